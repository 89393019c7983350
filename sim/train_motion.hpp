#pragma once
// Each train's motion through a simulated day: the planned leg it follows (its motion read from
// the plan, no integration) while its authority allows, else a motion integrated from its state
// that brakes for the end of the authority, runs slower where a running-time extension was
// drawn, and hands back to the planned leg where it regains the leg's speed; where the head is,
// how fast it runs, and when it reaches a place.
//
// Why a class of its own: the motion knows the train's state and the authority's end, not why
// the authority grows (sim/movement_authority) nor what the day records of it (sim/day_records).
// The questions asked several times per event (head position, time at a place) are inline here:
// the engine asks them on its hot path.
#include <cmath>
#include <cstdint>
#include <vector>

#include "sim/day_records.hpp"
#include "sim/day_state.hpp"

namespace knockon::day {

class TrainMotion {
public:
    TrainMotion(const SimModel& model, const InjectedDelays& delays, const RunOptions& run, double sample_interval,
                std::vector<TrainState>& states, DayEvents& events, DayRecords& records);

    const Trajectory& traj(std::uint32_t t) const {
        const TrainState& s = st_[t];
        return s.leg >= 0 ? run_of(t).legs[static_cast<std::size_t>(s.leg)].trajectory : s.own;
    }
    // The current motion's ends, read from the model for a planned leg (its motion is cold).
    SimModel::Train::LegEnds ends(std::uint32_t t) const {
        const TrainState& s = st_[t];
        if (s.leg >= 0) return model_.trains()[t].leg_ends[static_cast<std::size_t>(s.leg)];
        return {s.own.s0, s.own.s_end, s.own.duration(), s.own.v.back()};
    }
    double head_position(std::uint32_t t) const;
    double head_speed(std::uint32_t t) const;
    double time_at_head(std::uint32_t t, double s) const;   // NaN: not on the current motion
    // The same for a fixed place timed on the planned legs, straight from the model while the
    // train runs its planned leg.
    double time_at_place(std::uint32_t t, const Place& at) const {
        const TrainState& st = st_[t];
        if (st.phase == Phase::moving && st.leg >= 0 && at.leg == st.leg) return st.t0 + at.t;
        return time_at_head(t, at.s);
    }
    // The first stop beyond s, or the path's end (infinity: it runs out over the line end).
    double next_stop_s(std::uint32_t t, double s) const;
    // Where a motion from s must end: the next stop, the end of authority or the path's end
    // (infinity: it runs out over the line end).
    double motion_target(std::uint32_t t, double s) const {
        const ServiceRun& run = run_of(t);
        return std::min({next_stop_s(t, s - kEps), st_[t].eoa, run.path.ends_at_edge ? kInf : run.path.length});
    }

    // The train enters over the line end on its planned first leg (or, with none starting
    // there, at its entry speed with a motion still to compute).
    void enter(std::uint32_t t);
    // The planned leg that starts at s_now, if any: the train follows it (until it must brake).
    bool start_leg(std::uint32_t t, double s_now);
    // Recomputes the motion after the authority or the state changed.  A train on a planned leg
    // stays on it while the authority allows (leave_leg: it must not).  True when the train's
    // points along the way must be scheduled again (the motion changed).
    bool replan(std::uint32_t t, bool leave_leg = false);
    // The integrated motion is back on its planned leg's speed: it follows the leg again.
    // True as replan.
    bool join_leg(std::uint32_t t);
    // The motion has ended with the head at its end: the train stands there.
    void come_to_stand(std::uint32_t t);
    // Trajectory samples of train t up to `until` (when asked for).
    void sample_until(std::uint32_t t, double until);

private:
    // A stretch run slower by an injected running-time extension.
    struct SlowStretch {
        double from, to, factor;
    };

    const ServiceRun& run_of(std::uint32_t t) const { return model_.trains()[t].plan->run; }
    double now() const { return events_.now(); }
    double brake_point(std::uint32_t t, std::size_t k, double eoa) const {
        return model_.trains()[t].brake_point(k, eoa).s;
    }
    // Where the next slow running begins with the head beyond s (infinity: none).
    double next_slow_start(std::uint32_t t, double s) const {
        double from = kInf;
        for (const SlowStretch& sl : slow_[t])
            if (sl.to > s + kEps) from = std::min(from, sl.from);
        return from;
    }
    // A train follows its planned leg until it must brake for the end of its authority or for
    // slow running ahead (braking to a stop there: on the safe side).
    void set_brake_point(std::uint32_t t);
    // The planned leg that holds [from, to], or -1.
    long leg_holding(std::uint32_t t, double from, double to) const;
    // An integrated motion that the authority just extended stands as it is for now (same stop,
    // or a rejoin or a brake event comes first): nothing to integrate yet.
    bool motion_stands(std::uint32_t t);

    const SimModel& model_;
    const RunOptions& run_options_;
    const double sample_interval_;
    TrainState* const st_;   // the engine's train states, one per train for the whole day
    DayEvents& events_;
    DayRecords& records_;
    std::vector<std::vector<SlowStretch>> slow_;     // [train]
};

inline double TrainMotion::head_position(std::uint32_t t) const {
    const TrainState& s = st_[t];
    if (s.phase != Phase::moving) return s.s_stand;
    auto& m = s.head_memo;
    const double now = events_.now();
    if (m.now == now && m.t0 == s.t0 && m.leg == s.leg && m.own_version == s.own_version && m.free_end == s.free_end)
        return m.position;
    double position;
    const double dt = now - s.t0;
    if (traj(t).v.size() <= 1)
        position = traj(t).s0;
    else if (const auto e = ends(t); s.free_end && dt > e.duration)
        position = e.s_end + (dt - e.duration) * e.v_end;
    else
        position = traj(t).position_at(dt);
    m.now = now;
    m.t0 = s.t0;
    m.leg = s.leg;
    m.own_version = s.own_version;
    m.free_end = s.free_end;
    m.position = position;
    return position;
}

inline double TrainMotion::head_speed(std::uint32_t t) const {
    const TrainState& s = st_[t];
    if (s.phase != Phase::moving) return 0.0;
    double pos = head_position(t);
    if (pos >= traj(t).s_end || traj(t).v.size() <= 1) return traj(t).v.back();
    return traj(t).speed_at(pos);
}

inline double TrainMotion::time_at_head(std::uint32_t t, double p) const {
    const TrainState& s = st_[t];
    const double now = events_.now();
    if (s.phase == Phase::standing) return p <= s.s_stand + kEps ? now : kNoTime;
    if (s.phase != Phase::moving) return kNoTime;
    const auto e = ends(t);
    if (p <= e.s0 + kEps) return now;
    if (p <= e.s_end + kEps) return s.t0 + traj(t).time_at(std::min(p, e.s_end));
    if (s.free_end) return s.t0 + e.duration + (p - e.s_end) / std::max(e.v_end, 0.1);
    return kNoTime;
}

}  // namespace knockon::day
