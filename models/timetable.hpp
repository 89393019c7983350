#pragma once
// The timetable: services, their calls at stations, expanded from clock-face patterns.
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

struct Service {
    std::string id;
    std::string train_type;
    std::string category;                // free label used for grouping results (e.g. "stopping")
    Direction direction = Direction::up;
    // Entering from beyond the modelled area: the train appears at the line end, running at
    // entry_speed (default: the line speed there, capped by the train's max speed).
    bool enters_at_edge = false;
    std::optional<double> entry_speed;   // [m/s]
    bool leaves_at_edge = false;         // runs on beyond the far line end
    std::vector<Call> calls;             // in running order; at least one
    // Index of the timetable entry it was written as (the runs of a repeat pattern share it):
    // where messages about it point (Scenario::where).
    std::size_t entry = 0;
};

struct Timetable {
    std::vector<Service> services;       // expanded: one entry per train run
    double rounding = 30.0;              // constructed times are rounded up to this grid [s]
};

}  // namespace knockon
