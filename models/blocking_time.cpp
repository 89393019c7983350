#include "models/blocking_time.hpp"

#include <algorithm>
#include <cmath>

namespace knockon {
namespace {

// The braking point of the planned motion for a stop at `target`: the last grid point of the
// leg that reaches `target` from which the train, running as planned, can still stop there on
// the braking curve the running-time integration uses (per cell gradient).  This is where the
// simulated train leaves its planned motion when its authority ends at `target`, so the driver
// must know the route beyond it before: by the brake build-up time earlier (tests/REFERENCES.md D11:
// reaction distance v t plus braking distance), which keeps rounding on the safe side too.
// When the train could not even start from the leg's start (a stop) on such an authority, just
// before that stop (the departure needs the route); entering over the line end, the stopping
// distance from the entry speed in rear of the target, beyond the line end.
double braking_start(const ServiceRun& run, double target) {
    const RunLeg* leg = nullptr;
    for (const RunLeg& l : run.legs)
        if (l.trajectory.s0 < target - 1e-6 && target <= l.trajectory.s_end + 1e-6) leg = &l;
    if (!leg) return target - stopping_distance(*run.type, run.speed_at(target), run.path.gradient_at(target));
    const Trajectory& tr = leg->trajectory;
    const std::size_t points = tr.v.size();
    // The last point at or before the target.
    std::size_t j = 0;
    while (j + 1 < points && tr.point(j + 1) <= target + 1e-9) ++j;
    std::vector<double> gradient(leg->grid.cells);
    leg->grid.gradient.expand(0, leg->grid.cells, gradient.data());
    // v^2 of the braking curve to the target, back from point j.
    std::vector<double> envelope(j + 1);
    double w = 0.0, next = target;
    for (std::size_t p = j + 1; p-- > 0;) {
        const double ds = next - tr.point(p);
        const double g = p < gradient.size() ? gradient[p] : run.path.gradient_at(tr.point(p));
        w += 2.0 * braking_deceleration(*run.type, std::sqrt(w), g) * ds;
        envelope[p] = w;
        next = tr.point(p);
    }
    for (std::size_t p = 0; p <= j; ++p) {
        if (!(tr.v[p] * tr.v[p] > envelope[p])) continue;
        if (p == 0) {
            if (leg == &run.legs.front() && run.path.starts_at_edge)
                return target - stopping_distance(*run.type, tr.v[0], run.path.gradient_at(target));
            return tr.s0 - 1e-3;
        }
        return tr.point(p - 1) - tr.v[p - 1] * run.type->brake_delay;
    }
    return target;   // the plan stops there anyway
}

// Where the driver must first see the route ahead of signal i clear, by the aspect system: the
// signal in rear (three aspects), one or two signals back as the braking distance needs (four
// aspects), the distant signal (two aspects), or the braking point (cab signalling, and the
// first routes of a path, which no signal in rear shows).
double system_warning_point(const ServiceRun& run, std::size_t i) {
    const TrainPath& path = run.path;
    const PathSignal& sig = path.signals[i];
    const double brake = braking_start(run, sig.s);
    switch (sig.system) {
        case AspectSystem::two_aspect:
            return sig.signal.distant_distance ? sig.s - *sig.signal.distant_distance : brake;
        case AspectSystem::three_aspect:
            return i >= 1 ? path.signals[i - 1].s : brake;
        case AspectSystem::four_aspect:
            if (i >= 1 && brake >= path.signals[i - 1].s) return path.signals[i - 1].s;
            if (i >= 2) return path.signals[i - 2].s;
            return std::min(i >= 1 ? path.signals[i - 1].s : sig.s, brake);
        case AspectSystem::cab_fixed_block: return brake;
    }
    return sig.s;
}

// Where the driver must first see the route ahead of signal i clear.  Where no signal on the
// path shows that route (the first routes of a path), the warning is the braking distance in rear
// of the signal; on a path entering over the line end, when the driver cannot read the signal
// itself from there, the signals beyond the line end (outside the model) must give it: the
// warning point is then the line end, and the train is let in only once it knows the route.
double warning_point(const ServiceRun& run, std::size_t i) {
    const TrainPath& path = run.path;
    double w = system_warning_point(run, i);
    const bool shown_in_rear = (path.signals[i].system == AspectSystem::three_aspect && i >= 1) ||
                               (path.signals[i].system == AspectSystem::four_aspect && i >= 2) ||
                               path.signals[i].system == AspectSystem::two_aspect ||
                               path.signals[i].system == AspectSystem::cab_fixed_block;
    if (!shown_in_rear && path.starts_at_edge && w > 0.0) {
        double read = INFINITY;   // the earliest read point of a signal on the path that shows it
        for (std::size_t j = 0; j <= i; ++j) read = std::min(read, aspect_read_point(path.signals[j]));
        if (read > w) w = 0.0;
    }
    return w;
}

// The last planned stop in (from, to] (index into run.calls), or -1.
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

double aspect_read_point(const PathSignal& sig) {
    switch (sig.system) {
        case AspectSystem::cab_fixed_block: return -INFINITY;
        case AspectSystem::two_aspect:
            return sig.s - sig.signal.distant_distance.value_or(0.0) - sig.signal.sighting_distance;
        default: return sig.s - sig.signal.sighting_distance;
    }
}

std::vector<WarningShortfall> warning_shortfalls(const ServiceRun& run) {
    std::vector<WarningShortfall> out;
    const TrainPath& path = run.path;
    for (std::size_t i = 0; i < path.signals.size(); ++i) {
        const PathSignal& sig = path.signals[i];
        if (sig.s < -1e-6 || sig.s >= path.length - 1e-6) continue;
        double from = kNoTime;   // where the first warning is given
        switch (sig.system) {
            case AspectSystem::two_aspect:
                if (sig.signal.distant_distance) from = sig.s - *sig.signal.distant_distance;
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
        r.entry_signal = sig.signal.name;
        r.s_entry = sig.s;
        if (i + 1 < path.signals.size()) {
            r.exit_signal = path.signals[i + 1].signal.name;
            r.s_exit = path.signals[i + 1].s;
            r.overlap = path.signals[i + 1].signal.overlap;
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
        b.index = sec.index;
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

bool stands_at_start(const ServiceRun& run, const PathSection& sec) {
    return !run.path.starts_at_edge && sec.s_from < net::kSamePlace && sec.s_to > -run.type->length + net::kSamePlace;
}

bool stands_at_end(const ServiceRun& run, const PathSection& sec) {
    const double end = run.path.length;
    return !run.path.ends_at_edge && sec.s_from < end - net::kSamePlace && sec.s_to > end - run.type->length + net::kSamePlace;
}

bool turns_back(const LinkPlan& link, const ServiceRun& later) {
    return link.kind == LinkKind::turnaround && link.to_call == 0 && later.service->continues;
}

std::vector<PlatformHandover> platform_handover(const ServiceRun& incoming, const ServiceRun& outgoing) {
    std::vector<PlatformHandover> out;
    const auto& in = incoming.path.sections;
    const auto& next = outgoing.path.sections;
    for (std::size_t j = 0; j < next.size(); ++j) {
        if (!stands_at_start(outgoing, next[j]) || next[j].index == net::kNone) continue;
        for (std::size_t k = 0; k < in.size(); ++k)
            if (in[k].index == next[j].index && stands_at_end(incoming, in[k])) {
                out.push_back({k, j});
                break;
            }
    }
    return out;
}

void hand_over_platform(const ServiceRun& incoming_run, Stairway& incoming, const ServiceRun& outgoing_run,
                        Stairway& outgoing) {
    const double handover = incoming_run.vanish_time;
    auto blocking_of = [](Stairway& st, std::size_t index) -> SectionBlocking* {
        for (SectionBlocking& b : st.sections)
            if (b.index == index) return &b;
        return nullptr;
    };
    for (const PlatformHandover& h : platform_handover(incoming_run, outgoing_run)) {
        SectionBlocking* from = blocking_of(incoming, incoming_run.path.sections[h.incoming].index);
        SectionBlocking* to = blocking_of(outgoing, outgoing_run.path.sections[h.outgoing].index);
        if (!from || !to) continue;
        // The set is there from the handover on, as the return part.
        to->start = std::min(to->start, handover);
        to->occupied_from = std::min(to->occupied_from, handover);
        from->end = to->start;
        from->occupied_to = std::min(from->occupied_to, to->start);
    }
}

}  // namespace knockon
