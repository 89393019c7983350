#pragma once
// Links between services: a train set that forms a later service after a turnaround, a
// connection passengers make from a feeder to a connecting service, and a crew that works one
// service and then another.  Each keeps the later service from leaving before the earlier one
// has arrived plus a minimum time; a connection only up to a maximum wait.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/service_paths.hpp"
#include "models/timetable.hpp"

namespace knockon {

struct ServiceRun;

const char* to_string(LinkKind k);            // "turnaround", "connection", "crew"
std::optional<LinkKind> link_kind_from_name(const std::string& name);   // back from to_string; nullopt: none
const char* minimum_name(LinkKind k);         // "turnaround", "transfer", "crew change"

// A link resolved against the plan: the trains (indices into the plan, the same as into
// Timetable::services), the timing points it joins and the planned times on either side.
struct LinkPlan {
    std::size_t link = 0;                   // index into Timetable::links
    LinkKind kind = LinkKind::turnaround;
    std::size_t from = 0, to = 0;           // trains
    std::size_t from_call = 0, to_call = 0; // timing points (ServiceRun::calls) of each
    double min_time = 0.0, max_wait = 0.0;  // [s]
    double arrival = 0.0;     // the earlier train's planned arrival at from_call [s]
    double departure = 0.0;   // the later train's planned departure at to_call [s]
    // What the timetable leaves beyond the minimum time: negative means it cannot be kept.
    double buffer() const { return departure - (arrival + min_time); }
    // The latest the later train waits for the earlier (connections; infinity otherwise) [s].
    double wait_until() const;
};

// Timing points a link joins, in Service::calls: the earlier service's call it arrives at and the
// later one's call it departs from.  Nothing when the services cannot be linked so (the reader
// reports why, see link_problem).
struct LinkCalls {
    std::size_t from_call = 0, to_call = 0;
};
std::optional<LinkCalls> link_calls(const ServiceLink& link, const Service& from, const Service& to);

// Why two services cannot be linked as asked, in a sentence naming both, or nothing: the earlier
// must end on the line (turnaround, crew) or stop at the station with an arrival (connection), the
// later start on the line or stop there with a departure; a turnaround needs the later service to
// start on the platform track the earlier one ends on (a reversal needs a track both directions
// use).  `paths` lays the paths for the track check.
std::optional<std::string> link_problem(const ServicePaths& paths, const ServiceLink& link, const Service& from,
                                        const Service& to);

}  // namespace knockon
