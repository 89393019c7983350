#include "sim/attribution.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <utility>

namespace knockon {

namespace {

// A train's delay as shares of its sources, by source number (sorted, no duplicates).
using Shares = std::vector<std::pair<std::uint32_t, double>>;

void add_share(Shares& s, std::uint32_t source, double x) {
    auto it = std::lower_bound(s.begin(), s.end(), source,
                               [](const std::pair<std::uint32_t, double>& a, std::uint32_t b) { return a.first < b; });
    if (it != s.end() && it->first == source) it->second += x;
    else s.insert(it, {source, x});
}

double total_of(const Shares& s) {
    double sum = 0.0;
    for (const auto& [source, x] : s) sum += x;
    return sum;
}

// `y` split in proportion to `w` (sum > 0) into `out`; the last share is the remainder, so the
// shares add up to y whatever the rounding.
void split(double y, const std::vector<double>& w, std::vector<double>& out) {
    double sum = 0.0;
    for (double x : w) sum += x;
    out.clear();
    double given = 0.0;
    for (std::size_t i = 0; i + 1 < w.size(); ++i) {
        const double s = y * (w[i] / sum);
        out.push_back(s);
        given += s;
    }
    out.push_back(y - given);
}

double value_of(const std::vector<std::vector<double>>& v, std::uint32_t t, std::uint32_t call) {
    return t < v.size() && call < v[t].size() ? v[t][call] : 0.0;
}

}  // namespace

const char* to_string(DelaySource::Kind k) {
    switch (k) {
        case DelaySource::Kind::entry: return "entry";
        case DelaySource::Kind::dwell: return "dwell";
        case DelaySource::Kind::running: return "running";
        case DelaySource::Kind::disruption: return "disruption";
        case DelaySource::Kind::dispatch: return "dispatch";
        case DelaySource::Kind::timetable: return "timetable";
        case DelaySource::Kind::unexplained: return "unexplained";
    }
    return "unexplained";
}

bool is_primary(DelaySource::Kind k) {
    return k == DelaySource::Kind::entry || k == DelaySource::Kind::dwell || k == DelaySource::Kind::running;
}

DelaySource delay_source(const SourceIndex& x, std::size_t i, const std::vector<TimingRecord>& timing) {
    DelaySource s;
    if (i < x.entry(0)) {
        s.kind = i < x.running(0) ? DelaySource::Kind::dwell : DelaySource::Kind::running;
        s.record = static_cast<std::uint32_t>(i < x.running(0) ? i : i - x.records);
        s.train = timing[s.record].train;
    } else if (i < x.disruption(0)) {
        s.kind = DelaySource::Kind::entry;
        s.train = static_cast<std::uint32_t>(i - x.entry(0));
        for (std::size_t r = 0; r < timing.size(); ++r)
            if (timing[r].train == s.train) {
                s.record = static_cast<std::uint32_t>(r);
                break;
            }
    } else if (i < x.dispatch()) {
        s.kind = DelaySource::Kind::disruption;
        s.section = static_cast<std::uint32_t>(i - x.disruption(0));
    } else {
        s.kind = i == x.dispatch()    ? DelaySource::Kind::dispatch
                 : i == x.timetable() ? DelaySource::Kind::timetable
                                      : DelaySource::Kind::unexplained;
    }
    return s;
}

DayAttribution attribute_knock_on(const SimResult& day, const InjectedDelays& delays) {
    DayAttribution a;
    const std::size_t trains = day.train_ids.size();
    a.index = {day.timing.size(), trains, day.section_names.size()};
    const SourceIndex& ix = a.index;
    a.damage.assign(ix.size(), 0.0);
    a.by_cause.assign(5, 0.0);
    a.through_section.assign(ix.sections, 0.0);
    a.through_link.assign(day.links.size(), 0.0);

    std::vector<long> first(trains, -1);
    for (std::size_t r = 0; r < day.timing.size(); ++r)
        if (first[day.timing[r].train] < 0) first[day.timing[r].train] = static_cast<long>(r);
    std::vector<std::vector<const RouteRecord*>> held_routes(trains);
    for (const RouteRecord& rr : day.routes)
        if (rr.held_by.kind != HoldCause::Kind::none && rr.train < trains) held_routes[rr.train].push_back(&rr);

    // Pieces of knock-on, then timing points passed, in time order; a piece ending at the moment a
    // train passes a timing point is taken first, so that it counts in that train's delay there.
    struct Event {
        double time;
        int type;              // 0: a knock-on piece, 1: a timing point passed
        std::uint32_t index;   // the piece, or the timing record
        int departure;         // timing point: 0 arrival, 1 departure
    };
    std::vector<Event> events;
    events.reserve(day.knock_on_parts.size() + 2 * day.timing.size());
    for (std::size_t i = 0; i < day.knock_on_parts.size(); ++i)
        events.push_back({day.knock_on_parts[i].to, 0, static_cast<std::uint32_t>(i), 0});
    for (std::size_t r = 0; r < day.timing.size(); ++r) {
        const TimingRecord& tr = day.timing[r];
        if (!std::isnan(tr.arrival)) events.push_back({tr.arrival, 1, static_cast<std::uint32_t>(r), 0});
        if (!std::isnan(tr.departure)) events.push_back({tr.departure, 1, static_cast<std::uint32_t>(r), 1});
    }
    std::sort(events.begin(), events.end(), [](const Event& x, const Event& y) {
        if (x.time != y.time) return x.time < y.time;
        if (x.type != y.type) return x.type < y.type;
        if (x.index != y.index) return x.index < y.index;
        return x.departure < y.departure;
    });

    std::vector<Shares> delay(trains), received(trains);
    std::vector<std::uint8_t> entry_done(trains, 0);
    // Every share given, keyed by its edge; summed per edge at the end in the order given.
    using EdgeKey = std::array<std::uint32_t, 6>;
    std::vector<std::pair<EdgeKey, double>> given;
    // Buffers reused by every piece, so that a day allocates them once.
    std::vector<std::uint32_t> sources;
    std::vector<double> shares, w;

    // Passes y seconds with direct cause c, received by record r, on to their sources.
    auto trace = [&](double y, const HoldCause& c, std::uint32_t r) {
        const std::uint32_t t = day.timing[r].train;
        a.by_cause[static_cast<std::size_t>(c.kind)] += y;
        if ((c.kind == HoldCause::Kind::train || c.kind == HoldCause::Kind::disruption) && c.section < ix.sections)
            a.through_section[c.section] += y;
        if (c.kind == HoldCause::Kind::link && c.link < a.through_link.size()) a.through_link[c.link] += y;
        sources.clear();
        shares.clear();
        const bool holder = (c.kind == HoldCause::Kind::train || c.kind == HoldCause::Kind::link) && c.train < trains;
        if (holder && total_of(delay[c.train]) > 0.0) {
            const Shares& d = delay[c.train];
            const double late = total_of(d);
            w.clear();
            for (const auto& [source, x] : d) {
                sources.push_back(source);
                w.push_back(x);
            }
            if (y > late) {   // the holder on time would still have held it y - late
                sources.push_back(static_cast<std::uint32_t>(ix.timetable()));
                w.push_back(y - late);
            }
            split(y, w, shares);
        } else {
            std::size_t root = ix.unexplained();
            if (holder) root = ix.timetable();
            else if (c.kind == HoldCause::Kind::disruption && c.section < ix.sections) root = ix.disruption(c.section);
            else if (c.kind == HoldCause::Kind::dispatch) root = ix.dispatch();
            sources.push_back(static_cast<std::uint32_t>(root));
            shares.push_back(y);
        }
        for (std::size_t k = 0; k < sources.size(); ++k) {
            a.damage[sources[k]] += shares[k];
            add_share(received[t], sources[k], shares[k]);
            given.push_back({{sources[k], static_cast<std::uint32_t>(c.kind), c.train, c.section, c.link, r}, shares[k]});
        }
    };

    // When the train of record r left the timing point before the previous one (that one, for
    // the second record; the run's start for the first).
    auto earlier_departure = [&](std::uint32_t r) {
        const std::uint32_t t = day.timing[r].train;
        for (std::uint32_t back = 2; back >= 1; --back)
            if (r >= back && day.timing[r - back].train == t && !std::isnan(day.timing[r - back].departure))
                return day.timing[r - back].departure;
        return std::isnan(day.timing[r].arrival) ? 0.0 : day.timing[r].arrival;
    };
    std::vector<HoldCause> causes;
    std::vector<double> piece_w, piece_y;
    for (const Event& e : events) {
        if (e.type == 0) {
            const KnockOnPart& p = day.knock_on_parts[e.index];
            const std::uint32_t t = day.timing[p.record].train;
            causes.clear();
            piece_w.clear();
            if (!p.run) {
                causes.push_back(p.cause);
                piece_w.push_back(1.0);
            } else {
                // The routes held for the train while it lost the time, by how long within the run.
                for (const RouteRecord* rr : held_routes[t]) {
                    const double overlap = std::min(rr->granted, p.to) - std::max(rr->requested, p.from);
                    if (!(overlap > 0.0)) continue;
                    causes.push_back(rr->held_by);
                    piece_w.push_back(overlap);
                }
                if (causes.empty()) {
                    // None held within the run: a hold just before it still costs time in it (the
                    // train brakes for the late route and re-accelerates after it, past the timing
                    // point).  The routes held since the train left the timing point before the
                    // previous one take it, by how long each was held.
                    const double since = earlier_departure(p.record);
                    for (const RouteRecord* rr : held_routes[t]) {
                        const double held = std::min(rr->granted, p.to) - std::max(rr->requested, since);
                        if (!(held > 0.0)) continue;
                        causes.push_back(rr->held_by);
                        piece_w.push_back(held);
                    }
                }
                if (causes.empty()) {
                    causes.emplace_back();
                    piece_w.push_back(1.0);
                }
            }
            split(p.seconds, piece_w, piece_y);
            for (std::size_t k = 0; k < causes.size(); ++k) trace(piece_y[k], causes[k], p.record);
            continue;
        }
        // A timing point passed: the train's delay there, as shares of its sources.
        const TimingRecord& tr = day.timing[e.index];
        const std::uint32_t t = tr.train;
        Shares& d = delay[t];
        for (const auto& [source, x] : received[t]) add_share(d, source, x);
        received[t].clear();
        const bool first_record = first[t] == static_cast<long>(e.index);
        if (first_record && !entry_done[t]) {
            entry_done[t] = 1;
            const double x = t < delays.entry.size() ? delays.entry[t] : 0.0;
            if (x > 0.0) add_share(d, static_cast<std::uint32_t>(ix.entry(t)), x);
        }
        if (e.departure == 0 && !first_record) {
            const double x = value_of(delays.running, t, day.timing[e.index - 1].call);
            if (x > 0.0) add_share(d, static_cast<std::uint32_t>(ix.running(e.index - 1)), x);
        }
        if (e.departure == 1) {
            const double x = value_of(delays.dwell, t, tr.call);
            if (x > 0.0) add_share(d, static_cast<std::uint32_t>(ix.dwell(e.index)), x);
        }
        const double measured = e.departure ? tr.departure_delay : tr.arrival_delay;
        if (std::isnan(measured)) continue;
        // Recovered: every source alike.  A delay above the shares has no source the day recorded
        // (the published times' rounding, losses below the engine's noise floor): it is not traced.
        const double late = std::max(0.0, measured), kept = total_of(d);
        if (kept > late) {
            const double f = late / kept;
            for (auto& [source, x] : d) x *= f;
        }
    }

    // A stable sort keeps each edge's shares in the order given, so each sum is the one a running
    // sum per edge would give, to the bit.
    std::stable_sort(given.begin(), given.end(),
                     [](const std::pair<EdgeKey, double>& x, const std::pair<EdgeKey, double>& y) { return x.first < y.first; });
    for (std::size_t i = 0; i < given.size();) {
        const EdgeKey& key = given[i].first;
        double seconds = 0.0;
        for (; i < given.size() && given[i].first == key; ++i) seconds += given[i].second;
        DelayEdge e;
        e.source = key[0];
        e.cause.kind = static_cast<HoldCause::Kind>(key[1]);
        e.cause.train = key[2];
        e.cause.section = key[3];
        e.cause.link = key[4];
        e.record = key[5];
        e.seconds = seconds;
        a.edges.push_back(e);
    }
    return a;
}

}  // namespace knockon
