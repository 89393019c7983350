#include "sim/crossing_changes.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "sim/sim_model.hpp"
#include "sim/sim_result.hpp"

namespace knockon {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kEps = 1e-6;
constexpr std::size_t kNoPlace = static_cast<std::size_t>(-1);

// As run: per (train, global section) the record's head entry and its blocking start.
struct AsRun {
    std::map<std::pair<std::uint32_t, std::uint32_t>, const SectionRecord*> records;
    const SectionRecord* of(std::uint32_t t, std::uint32_t g) const {
        const auto it = records.find({t, g});
        return it == records.end() ? nullptr : it->second;
    }
};

// When train t's use u of a stretch began: planned, or as run (NaN if it never got there).
double use_start(const SimModel::Train& tr, std::uint32_t t, const StretchUse& u, const AsRun* as_run) {
    if (!as_run) return u.start;
    // Blocked from its first lock; it counts once its head entered some section of the stretch
    // (sections beyond a stop at the path's end are held as overlap, never entered).
    double start = std::numeric_limits<double>::infinity();
    bool entered = false;
    for (std::uint32_t k = u.first; k < u.end; ++k) {
        const SectionRecord* r = as_run->of(t, tr.section_index[k]);
        if (!r) continue;
        start = std::min(start, r->locked);
        entered = entered || !std::isnan(r->head_enters);
    }
    return entered ? start : kNaN;
}

// The place where the order of a and b flips over their shared stretches (by chainage), or
// kNoPlace when it never does and they run one way; NaN-free inputs assumed.
struct Flip {
    std::size_t place = kNoPlace;
    bool valid = true;
};

Flip flip_place(const SimModel& model, const std::vector<std::int32_t>& shared, std::uint32_t a, std::uint32_t b,
                const AsRun* as_run, bool opposing, bool a_up) {
    const auto& trains = model.trains();
    const auto& stretches = model.single_track().stretches;
    // a_first[i]: a passed shared stretch i (by chainage) before b.
    std::vector<char> a_first;
    for (std::int32_t s : shared) {
        const double ta = use_start(trains[a], a, *trains[a].use_of(s), as_run);
        const double tb = use_start(trains[b], b, *trains[b].use_of(s), as_run);
        if (std::isnan(ta) || std::isnan(tb)) return {kNoPlace, false};
        a_first.push_back(ta < tb || (ta == tb && a < b));
    }
    // In chainage order a_first runs true... then false... for an up train a (it meets b, or b
    // overtakes it, further up); the reverse for a down train.
    for (std::size_t i = 0; i + 1 < shared.size(); ++i)
        if (a_first[i] != a_first[i + 1]) return {stretches[static_cast<std::size_t>(shared[i])].upper, true};
    if (!opposing) return {kNoPlace, true};
    // No flip: the up train passed every shared stretch first, so they meet beyond the last one
    // by chainage; or the down train did, and they meet before the first.
    const bool up_train_first = a_up ? a_first.front() : !a_first.front();
    return {up_train_first ? stretches[static_cast<std::size_t>(shared.back())].upper
                           : stretches[static_cast<std::size_t>(shared.front())].lower,
            true};
}

// Train t's delay when its head reaches chainage x (as run minus planned), x a section boundary:
// from the section starting there; where x lies at or before where its run starts, its departure
// delay there, and at or beyond where it ends, its arrival delay there; else NaN (or never got there).
double delay_at(const SimModel::Train& tr, std::uint32_t t, double x, bool up, const AsRun& as_run,
                const SimResult& day) {
    const ServiceRun& run = tr.plan->run;
    const auto& path = run.path;
    const double first = path.chainage_at(run.calls.front().s), last = path.chainage_at(run.calls.back().s);
    const auto record = [&](bool origin) -> const TimingRecord* {
        const TimingRecord* found = nullptr;
        for (const TimingRecord& r : day.timing)
            if (r.train == t) {
                if (origin) return &r;
                found = &r;
            }
        return found;
    };
    if (up ? x <= first + kEps : x >= first - kEps) {
        const TimingRecord* r = record(true);
        return r ? (std::isnan(r->departure_delay) ? r->arrival_delay : r->departure_delay) : kNaN;
    }
    if (up ? x >= last - kEps : x <= last + kEps) {
        const TimingRecord* r = record(false);
        return r ? r->arrival_delay : kNaN;
    }
    for (std::size_t k = 0; k < path.sections.size(); ++k) {
        const PathSection& sec = path.sections[k];
        if (std::fabs((up ? sec.x_lo : sec.x_hi) - x) > kEps) continue;
        const SectionRecord* r = as_run.of(t, tr.section_index[k]);
        if (!r || std::isnan(r->head_enters)) return kNaN;
        return r->head_enters - run.head_reach(sec.s_from);
    }
    return kNaN;
}

// Delay on leaving the later of two places minus that on reaching the earlier, in t's direction.
double change_between(const SimModel& model, std::uint32_t t, std::size_t p, std::size_t q, const AsRun& as_run,
                      const SimResult& day) {
    const SimModel::Train& tr = model.trains()[t];
    const bool up = tr.plan->run.service->direction == Direction::up;
    const auto& places = model.single_track().places;
    if (p == kNoPlace || q == kNoPlace) return kNaN;
    const CrossingPlace &a = places[std::min(p, q)], &b = places[std::max(p, q)];
    // Up: reaches the lower-chainage place first, enters it at x_lo, leaves the other at x_hi.
    const double reach = up ? a.x_lo : b.x_hi, leave = up ? b.x_hi : a.x_lo;
    return delay_at(tr, t, leave, up, as_run, day) - delay_at(tr, t, reach, up, as_run, day);
}

}  // namespace

const char* to_string(CrossingChange::Kind k) {
    return k == CrossingChange::Kind::moved_crossing ? "crossing moved" : "order changed";
}

std::vector<CrossingChange> crossing_changes(const SimModel& model, const SimResult& day) {
    std::vector<CrossingChange> out;
    const auto& trains = model.trains();
    const auto& places = model.single_track().places;
    if (model.single_track().empty()) return out;
    AsRun as_run;
    for (const SectionRecord& r : day.sections) as_run.records[{r.train, r.section}] = &r;

    for (std::uint32_t a = 0; a < trains.size(); ++a) {
        if (trains[a].stretch_uses.empty()) continue;
        for (std::uint32_t b = a + 1; b < trains.size(); ++b) {
            std::vector<std::int32_t> shared;
            for (const StretchUse& u : trains[a].stretch_uses)
                if (trains[b].use_of(u.stretch)) shared.push_back(u.stretch);
            if (shared.empty()) continue;
            std::sort(shared.begin(), shared.end());   // stretches are by chainage
            const bool a_up = trains[a].plan->run.service->direction == Direction::up;
            const bool opposing = a_up != (trains[b].plan->run.service->direction == Direction::up);
            const Flip planned = flip_place(model, shared, a, b, nullptr, opposing, a_up);
            const Flip actual = flip_place(model, shared, a, b, &as_run, opposing, a_up);
            if (!actual.valid || planned.place == actual.place) continue;

            CrossingChange c;
            c.kind = opposing ? CrossingChange::Kind::moved_crossing : CrossingChange::Kind::changed_order;
            // Who was planned first over the first shared stretch each meets.
            const std::int32_t first_met = a_up ? shared.front() : shared.back();
            const bool a_planned_first = trains[a].use_of(first_met)->start <= trains[b].use_of(first_met)->start;
            c.first = a_planned_first ? a : b;
            c.second = a_planned_first ? b : a;
            c.planned_place = planned.place == kNoPlace ? std::string() : places[planned.place].name;
            c.actual_place = actual.place == kNoPlace ? std::string() : places[actual.place].name;
            // When: the later of the two trains entering the shared stretch beyond the actual place
            // in its direction (beyond the last shared one when one direction kept its order).
            double when = -std::numeric_limits<double>::infinity();
            for (std::uint32_t t : {a, b}) {
                const bool up = trains[t].plan->run.service->direction == Direction::up;
                for (std::int32_t s : shared) {
                    const SingleTrackStretch& st = model.single_track().stretches[static_cast<std::size_t>(s)];
                    const bool beyond = actual.place == kNoPlace || (up ? st.lower : st.upper) == actual.place;
                    if (beyond) when = std::max(when, use_start(trains[t], t, *trains[t].use_of(s), &as_run));
                }
            }
            c.when = std::isfinite(when) ? when : kNaN;
            const std::size_t p = planned.place == kNoPlace ? actual.place : planned.place;
            const std::size_t q = actual.place == kNoPlace ? p : actual.place;
            c.first_change = change_between(model, c.first, p, q, as_run, day);
            c.second_change = change_between(model, c.second, p, q, as_run, day);
            out.push_back(std::move(c));
        }
    }
    std::stable_sort(out.begin(), out.end(), [](const CrossingChange& x, const CrossingChange& y) { return x.when < y.when; });
    return out;
}

}  // namespace knockon
