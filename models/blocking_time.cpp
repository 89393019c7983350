#include "models/blocking_time.hpp"

#include <algorithm>
#include <cmath>

namespace knockon {
namespace {

// Where the driver must first see the route ahead of signal i clear.
double warning_point(const ServiceRun& run, std::size_t i) {
    const TrainPath& path = run.path;
    const PathSignal& sig = path.signals[i];
    const double g = path.gradient_at(sig.s);
    auto braking_from = [&](double s) { return stopping_distance(*run.type, run.speed_at(s), g); };
    switch (sig.system) {
        case AspectSystem::two_aspect:
            return sig.s - sig.signal->distant_distance.value_or(braking_from(sig.s));
        case AspectSystem::three_aspect:
            if (i >= 1) return path.signals[i - 1].s;
            return sig.s - braking_from(sig.s);
        case AspectSystem::four_aspect:
            // One block back when it holds the braking distance, else two (the most a
            // preliminary caution can give); before the first signals of the path, the braking
            // distance itself.
            if (i >= 1 && sig.s - path.signals[i - 1].s >= braking_from(path.signals[i - 1].s))
                return path.signals[i - 1].s;
            if (i >= 2) return path.signals[i - 2].s;
            return std::min(i >= 1 ? path.signals[i - 1].s : sig.s, sig.s - braking_from(sig.s));
        case AspectSystem::cab_fixed_block: {
            // The braking-curve point: solve w = s_i - D(v(w)) by a few fixed-point steps.
            double w = sig.s - braking_from(sig.s);
            for (int k = 0; k < 4; ++k) w = sig.s - braking_from(std::max(w, path.s_min));
            return w;
        }
    }
    return sig.s;
}

// The last planned stop in [from, to) (index into run.calls), or -1.
long stop_in(const ServiceRun& run, double from, double to) {
    long found = -1;
    for (std::size_t k = 0; k < run.calls.size(); ++k) {
        const PlannedCall& c = run.calls[k];
        if (c.stops && c.s > from + 1e-6 && c.s <= to + 1e-6 && !std::isnan(c.planned_departure))
            found = static_cast<long>(k);
    }
    return found;
}

}  // namespace

std::vector<WarningShortfall> warning_shortfalls(const ServiceRun& run) {
    std::vector<WarningShortfall> out;
    const TrainPath& path = run.path;
    for (std::size_t i = 0; i < path.signals.size(); ++i) {
        const PathSignal& sig = path.signals[i];
        if (sig.s < -1e-6 || sig.s >= path.length - 1e-6) continue;
        double from = kNoTime;   // where the first warning is given
        switch (sig.system) {
            case AspectSystem::two_aspect:
                if (sig.signal->distant_distance) from = sig.s - *sig.signal->distant_distance;
                break;
            case AspectSystem::three_aspect:
                if (i >= 1) from = path.signals[i - 1].s;
                break;
            case AspectSystem::four_aspect:
                if (i >= 2) from = path.signals[i - 2].s;
                break;
            case AspectSystem::cab_fixed_block: break;   // the braking curve is the warning
        }
        if (std::isnan(from) || from < path.s_min) continue;
        const double v = run.speed_at(std::max(from, 0.0));
        // On the steepest fall over the whole braking distance, not only at the signal: a fall
        // just in rear of the signal lengthens the braking as much as one at it.
        const double needed = stopping_distance_before(*run.type, v, path, from, sig.s);
        const double available = sig.s - from;
        // A metre of slack: whole-metre layouts meet the rule exactly at the limit.
        if (needed > available + 1.0) out.push_back({i, available, needed, v});
    }
    return out;
}

Stairway blocking_stairway(const ServiceRun& run, const InterlockingTimes& times) {
    Stairway st;
    const TrainPath& path = run.path;
    const double L = run.type->length;

    // Routes: from every facing signal at or after the start and before the end of the path.
    for (std::size_t i = 0; i < path.signals.size(); ++i) {
        const PathSignal& sig = path.signals[i];
        if (sig.s < -1e-6 || sig.s >= path.length - 1e-6) continue;
        RouteBlocking r;
        r.entry_signal = sig.signal->id;
        r.s_entry = sig.s;
        if (i + 1 < path.signals.size()) {
            r.exit_signal = path.signals[i + 1].signal->id;
            r.s_exit = path.signals[i + 1].s;
            r.overlap = path.signals[i + 1].signal->overlap;
        } else {
            r.s_exit = path.ends_at_edge ? path.length : std::min(path.length, path.s_max);
        }
        double w = warning_point(run, i);
        double t_w = run.head_reach(w);
        const double previous = i > 0 ? path.signals[i - 1].s : -INFINITY;
        r.departure_call = stop_in(run, std::min(w, previous), sig.s);
        if (r.departure_call >= 0) {
            // Stands at a stop in rear of the signal: the route is needed for the departure.
            t_w = run.calls[r.departure_call].planned_departure;
            w = run.calls[r.departure_call].s;
        }
        r.warning_point = w;
        const double t_i = run.head_reach(r.s_entry);
        const double t_x = run.head_reach(r.s_exit);
        const double t_c = run.tail_clear(r.s_exit + r.overlap);
        r.setup = times.route_setup;
        r.sight_reaction = times.sight_reaction;
        r.approach = t_i - t_w;
        r.running = t_x - t_i;
        r.clearing = t_c - t_x;
        r.release = times.release;
        r.start = t_w - r.sight_reaction - r.setup;
        r.end = t_c + r.release;
        st.routes.push_back(r);
    }

    // Sections: union of the routes that lock them, and physical occupation.
    for (const PathSection& sec : path.sections) {
        SectionBlocking b;
        b.section = sec.id;
        b.x_lo = sec.x_lo;
        b.x_hi = sec.x_hi;
        b.s_from = sec.s_from;
        b.s_to = sec.s_to;
        bool locked = false;
        double start = INFINITY;
        for (const RouteBlocking& r : st.routes) {
            double lo = r.s_entry, hi = r.s_exit + r.overlap;
            if (std::min(hi, sec.s_to) - std::max(lo, sec.s_from) > 1e-6) {
                locked = true;
                start = std::min(start, r.start);
            }
        }
        const bool entered = sec.s_to > -L + 1e-6 && sec.s_from < path.length - 1e-6;
        if (entered) {
            b.occupied_from = run.head_reach(sec.s_from);
            b.occupied_to = run.tail_clear(sec.s_to);
            start = std::min(start, b.occupied_from);
        }
        if (!locked && !entered) continue;
        b.start = start;
        b.end = run.tail_clear(sec.s_to) + times.release;
        // A section locked only as overlap beyond where the train ends is held until it leaves.
        if (!entered) b.end = std::max(b.end, run.vanish_time + times.release);
        st.sections.push_back(b);
    }
    return st;
}

}  // namespace knockon
