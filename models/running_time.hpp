#pragma once
// Running-time calculation: integrates the train's motion along its path with tractive effort,
// Davis resistance, gradient, static speed limits (raised only once the tail has left a lower
// limit) and braking curves to lower limits and to a stop.
//
// Method: on a uniform distance grid, a backward pass builds the braking envelope (limits and
// the target), then a forward pass accelerates under it; speed is integrated in v^2 over
// distance (exact for piecewise-constant acceleration), time from dt = 2 ds / (v0 + v1).
#include <optional>
#include <vector>

#include "models/path.hpp"
#include "models/train_type.hpp"

namespace knockon {

struct RunOptions {
    double step = 2.0;   // distance grid [m]: 2 m keeps timing points within ~0.02 s of a 1 m grid
    // Slow running (a primary delay): over [slow_from, slow_to) the speed limits are scaled by
    // slow_factor in (0, 1].
    double slow_from = 0.0, slow_to = 0.0, slow_factor = 1.0;
};

// Speed and time over distance for one leg of a run; t is relative to the leg's start.
struct Trajectory {
    double s0 = 0.0;
    double step = 1.0;
    std::vector<double> v;   // [m/s] at s0 + i*step (last point at the leg end exactly)
    std::vector<double> t;   // [s]  time at which the head reaches that point
    double s_end = 0.0;

    double duration() const { return t.empty() ? 0.0 : t.back(); }
    double time_at(double s) const;       // head reaches s (clamped to the leg)
    double speed_at(double s) const;
    double position_at(double time) const;
};

// The fastest run from (s_start, v_start) to s_end, stopping there when stop_at_end, otherwise
// leaving at whatever speed the limits allow.
Trajectory run_leg(const TrainType& type, const TrainPath& path, double s_start, double v_start,
                   double s_end, bool stop_at_end, const RunOptions& options = {});

// The same, written into `out` so that its buffers are reused (the simulation's hot path).
void run_leg_into(Trajectory& out, const TrainType& type, const TrainPath& path, double s_start, double v_start,
                  double s_end, bool stop_at_end, const RunOptions& options = {});

// Effective deceleration of service braking at speed v on gradient g (positive = climbing).
double braking_deceleration(const TrainType& type, double v, double gradient);
// Distance to stop from speed v: v * brake_delay + braking distance on constant gradient g.
double stopping_distance(const TrainType& type, double v, double gradient);
// Speed at which tractive effort equals Davis resistance plus gradient force (level when 0).
double balancing_speed(const TrainType& type, double gradient = 0.0);

}  // namespace knockon
