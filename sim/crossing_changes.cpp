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

// As run: per (train, global section) the record, and per train and stretch use (in
// SimModel::Train::stretch_uses order) when it began: worked out once, read for every pair.
struct AsRun {
    std::map<std::pair<std::uint32_t, std::uint32_t>, const SectionRecord*> records;
    std::vector<std::vector<double>> use_starts;
    const SectionRecord* of(std::uint32_t t, std::uint32_t g) const {
        const auto it = records.find({t, g});
        return it == records.end() ? nullptr : it->second;
    }
};

// When train t's use u of a stretch began as run: blocked from its first lock; it counts once its
// head entered some section of the stretch (sections beyond a stop at the path's end are held as
// overlap, never entered); NaN if it never got there.
double as_run_start(const SimModel::Train& tr, std::uint32_t t, const StretchUse& u, const AsRun& as_run) {
    double start = std::numeric_limits<double>::infinity();
    bool entered = false;
    for (std::uint32_t k = u.first; k < u.end; ++k) {
        const SectionRecord* r = as_run.of(t, tr.section_index[k]);
        if (!r) continue;
        start = std::min(start, r->locked);
        entered = entered || !std::isnan(r->head_enters);
    }
    return entered ? start : kNaN;
}

// When train t's use of stretch s began: planned, or as run.
double use_start(const SimModel::Train& tr, std::uint32_t t, std::int32_t s, const AsRun* as_run) {
    const StretchUse* u = tr.use_of(s);
    if (!as_run) return u->start;
    return as_run->use_starts[t][static_cast<std::size_t>(u - tr.stretch_uses.data())];
}

Direction opposite(Direction d) { return d == Direction::up ? Direction::down : Direction::up; }

// The place where the order of a and b flips over their shared stretches, or kNoPlace when it
// never does and they run one way.  `shared` lies in the order of a train running up the first
// of them (a's path order, reversed where a runs down there: chainage order on a line), and
// `reversed` says whether a runs against that order.  NaN-free inputs assumed.
struct Flip {
    std::size_t place = kNoPlace;
    bool valid = true;
};

Flip flip_place(const SimModel& model, const std::vector<std::int32_t>& shared, std::uint32_t a, std::uint32_t b,
                const AsRun* as_run, bool opposing, bool reversed) {
    const auto& trains = model.trains();
    const auto& stretches = model.single_track().stretches;
    // a_first[i]: a passed shared stretch i before b.
    std::vector<char> a_first;
    for (std::int32_t s : shared) {
        const double ta = use_start(trains[a], a, s, as_run);
        const double tb = use_start(trains[b], b, s, as_run);
        if (std::isnan(ta) || std::isnan(tb)) return {kNoPlace, false};
        a_first.push_back(ta < tb || (ta == tb && a < b));
    }
    // The direction on stretch i of a train running in the list's order.
    const auto along = [&](std::size_t i) {
        const Direction d = trains[a].use_of(shared[i])->direction;
        return reversed ? opposite(d) : d;
    };
    const auto stretch = [&](std::size_t i) -> const SingleTrackStretch& {
        return stretches[static_cast<std::size_t>(shared[i])];
    };
    // In the list's order a_first runs true... then false... for a train a running that way (it
    // meets b, or b overtakes it, further on); the reverse for a train running against it.
    for (std::size_t i = 0; i + 1 < shared.size(); ++i)
        if (a_first[i] != a_first[i + 1]) return {stretch(i).exit_place(along(i)), true};
    if (!opposing) return {kNoPlace, true};
    // No flip: the train running in the list's order passed every shared stretch first, so they
    // meet beyond the last one; or the other did, and they meet before the first.
    const bool in_order_first = reversed ? !a_first.front() : a_first.front();
    return {in_order_first ? stretch(shared.size() - 1).exit_place(along(shared.size() - 1))
                           : stretch(0).entry_place(along(0)),
            true};
}

// A point of train t's path where its delay is measured: before or at where its run starts (its
// delay when ready to leave there), at or beyond where it ends (its arrival delay), else where
// its head enters path section `section` (which starts at s).
struct PathPoint {
    double s = 0.0;
    std::size_t section = 0;
};

// Where t's head reaches place p, and where it leaves it: the end of its passage over the stretch
// it arrives by, the start of its passage over the stretch it leaves by.  Where it arrives by no
// stretch it started in the place (a loop: its start) or came from track off the single line to a
// place that is a point (an end of the single track: reaching it is leaving it); likewise where it
// leaves by none.
struct PlaceOnPath {
    bool arrives = false, leaves = false;
    PathPoint reach, leave;
};

PlaceOnPath place_on_path(const SimModel& model, std::uint32_t t, std::size_t p) {
    const SimModel::Train& tr = model.trains()[t];
    const auto& sections = tr.plan->run.path.sections;
    const auto& stretches = model.single_track().stretches;
    PlaceOnPath out;
    for (const StretchUse& u : tr.stretch_uses) {
        const SingleTrackStretch& st = stretches[static_cast<std::size_t>(u.stretch)];
        if (!out.arrives && st.exit_place(u.direction) == p) {
            out.arrives = true;
            out.reach = {sections[u.end - 1].s_to, u.end};
        }
        if (!out.leaves && st.entry_place(u.direction) == p) {
            out.leaves = true;
            out.leave = {sections[u.first].s_from, u.first};
        }
    }
    const bool loop = model.single_track().places[p].kind == CrossingPlaceKind::loop;
    const double inf = std::numeric_limits<double>::infinity();
    if (!out.arrives) out.reach = loop || !out.leaves ? PathPoint{-inf, 0} : out.leave;
    if (!out.leaves) out.leave = loop || !out.arrives ? PathPoint{inf, 0} : out.reach;
    return out;
}

// Train t's delay at a point of its path (as run minus planned); NaN if it never got there.
double delay_at(const SimModel::Train& tr, std::uint32_t t, const PathPoint& at, const AsRun& as_run,
                const SimResult& day) {
    const ServiceRun& run = tr.plan->run;
    const auto& path = run.path;
    const double first = run.calls.front().s, last = run.calls.back().s;
    const auto record = [&](bool origin) -> const TimingRecord* {
        const TimingRecord* found = nullptr;
        for (const TimingRecord& r : day.timing)
            if (r.train == t) {
                if (origin) return &r;
                found = &r;
            }
        return found;
    };
    if (at.s <= first + kEps) {
        // Reaching the place it starts at: when it was ready to leave (its departure delay less
        // what it then waited for others, the origin's knock-on).
        const TimingRecord* r = record(true);
        if (!r) return kNaN;
        return std::isnan(r->departure_delay) ? r->arrival_delay : r->departure_delay - r->knock_on;
    }
    if (at.s >= last - kEps) {
        const TimingRecord* r = record(false);
        return r ? r->arrival_delay : kNaN;
    }
    if (at.section >= path.sections.size()) return kNaN;
    const SectionRecord* r = as_run.of(t, tr.section_index[at.section]);
    if (!r || std::isnan(r->head_enters)) return kNaN;
    return r->head_enters - run.head_reach(path.sections[at.section].s_from);
}

// Delay on leaving the later of two places minus that on reaching the earlier, along t's path.
double change_between(const SimModel& model, std::uint32_t t, std::size_t p, std::size_t q, const AsRun& as_run,
                      const SimResult& day) {
    if (p == kNoPlace || q == kNoPlace) return kNaN;
    const SimModel::Train& tr = model.trains()[t];
    const PlaceOnPath at_p = place_on_path(model, t, p), at_q = place_on_path(model, t, q);
    const bool p_first = at_p.reach.s <= at_q.reach.s;
    const PlaceOnPath& earlier = p_first ? at_p : at_q;
    const PlaceOnPath& later = p_first ? at_q : at_p;
    return delay_at(tr, t, later.leave, as_run, day) - delay_at(tr, t, earlier.reach, as_run, day);
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
    as_run.use_starts.resize(trains.size());
    for (std::uint32_t t = 0; t < trains.size(); ++t)
        for (const StretchUse& u : trains[t].stretch_uses)
            as_run.use_starts[t].push_back(as_run_start(trains[t], t, u, as_run));

    for (std::uint32_t a = 0; a < trains.size(); ++a) {
        if (trains[a].stretch_uses.empty()) continue;
        for (std::uint32_t b = a + 1; b < trains.size(); ++b) {
            // The shared stretches in a's path order, the first it meets first.
            std::vector<std::int32_t> shared;
            for (const StretchUse& u : trains[a].stretch_uses)
                if (trains[b].use_of(u.stretch)) shared.push_back(u.stretch);
            if (shared.empty()) continue;
            const std::int32_t first_met = shared.front();
            const Direction a_dir = trains[a].use_of(first_met)->direction;
            const bool opposing = a_dir != trains[b].use_of(first_met)->direction;
            const bool reversed = a_dir == Direction::down;
            if (reversed) std::reverse(shared.begin(), shared.end());
            const Flip planned = flip_place(model, shared, a, b, nullptr, opposing, reversed);
            const Flip actual = flip_place(model, shared, a, b, &as_run, opposing, reversed);
            if (!actual.valid || planned.place == actual.place) continue;

            CrossingChange c;
            c.kind = opposing ? CrossingChange::Kind::moved_crossing : CrossingChange::Kind::changed_order;
            // Who was planned first over the first shared stretch a meets.
            const bool a_planned_first = trains[a].use_of(first_met)->start <= trains[b].use_of(first_met)->start;
            c.first = a_planned_first ? a : b;
            c.second = a_planned_first ? b : a;
            c.planned_place = planned.place == kNoPlace ? std::string() : places[planned.place].name;
            c.actual_place = actual.place == kNoPlace ? std::string() : places[actual.place].name;
            // When: the later of the two trains entering the shared stretch beyond the actual place
            // in its direction (beyond the last shared one when one direction kept its order).
            double when = -std::numeric_limits<double>::infinity();
            for (std::uint32_t t : {a, b})
                for (std::int32_t s : shared) {
                    const SingleTrackStretch& st = model.single_track().stretches[static_cast<std::size_t>(s)];
                    const bool beyond = actual.place == kNoPlace || st.entry_place(trains[t].use_of(s)->direction) == actual.place;
                    if (beyond) when = std::max(when, use_start(trains[t], t, s, &as_run));
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
