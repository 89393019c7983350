#include "tools/results/shard_hdf5.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <stdexcept>

#include "tools/results/hdf5_file.hpp"
#include "tools/results/hdf5_read.hpp"
#include "tools/results/results_file.hpp"
#include "tools/results/study_hdf5.hpp"

namespace knockon {

namespace {

using h5::FieldKind;
using h5::RecordLayout;
using h5::RecordTable;

const char* const kShard = "/shard";

std::uint32_t count32(std::size_t n) {
    if (n > std::numeric_limits<std::uint32_t>::max()) throw std::overflow_error("count does not fit in u32");
    return static_cast<std::uint32_t>(n);
}

std::size_t longest(const std::vector<std::string>& values) {
    std::size_t n = 0;
    for (const std::string& v : values) n = std::max(n, v.size());
    return n;
}

// A table of day-major rows of float figures kept as f64 (a float goes to double and back
// exactly), `per_day` rows a day.
RecordLayout values_layout(const std::vector<std::string>& fields) {
    RecordLayout layout;
    for (const std::string& f : fields) layout.add(f, FieldKind::f64);
    return layout;
}

}  // namespace

namespace {

// The tables of one study's days in `group` (/shard, or a variant's group in a comparison shard),
// filled a day at a time; finish() adds what the merge needs besides the days.
struct DayTables {
    DayTables(h5::Group g, const std::vector<double>& thresholds_s) : group(std::move(g)), thresholds(thresholds_s) {
        per_day.emplace(group, "per_day", per_day_layout(thresholds));
        timing.emplace(group, "timing_figures", values_layout({"arrival_delay", "knock_on"}));
        trains.emplace(group, "train_figures", values_layout({"primary", "knock_on", "final_delay"}));
        sections.emplace(group, "section_figures", values_layout({"blocked"}));
        buffers.emplace(group, "buffer_figures", values_layout({"as_run"}));
        attribution.emplace(group, "attribution_figures", values_layout({"value"}));
        held.emplace(group, "held",
                     RecordLayout().add("replication", FieldKind::u32).add("signal", FieldKind::u32).add("seconds", FieldKind::f64));
    }
    void add_day(const ReplicationFigures& day);
    void finish(const StudyResult& study);

    h5::Group group;
    std::vector<double> thresholds;
    std::optional<RecordTable> per_day, timing, trains, sections, buffers, attribution, held;
    std::map<std::string, std::uint32_t> signal_index;
    std::vector<std::string> signals;   // by index, in the order first met
    std::uint32_t days = 0;
    std::size_t records = 0, train_count = 0, section_count = 0, pairs = 0;
    AttributionLayout attribution_layout;
};

void DayTables::add_day(const ReplicationFigures& day) {
    DayTables& s = *this;
    if (s.days == 0) {
        s.records = day.arrival_delay.size();
        s.train_count = day.train_primary.size();
        s.section_count = day.section_blocked.size();
        s.pairs = day.buffer.size();
        s.attribution_layout = day.attribution_layout;
    } else if (day.arrival_delay.size() != s.records || day.train_primary.size() != s.train_count ||
               day.section_blocked.size() != s.section_count || day.buffer.size() != s.pairs ||
               !(day.attribution_layout == s.attribution_layout)) {
        throw std::logic_error("ShardHdf5Writer: replication " + std::to_string(day.stats.replication) +
                               " has another shape than the days before it");
    }
    const ReplicationStats& r = day.stats;
    add_per_day_record(*s.per_day, day.stats, s.thresholds);
    for (std::size_t k = 0; k < s.records; ++k) s.timing->begin().f64(day.arrival_delay[k]).f64(day.knock_on[k]);
    for (std::size_t t = 0; t < s.train_count; ++t)
        s.trains->begin().f64(day.train_primary[t]).f64(day.train_knock_on[t]).f64(day.train_final_delay[t]);
    for (float b : day.section_blocked) s.sections->begin().f64(b);
    for (float b : day.buffer) s.buffers->begin().f64(b);
    if (day.attribution.size() != s.attribution_layout.width())
        throw std::logic_error("ShardHdf5Writer: replication " + std::to_string(day.stats.replication) +
                               " has attribution figures of another length than their layout");
    for (float v : day.attribution) s.attribution->begin().f64(v);
    for (const auto& [signal, seconds] : day.held) {
        const auto [it, added] = s.signal_index.try_emplace(signal, count32(s.signals.size()));
        if (added) s.signals.push_back(signal);
        s.held->begin().u32(r.replication).u32(it->second).f64(seconds);
    }
    ++s.days;
}

void DayTables::finish(const StudyResult& study) {
    DayTables& s = *this;
    for (auto* t : {&s.per_day, &s.timing, &s.trains, &s.sections, &s.buffers, &s.attribution, &s.held}) {
        (*t)->flush();
        t->reset();
    }
    const h5::Group& g = s.group;
    const h5::Attributes a = g.attributes();
    a.set_u32("days", s.days);
    a.set_u8("partial", study.partial ? 1 : 0);
    a.set_u32("timing_records", count32(s.records));
    a.set_u32("trains", count32(s.train_count));
    a.set_u32("sections", count32(s.section_count));
    a.set_u32("buffer_pairs", count32(s.pairs));
    a.set_u32("attribution_links", s.attribution_layout.links);
    a.set_u32("attribution_places", s.attribution_layout.places);
    if (study.first_deadlock) write_first_deadlock(a, *study.first_deadlock);
    write_names(g, "held_signals", s.signals, "Signal ids; the 'signal' field of held is an index into this table.");
    write_names(g, "trains_index", study.train_ids, "Train ids of the timing template and the train figures.");
    write_names(g, "sections_index", study.section_names, "Detection section ids of the section figures.");
    std::vector<std::string> stations;
    for (const TimingRecord& t : study.timing_template) stations.push_back(t.station);
    RecordTable tmpl(g, "timing_template",
                     RecordLayout()
                         .add("train", FieldKind::u32)
                         .add("call", FieldKind::u32)
                         .add_text("station", longest(stations))
                         .add("stops", FieldKind::u8));
    for (const TimingRecord& t : study.timing_template)
        tmpl.begin().u32(t.train).u32(t.call).text(t.station).u8(t.stops ? 1 : 0);
    tmpl.flush();
}

// The facts of the run a merge compares, on /shard (study and comparison shards alike).
void write_run_facts(const h5::Group& g, const ShardRun& run) {
    const h5::Attributes a = g.attributes();
    a.set_u32("shard", run.shard);
    a.set_u32("shards", run.shards);
    a.set_u32("planned_replications", run.planned);
    a.set_u32("first_replication", run.first);
    a.set_u32("end_replication", run.end);
    a.set_text("scenario_text", run.scenario_text);
    a.set_f64_array("thresholds_s", run.thresholds);
    a.set_text("order", run.order);
    a.set_f64("sample_s", run.sample);
    a.set_text("traces", run.traces);
}

}  // namespace

struct ShardHdf5Writer::State {
    State(const std::string& path, const ShardRun& r) : file(path), run(r) {
        tables.emplace(file.root().create_group("shard"), r.thresholds);
    }
    h5::OutputFile file;   // declared first: closed after the groups and tables below
    ShardRun run;
    std::optional<DayTables> tables;
    std::optional<h5::Group> replications;
    std::uint32_t traced = 0;
};

ShardHdf5Writer::ShardHdf5Writer(const std::string& path, const Hdf5RunInfo& info, const ShardRun& run) {
    state_ = std::make_unique<State>(path, run);
    const h5::Group root = state_->file.root();
    write_run_attributes(root, info, "shard");
    write_run_facts(state_->tables->group, run);
    state_->replications.emplace(root.create_group("replications"));
    state_->replications->attributes().set_text("traces", run.traces);
}

ShardHdf5Writer::~ShardHdf5Writer() = default;

void ShardHdf5Writer::add_day(const ReplicationFigures& day) {
    if (!state_->replications) throw std::logic_error("ShardHdf5Writer: day after finish");
    state_->tables->add_day(day);
}

void ShardHdf5Writer::write_trace(std::uint32_t replication, const SimResult& day, const DayAttribution* attribution) {
    if (!state_->replications) throw std::logic_error("ShardHdf5Writer: trace after finish");
    write_day(state_->replications->create_group(replication_group_name(replication)), day, attribution);
    ++state_->traced;
}

void ShardHdf5Writer::finish(const StudyResult& study) {
    State& s = *state_;
    if (!s.replications) throw std::logic_error("ShardHdf5Writer: finished twice");
    s.replications->attributes().set_u32("traced", s.traced);
    s.replications.reset();
    s.tables->finish(study);
    s.tables.reset();
    s.file.commit();
}

struct ComparisonShardHdf5Writer::State {
    explicit State(const std::string& path) : file(path) {}
    h5::OutputFile file;   // declared first: closed after the groups and tables below
    ShardRun run;
    std::vector<ShardVariant> variants;
    std::optional<h5::Group> shard, all;
    std::optional<DayTables> tables;   // the variant whose days come now
    std::size_t next = 0;              // variants begun so far
    bool finished = false;
};

ComparisonShardHdf5Writer::ComparisonShardHdf5Writer(const std::string& path, const Hdf5RunInfo& info,
                                                     const ShardRun& run, const std::vector<ShardVariant>& variants)
    : state_(std::make_unique<State>(path)) {
    State& s = *state_;
    s.run = run;
    s.variants = variants;
    write_run_attributes(s.file.root(), info, ShardFile::kComparisonShardKind);
    s.shard.emplace(s.file.root().create_group("shard"));
    write_run_facts(*s.shard, run);
    s.shard->attributes().set_u32("variants", count32(variants.size()));
    s.all.emplace(s.shard->create_group("variants"));
    std::vector<std::string> names, descriptions;
    for (const ShardVariant& v : variants) {
        names.push_back(v.name);
        descriptions.push_back(v.description);
    }
    write_names(*s.shard, "variants_index", names, "The variants compared, in order (the first is the reference); "
                "each one's days are under /shard/variants/<name>.");
    write_names(*s.shard, "variant_descriptions", descriptions, "The description of each variant of variants_index.");
}

ComparisonShardHdf5Writer::~ComparisonShardHdf5Writer() = default;

void ComparisonShardHdf5Writer::begin_variant() {
    State& s = *state_;
    if (s.finished || s.tables || s.next >= s.variants.size())
        throw std::logic_error("ComparisonShardHdf5Writer: no variant to begin");
    s.tables.emplace(s.all->create_group(s.variants[s.next].name), s.run.thresholds);
    ++s.next;
}

void ComparisonShardHdf5Writer::add_day(const ReplicationFigures& day) {
    if (!state_->tables) throw std::logic_error("ComparisonShardHdf5Writer: day outside a variant");
    state_->tables->add_day(day);
}

void ComparisonShardHdf5Writer::end_variant(const StudyResult& study) {
    State& s = *state_;
    if (!s.tables) throw std::logic_error("ComparisonShardHdf5Writer: no variant to end");
    s.tables->finish(study);
    s.tables.reset();
}

void ComparisonShardHdf5Writer::finish() {
    State& s = *state_;
    if (s.finished || s.tables || s.next != s.variants.size())
        throw std::logic_error("ComparisonShardHdf5Writer: finished before every variant ended");
    s.all.reset();
    s.shard.reset();
    s.file.commit();
    s.finished = true;
}

// ---------------------------------------------------------------------------------------------

namespace {

std::uint32_t u32_attribute(const h5::InputFile& f, const std::string& object, const std::string& name) {
    const double v = f.number_attribute(object, name);
    if (!(v >= 0.0 && v <= 4294967295.0) || v != std::floor(v))
        throw h5::Error(f.path() + ": " + object + ": attribute " + name + " is not a whole number of 32 bits");
    return static_cast<std::uint32_t>(v);
}

void expect_rows(const h5::InputFile& f, const std::string& table, std::size_t rows) {
    if (f.rows(table) != rows)
        throw h5::Error(f.path() + ": " + table + ": " + std::to_string(f.rows(table)) + " records, expected " +
                        std::to_string(rows));
}

}  // namespace

namespace {

// What the merge needs of one study's days besides the tables: read from `group`.
ShardDays read_day_facts(const h5::InputFile& f, const std::string& group) {
    ShardDays s;
    s.group = group;
    s.partial = f.number_attribute(group, "partial") != 0.0;
    s.days = u32_attribute(f, group, "days");
    s.train_ids = f.text_column(group + "/trains_index", "id");
    s.section_names = f.text_column(group + "/sections_index", "id");
    const std::string tt = group + "/timing_template";
    const auto train = f.number_column(tt, "train"), call = f.number_column(tt, "call"),
               stops = f.number_column(tt, "stops");
    const auto station = f.text_column(tt, "station");
    for (std::size_t k = 0; k < train.size(); ++k) {
        TimingRecord t;
        t.train = static_cast<std::uint32_t>(train[k]);
        t.call = static_cast<std::uint32_t>(call[k]);
        t.station = station[k];
        t.stops = stops[k] != 0.0;
        s.timing_template.push_back(std::move(t));
    }
    if (f.has_attribute(group, "first_deadlock_replication")) {
        DeadlockedDay d;
        d.replication = u32_attribute(f, group, "first_deadlock_replication");
        d.report.deadlocked = true;
        d.report.time = f.number_attribute(group, "first_deadlock_time");
        d.report.cause = f.text_attribute(group, "first_deadlock_cause");
        d.report.description = f.text_attribute(group, "first_deadlock_description");
        s.first_deadlock = std::move(d);
    }
    return s;
}

}  // namespace

ShardFile read_shard_file(const std::string& path) {
    const h5::InputFile f(path);
    ShardFile s;
    s.path = path;
    if (!f.has_attribute("/", "program") || f.text_attribute("/", "program") != "knockon" ||
        !f.has_attribute("/", "kind"))
        throw h5::Error(path + ": not a knockon results file");
    s.kind = f.text_attribute("/", "kind");
    if (s.kind != "shard" && !s.comparison())
        throw h5::Error(path + ": a '" + s.kind + "' results file, not a study shard (simulate --shard K/N --out) "
                        "nor a comparison shard (compare --shard K/N --out)");
    s.program_version = f.text_attribute("/", "program_version");
    s.scenario_file = f.text_attribute("/", "scenario_file");
    s.scenario_name = f.text_attribute("/", "scenario_name");
    s.scenario_hash = f.text_attribute("/", "scenario_hash");
    if (!s.comparison()) s.variant = f.text_attribute("/", "variant");
    s.seed = static_cast<std::uint64_t>(f.number_attribute("/", "seed"));
    s.step = f.number_attribute("/", "step_m");
    ShardRun& r = s.run;
    r.shard = u32_attribute(f, kShard, "shard");
    r.shards = u32_attribute(f, kShard, "shards");
    r.planned = u32_attribute(f, kShard, "planned_replications");
    r.first = u32_attribute(f, kShard, "first_replication");
    r.end = u32_attribute(f, kShard, "end_replication");
    r.scenario_text = f.text_attribute(kShard, "scenario_text");
    r.thresholds = f.number_array_attribute(kShard, "thresholds_s");
    r.order = f.text_attribute(kShard, "order");
    r.sample = f.number_attribute(kShard, "sample_s");
    r.traces = f.text_attribute(kShard, "traces");
    if (!s.comparison()) {
        s.studies.push_back(read_day_facts(f, kShard));
        for (const std::string& name : f.members("/replications")) {
            if (name.empty() || name.find_first_not_of("0123456789") != std::string::npos || name.size() > 9)
                throw h5::Error(path + ": /replications/" + name + ": not a replication number");
            s.traced.push_back(static_cast<std::uint32_t>(std::stoul(name)));
        }
        std::sort(s.traced.begin(), s.traced.end());
        return s;
    }
    const std::vector<std::string> names = f.text_column("/shard/variants_index", "id"),
                                   descriptions = f.text_column("/shard/variant_descriptions", "id");
    if (names.size() != descriptions.size() || names.size() != u32_attribute(f, kShard, "variants"))
        throw h5::Error(path + ": /shard/variants_index: " + std::to_string(names.size()) +
                        " variants, not as many as the shard says; the file is damaged");
    const std::vector<std::string> groups = f.members("/shard/variants");
    for (std::size_t v = 0; v < names.size(); ++v) {
        if (std::find(groups.begin(), groups.end(), names[v]) == groups.end())
            throw h5::Error(path + ": /shard/variants/" + names[v] + ": missing; the file is damaged");
        ShardDays d = read_day_facts(f, "/shard/variants/" + names[v]);
        d.variant = {names[v], descriptions[v]};
        s.studies.push_back(std::move(d));
    }
    return s;
}

std::vector<ReplicationFigures> read_shard_days(const ShardFile& shard, const ShardDays& study) {
    const h5::InputFile f(shard.path);
    const std::string& g = study.group;
    const std::size_t days = study.days;
    const std::size_t records = u32_attribute(f, g, "timing_records"), trains = u32_attribute(f, g, "trains"),
                      sections = u32_attribute(f, g, "sections"), pairs = u32_attribute(f, g, "buffer_pairs");
    const std::string pd = g + "/per_day", timing = g + "/timing_figures", train_table = g + "/train_figures",
                      section_table = g + "/section_figures", buffer_table = g + "/buffer_figures", held = g + "/held";
    expect_rows(f, pd, days);
    expect_rows(f, timing, days * records);
    expect_rows(f, train_table, days * trains);
    expect_rows(f, section_table, days * sections);
    expect_rows(f, buffer_table, days * pairs);
    // The attribution row's layout: the counts above, the links and the places.
    const std::string attribution_table = g + "/attribution_figures";
    AttributionLayout layout;
    layout.records = count32(records);
    layout.trains = count32(trains);
    layout.sections = count32(sections);
    layout.pairs = count32(pairs);
    layout.links = u32_attribute(f, g, "attribution_links");
    layout.places = u32_attribute(f, g, "attribution_places");
    const std::size_t width = days == 0 ? 0 : layout.width();
    expect_rows(f, attribution_table, days * width);
    const std::vector<ReplicationStats> per_day = read_per_day_table(f, pd, shard.run.thresholds, kSimHdf5SchemaVersion);
    const auto arrival = f.number_column(timing, "arrival_delay"),
               record_knock_on = f.number_column(timing, "knock_on"),
               train_primary = f.number_column(train_table, "primary"),
               train_knock_on = f.number_column(train_table, "knock_on"),
               train_final = f.number_column(train_table, "final_delay"),
               blocked = f.number_column(section_table, "blocked"),
               buffer = f.number_column(buffer_table, "as_run"),
               attribution = f.number_column(attribution_table, "value");
    const auto held_day = f.number_column(held, "replication"), held_signal = f.number_column(held, "signal"),
               held_s = f.number_column(held, "seconds");
    const auto signals = f.text_column(g + "/held_signals", "id");

    // The figures were floats: back from double exactly.  A value no float can hold (a damaged or
    // foreign file) is refused before the cast, which would be undefined.
    const auto floats = [&shard](const std::vector<double>& v, std::size_t from, std::size_t n) {
        std::vector<float> out(n);
        for (std::size_t i = 0; i < n; ++i) {
            const double x = v[from + i];
            if (!std::isnan(x) && !(std::fabs(x) <= static_cast<double>(std::numeric_limits<float>::max())))
                throw h5::Error(shard.path + ": a day's figure holds " + std::to_string(x) +
                                ", which no stored figure can be; the file is damaged");
            out[i] = static_cast<float>(x);
        }
        return out;
    };
    // A whole number below `limit`, checked before the cast.
    const auto index = [&shard, &held](double x, std::size_t limit, std::size_t record) {
        if (!(x >= 0.0 && x < static_cast<double>(limit) && x == std::floor(x)))
            throw h5::Error(shard.path + ": " + held + ": record " + std::to_string(record) +
                            " names a day or signal the shard does not have");
        return static_cast<std::size_t>(x);
    };
    std::vector<ReplicationFigures> out(days);
    std::map<std::uint32_t, std::size_t> day_of;   // replication -> row
    for (std::size_t d = 0; d < days; ++d) {
        ReplicationFigures& r = out[d];
        ReplicationStats& st = r.stats;
        st = per_day[d];
        if (st.deadlocked && study.first_deadlock && study.first_deadlock->replication == st.replication)
            r.deadlock = study.first_deadlock->report;
        r.arrival_delay = floats(arrival, d * records, records);
        r.knock_on = floats(record_knock_on, d * records, records);
        r.train_primary = floats(train_primary, d * trains, trains);
        r.train_knock_on = floats(train_knock_on, d * trains, trains);
        r.train_final_delay = floats(train_final, d * trains, trains);
        r.section_blocked = floats(blocked, d * sections, sections);
        r.buffer = floats(buffer, d * pairs, pairs);
        r.attribution_layout = layout;
        r.attribution = floats(attribution, d * width, width);
        day_of[st.replication] = d;
    }
    for (std::size_t i = 0; i < held_day.size(); ++i) {
        const auto day = day_of.find(static_cast<std::uint32_t>(index(held_day[i], UINT32_MAX, i)));
        const std::size_t signal = index(held_signal[i], signals.size(), i);
        if (day == day_of.end() || signal >= signals.size())
            throw h5::Error(shard.path + ": " + held + ": record " + std::to_string(i) +
                            " names a day or signal the shard does not have");
        out[day->second].held[signals[signal]] = held_s[i];
    }
    return out;
}

}  // namespace knockon
