#include "sim/route_requests.hpp"

#include <algorithm>
#include <cmath>

namespace knockon::day {

bool RouteRequests::due(std::uint32_t t, std::size_t i, SimTime time) {
    if (link_timed_stop(t, i) < 0) return true;
    // Timed before a link's earlier train arrived: ask now only if the links still let it go by
    // then (else later, or once that train arrives: DayLinks::arrive).
    const double when = desired_request_time(t, i);
    if (std::isnan(when)) return false;
    if (SimTime::from_seconds(when) > time) {
        events_.push(when, kRequest, t, static_cast<std::uint32_t>(i));
        return false;
    }
    return true;
}

double RouteRequests::desired_request_time(std::uint32_t t, std::size_t i) const {
    const SimModel::Route& r = train(t).routes[i];
    const TrainState& s = st_[t];
    // The route must be known by `when`: asked for setting plus reaction time earlier, counted
    // from `when`'s own tick, so that the driver learns it on the very tick the head reaches the
    // place timed by the same sum (a signal passed then is still read).
    auto ask_for = [&](double when) {
        if (std::isnan(when)) return kNoTime;   // not known yet (a link's earlier train to come)
        return SimTime::from_seconds(when).to_seconds() - (times_.sight_reaction + times_.route_setup);
    };
    // The departure from stop k, ready at `ready`, as the links there let it go (NaN: not known yet).
    auto leaves = [&](long k, double ready) {
        return train(t).links_in.empty() ? ready : links_.released(t, k, ready);
    };
    if (r.after_stop >= 0) {
        const PlannedCall& c = run_of(t).calls[r.after_stop];
        if (s.phase == Phase::standing && s.stop_call == r.after_stop) return ask_for(leaves(r.after_stop, s.ready_time));
        if (s.phase == Phase::moving && std::fabs(motion_.ends(t).s_end - c.s) < kEps && !s.free_end) {
            // Heading for that stop: ready when both the schedule and the dwell allow.
            const double arrival = s.t0 + motion_.ends(t).duration;
            return ask_for(
                leaves(r.after_stop, std::max(c.scheduled_departure, arrival + dwell_at(run_of(t), delays_, t, r.after_stop))));
        }
        if (s.next_call > static_cast<std::size_t>(r.after_stop)) return now();  // already left it
        return kNoTime;
    }
    if (r.stop_before_warning >= 0 && s.next_call <= static_cast<std::size_t>(r.stop_before_warning) + 1) {
        // The warning point lies beyond a stop the train stands at or heads for: forecast from its
        // departure there, as the plan times it from the planned departure.
        const long k = r.stop_before_warning;
        const PlannedCall& c = run_of(t).calls[k];
        // Where the warning point lies on the leg leaving that stop, it is timed as the engine
        // will time the head there (the departure's tick plus the place's time on the leg), so
        // the driver learns the route on the very tick the head passes the signal in rear, not
        // a tick after it (then unread: the train would brake for a route that was set in time).
        const Place& w = train(t).warnings[i];
        const bool on_leg_out = w.leg >= 0 && std::fabs(train(t).leg_ends[static_cast<std::size_t>(w.leg)].s0 - c.s) < kEps;
        auto after_departure = [&](double departure) {
            return on_leg_out ? SimTime::from_seconds(departure).to_seconds() + w.t : departure + r.warning_after_departure;
        };
        if (s.phase == Phase::standing && s.stop_call == k && !std::isnan(s.ready_time))
            return ask_for(after_departure(leaves(k, s.ready_time)));
        if (s.phase == Phase::moving && !s.free_end && std::fabs(motion_.ends(t).s_end - c.s) < kEps &&
            s.next_call == static_cast<std::size_t>(k)) {
            const double arrival = s.t0 + motion_.ends(t).duration;
            return ask_for(after_departure(leaves(k, std::max(c.scheduled_departure, arrival + dwell_at(run_of(t), delays_, t, k)))));
        }
    }
    if (s.phase == Phase::waiting) {
        // Not yet in the model: the planned approach (extrapolated beyond the line end) is the
        // best forecast of when it reaches the warning point.
        const ServiceRun& run = run_of(t);
        if (!run.path.starts_at_edge) return kNoTime;
        const double entry = entry_delay(delays_, t);
        // (on its first leg, timed as the engine will time the place: from the appearance's tick)
        const Place& w = train(t).warnings[i];
        if (w.leg == 0) return ask_for(SimTime::from_seconds(run.appear_time + entry).to_seconds() + w.t);
        return ask_for(run.head_reach(r.warning_point) + entry);
    }
    if (s.phase == Phase::standing && s.s_stand >= r.warning_point - kPositionTolerance) return now();
    // (a warning point already passed gives a time in the past: the request goes out now)
    double tw = motion_.time_at_place(t, train(t).warnings[i]);
    if (s.phase == Phase::moving && !s.free_end) {
        // A motion that brakes for the end of the authority, not for a stop, reaches the warning
        // point late or never: the route is wanted for when the train would get there running on.
        // (No stop lies between the motion's start and the head, other than one at the start.)
        const ServiceRun& run = run_of(t);
        const auto e = motion_.ends(t);
        const double stop = motion_.next_stop_s(t, e.s0);
        const bool to_end = std::isinf(stop);
        const double end = to_end ? run.path.length : stop;
        if (e.s_end < end - kEps && r.warning_point <= end + kEps) {
            const double head = motion_.head_position(t);
            if (head >= r.warning_point - kPositionTolerance) return now();
            // The planned motion over [head, warning point] (no stop lies between): a lower bound
            // of the time it will take, so the request is never late (early by at most the
            // re-acceleration the train still needs).
            const double tf = now() + std::max(0.0, run.head_reach(r.warning_point) - run.head_reach(head));
            tw = std::isnan(tw) ? tf : std::min(tw, tf);
        }
    }
    return std::isnan(tw) ? kNoTime : ask_for(tw);
}

long RouteRequests::link_timed_stop(std::uint32_t t, std::size_t i) const {
    if (train(t).links_in.empty()) return -1;   // most trains: asked at every route request
    const SimModel::Route& r = train(t).routes[i];
    const long k = r.after_stop >= 0 ? r.after_stop
                   : r.stop_before_warning >= 0 && st_[t].next_call <= static_cast<std::size_t>(r.stop_before_warning) + 1
                       ? r.stop_before_warning
                       : -1;
    if (k < 0) return -1;
    for (std::uint32_t l : train(t).links_in)
        if (static_cast<long>(model_.links()[l].to_call) == k) return k;
    return -1;
}


}  // namespace knockon::day
