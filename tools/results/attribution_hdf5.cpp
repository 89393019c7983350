#include "tools/results/attribution_hdf5.hpp"

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "models/links.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/results/sim_hdf5.hpp"

namespace knockon {

namespace {

using h5::FieldKind;
using h5::RecordLayout;
using h5::RecordTable;

// An index field of u32 where a row may have none: as f64, NaN for none (as holds' cause_link).
double index_or_nan(std::uint32_t i) { return i == UINT32_MAX ? std::nan("") : static_cast<double>(i); }

std::size_t longest(const std::vector<std::string>& v) {
    std::size_t n = 1;
    for (const std::string& s : v) n = std::max(n, s.size());
    return n;
}

std::string place_of(const DelaySource& s, const std::vector<TimingRecord>& timing) {
    return s.record == DelaySource::kNone ? std::string() : timing[s.record].station;
}

RecordLayout& add_estimate(RecordLayout& l, const std::string& name) {
    return l.add(name + "_mean", FieldKind::f64).add(name + "_ci95_half_width", FieldKind::f64);
}

const char* const kSourceUnits =
    "source: row of the day's numbering (see HDF5_LAYOUT.md), kind: text, train: index into trains or NaN, "
    "place: text, section: index into sections or NaN";

}  // namespace

void write_day_attribution(const h5::Group& day, const SimResult& r, const DayAttribution& a) {
    std::vector<std::size_t> used;
    std::vector<std::string> places;
    for (std::size_t i = 0; i < a.damage.size(); ++i)
        if (a.damage[i] != 0.0) {
            used.push_back(i);
            places.push_back(place_of(delay_source(a.index, i, r.timing), r.timing));
        }
    {
        RecordTable t(day, "attribution_sources",
                      RecordLayout()
                          .add("source", FieldKind::u32)
                          .add_text("kind", 11)
                          .add("train", FieldKind::f64)
                          .add_text("place", longest(places))
                          .add("section", FieldKind::f64)
                          .add("damage", FieldKind::f64));
        for (std::size_t k = 0; k < used.size(); ++k) {
            const DelaySource s = delay_source(a.index, used[k], r.timing);
            t.begin()
                .u32(static_cast<std::uint32_t>(used[k]))
                .text(to_string(s.kind))
                .f64(index_or_nan(s.train))
                .text(places[k])
                .f64(index_or_nan(s.section))
                .f64(a.damage[used[k]]);
        }
        t.flush();
        describe(t, std::string(kSourceUnits) + ", damage: s",
                 "Where the day's knock-on came from: each delay it was traced back to (primary delays: entry, "
                 "dwell, running; or disruption, dispatch, timetable, unexplained) with the knock-on it caused "
                 "downstream. The damages add up to the day's knock-on.");
    }
    RecordTable t(day, "attribution_edges",
                  RecordLayout()
                      .add("source", FieldKind::u32)
                      .add_text("cause", 10)
                      .add("from_train", FieldKind::f64)
                      .add("section", FieldKind::f64)
                      .add("link", FieldKind::f64)
                      .add("record", FieldKind::u32)
                      .add("to_train", FieldKind::u32)
                      .add("seconds", FieldKind::f64));
    for (const DelayEdge& e : a.edges)
        t.begin()
            .u32(e.source)
            .text(to_string(e.cause.kind))
            .f64(index_or_nan(e.cause.train))
            .f64(index_or_nan(e.cause.section))
            .f64(index_or_nan(e.cause.link))
            .u32(e.record)
            .u32(r.timing[e.record].train)
            .f64(e.seconds);
    t.flush();
    describe(t,
             "source: row of the day's numbering (attribution_sources), cause: text, from_train: index into trains "
             "or NaN, section: index into sections or NaN, link: row of links or NaN, record: row of timing, "
             "to_train: index into trains, seconds: s",
             "The delay trees: knock-on that `source` started reached train to_train at timing record `record` "
             "through its direct cause (the train that held it or the link's earlier train, the section, the "
             "link). The edges of one source form its tree; all edges add up to the day's knock-on.");
}

void write_study_attribution(const h5::Group& g, const SimModel& model, const AttributionSummary& s,
                             const std::vector<TimingRecord>& timing) {
    {
        std::vector<std::string> places;
        for (const SourceDamage& d : s.sources) places.push_back(place_of(delay_source(s.layout.sources(), d.source, timing), timing));
        RecordLayout l;
        l.add_text("kind", 11).add("train", FieldKind::f64).add_text("place", longest(places)).add("section", FieldKind::f64);
        add_estimate(l, "damage").add("n", FieldKind::u64);
        RecordTable t(g, "attribution_sources", l);
        for (std::size_t k = 0; k < s.sources.size(); ++k) {
            const DelaySource src = delay_source(s.layout.sources(), s.sources[k].source, timing);
            const Estimate& e = s.sources[k].damage;
            t.begin()
                .text(to_string(src.kind))
                .f64(index_or_nan(src.train))
                .text(places[k])
                .f64(index_or_nan(src.section))
                .f64(e.mean)
                .f64(e.half_width)
                .u64(e.n);
        }
        t.flush();
        describe(t,
                 "kind: text, train: index into trains_index or NaN, place: text, section: index into sections_index "
                 "or NaN, damage_mean: s, damage_ci95_half_width: s, n: days",
                 "Mean damage per day of each source of knock-on (a primary delay by train, place and kind, or "
                 "disruption, dispatch, timetable, unexplained), largest first, with 95 % CI half-width; sources "
                 "that caused no knock-on on any day are left out.");
    }
    {
        std::vector<std::string> names;
        for (const PlaceKnockOn& p : s.places) names.push_back(p.place);
        RecordLayout l;
        l.add_text("place", longest(names));
        add_estimate(l, "received");
        add_estimate(l, "caused");
        RecordTable t(g, "attribution_places", l);
        for (const PlaceKnockOn& p : s.places)
            t.begin().text(p.place).f64(p.received.mean).f64(p.received.half_width).f64(p.caused.mean).f64(p.caused.half_width);
        t.flush();
        describe(t,
                 "place: text, received_mean: s, received_ci95_half_width: s, caused_mean: s, "
                 "caused_ci95_half_width: s",
                 "Per place (timing point id): knock-on received there per day, and knock-on caused downstream "
                 "by the primary delays drawn there (late starts at a train's first timing point, dwells there, "
                 "slow runs from there), means with 95 % CI half-width.");
    }
    {
        RecordLayout l;
        l.add_text("kind", 7).add("index", FieldKind::u32).add("leader", FieldKind::f64).add("follower", FieldKind::f64);
        add_estimate(l, "knock_on");
        RecordTable t(g, "attribution_through", l);
        auto rows = [&](const char* kind, const std::vector<ThroughStats>& v) {
            for (const ThroughStats& x : v) {
                double from = std::nan(""), to = std::nan("");
                if (std::string(kind) == "buffer") {
                    from = model.buffer_pairs()[x.index].leader;
                    to = model.buffer_pairs()[x.index].follower;
                } else if (std::string(kind) == "link") {
                    from = static_cast<double>(model.links()[x.index].from);
                    to = static_cast<double>(model.links()[x.index].to);
                }
                t.begin()
                    .text(kind)
                    .u32(static_cast<std::uint32_t>(x.index))
                    .f64(from)
                    .f64(to)
                    .f64(x.knock_on.mean)
                    .f64(x.knock_on.half_width);
            }
        };
        rows("buffer", s.buffers);
        rows("link", s.links);
        rows("section", s.sections);
        t.flush();
        describe(t,
                 "kind: text, index: row of buffers' pairs (SimModel order, as the buffer table's leader and "
                 "follower), of the scenario's links, or into sections_index, leader: index into trains_index or "
                 "NaN, follower: index into trains_index or NaN, knock_on_mean: s, knock_on_ci95_half_width: s",
                 "What the knock-on passed through, per day with 95 % CI half-width, largest first within each "
                 "kind: per buffer (a pair of consecutive trains), the knock-on the leader passed directly to the "
                 "follower (the planner's list of buffers to widen first); per link, the knock-on that waited "
                 "for it; per section, the knock-on whose direct cause held that section.");
    }
    RecordLayout l;
    l.add_text("cause", 10);
    add_estimate(l, "knock_on");
    RecordTable t(g, "attribution_causes", l);
    for (std::size_t c = 0; c < s.by_cause.size(); ++c)
        t.begin().text(to_string(static_cast<HoldCause::Kind>(c))).f64(s.by_cause[c].mean).f64(s.by_cause[c].half_width);
    t.flush();
    describe(t, "cause: text, knock_on_mean: s, knock_on_ci95_half_width: s",
             "Knock-on per day by direct cause (train: another train's occupation or route; link; disruption; "
             "dispatch; none: not recorded), with 95 % CI half-width.");
}

}  // namespace knockon
