#pragma once
// A network timetable as the services planning and simulation work on: each repeat pattern
// expanded into its runs (models/repeat_runs), and each run split at its reversals into one
// service per heading, since a train path runs in one heading (models/network/train_path).  The
// parts of a reversing run are joined by turnaround links: the set stays on its platform track
// and the return working leaves at the reversal's departure, no sooner than its arrival plus the
// minimum turnaround (min_turnaround, else the call's minimum dwell, else its type's).
#include <vector>

#include "models/network/graph.hpp"
#include "models/network/timetable.hpp"
#include "models/timetable.hpp"
#include "models/train_type.hpp"

namespace knockon::net {

struct NetworkRuns {
    std::vector<Service> services;        // Timetable::services
    std::vector<NetworkService> runs;     // per service: its part of the network service, one heading
    std::vector<ServiceLink> links;       // a turnaround at each reversal
};

// Needs a timetable check_timetable found no problem in (names resolve, paths are found).  A
// part after a reversal is named "<run id>.2", ".3", ...; its primary delays are drawn by a key
// of its own ("<draw name>.2"), and it draws no entry delay (it does not enter: the set is there).
// A service's direction is the heading it starts in (forward: up).
NetworkRuns network_runs(const NetworkGraph& graph, const NetworkTimetable& timetable,
                         const std::vector<TrainType>& types);

}  // namespace knockon::net
