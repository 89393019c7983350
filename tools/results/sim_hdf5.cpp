#include "tools/results/sim_hdf5.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <vector>

#include "models/links.hpp"
#include "sim/day_summary.hpp"
#include "sim/deadlock_text.hpp"
#include "tools/results/attribution_hdf5.hpp"
#include "tools/results/deadlock_output.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/results/plan_output.hpp"

namespace knockon {

namespace {

using h5::FieldKind;
using h5::RecordLayout;
using h5::RecordTable;

constexpr const char* kTimeUnit = "s after midnight of the simulated day";

// Longest string a column will hold, so fixed-length fields are as narrow as the data allows.
template <class Records, class Get>
std::size_t longest(const Records& records, Get get) {
    std::size_t n = 0;
    for (const auto& r : records) n = std::max(n, get(r).size());
    return n;
}

}  // namespace

void describe(const RecordTable& t, const std::string& units, const std::string& description) {
    t.attributes().set_text("units", units);
    t.attributes().set_text("description", description);
}

void write_names(const h5::Group& group, const std::string& name, const std::vector<std::string>& ids,
                 const std::string& description) {
    RecordTable t(group, name,
                  RecordLayout().add("index", FieldKind::u32).add_text("id", longest(ids, [](auto& s) -> auto& {
                      return s;
                  })));
    for (std::size_t i = 0; i < ids.size(); ++i) t.begin().u32(static_cast<std::uint32_t>(i)).text(ids[i]);
    t.flush();
    describe(t, "index: 0-based row number, id: text", description);
}

namespace {

void write_timing(const h5::Group& day, const std::vector<TimingRecord>& records) {
    RecordTable t(day, "timing",
                  RecordLayout()
                      .add("train", FieldKind::u32)
                      .add("call", FieldKind::u32)
                      .add_text("station", longest(records, [](auto& r) -> auto& { return r.station; }))
                      .add("stops", FieldKind::u8)
                      .add("scheduled_arrival", FieldKind::f64)
                      .add("scheduled_departure", FieldKind::f64)
                      .add("arrival", FieldKind::f64)
                      .add("departure", FieldKind::f64)
                      .add("arrival_delay", FieldKind::f64)
                      .add("departure_delay", FieldKind::f64)
                      .add("knock_on", FieldKind::f64));
    for (const TimingRecord& r : records)
        t.begin()
            .u32(r.train)
            .u32(r.call)
            .text(r.station)
            .u8(r.stops ? 1 : 0)
            .f64(r.scheduled_arrival)
            .f64(r.scheduled_departure)
            .f64(r.arrival)
            .f64(r.departure)
            .f64(r.arrival_delay)
            .f64(r.departure_delay)
            .f64(r.knock_on);
    t.flush();
    describe(t,
             "train: index into trains, call: 0-based timing point of the train, station: text, "
             "stops: 1 = scheduled stop / 0 = pass, scheduled_arrival: s after midnight, "
             "scheduled_departure: s after midnight, arrival: s after midnight, departure: s after midnight, "
             "arrival_delay: s, departure_delay: s, knock_on: s",
             "Times of every train at every timing point, scheduled and as run; NaN where a time does not "
             "apply or did not happen. A pass has arrival = departure = the pass time. knock_on is the "
             "delay caused by other trains on the run from the previous timing point and, at a stop, "
             "while waiting to leave.");
}

void write_occupancy(const h5::Group& day, const std::vector<SectionRecord>& records) {
    RecordTable t(day, "occupancy",
                  RecordLayout()
                      .add("train", FieldKind::u32)
                      .add("section", FieldKind::u32)
                      .add("locked", FieldKind::f64)
                      .add("head_enters", FieldKind::f64)
                      .add("head_leaves", FieldKind::f64)
                      .add("tail_clears", FieldKind::f64)
                      .add("released", FieldKind::f64));
    for (const SectionRecord& r : records)
        t.begin()
            .u32(r.train)
            .u32(r.section)
            .f64(r.locked)
            .f64(r.head_enters)
            .f64(r.head_leaves)
            .f64(r.tail_clears)
            .f64(r.released);
    t.flush();
    describe(t,
             "train: index into trains, section: index into sections, locked: s after midnight, "
             "head_enters: s after midnight, head_leaves: s after midnight, tail_clears: s after midnight, "
             "released: s after midnight",
             "Each train's use of each detection section as run; the as-run blocking time is [locked, "
             "released]. NaN where a moment did not happen.");
}

void write_routes(const h5::Group& day, const std::vector<RouteRecord>& records) {
    RecordTable t(day, "routes",
                  RecordLayout()
                      .add("train", FieldKind::u32)
                      .add_text("entry_signal", longest(records, [](auto& r) -> auto& { return r.entry_signal; }))
                      .add_text("exit_signal", longest(records, [](auto& r) -> auto& { return r.exit_signal; }))
                      .add("requested", FieldKind::f64)
                      .add("granted", FieldKind::f64)
                      .add("cleared", FieldKind::f64));
    for (const RouteRecord& r : records)
        t.begin().u32(r.train).text(r.entry_signal).text(r.exit_signal).f64(r.requested).f64(r.granted).f64(
            r.cleared);
    t.flush();
    describe(t,
             "train: index into trains, entry_signal: text, exit_signal: text, requested: s after midnight, "
             "granted: s after midnight, cleared: s after midnight",
             "Route setting for each train: requested = the train asked for the route, granted = its sections "
             "were locked and set-up began, cleared = the entry signal showed proceed. NaN where a step did "
             "not happen.");
}

// Holds at signals and waits at stops share their layout: who, where, when, and the cause (as
// text ids, empty where the cause has none; the link as a row of /day/links, NaN where none).
void write_hold_table(const h5::Group& day, const char* name, const SimResult& r, const std::vector<HoldRecord>& records,
                      bool at_stop, const std::string& description) {
    auto id = [](const std::vector<std::string>& ids, std::uint32_t i) -> const std::string& {
        static const std::string none;
        return i < ids.size() ? ids[i] : none;
    };
    RecordLayout layout;
    layout.add("train", FieldKind::u32);
    if (at_stop) layout.add_text("station", longest(records, [](auto& h) -> auto& { return h.station; }));
    else layout.add_text("signal", longest(records, [](auto& h) -> auto& { return h.signal; }));
    layout.add("from", FieldKind::f64)
        .add("to", FieldKind::f64)
        .add_text("cause", 10)
        .add_text("cause_train", longest(records, [&](auto& h) -> auto& { return id(r.train_ids, h.cause.train); }))
        .add_text("cause_section",
                  longest(records, [&](auto& h) -> auto& { return id(r.section_names, h.cause.section); }))
        .add_text("cause_signal", longest(records, [](auto& h) -> auto& { return h.cause.signal; }))
        .add("cause_link", FieldKind::f64);
    RecordTable t(day, name, layout);
    for (const HoldRecord& h : records) {
        auto& row = t.begin().u32(h.train).text(at_stop ? h.station : h.signal).f64(h.from).f64(h.to);
        row.text(to_string(h.cause.kind))
            .text(id(r.train_ids, h.cause.train))
            .text(id(r.section_names, h.cause.section))
            .text(h.cause.signal)
            .f64(h.cause.link == HoldCause::kNone ? std::nan("") : static_cast<double>(h.cause.link));
    }
    t.flush();
    describe(t,
             std::string("train: index into trains, ") + (at_stop ? "station: text" : "signal: text") +
                 ", from: s after midnight, to: s after midnight, cause: text, cause_train: text, cause_section: "
                 "text, cause_signal: text, cause_link: row of links",
             description);
}

void write_holds(const h5::Group& day, const SimResult& r) {
    write_hold_table(day, "holds", r, r.holds, false,
                     "Time a train stood at a signal showing stop (not at a scheduled stop), with what held it.");
    write_hold_table(day, "waits", r, r.waits, true,
                     "Time a train, ready to leave a stop or its origin, was kept there, with what kept it.");
}

void write_links(const h5::Group& day, const SimResult& r) {
    RecordTable t(day, "links",
                  RecordLayout()
                      .add("from", FieldKind::u32)
                      .add("to", FieldKind::u32)
                      .add("connection", FieldKind::u8)
                      .add("arrival", FieldKind::f64)
                      .add("departure", FieldKind::f64)
                      .add("waited", FieldKind::f64)
                      .add("missed", FieldKind::u8));
    for (const LinkRecord& l : r.links)
        t.begin().u32(l.from).u32(l.to).u8(l.connection ? 1 : 0).f64(l.arrival).f64(l.departure).f64(l.waited).u8(
            l.missed ? 1 : 0);
    t.flush();
    describe(t,
             "from: index into trains, to: index into trains, connection: 0/1, arrival: s after midnight, "
             "departure: s after midnight, waited: s, missed: 0/1",
             "Each link of the timetable (turnaround, connection, crew link) in timetable order: the earlier "
             "train's arrival, the later train's departure, how long the link kept it beyond its own readiness, "
             "and whether a connection was missed. NaN where a train never got there.");
}

void write_crossing_changes(const h5::Group& day, const std::vector<CrossingChange>& records) {
    RecordTable t(day, "crossing_changes",
                  RecordLayout()
                      .add_text("kind", 16)
                      .add("first", FieldKind::u32)
                      .add("second", FieldKind::u32)
                      .add_text("planned_place", longest(records, [](auto& r) -> auto& { return r.planned_place; }))
                      .add_text("actual_place", longest(records, [](auto& r) -> auto& { return r.actual_place; }))
                      .add("when", FieldKind::f64)
                      .add("first_change", FieldKind::f64)
                      .add("second_change", FieldKind::f64));
    for (const CrossingChange& r : records)
        t.begin()
            .text(to_string(r.kind))
            .u32(r.first)
            .u32(r.second)
            .text(r.planned_place)
            .text(r.actual_place)
            .f64(r.when)
            .f64(r.first_change)
            .f64(r.second_change);
    t.flush();
    describe(t,
             "kind: text (crossing moved, order changed), first: index into trains, second: index into trains, "
             "planned_place: text, actual_place: text, when: s after midnight, first_change: s, second_change: s",
             "Single-track stretches: pairs of opposing trains that crossed at another crossing place than "
             "planned, and pairs of one direction that passed in another order (first = the train planned "
             "first over their first shared stretch; a place is empty where one direction keeps its order). "
             "when = the later of the two trains entering their shared stretches. first_change and "
             "second_change = each train's delay on leaving the later of the two places minus its delay on "
             "reaching the earlier one: positive lost, negative gained; NaN where not measurable.");
}

void write_trajectories(const h5::Group& day, const std::vector<TrajectorySample>& samples) {
    RecordTable t(day, "trajectories",
                  RecordLayout()
                      .add("train", FieldKind::u32)
                      .add("time", FieldKind::f64)
                      .add("position", FieldKind::f64)
                      .add("chainage", FieldKind::f64)
                      .add("speed", FieldKind::f64));
    for (const TrajectorySample& s : samples)
        t.begin().u32(s.train).f64(s.time).f64(s.position).f64(s.chainage).f64(s.speed);
    t.flush();
    describe(t,
             "train: index into trains, time: s after midnight, position: m along the train's path, "
             "chainage: m along the line, speed: m/s",
             "Sampled motion of each train (empty unless trajectories were requested).");
}

// One record per train the day left waiting, and one per section kept from such a train.
void write_deadlock(const h5::Group& day, const SimResult& r) {
    const std::vector<DeadlockWait>& waiting = r.deadlock.waiting;
    std::vector<std::string> texts, kinds, links, link_from;
    for (const DeadlockWait& w : waiting) {
        texts.push_back(describe_wait(w, r.train_ids, r.section_names));
        kinds.push_back(wait_name(w.waits_for));
        const bool link = w.waits_for == DeadlockWait::For::link && w.link_from < r.train_ids.size();
        links.push_back(link ? to_string(w.link_kind) : "");
        link_from.push_back(link ? r.train_ids[w.link_from] : "");
    }
    auto text_of = [](auto& s) -> auto& { return s; };
    RecordTable t(day, "deadlock",
                  RecordLayout()
                      .add("train", FieldKind::u32)
                      .add_text("waits_for", longest(kinds, [](auto& s) -> auto& { return s; }))
                      .add("chainage", FieldKind::f64)
                      .add_text("station", longest(waiting, [](auto& w) -> auto& { return w.station; }))
                      .add("since", FieldKind::f64)
                      .add_text("signal", longest(waiting, [](auto& w) -> auto& { return w.signal; }))
                      .add("route_set", FieldKind::f64)
                      .add("read_from", FieldKind::f64)
                      .add_text("link", longest(links, text_of))
                      .add_text("link_from", longest(link_from, text_of))
                      .add_text("text", longest(texts, text_of)));
    for (std::size_t i = 0; i < waiting.size(); ++i) {
        const DeadlockWait& w = waiting[i];
        t.begin()
            .u32(w.train)
            .text(kinds[i])
            .f64(w.chainage)
            .text(w.station)
            .f64(w.since)
            .text(w.signal)
            .f64(w.route_set)
            .f64(w.read_from)
            .text(links[i])
            .text(link_from[i])
            .text(texts[i]);
    }
    t.flush();
    describe(t,
             "train: index into trains, waits_for: appear / enter / entry_view / route / view / request / link / "
             "other, chainage: m along the line, station: text, since: s after midnight, signal: text, "
             "route_set: s after midnight, read_from: m along the line, link: turnaround / connection / crew, "
             "link_from: train id, text: text",
             "Each train a deadlocked day left waiting (none if the day ran to the end): where its head stood "
             "(NaN: not on the line), the timing point it stood at, since when it waited, what it waited for "
             "and at which signal, and for a route set but not seen when it was set and where the signal "
             "comes into view; for a link wait the kind of link and the earlier train it waits for (empty "
             "otherwise); text says it in words. The sections kept from it are in deadlock_blocks.");

    struct Block {
        std::uint32_t train, section;
        std::string by, holder;
    };
    std::vector<Block> blocks;
    for (const DeadlockWait& w : waiting)
        for (const DeadlockBlock& b : w.blocks)
            blocks.push_back({w.train, b.section, block_name(b.by),
                              b.by == DeadlockBlock::By::disruption || b.train >= r.train_ids.size()
                                  ? std::string()
                                  : r.train_ids[b.train]});
    RecordTable bt(day, "deadlock_blocks",
                   RecordLayout()
                       .add("train", FieldKind::u32)
                       .add("section", FieldKind::u32)
                       .add_text("by", longest(blocks, [](auto& b) -> auto& { return b.by; }))
                       .add_text("holder", longest(blocks, [](auto& b) -> auto& { return b.holder; })));
    for (const Block& b : blocks) bt.begin().u32(b.train).u32(b.section).text(b.by).text(b.holder);
    bt.flush();
    describe(bt,
             "train: index into trains, section: index into sections, by: held / promised / disruption, "
             "holder: train id",
             "For each train a deadlocked day left waiting, each section it needed that it could not have: held "
             "by another train, free but promised to a train planned to use it first (timetable order), or out "
             "of use (disruption; holder empty).");
}

}  // namespace

void write_deadlock_attributes(const h5::Group& root, std::size_t deadlocked_days, const std::string& notice) {
    const h5::Attributes a = root.attributes();
    a.set_u32("deadlocked_days", static_cast<std::uint32_t>(deadlocked_days));
    a.set_text("deadlock_notice", notice);
}

void write_run_attributes(const h5::Group& root, const Hdf5RunInfo& info, const std::string& kind) {
    const h5::Attributes a = root.attributes();
    a.set_i32("schema_version", kSimHdf5SchemaVersion);
    a.set_text("kind", kind);
    a.set_text("program", "knockon");
    a.set_text("program_version", info.program_version.empty() ? KNOCKON_VERSION : info.program_version);
    a.set_text("scenario_file", info.scenario_file);
    a.set_text("scenario_name", info.scenario_name);
    a.set_text("command_line", info.command_line);
    a.set_u64("seed", info.seed);
    a.set_text("time_unit", kTimeUnit);
    a.set_text("caution", kSafetyCaution);
    if (!info.variant.empty()) a.set_text("variant", info.variant);
    a.set_f64("step_m", info.step);
    if (!info.scenario_hash.empty()) a.set_text("scenario_hash", info.scenario_hash);
}

void write_day(const h5::Group& day, const SimResult& result, const DayAttribution* attribution) {
    const h5::Attributes d = day.attributes();
    d.set_u64("events", result.events);
    d.set_u64("block_passages", result.block_passages);
    d.set_u8("deadlocked", result.deadlock.deadlocked ? 1 : 0);
    d.set_text("deadlock_cause", result.deadlock.cause);
    d.set_text("deadlock_description", result.deadlock.description);
    d.set_f64("last_event_time", result.deadlock.time);
    const DaySummary summary = summarize_day(result);
    d.set_u32("trains_not_finished", static_cast<std::uint32_t>(summary.trains - summary.finished));

    write_names(day, "trains", result.train_ids,
                "Train ids; the 'train' field of the other tables is an index into this table.");
    write_names(day, "sections", result.section_names,
                "Detection section ids; the 'section' field of occupancy is an index into this table.");
    write_timing(day, result.timing);
    write_occupancy(day, result.sections);
    write_routes(day, result.routes);
    write_holds(day, result);
    write_links(day, result);
    write_crossing_changes(day, result.crossing_changes);
    write_trajectories(day, result.samples);
    write_deadlock(day, result);
    if (attribution) write_day_attribution(day, result, *attribution);
}

void write_sim_hdf5(const std::string& path, const SimResult& result, const Hdf5RunInfo& info,
                    const DayAttribution* attribution) {
    try {
        h5::OutputFile file(path);
        {
            const h5::Group root = file.root();
            write_run_attributes(root, info, "day");
            const DaySummary summary = summarize_day(result);
            write_deadlock_attributes(root, result.deadlock.deadlocked ? 1 : 0,
                                      day_deadlock_notice(result.deadlock, summary.trains,
                                                          summary.trains - summary.finished));
            write_day(root.create_group("day"), result, attribution);
        }  // every group and dataset handle is closed here, before the file
        file.commit();
    } catch (const std::runtime_error&) {  // h5::Error and the rename's error already name the file
        throw;
    } catch (const std::exception& e) {  // e.g. out of memory
        throw std::runtime_error(path + ": cannot write HDF5 results: " + e.what());
    }
}

}  // namespace knockon
