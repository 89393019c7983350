#pragma once
// Running-time calculation: integrates the train's motion along its path with tractive effort,
// Davis resistance, gradient, static speed limits (raised only once the tail has left a lower
// limit) and braking curves to lower limits and to a stop.
//
// Method: on a uniform distance grid, a backward pass builds the braking envelope (limits and
// the target), then a forward pass accelerates under it; speed is integrated in v^2 over
// distance (exact for piecewise-constant acceleration), time from dt = 2 ds / (v0 + v1).  Full
// cells that accelerate (or lose speed on a climb) under full power from 1 m/s up are read off
// the type's full-power curve for the cell's gradient (models/full_power_curve.hpp); the rest are
// integrated by Motion::step_w (models/motion.hpp).
#include <cstdint>
#include <optional>
#include <stdexcept>
#include <vector>

#include "models/path.hpp"
#include "models/sorted_index.hpp"
#include "models/train_type.hpp"

namespace knockon {

// The train cannot make the run: it loses all speed on a climb (or cannot start) where the
// target is still ahead.  Where along the path, and the forces at standstill there, so that the
// caller can say where on the line and what is missing.
struct StallError : std::runtime_error {
    StallError(double s, double gradient, double tractive, double resistance, double gradient_force);
    double s;                  // along the path [m]
    double gradient;           // met there (positive climbing)
    double tractive, resistance, gradient_force;   // at standstill [N]
};

struct RunOptions {
    double step = 2.0;   // distance grid [m]: 2 m keeps timing points within ~0.02 s of a 1 m grid
    // Slow running (a primary delay): over [slow_from, slow_to) the speed limits are scaled by
    // slow_factor in (0, 1].
    double slow_from = 0.0, slow_to = 0.0, slow_factor = 1.0;
};

// Speed and time over distance for one leg of a run; t is relative to the leg's start.
// Point 0 is at s0, point i >= 1 at origin + (base + i) * step, the last one at s_end exactly.
// A run over a whole grid has origin = s0 and base = 0 (points s0 + i*step); a run started
// part-way along a grid (LegGrid) keeps that grid's points, its first cell shortened.
struct Trajectory {
    double s0 = 0.0;
    double step = 1.0;
    std::vector<double> v;   // [m/s] at each point
    std::vector<double> t;   // [s]  time at which the head reaches that point
    double s_end = 0.0;
    double origin = 0.0;
    std::size_t base = 0;
    SortedIndex time_index;  // over t, for position_at; built by the integration
    // Points 0..settled are the same for any end further on (same grid, start and options): the
    // braking for the stop at s_end, and the last cell's length, touch only points beyond.
    std::size_t settled = 0;

    double point(std::size_t i) const;    // s of point i

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

// Values over consecutive indices stored as runs: the value at i is that of the last run
// starting at or before i.  Speed limits and gradients change a few times along a leg of
// thousands of grid points.
struct StepRuns {
    std::vector<std::uint32_t> first;
    std::vector<double> value;
    void assign(const std::vector<double>& values, std::size_t n);   // the first n values
    void expand(std::size_t from, std::size_t count, double* out) const;   // out[k] = value at from + k
};

// The distance grid of one planned leg with its static profile: points s0 + i*step (the last at
// s_end), each point's static limit (tail rule, capped by the type's maximum speed) and each
// cell's gradient.  A motion integrated again from anywhere on the leg on this grid meets the
// same points, limits and gradients as the leg; once it has the leg's speed at a point, it runs
// exactly as the leg from there on (the integration is a function of speed and place alone).
struct LegGrid {
    double s0 = 0.0, step = 1.0, s_end = 0.0;
    std::size_t cells = 0;
    StepRuns limit;      // per point [m/s]
    StepRuns gradient;   // per cell (positive climbing)
    // Per cell: 1 where its gradient holds for at least kCurveStretch along the path, so that
    // reading accelerating cells off a full-power curve pays for sampling it; else 0.
    StepRuns on_curve;
    static constexpr double kCurveStretch = 500.0;   // [m]
    double at(std::size_t i) const { return i >= cells ? s_end : s0 + static_cast<double>(i) * step; }
};

LegGrid make_leg_grid(const TrainType& type, const TrainPath& path, double s_start, double s_end,
                      const RunOptions& options = {});

// Where a motion integrated on a leg's grid may hand over to the leg's planned motion.
struct Rejoin {
    const Trajectory* leg = nullptr;   // run over the whole of the same LegGrid
    double after = 0.0;                // only at grid points at or beyond this [m]
    double before = 0.0;               // and short of this [m]
};

// The fastest run from (s_start, v_start) to s_end, both within the grid, on the grid's points
// (the first cell shortened to start at s_start, the last to end at s_end); slow running as in
// `options` (its step is the grid's).  With a rejoin, the run ends at the first grid point
// in [rejoin.after, rejoin.before), other than its last, where its speed equals the leg's: the index of that
// point on the grid is returned (else -1), and from there the leg's motion is the run's.
long run_on_grid_into(Trajectory& out, const TrainType& type, const LegGrid& grid, double s_start, double v_start,
                      double s_end, bool stop_at_end, const RunOptions& options = {},
                      const Rejoin* rejoin = nullptr);

// Effective deceleration of service braking at speed v on gradient g (positive = climbing).
double braking_deceleration(const TrainType& type, double v, double gradient);
// Distance to stop from speed v: v * brake_delay + braking distance on constant gradient g.
double stopping_distance(const TrainType& type, double v, double gradient);
// Distance to stop from v short of s_target on `path`: stopping_distance on the steepest fall
// over the whole braking distance in rear of s_target, and at least over [s_from, s_target]
// (where the driver is first warned).  The one rule for a braking distance on a gradient profile.
double stopping_distance_before(const TrainType& type, double v, const TrainPath& path, double s_from,
                                double s_target);
// Speed at which tractive effort equals Davis resistance plus gradient force (level when 0).
double balancing_speed(const TrainType& type, double gradient = 0.0);

}  // namespace knockon
