#pragma once
// One simulated day of signalled operation, event by event.
//
// Trains run the motion of the running-time calculation (models/running_time) towards the
// nearest of: their next stop, the end of the movement authority their driver knows, the end
// of their path.  The engine schedules only the next point of interest of each kind (section
// boundary, tail clearing, signal sighting point, signal, timing point, route request, stop)
// and recomputes the motion when the authority grows.
//
// Interlocking: a train asks for each route ahead of its approach, so that with no
// disturbance the route is set exactly when blocking time theory says it must be (warning point
// minus sight-and-reaction and set-up time; for a train standing at a stop, its departure
// minus those times).  A route is granted when all its sections (with overlap) are free and
// the order policy allows; set-up takes the interlocking's set-up time; each section is
// released the release time after the tail clears it.
//
// Signals and drivers: the aspect a train sees at a signal counts the consecutive routes set
// for it from that signal on, capped by the aspect system (2-aspect: 1, 3-aspect: 2,
// 4-aspect: 3, cab signalling: no cap); an aspect of k gives authority to the k-th signal
// ahead.  A driver learns an aspect when the signal is in sight (its sighting distance; for
// 2-aspect, the sighting point of its distant signal; cab signalling: always) and the
// sight-and-reaction time after the route was set, whichever is later.
//
// The event loop (sim/simulation.cpp) hands each rule to its piece: the train's motion
// (sim/train_motion), movement authority (sim/movement_authority), route requests
// (sim/route_requests), links (sim/day_links) and the day's records (sim/day_records).
#include <cstdint>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "sim/injected_delays.hpp"
#include "sim/interlocking.hpp"
#include "sim/sim_model.hpp"
#include "sim/sim_result.hpp"

namespace knockon {

struct SimOptions {
    RouteOrder route_order = RouteOrder::timetable;
    double sample_interval = 0.0;   // trajectory samples every this many seconds; 0 = none
    RunOptions run;
    std::uint64_t max_events = 200'000'000;   // a guard: more means a bug, reported, never a hang
};

SimResult simulate_day(const SimModel& model, const InjectedDelays& delays, const SimOptions& options);

}  // namespace knockon
