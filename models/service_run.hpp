#pragma once
// The planned run of one service: its path, its motion leg by leg (stop to stop), and its
// scheduled and planned times at every call.
//
// Driving rule (the same in `plan` and in `simulate`): a train runs at the performance of its
// type and waits at each stop until its scheduled departure and its minimum dwell are both
// over, so the running-time supplement is recovered at stops.  Times the timetable omits are
// constructed from the scheduled running time (technical minimum plus supplement), rounded up
// to the timetable's grid.
#include <limits>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/service_paths.hpp"
#include "models/path.hpp"
#include "models/running_time.hpp"
#include "models/timetable.hpp"
#include "models/train_type.hpp"

namespace knockon {

inline constexpr double kNoTime = std::numeric_limits<double>::quiet_NaN();

struct PlannedCall {
    std::size_t call = 0;
    std::string station;
    double s = 0.0;
    bool stops = true;
    // For passes, arrival and departure are the pass time.  Origin arrivals are kNoTime.
    double scheduled_arrival = kNoTime, scheduled_departure = kNoTime;
    double planned_arrival = kNoTime, planned_departure = kNoTime;
    // From the previous call's departure to this call's arrival [s]; 0 at the first call.
    double technical_running = 0.0;   // fastest possible
    double scheduled_running = 0.0;   // technical plus supplement
    double timetabled_running = 0.0;  // what the timetable allows
};

struct RunLeg {
    Trajectory trajectory;
    double start_time = 0.0;   // absolute departure at the leg's start [s]
    LegGrid grid;              // its grid and static profile, to integrate again on the same points
};

struct ServiceRun {
    const Service* service = nullptr;
    const TrainType* type = nullptr;
    TrainPath path;
    std::vector<RunLeg> legs;
    std::vector<PlannedCall> calls;
    double appear_time = 0.0;   // placed at its origin, or its head crosses the line end
    double vanish_time = 0.0;   // leaves the model: after the terminus dwell, or tail past the line end
    double entry_speed = 0.0;   // at the line end where it enters, when it comes from beyond [m/s]
    double exit_speed = 0.0;    // at the far line end, when it runs on [m/s]

    // First time the head is at s, and the last time (they differ at stops).  Before the start
    // of the path: the appear time / departure; beyond the end: extrapolated at exit speed when
    // the train runs on, else the vanish time.
    double head_reach(double s) const;
    double head_leave(double s) const;
    double tail_clear(double s) const { return head_leave(s + type->length); }
    // Speed of the planned motion when the head passes s (0 at stops) [m/s].
    double speed_at(double s) const;
};

ServiceRun plan_service(const ServicePaths& paths, const Service& service, const TrainType& type,
                        double rounding, const RunOptions& options = {});

// The least time a train stands at a stop: the call's minimum dwell, else its type's.
double min_dwell_of(const Call& call, const TrainType& type);

// Rounds t up to the next multiple of grid (grid <= 0: unchanged), ignoring sub-millisecond noise.
double round_up_to_grid(double t, double grid);

}  // namespace knockon
