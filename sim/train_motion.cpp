#include "sim/train_motion.hpp"

#include <algorithm>

namespace knockon::day {

TrainMotion::TrainMotion(const SimModel& model, const InjectedDelays& delays, const RunOptions& run,
                         double sample_interval, std::vector<TrainState>& states, DayEvents& events,
                         DayRecords& records)
    : model_(model),
      run_options_(run),
      sample_interval_(sample_interval),
      st_(states.data()),
      events_(events),
      records_(records) {
    for (std::uint32_t t = 0; t < model.trains().size(); ++t) {
        const ServiceRun& run = run_of(t);
        // Running-time extensions become slower running over the stretch to the next timing
        // point: limits scaled by T / (T + extra), exact where the train would cruise.
        slow_.emplace_back();
        for (std::size_t k = 0; k + 1 < run.calls.size(); ++k) {
            const double extra = delay_of(delays.running, t, run.calls[k].call);
            const double T = run.calls[k + 1].technical_running;
            if (extra > 0.0 && T > 0.0) slow_[t].push_back({run.calls[k].s, run.calls[k + 1].s, T / (T + extra)});
        }
        if (run.path.ends_at_edge && !run.calls.empty()) {
            const double extra = delay_of(delays.running, t, run.calls.back().call);
            const double T = run.legs.back().trajectory.duration();   // to the line end, roughly
            if (extra > 0.0 && T > 0.0) slow_[t].push_back({run.calls.back().s, run.path.length + 1.0, T / (T + extra)});
        }
    }
}

double TrainMotion::next_stop_s(std::uint32_t t, double from) const {
    const ServiceRun& run = run_of(t);
    for (const PlannedCall& c : run.calls)
        if (c.stops && c.s > from + kEps) return c.s;
    return run.path.ends_at_edge ? kInf : run.path.length;
}

void TrainMotion::set_brake_point(std::uint32_t t) {
    TrainState& s = st_[t];
    const double limit = slow_[t].empty() ? s.eoa : std::min(s.eoa, next_slow_start(t, head_position(t)));
    const SimModel::Train::BrakePoint b = model_.trains()[t].brake_point(static_cast<std::size_t>(s.leg), limit);
    s.brake_from = b.s;
    s.brake_time = b.t;
    s.brake_index = b.index;
}

void TrainMotion::enter(std::uint32_t t) {
    TrainState& s = st_[t];
    events_.cancel_motion(t);
    if (!start_leg(t, 0.0)) {
        s.leg = -1;
        s.join_leg = -1;
        ++s.own_version;
        s.own_target = kNoTime;
        s.own.s0 = s.own.s_end = s.own.origin = 0.0;
        s.own.base = 0;
        s.own.v.assign(1, run_of(t).entry_speed);   // keeps the buffers
        s.own.t.assign(1, 0.0);
        s.own.time_index.clear();
        s.free_end = false;
    }
}

void TrainMotion::come_to_stand(std::uint32_t t) {
    TrainState& s = st_[t];
    sample_until(t, now());
    s.s_stand = traj(t).s_end;
    s.leg = -1;
    s.phase = Phase::standing;
    s.stand_since = now();
}

void TrainMotion::sample_until(std::uint32_t t, double until) {
    if (sample_interval_ <= 0.0) return;
    TrainState& s = st_[t];
    const TrainPath& path = run_of(t).path;
    double start = s.phase == Phase::moving ? s.t0 : s.stand_since;
    double dt = sample_interval_;
    double first = std::max(start, s.last_sample + dt);
    first = std::ceil(first / dt - 1e-9) * dt;
    auto add = [&](double time) {
        double pos, v;
        if (s.phase == Phase::moving) {
            double rel = time - s.t0;
            if (s.free_end && rel > traj(t).duration()) {
                v = traj(t).v.back();
                pos = traj(t).s_end + (rel - traj(t).duration()) * v;
            } else {
                pos = traj(t).position_at(rel);
                v = traj(t).speed_at(pos);
            }
        } else {
            pos = s.s_stand;
            v = 0.0;
        }
        if (pos > path.length + kEps && !path.ends_at_edge) return;
        double x = pos <= path.length ? path.chainage_at(pos) : path.chainage_at(path.length);
        records_.add_sample({t, time, pos, x, v});
        s.last_sample = time;
    };
    for (double time = first; time <= until + 1e-9; time += dt) add(time);
}

long TrainMotion::leg_holding(std::uint32_t t, double from, double to) const {
    const ServiceRun& run = run_of(t);
    for (std::size_t k = 0; k < run.legs.size(); ++k) {
        const Trajectory& lt = run.legs[k].trajectory;
        if (from >= lt.s0 - kEps && to <= lt.s_end + kEps) return static_cast<long>(k);
    }
    return -1;
}

bool TrainMotion::join_leg(std::uint32_t t) {
    // The integrated motion has reached the planned leg's speed at one of its grid points: from
    // there the leg's motion is the train's, shifted in time.
    TrainState& s = st_[t];
    const ServiceRun& run = run_of(t);
    const std::size_t k = static_cast<std::size_t>(s.join_leg);
    sample_until(t, now());
    s.t0 += s.own.duration() - run.legs[k].trajectory.t[s.join_point];
    s.leg = static_cast<long>(k);
    s.leg_scheduled = false;
    s.join_leg = -1;
    s.free_end = k + 1 == run.legs.size() && run.path.ends_at_edge;
    return replan(t);
}

bool TrainMotion::start_leg(std::uint32_t t, double s_now) {
    // The planned leg that starts here: the train follows it until it must brake (set_brake_point).
    TrainState& s = st_[t];
    const ServiceRun& run = run_of(t);
    for (std::size_t k = 0; k < run.legs.size(); ++k) {
        const Trajectory& lt = run.legs[k].trajectory;
        if (std::fabs(lt.s0 - s_now) > kEps) continue;
        s.leg = static_cast<long>(k);
        s.leg_scheduled = false;
        s.t0 = now();
        s.free_end = k + 1 == run.legs.size() && run.path.ends_at_edge;
        s.phase = Phase::moving;
        return true;
    }
    return false;
}

bool TrainMotion::replan(std::uint32_t t, bool leave_leg) {
    TrainState& s = st_[t];
    const ServiceRun& run = run_of(t);
    if (s.phase == Phase::moving && s.leg >= 0 && !leave_leg) {
        set_brake_point(t);
        // (compared in time, not place: the leg's time at its brake point is known, the head
        // position would need a look-up in the leg's long motion)
        if (std::isinf(s.brake_from) || s.t0 + s.brake_time > now()) {
            // Still free to run the plan: the points ahead stand (once scheduled for this leg),
            // only the brake point moves.
            // (the points go into the queue after the brake point: they are of other phases, so
            // the order of pushing them changes nothing)
            const bool reschedule = !s.leg_scheduled;
            if (reschedule) {
                events_.cancel_motion(t);
                s.leg_scheduled = true;
            } else {
                events_.cancel_brake_point(t);
            }
            // (time_at_head, without a look-up in the leg's motion)
            if (const auto e = ends(t); s.brake_from < e.s_end)
                events_.push(s.brake_from <= e.s0 + kEps ? now() : s.t0 + s.brake_time, kBrakePoint, t);
            return reschedule;
        }
    }
    if (s.phase == Phase::moving && s.leg < 0 && !leave_leg && motion_stands(t)) return false;
    // Where the new motion starts: at a brake event, exactly at the point the current motion
    // hands over (its time, place and speed there); otherwise where the head is now.
    double s_now, v_now, t_start = now();
    if (s.phase == Phase::moving && leave_leg) {
        const Trajectory& from = traj(t);
        const std::size_t i = s.leg >= 0 ? s.brake_index : from.settled;
        s_now = from.point(i);
        v_now = from.v[i];
        t_start = s.t0 + from.t[i];
    } else {
        s_now = head_position(t);
        v_now = head_speed(t);
    }
    sample_until(t, now());

    double target = motion_target(t, s_now);
    bool free = false;
    if (std::isinf(target)) {
        target = run.path.length;
        free = true;
    }
    events_.cancel_motion(t);
    if (target - s_now < 1e-3 && v_now <= 1e-6) {
        s.phase = Phase::standing;
        s.s_stand = s_now;
        s.stand_since = now();
        return true;
    }
    RunOptions ro = run_options_;
    for (const SlowStretch& sl : slow_[t])
        if (sl.to > s_now + kEps && sl.from < target) {
            ro.slow_from = sl.from;
            ro.slow_to = sl.to;
            ro.slow_factor = sl.factor;
            break;
        }
    s.leg = -1;
    s.join_leg = -1;
    s.own_target = free ? kNoTime : target;
    const double end = std::max(target, s_now);
    // On a planned leg the motion is integrated on the leg's grid, and hands back to the leg
    // where it regains the leg's speed, past the slow running it integrates and short of
    // braking for the authority or the next slow running: a hindered train then costs
    // integration only while it runs differently from its plan.
    const long k = leg_holding(t, s_now, end);
    if (k >= 0) {
        const RunLeg& leg = run.legs[static_cast<std::size_t>(k)];
        const double after = ro.slow_factor < 1.0 ? ro.slow_to : s_now;
        const double before =
            brake_point(t, static_cast<std::size_t>(k), std::min(s.eoa, next_slow_start(t, after)));
        const Rejoin rejoin{&leg.trajectory, after, before};
        ++s.own_version;
        const long j = run_on_grid_into(s.own, *run.type, leg.grid, s_now, v_now, end, !free, ro, &rejoin);
        if (j >= 0) {
            s.join_leg = k;
            s.join_point = static_cast<std::size_t>(j);
        }
    } else {
        ++s.own_version;
        run_leg_into(s.own, *run.type, run.path, s_now, v_now, end, !free, ro);
    }
    s.t0 = t_start;
    s.free_end = free && s.join_leg < 0;
    s.phase = Phase::moving;
    return true;
}

bool TrainMotion::motion_stands(std::uint32_t t) {
    // The authority grew while the train runs an integrated motion braking for its old end.
    TrainState& s = st_[t];
    if (std::isnan(s.own_target)) return false;
    const double head = head_position(t);
    if (motion_target(t, head) == s.own_target) return true;        // it stops at the same place anyway
    if (s.join_leg >= 0) return true;                // it rejoins its leg first, which reads the authority
    const Trajectory& own = s.own;
    if (!(own.point(own.settled) > head + kPositionTolerance)) return false;
    // Up to the settled point the motion is the same for any further end: integrate there.
    events_.cancel_brake_point(t);
    events_.push(s.t0 + own.t[own.settled], kBrakePoint, t);
    return true;
}

}  // namespace knockon::day
