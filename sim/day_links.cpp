#include "sim/day_links.hpp"

#include <algorithm>

namespace knockon::day {

double DayLinks::hold(std::uint32_t t, long k) const {
    double hold = -kInf;
    for (std::uint32_t l : model_.trains()[t].links_in) {
        const LinkPlan& link = model_.links()[l];
        if (static_cast<long>(link.to_call) != k) continue;
        const double arrival = records_.link(l).arrival;
        double until = std::isnan(arrival) ? kInf : arrival + link.min_time;
        if (link.kind == LinkKind::connection) until = std::min(until, link.wait_until());
        hold = std::max(hold, until);
    }
    // On the engine's clock: an event pushed for `hold` happens at its tick.
    return std::isfinite(hold) ? SimTime::from_seconds(hold).to_seconds() : hold;
}

double DayLinks::released(std::uint32_t t, long k, double ready) const {
    for (std::uint32_t l : model_.trains()[t].links_in) {
        const LinkPlan& link = model_.links()[l];
        if (static_cast<long>(link.to_call) != k) continue;
        const double arrival = records_.link(l).arrival;
        double until = !std::isnan(arrival)                 ? arrival + link.min_time
                       : link.arrival > events_.now() + kEps ? link.arrival + link.min_time
                                                             : kNoTime;
        if (link.kind == LinkKind::connection) until = std::isnan(until) ? link.wait_until()
                                                                        : std::min(until, link.wait_until());
        if (std::isnan(until)) return kNoTime;
        ready = std::max(ready, SimTime::from_seconds(until).to_seconds());
    }
    return ready;
}

long DayLinks::binding(std::uint32_t t, std::size_t k) const {
    long binding = -1;
    double latest = -kInf;
    for (std::uint32_t l : model_.trains()[t].links_in) {
        const LinkPlan& link = model_.links()[l];
        if (link.to_call != k) continue;
        const double arrival = records_.link(l).arrival;
        double until = std::isnan(arrival) ? kInf : arrival + link.min_time;
        if (link.kind == LinkKind::connection) until = std::min(until, link.wait_until());
        if (until > latest) {
            latest = until;
            binding = l;
        }
    }
    return binding;
}

long DayLinks::finish(std::uint32_t t, std::size_t k) {
    const TrainState& s = st_[t];
    const double now = events_.now();
    for (std::uint32_t l : model_.trains()[t].links_in) {
        const LinkPlan& link = model_.links()[l];
        if (link.to_call != k) continue;
        LinkRecord& r = records_.link(l);
        r.departure = now;
        const double ready = std::isnan(r.arrival) ? kInf : r.arrival + link.min_time;
        r.missed = link.kind == LinkKind::connection && ready > now + kEps;
        r.waited = std::max(0.0, std::min(now, ready) - s.own_ready);
    }
    return binding(t, k);
}

long DayLinks::stuck(std::uint32_t t) const {
    const TrainState& s = st_[t];
    const auto& links_in = model_.trains()[t].links_in;
    if (s.awaiting_set)
        for (std::uint32_t l : links_in) {
            const LinkPlan& link = model_.links()[l];
            if (link.kind == LinkKind::turnaround && st_[link.from].phase != Phase::finished) return l;
        }
    if (s.phase != Phase::standing || s.stop_call < 0 || links_in.empty()) return -1;
    return std::isinf(hold(t, s.stop_call)) ? binding(t, static_cast<std::size_t>(s.stop_call)) : -1;
}

void DayLinks::set_left(std::uint32_t t) {
    for (std::uint32_t l : model_.trains()[t].links_out) {
        const LinkPlan& link = model_.links()[l];
        TrainState& next = st_[link.to];
        if (link.kind != LinkKind::turnaround || !next.awaiting_set) continue;
        next.awaiting_set = false;
        next.appear_deferred = true;
        events_.push(events_.now(), kAppear, static_cast<std::uint32_t>(link.to));
    }
}

}  // namespace knockon::day
