#include "tools/results/study_hdf5.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <limits>
#include <stdexcept>
#include <vector>

#include "tools/results/attribution_hdf5.hpp"
#include "tools/results/deadlock_output.hpp"
#include "tools/results/hdf5_file.hpp"

namespace knockon {

namespace {

using h5::FieldKind;
using h5::RecordLayout;
using h5::RecordTable;

const double kNaN = std::numeric_limits<double>::quiet_NaN();

std::size_t longest(const std::vector<std::string>& values) {
    std::size_t n = 0;
    for (const std::string& v : values) n = std::max(n, v.size());
    return n;
}

std::uint32_t count32(std::size_t n) {
    if (n > std::numeric_limits<std::uint32_t>::max()) throw std::overflow_error("count does not fit in u32");
    return static_cast<std::uint32_t>(n);
}

}  // namespace

void write_first_deadlock(const h5::Attributes& a, const DeadlockedDay& d) {
    a.set_u32("first_deadlock_replication", d.replication);
    a.set_f64("first_deadlock_time", d.report.time);
    a.set_text("first_deadlock_cause", d.report.cause);
    a.set_text("first_deadlock_description", d.report.description);
}

RecordLayout per_day_layout(const std::vector<double>& thresholds) {
    RecordLayout layout;
    layout.add("replication", FieldKind::u32)
        .add("deadlocked", FieldKind::u8)
        .add("events", FieldKind::u64)
        .add("block_passages", FieldKind::u64)
        .add("total_primary", FieldKind::f64)
        .add("total_knock_on", FieldKind::f64)
        .add("mean_arrival_delay", FieldKind::f64)
        .add("moved_crossings", FieldKind::u32)
        .add("changed_orders", FieldKind::u32)
        .add("missed_connections", FieldKind::u32);
    for (double t : thresholds) layout.add(punctuality_field(t), FieldKind::f64);
    return layout;
}

void add_per_day_record(RecordTable& table, const ReplicationStats& r, const std::vector<double>& thresholds) {
    table.begin()
        .u32(r.replication)
        .u8(r.deadlocked ? 1 : 0)
        .u64(r.events)
        .u64(r.block_passages)
        .f64(r.total_primary)
        .f64(r.total_knock_on)
        .f64(r.mean_arrival_delay)
        .u32(r.moved_crossings)
        .u32(r.changed_orders)
        .u32(r.missed_connections);
    for (std::size_t i = 0; i < thresholds.size(); ++i)
        table.f64(i < r.punctuality.size() ? r.punctuality[i] : kNaN);
}

namespace {

void write_per_day(const h5::Group& g, const StudyResult& study, const std::vector<double>& thresholds) {
    std::string units =
        "replication: 0-based replication number, deadlocked: 1 = the day ended in deadlock / 0 = not, "
        "events: count, block_passages: count, total_primary: s, total_knock_on: s, mean_arrival_delay: s, "
        "moved_crossings: count, changed_orders: count, missed_connections: count";
    for (double t : thresholds) units += ", " + punctuality_field(t) + ": share of arrivals and passes (0 to 1)";
    RecordTable table(g, "per_day", per_day_layout(thresholds));
    for (const ReplicationStats& r : study.replications) add_per_day_record(table, r, thresholds);
    table.flush();
    describe(table, units,
             "One record per simulated day, in replication order: primary delay injected into all trains, "
             "knock-on delay of all trains, mean arrival delay (early counted as 0) and the share of "
             "arrivals and passes with delay strictly below each threshold, and on single-track stretches "
             "the crossings that took place at another crossing place than planned and the pairs of one "
             "direction that passed in another order (sim/crossing_changes.hpp). A day that ended in deadlock "
             "(deadlocked = 1) keeps its sums up to the deadlock, has NaN mean and shares, and enters no "
             "figure of the other tables.");
}

void write_summary(const h5::Group& g, const StudySummary& s) {
    struct Row {
        std::string figure, unit;
        Estimate e;
    };
    std::vector<Row> rows = {{"total_primary", "s", s.total_primary},
                             {"total_knock_on", "s", s.total_knock_on},
                             {"mean_arrival_delay", "s", s.mean_arrival_delay},
                             {"moved_crossings", "count", s.moved_crossings},
                             {"changed_orders", "count", s.changed_orders},
                             {"missed_connections", "count", s.missed_connections}};
    for (std::size_t i = 0; i < s.thresholds.size() && i < s.punctuality.size(); ++i)
        rows.push_back({punctuality_field(s.thresholds[i]), "share", s.punctuality[i]});
    std::vector<std::string> figures, units;
    for (const Row& r : rows) {
        figures.push_back(r.figure);
        units.push_back(r.unit);
    }
    RecordLayout layout;
    layout.add_text("figure", longest(figures)).add_text("unit", longest(units));
    add_estimate_fields(layout);
    RecordTable table(g, "summary", layout);
    for (const Row& r : rows)
        table.begin().text(r.figure).text(r.unit).f64(r.e.mean).f64(r.e.half_width).f64(r.e.lower).f64(r.e.upper).u64(
            r.e.n);
    table.flush();
    describe(table, std::string("figure: name of a per_day field, unit: text (s, share or count), ") + kEstimateUnits,
             "Mean over the complete days (not ended in deadlock) of one per_day field with its 95 % "
             "confidence interval (Student t); the same figures as the JSON output's per_day.");
}

// Row k is timing record k of every day (SimResult::timing order, as in /replications/<k>/timing).
void write_timing_points(const h5::Group& g, const StudyResult& study, const StudySummary& s) {
    std::vector<std::string> stations;
    for (const TimingPointStats& tp : s.timing_points) stations.push_back(tp.station);
    RecordLayout layout;
    layout.add("train", FieldKind::u32)
        .add("call", FieldKind::u32)
        .add_text("station", longest(stations))
        .add("stops", FieldKind::u8)
        .add("reached", FieldKind::u32)
        .add("delay_mean", FieldKind::f64)
        .add("delay_ci95_half_width", FieldKind::f64)
        .add("p50", FieldKind::f64)
        .add("p90", FieldKind::f64)
        .add("p95", FieldKind::f64)
        .add("max", FieldKind::f64)
        .add("knock_on_mean", FieldKind::f64)
        .add("knock_on_ci95_half_width", FieldKind::f64);
    std::string units =
        "train: index into trains_index, call: 0-based timing point of the train, station: text, "
        "stops: 1 = scheduled stop / 0 = pass, reached: days, delay_mean: s, delay_ci95_half_width: s, "
        "p50: s, p90: s, p95: s, max: s, knock_on_mean: s, knock_on_ci95_half_width: s";
    for (double t : s.thresholds) {
        const std::string name = punctuality_field(t);
        layout.add(name + "_share", FieldKind::f64);
        layout.add(name + "_lower", FieldKind::f64);
        layout.add(name + "_upper", FieldKind::f64);
        units += ", " + name + "_share: share (0 to 1), " + name + "_lower: share, " + name + "_upper: share";
    }
    RecordTable table(g, "timing_points", layout);
    for (std::size_t k = 0; k < s.timing_points.size(); ++k) {
        const TimingPointStats& tp = s.timing_points[k];
        // Never reached: no delay to describe, NaN as for any figure that did not happen.
        const bool reached = tp.reached > 0;
        auto or_nan = [&](double v) { return reached ? v : kNaN; };
        table.begin()
            .u32(tp.train)
            .u32(k < study.timing_template.size() ? study.timing_template[k].call : 0)
            .text(tp.station)
            .u8(tp.stops ? 1 : 0)
            .u32(count32(tp.reached))
            .f64(or_nan(tp.delay.mean))
            .f64(or_nan(tp.delay.half_width))
            .f64(or_nan(tp.delay_quantiles.p50))
            .f64(or_nan(tp.delay_quantiles.p90))
            .f64(or_nan(tp.delay_quantiles.p95))
            .f64(or_nan(tp.delay_quantiles.max))
            .f64(tp.knock_on.mean)
            .f64(tp.knock_on.half_width);
        for (std::size_t i = 0; i < s.thresholds.size(); ++i) {
            const bool has = i < tp.punctuality.size();
            table.f64(has ? tp.punctuality[i].mean : kNaN)
                .f64(has ? tp.punctuality[i].lower : kNaN)
                .f64(has ? tp.punctuality[i].upper : kNaN);
        }
    }
    table.flush();
    describe(table, units,
             "Per train and timing point over the days: arrival delay (early counted as 0; mean with 95 % CI "
             "half-width and quantiles p50/p90/p95/max, over the days the train got there), knock-on delay "
             "gathered on the way there and waiting to leave (over all days), and the share of days within "
             "each threshold (delay strictly below it) with its 95 % Wilson interval. NaN where the train "
             "never got there.");
}

void write_trains(const h5::Group& g, const StudySummary& s) {
    RecordTable table(g, "trains",
                      RecordLayout()
                          .add("train", FieldKind::u32)
                          .add("primary_mean", FieldKind::f64)
                          .add("primary_ci95_half_width", FieldKind::f64)
                          .add("knock_on_mean", FieldKind::f64)
                          .add("knock_on_ci95_half_width", FieldKind::f64)
                          .add("final_delay_mean", FieldKind::f64)
                          .add("final_delay_ci95_half_width", FieldKind::f64));
    for (const TrainStats& t : s.trains)
        table.begin()
            .u32(t.train)
            .f64(t.primary.mean)
            .f64(t.primary.half_width)
            .f64(t.knock_on.mean)
            .f64(t.knock_on.half_width)
            .f64(t.final_delay.mean)
            .f64(t.final_delay.half_width);
    table.flush();
    describe(table,
             "train: index into trains_index, primary_mean: s, primary_ci95_half_width: s, knock_on_mean: s, "
             "knock_on_ci95_half_width: s, final_delay_mean: s, final_delay_ci95_half_width: s",
             "Per train, mean per day with 95 % CI half-width: primary delay injected, knock-on delay, delay "
             "at the last timing point reached.");
}

void write_signals(const h5::Group& g, const StudySummary& s) {
    std::vector<std::string> names;
    for (const SignalStats& sg : s.signals) names.push_back(sg.signal);
    RecordTable table(g, "signals",
                      RecordLayout()
                          .add_text("signal", longest(names))
                          .add("held_mean", FieldKind::f64)
                          .add("held_ci95_half_width", FieldKind::f64));
    for (const SignalStats& sg : s.signals) table.begin().text(sg.signal).f64(sg.held.mean).f64(sg.held.half_width);
    table.flush();
    describe(table, "signal: text, held_mean: s, held_ci95_half_width: s",
             "Signals where trains stood at stop, largest mean first: time all trains stood there per day "
             "(days without a stand count as 0), with 95 % CI half-width.");
}

void write_sections(const h5::Group& g, const StudySummary& s) {
    RecordTable table(g, "sections",
                      RecordLayout()
                          .add("section", FieldKind::u32)
                          .add("blocked_share_mean", FieldKind::f64)
                          .add("blocked_share_ci95_half_width", FieldKind::f64));
    for (std::size_t k = 0; k < s.section_blocked_share.size(); ++k)
        table.begin().u32(count32(k)).f64(s.section_blocked_share[k].mean).f64(s.section_blocked_share[k].half_width);
    table.flush();
    describe(table,
             "section: index into sections_index, blocked_share_mean: share of 24 h (0 to 1), "
             "blocked_share_ci95_half_width: share",
             "Per detection section: share of the day it was blocked as run (from locked to released), mean "
             "over the days with 95 % CI half-width.");
}

void write_buffers(const h5::Group& g, const SimModel& model, const StudySummary& s) {
    std::vector<std::string> names;
    for (const SimModel::BufferPair& bp : model.buffer_pairs()) names.push_back(bp.line_section);
    RecordTable table(g, "buffers",
                      RecordLayout()
                          .add("leader", FieldKind::u32)
                          .add("follower", FieldKind::u32)
                          .add_text("line_section", longest(names))
                          .add("section", FieldKind::u32)
                          .add("planned", FieldKind::f64)
                          .add("as_run_mean", FieldKind::f64)
                          .add("as_run_ci95_half_width", FieldKind::f64)
                          .add("p10", FieldKind::f64)
                          .add("n", FieldKind::u64));
    for (const BufferStats& b : s.buffers) {
        const SimModel::BufferPair& bp = model.buffer_pairs().at(b.pair);
        table.begin()
            .u32(bp.leader)
            .u32(bp.follower)
            .text(bp.line_section)
            .u32(bp.section)
            .f64(b.planned)
            .f64(b.as_run.mean)
            .f64(b.as_run.half_width)
            .f64(b.p10)
            .u64(b.as_run.n);
    }
    table.flush();
    describe(table,
             "leader: index into trains_index, follower: index into trains_index, line_section: text, "
             "section: index into sections_index, planned: s, as_run_mean: s, as_run_ci95_half_width: s, "
             "p10: s, n: days",
             "Consecutive trains of the plan on their critical detection section, thinnest as-run buffer "
             "first: planned buffer, and as run the follower's blocking start minus the leader's blocking "
             "end (negative: the follower was held up), mean with 95 % CI half-width and the value that "
             "10 % of days fell below, over the days both trains used the section.");
}

}  // namespace

void write_study_tables(const h5::Group& g, const SimModel& model, const StudyResult& study, const StudySummary& s) {
    const h5::Attributes a = g.attributes();
    a.set_u32("replications", count32(study.replications.size()));
    a.set_u8("partial", study.partial ? 1 : 0);
    a.set_u32("deadlocked_days", count32(s.deadlocked));
    a.set_u32("complete_days", count32(s.complete));
    if (s.first_deadlock) write_first_deadlock(a, *s.first_deadlock);
    a.set_f64("knock_on_ratio", s.knock_on_ratio);
    a.set_f64_array("thresholds_s", s.thresholds);

    write_per_day(g, study, s.thresholds);
    write_summary(g, s);
    write_timing_points(g, study, s);
    write_trains(g, s);
    write_signals(g, s);
    write_sections(g, s);
    write_buffers(g, model, s);
    write_study_attribution(g, model, s.attribution, study.timing_template);
    write_names(g, "trains_index", study.train_ids,
                "Train ids; the 'train' field of timing_points and trains is an index into this table.");
    write_names(g, "sections_index", study.section_names,
                "Detection section ids; the 'section' field of sections is an index into this table.");
}

// ---------------------------------------------------------------------------------------------

void add_estimate_fields(RecordLayout& layout) {
    layout.add("mean", FieldKind::f64)
        .add("ci95_half_width", FieldKind::f64)
        .add("ci95_lower", FieldKind::f64)
        .add("ci95_upper", FieldKind::f64)
        .add("n", FieldKind::u64);
}

std::string punctuality_field(double seconds) {
    // "3min" for whole minutes, else "150s".
    char buf[48];
    if (seconds >= 0.0 && std::fmod(seconds, 60.0) == 0.0)
        std::snprintf(buf, sizeof buf, "punctual_%.0fmin", seconds / 60.0);
    else
        std::snprintf(buf, sizeof buf, "punctual_%gs", seconds);
    return buf;
}

bool TraceSelection::traced(std::uint32_t replication, std::uint32_t planned) const {
    switch (mode) {
        case Mode::none: return false;
        case Mode::all: return true;
        case Mode::sample: {
            if (sample >= planned) return true;
            const std::uint64_t k = replication, K = sample, N = planned;
            return (k + 1) * K / N > k * K / N;
        }
    }
    return false;
}

std::string TraceSelection::text() const {
    switch (mode) {
        case Mode::none: return "none";
        case Mode::all: return "all";
        case Mode::sample: return "sample:" + std::to_string(sample);
    }
    return "none";
}

std::optional<TraceSelection> parse_trace_selection(const std::string& text) {
    TraceSelection t;
    if (text == "none") return t;
    if (text == "all") {
        t.mode = TraceSelection::Mode::all;
        return t;
    }
    const std::string prefix = "sample:";
    if (text.compare(0, prefix.size(), prefix) != 0) return std::nullopt;
    const char* first = text.data() + prefix.size();
    const char* last = text.data() + text.size();
    std::uint32_t k = 0;
    const auto [end, ec] = std::from_chars(first, last, k);
    if (first == last || ec != std::errc() || end != last || k == 0) return std::nullopt;
    t.mode = TraceSelection::Mode::sample;
    t.sample = k;
    return t;
}

std::string replication_group_name(std::uint32_t replication) {
    char buf[16];
    std::snprintf(buf, sizeof buf, "%06u", static_cast<unsigned>(replication));
    return buf;
}

// ---------------------------------------------------------------------------------------------

struct StudyHdf5Writer::State {
    explicit State(const std::string& path) : file(path) {}
    h5::OutputFile file;                    // declared first: closed after the groups below
    std::optional<h5::Group> replications;  // /replications, open while days come in
    std::uint32_t traced = 0;
};

StudyHdf5Writer::StudyHdf5Writer(const std::string& path, const Hdf5RunInfo& info, const TraceSelection& traces)
    : state_(std::make_unique<State>(path)) {
    const h5::Group root = state_->file.root();
    write_run_attributes(root, info, "study");
    state_->replications.emplace(root.create_group("replications"));
    state_->replications->attributes().set_text("traces", traces.text());
}

StudyHdf5Writer::~StudyHdf5Writer() = default;  // State: groups closed, then the file discarded

void StudyHdf5Writer::write_trace(std::uint32_t replication, const SimResult& day, const DayAttribution* attribution) {
    if (!state_->replications) throw std::logic_error("StudyHdf5Writer: trace after finish");
    write_day(state_->replications->create_group(replication_group_name(replication)), day, attribution);
    ++state_->traced;
}

void StudyHdf5Writer::copy_trace(const std::string& file, std::uint32_t replication) {
    if (!state_->replications) throw std::logic_error("StudyHdf5Writer: trace after finish");
    const std::string name = replication_group_name(replication);
    const h5::Place from{file, "/replications/" + name};
    const h5::Handle source(h5::check(H5Fopen(file.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), from, "cannot open"), H5Fclose);
    h5::check_status(H5Ocopy(source.id(), from.object.c_str(), state_->replications->id(), name.c_str(), H5P_DEFAULT,
                             H5P_DEFAULT),
                     from, "cannot copy the traced day");
    ++state_->traced;
}

void StudyHdf5Writer::finish(const SimModel& model, const StudyResult& study, const StudySummary& summary) {
    if (!state_->replications) throw std::logic_error("StudyHdf5Writer: finished twice");
    state_->replications->attributes().set_u32("traced", state_->traced);
    state_->replications.reset();
    {
        const h5::Group root = state_->file.root();
        write_deadlock_attributes(root, summary.deadlocked, study_deadlock_notice(summary));
        root.attributes().set_u32("replications", count32(study.replications.size()));
        root.attributes().set_u8("partial", study.partial ? 1 : 0);
        write_study_tables(root.create_group("study"), model, study, summary);
    }  // every group and dataset closed before the file
    state_->file.commit();
}

}  // namespace knockon
