#pragma once
// The timetable: services, their calls at stations, expanded from clock-face patterns.
#include <cstdint>
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"

namespace knockon {

// One timing point of a service.  Times are seconds after midnight of the simulated day.
// A call either stops (dwell) or passes.  Omitted times are constructed from the scheduled
// running time (technical minimum plus supplement), see plan.
struct Call {
    std::string station;                 // station id
    std::string track;                   // track used through the station; empty = main track
    bool stops = true;
    std::optional<double> arrival;       // [s]; only for stops
    std::optional<double> departure;     // [s]; for stops; for passes the pass time
    std::optional<double> min_dwell;     // [s]; default from the train type
};

// Who a service is for its primary-delay draws (sim/delay_draws): a name and, for a run of a repeat
// pattern, which run it is.  Unlike the id of a run ("S1-0630"), neither changes when the service
// is retimed, so a retimed train keeps its draws (common random numbers across timetable variants).
struct DrawIdentity {
    std::string name;                          // the service's draw_key, else its (pattern's) id
    std::optional<std::uint32_t> occurrence;   // a repeat's run: 0, 1, 2, ... in time order
};

struct Service {
    std::string id;                      // unique; a repeat's runs get "-HHMM" of their first time
    DrawIdentity draw;                   // empty name: the id (services made in code)
    std::string train_type;
    std::string category;                // free label used for grouping results (e.g. "stopping")
    // What a minute of this train's delay counts for when the dispatcher chooses where two
    // opposing trains cross (sim/dispatch.hpp): the scenario's weight for its category, else 1.
    double dispatch_weight = 1.0;
    Direction direction = Direction::up;
    // Entering from beyond the modelled area: the train appears at the line end, running at
    // entry_speed (default: the line speed there, capped by the train's max speed).
    bool enters_at_edge = false;
    std::optional<double> entry_speed;   // [m/s]
    bool leaves_at_edge = false;         // runs on beyond the far line end
    // Starts where its set reversed as the service before it (a network service that reverses
    // runs as one service per heading): it does not enter, so draws no entry delay.
    bool continues = false;
    std::vector<Call> calls;             // in running order; at least one

    const std::string& draw_name() const { return draw.name.empty() ? id : draw.name; }
    // Index of the timetable entry it was written as (the runs of a repeat pattern share it):
    // where messages about it point (Scenario::where).
    std::size_t entry = 0;
    // Index of its first call among the entry's calls as written (a network service that
    // reverses runs as one service per heading, the later ones starting at a reversal).
    std::size_t first_call = 0;
};

// Links between services (models/links): a set that forms a later service, a connection, a crew
// working one service and then another.
enum class LinkKind { turnaround, connection, crew };
// A link as the timetable gives it, services by id.
struct ServiceLink {
    LinkKind kind = LinkKind::turnaround;
    std::string from, to;      // the earlier service (incoming set, feeder, crew's first) and the later
    std::string station;       // connection: where passengers change; otherwise empty (ends and starts)
    double min_time = 0.0;     // turnaround, transfer or crew change time [s]
    double max_wait = 0.0;     // connection: the longest the connecting service waits beyond its departure [s]
};

struct Timetable {
    std::vector<Service> services;       // expanded: one entry per train run
    double rounding = 30.0;              // constructed times are rounded up to this grid [s]
    std::vector<ServiceLink> links;      // between expanded services, by id
};

}  // namespace knockon
