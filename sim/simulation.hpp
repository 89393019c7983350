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
#include <cstdint>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "sim/injected_delays.hpp"
#include "sim/interlocking.hpp"
#include "sim/sim_result.hpp"

namespace knockon {

struct SimOptions {
    RouteOrder route_order = RouteOrder::timetable;
    double sample_interval = 0.0;   // trajectory samples every this many seconds; 0 = none
    RunOptions run;
    std::uint64_t max_events = 200'000'000;   // a guard: more means a bug, reported, never a hang
};

// The static part of a simulation, built once from the plan and shared by every simulated day.
class SimModel {
public:
    SimModel(const Infrastructure& infra, const std::vector<TrainPlan>& plan);

    struct Route {
        std::string entry_signal, exit_signal;
        double s_entry = 0.0;
        double authority_end = 0.0;    // where a train may run to when this is the last route set
        double warning_point = 0.0;
        double read_point = 0.0;       // from here the driver can read the entry signal's aspect
        int aspect_cap = 2;
        long after_stop = -1;          // timing point of a planned stop before the signal, else -1
        std::vector<std::uint32_t> sections;   // global section indices, body and overlap
    };
    struct Train {
        const TrainPlan* plan = nullptr;
        std::vector<Route> routes;
        std::vector<std::uint32_t> section_index;   // per path section: global index
        // Per planned leg and grid point j: the largest s_i + D(v_i) over i <= j, where D is a
        // braking distance on the safe side.  A train following the leg as planned with its
        // authority ending at E need not leave the plan before the first point where this
        // exceeds E: up to there the planned motion stands, and the engine integrates nothing.
        std::vector<std::vector<double>> leg_reach;
    };

    const Infrastructure& infrastructure() const { return infra_; }
    const std::vector<Train>& trains() const { return trains_; }
    const std::vector<std::string>& section_names() const { return section_names_; }
    // Trains per section in planned order (by planned blocking start).
    const std::vector<std::vector<std::uint32_t>>& planned_order() const { return planned_order_; }
    // Consecutive train pairs of the plan with their buffer on the critical section, to measure
    // how much of each buffer the simulated days use.
    struct BufferPair {
        std::uint32_t leader = 0, follower = 0, section = 0;   // section: global index
        std::string line_section;
        double planned_buffer = 0.0;
    };
    const std::vector<BufferPair>& buffer_pairs() const { return buffer_pairs_; }

private:
    const Infrastructure& infra_;
    std::vector<Train> trains_;
    std::vector<std::string> section_names_;
    std::vector<std::vector<std::uint32_t>> planned_order_;
    std::vector<BufferPair> buffer_pairs_;
};

SimResult simulate_day(const SimModel& model, const InjectedDelays& delays, const SimOptions& options);

}  // namespace knockon
