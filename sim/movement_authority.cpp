#include "sim/movement_authority.hpp"

#include <algorithm>
#include <cmath>

namespace knockon::day {

SectionAuthority::SectionAuthority(const SimModel& model, RouteOrder order, std::vector<TrainState>& states,
                                   DayEvents& events, DayRecords& records)
    : model_(model),
      times_(model.interlocking()),
      order_(order),
      st_(states.data()),
      events_(events),
      records_(records),
      interlocking_(model.section_names().size(), order, model.planned_order()),
      dispatch_(model),
      outside_(model.trains().size(), 1) {}

void SectionAuthority::hand_over(std::uint32_t t, std::size_t k, std::uint32_t to, std::size_t k_to) {
    const std::uint32_t g = train(t).section_index[k];
    st_[t].holds[k] = 0;
    interlocking_.release(t, g);
    take_sections(to, {g}, {static_cast<std::uint32_t>(k_to)});
}

long SectionAuthority::pending_request(std::uint32_t t) const {
    long request = kNothing;
    for (const Pending& p : pending_)
        if (p.train == t) request = p.route;
    return request;
}

void SectionAuthority::blocks(std::uint32_t t, long request, std::vector<DeadlockBlock>& out) const {
    if (request == kNothing) return;
    const std::vector<std::uint32_t>& needed =
        request == kToAppear ? train(t).origin_sections : train(t).routes[static_cast<std::size_t>(request)].sections;
    for (std::uint32_t g : needed) {
        const std::uint32_t b = interlocking_.blocker(t, g);
        if (b == kNoTrain) continue;
        DeadlockBlock block;
        block.section = g;
        if (b == kDisruption) {
            block.by = DeadlockBlock::By::disruption;
        } else {
            block.train = b;
            block.by = interlocking_.holder(g) == b ? DeadlockBlock::By::held : DeadlockBlock::By::promised;
        }
        out.push_back(block);
    }
}

void SectionAuthority::take_sections(std::uint32_t t, const std::vector<std::uint32_t>& globals,
                        const std::vector<std::uint32_t>& path_sections) {
    interlocking_.take(t, globals);
    for (std::uint32_t k : path_sections)
        if (!st_[t].holds[k]) {
            st_[t].holds[k] = 1;
            records_.open_section(st_[t], t, train(t).section_index[k], k, now());
        }
}

const std::vector<std::uint32_t>& SectionAuthority::sections_of(const Pending& p) const {
    return p.route < 0 ? train(p.train).origin_sections : train(p.train).routes[p.route].sections;
}

const std::vector<std::uint32_t>& SectionAuthority::path_sections_of(const Pending& p) const {
    return p.route < 0 ? train(p.train).origin_path_sections : train(p.train).routes[p.route].path_sections;
}

std::uint32_t SectionAuthority::blocker_of(std::uint32_t t, std::uint32_t g, std::uint32_t k) const {
    const std::uint32_t b = interlocking_.blocker(t, g);
    if (b != kNoTrain || order_ != RouteOrder::dispatch) return b;
    return crossing_promise(t, g, k);
}

bool SectionAuthority::waits_on(std::uint32_t a, std::uint32_t b, std::vector<std::uint8_t>& seen) const {
    if (seen[a]) return false;
    seen[a] = 1;
    for (const Pending& p : pending_) {
        if (p.train != a) continue;
        const auto& globals = sections_of(p);
        const auto& path = path_sections_of(p);
        for (std::size_t i = 0; i < globals.size(); ++i) {
            const std::uint32_t c = blocker_of(a, globals[i], path[i]);
            if (c == b) return true;
            if (c < model_.trains().size() && waits_on(c, b, seen)) return true;
        }
    }
    return false;
}

double SectionAuthority::forecast_delay(std::uint32_t t) const {
    const ServiceRun& run = run_of(t);
    const TrainState& s = st_[t];
    if (s.phase == Phase::waiting) return std::max(0.0, now() - run.appear_time);
    double shown = 0.0;
    std::size_t k = 0;
    for (; k < run.calls.size(); ++k) {
        const TimingRecord& r = records_.timing(t, k);
        if (!std::isnan(r.departure)) shown = r.departure - run.calls[k].planned_departure;
        else if (!std::isnan(r.arrival)) shown = r.arrival - run.calls[k].planned_arrival;
        else break;
    }
    const double late = k < run.calls.size() && !std::isnan(run.calls[k].planned_arrival)
                            ? now() - run.calls[k].planned_arrival
                            : 0.0;
    return std::max({0.0, shown, late});
}

std::uint32_t SectionAuthority::crossing_promise(std::uint32_t t, std::uint32_t g, std::uint32_t k) const {
    const SimModel::Train& a = train(t);
    const std::int32_t stretch = a.stretch_of[k];
    if (stretch < 0) return kNoTrain;
    const std::uint32_t p = interlocking_.planned_before(t, g);
    if (p == kNoTrain) return kNoTrain;
    const SimModel::Train& b = train(p);
    const StretchUse* ua = a.use_of(stretch);
    const StretchUse* ub = b.use_of(stretch);
    // Opposing on this stretch (on a network that need not match the headings they started in).
    if (!ua || !ub || ua->direction == ub->direction) return kNoTrain;
    const CrossingChoice c =
        choose_crossing(*ua, forecast_delay(t), a.dispatch_weight, *ub, forecast_delay(p), b.dispatch_weight);
    if (c.asking_goes_first) return kNoTrain;
    // A train kept waiting for one that cannot come: p already asks for a route the safety rule
    // refuses (it would leave some train no way off the line, t among them).  Keeping the order
    // would only hold both until the forecasts tip the rule.
    for (const Pending& q : pending_)
        if (q.train == p && !dispatch_.leaves_a_way(interlocking_, p, sections_of(q), outside_)) return kNoTrain;
    return p;
}

bool SectionAuthority::may_take(std::uint32_t t, const std::vector<std::uint32_t>& sections,
                   const std::vector<std::uint32_t>& path_sections) const {
    const bool dispatch = order_ == RouteOrder::dispatch;
    for (std::size_t i = 0; i < sections.size(); ++i) {
        const std::uint32_t g = sections[i];
        const std::uint32_t b = blocker_of(t, g, path_sections[i]);
        if (b == kNoTrain) continue;
        // Held, or out of use: it must wait.  Promised to a train planned earlier: it waits for
        // that train, unless that train itself waits (directly or through others) for this one:
        // then the promise can never be kept (the other train is behind it, or held up by it),
        // and the order is given up for this section rather than locking both for good.
        if (b == kDisruption || interlocking_.holder(g) == b) return false;
        std::vector<std::uint8_t> seen(model_.trains().size(), 0);
        if (!waits_on(b, t, seen)) return false;
    }
    return !dispatch || dispatch_.leaves_a_way(interlocking_, t, sections, outside_);
}

void SectionAuthority::grant_pending(Grants& grants) {
    for (std::size_t i = 0; i < pending_.size();) {
        const Pending p = pending_[i];
        if (p.route < 0) {
            const SimModel::Train& tr = train(p.train);
            if (!may_take(p.train, tr.origin_sections, tr.origin_path_sections)) {
                pending_[i].cause = blocking_cause(p.train, tr.origin_sections);
                ++i;
                continue;
            }
            pending_.erase(pending_.begin() + static_cast<long>(i));
            take_sections(p.train, tr.origin_sections, tr.origin_path_sections);
            outside_[p.train] = 0;
            grants.appear_granted(p.train, p.cause);
            i = 0;  // a grant changes nothing that frees others, but keep the order simple
            continue;
        }
        const SimModel::Route& r = train(p.train).routes[p.route];
        if (!may_take(p.train, r.sections, r.path_sections)) {
            pending_[i].cause = blocking_cause(p.train, r.sections);
            pending_[i].cause.signal = r.entry_signal;
            ++i;
            continue;
        }
        pending_.erase(pending_.begin() + static_cast<long>(i));
        take_sections(p.train, r.sections, r.path_sections);
        // The route is set after the setting time (at that event tick), and the driver reacts to
        // the aspect after the reaction time.  Until then route_set lies in the future, which
        // every reader takes as "not set yet".
        const double set = SimTime::from_seconds(now() + times_.route_setup).to_seconds();
        st_[p.train].route_set[p.route] = set;
        events_.push(set + times_.sight_reaction, kAuthorityCheck, p.train);
        grants.route_granted(p.train, static_cast<std::size_t>(p.route), p.cause);
    }
}


HoldCause SectionAuthority::blocking_cause(std::uint32_t t, const std::vector<std::uint32_t>& sections) const {
    HoldCause c;
    c.kind = HoldCause::Kind::dispatch;
    for (std::uint32_t g : sections) {
        const std::uint32_t b = interlocking_.blocker(t, g);
        if (b == kNoTrain) continue;
        const bool held = b == kDisruption || interlocking_.holder(g) == b;
        if (c.kind != HoldCause::Kind::dispatch && !held) continue;   // a promise only where nothing is held
        c.section = g;
        c.kind = b == kDisruption ? HoldCause::Kind::disruption : HoldCause::Kind::train;
        c.train = b == kDisruption ? HoldCause::kNone : b;
        if (held) break;
    }
    return c;
}


}  // namespace knockon::day
