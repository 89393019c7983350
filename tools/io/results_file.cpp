#include "tools/io/results_file.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "sim/deadlock_text.hpp"
#include "tools/io/hdf5_read.hpp"
#include "tools/io/sim_hdf5.hpp"
#include "tools/io/study_hdf5.hpp"

namespace knockon {

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

// The columns of one table, read as needed, with the table's row count checked once.
class Table {
public:
    Table(const h5::InputFile& f, std::string path) : f_(f), path_(std::move(path)), rows_(f.rows(path_)) {}
    std::size_t rows() const { return rows_; }
    std::vector<double> num(const std::string& field) const { return f_.number_column(path_, field); }
    std::vector<std::string> text(const std::string& field) const { return f_.text_column(path_, field); }
    // An index column whose values must lie in [0, limit).
    std::vector<std::uint32_t> index(const std::string& field, std::size_t limit, const std::string& of) const {
        std::vector<std::uint32_t> out;
        out.reserve(rows_);
        for (double v : num(field)) {
            if (!(v >= 0.0 && v < static_cast<double>(limit) && v == std::floor(v)))
                throw ResultsFileError(f_.path() + ": " + path_ + ": field '" + field + "' holds " +
                                       std::to_string(v) + ", not a row of " + of + " (" + std::to_string(limit) +
                                       " rows)");
            out.push_back(static_cast<std::uint32_t>(v));
        }
        return out;
    }
    const std::string& path() const { return path_; }

private:
    const h5::InputFile& f_;
    std::string path_;
    std::size_t rows_;
};

// The columns of an estimate with its 95 % interval (mean, ci95_half_width, ci95_lower,
// ci95_upper, n), as /study/summary and /comparison/differences hold them.
class EstimateColumns {
public:
    explicit EstimateColumns(const Table& t)
        : mean_(t.num("mean")), half_(t.num("ci95_half_width")), lower_(t.num("ci95_lower")),
          upper_(t.num("ci95_upper")), n_(t.num("n")) {}
    Estimate at(std::size_t i) const {
        Estimate e;
        e.mean = mean_[i];
        e.half_width = half_[i];
        e.lower = lower_[i];
        e.upper = upper_[i];
        e.n = static_cast<std::size_t>(n_[i]);
        return e;
    }

private:
    std::vector<double> mean_, half_, lower_, upper_, n_;
};

std::vector<std::string> ids(const h5::InputFile& f, const std::string& table) { return f.text_column(table, "id"); }

Estimate mean_estimate(double mean, double half, std::size_t n) {
    Estimate e;
    e.mean = mean;
    e.half_width = half;
    e.lower = mean - half;
    e.upper = mean + half;
    e.n = n;
    return e;
}

// The trains a deadlocked day left waiting, /deadlock and /deadlock_blocks of a day group
// (schema 4 and later).
void read_deadlock(const h5::InputFile& f, const std::string& g, SimResult& day) {
    const std::size_t trains = day.train_ids.size(), sections = day.section_names.size();
    std::map<std::uint32_t, std::size_t> wait_of;   // train -> its entry
    {
        const Table t(f, g + "/deadlock");
        const auto train = t.index("train", trains, "trains");
        const auto kind = t.text("waits_for"), station = t.text("station"), signal = t.text("signal");
        const auto chainage = t.num("chainage"), since = t.num("since"), set = t.num("route_set"),
                   read_from = t.num("read_from");
        for (std::size_t i = 0; i < t.rows(); ++i) {
            const auto waits = wait_from_name(kind[i]);
            if (!waits)
                throw ResultsFileError(f.path() + ": " + t.path() + ": waits_for '" + kind[i] + "' is not a kind of wait");
            DeadlockWait w;
            w.train = train[i];
            w.waits_for = *waits;
            w.chainage = chainage[i];
            w.station = station[i];
            w.since = since[i];
            w.signal = signal[i];
            w.route_set = set[i];
            w.read_from = read_from[i];
            wait_of[w.train] = day.deadlock.waiting.size();
            day.deadlock.waiting.push_back(std::move(w));
        }
    }
    const Table t(f, g + "/deadlock_blocks");
    const auto train = t.index("train", trains, "trains");
    const auto section = t.index("section", sections, "sections");
    const auto by = t.text("by"), holder = t.text("holder");
    for (std::size_t i = 0; i < t.rows(); ++i) {
        const auto kind = block_from_name(by[i]);
        const auto it = wait_of.find(train[i]);
        const auto held_by = std::find(day.train_ids.begin(), day.train_ids.end(), holder[i]);
        if (!kind || it == wait_of.end() || (*kind != DeadlockBlock::By::disruption && held_by == day.train_ids.end()))
            throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) +
                                   " names no waiting train, kind of block or holding train of the day");
        DeadlockBlock b;
        b.section = section[i];
        b.by = *kind;
        if (*kind != DeadlockBlock::By::disruption)
            b.train = static_cast<std::uint32_t>(held_by - day.train_ids.begin());
        day.deadlock.waiting[it->second].blocks.push_back(b);
    }
}

SimResult read_day_group(const h5::InputFile& f, const std::string& g) {
    SimResult day;
    day.events = static_cast<std::uint64_t>(f.number_attribute(g, "events"));
    day.block_passages = static_cast<std::uint64_t>(f.number_attribute(g, "block_passages"));
    day.deadlock.deadlocked = f.number_attribute(g, "deadlocked") != 0.0;
    day.deadlock.description = f.text_attribute(g, "deadlock_description");
    day.deadlock.time = f.number_attribute(g, "last_event_time");
    day.train_ids = ids(f, g + "/trains");
    day.section_names = ids(f, g + "/sections");
    const std::size_t trains = day.train_ids.size(), sections = day.section_names.size();
    if (f.has_attribute(g, "deadlock_cause")) day.deadlock.cause = f.text_attribute(g, "deadlock_cause");
    if (f.exists(g + "/deadlock")) read_deadlock(f, g, day);

    {
        const Table t(f, g + "/timing");
        const auto train = t.index("train", trains, "trains");
        const auto call = t.num("call");
        const auto station = t.text("station");
        const auto stops = t.num("stops");
        const auto sa = t.num("scheduled_arrival"), sd = t.num("scheduled_departure");
        const auto a = t.num("arrival"), d = t.num("departure");
        const auto ad = t.num("arrival_delay"), dd = t.num("departure_delay");
        const auto k = t.num("knock_on");
        day.timing.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i) {
            TimingRecord& r = day.timing[i];
            r.train = train[i];
            r.call = static_cast<std::uint32_t>(call[i]);
            r.station = station[i];
            r.stops = stops[i] != 0.0;
            r.scheduled_arrival = sa[i];
            r.scheduled_departure = sd[i];
            r.arrival = a[i];
            r.departure = d[i];
            r.arrival_delay = ad[i];
            r.departure_delay = dd[i];
            r.knock_on = k[i];
        }
    }
    {
        const Table t(f, g + "/occupancy");
        const auto train = t.index("train", trains, "trains");
        const auto section = t.index("section", sections, "sections");
        const auto lk = t.num("locked"), he = t.num("head_enters"), hl = t.num("head_leaves");
        const auto tc = t.num("tail_clears"), rl = t.num("released");
        day.sections.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i)
            day.sections[i] = {train[i], section[i], lk[i], he[i], hl[i], tc[i], rl[i]};
    }
    {
        const Table t(f, g + "/holds");
        const auto train = t.index("train", trains, "trains");
        const auto signal = t.text("signal");
        const auto from = t.num("from"), to = t.num("to");
        day.holds.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i) day.holds[i] = {train[i], signal[i], from[i], to[i]};
    }
    {
        const Table t(f, g + "/trajectories");
        const auto train = t.index("train", trains, "trains");
        const auto time = t.num("time"), pos = t.num("position"), ch = t.num("chainage"), v = t.num("speed");
        day.samples.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i) day.samples[i] = {train[i], time[i], pos[i], ch[i], v[i]};
    }
    return day;
}

StoredStudy read_study_group(const h5::InputFile& f, const std::string& g) {
    StoredStudy out;
    StudySummary& s = out.summary;
    s.replications = static_cast<std::size_t>(f.number_attribute(g, "replications"));
    s.deadlocked = static_cast<std::size_t>(f.number_attribute(g, "deadlocked_days"));
    // Schema 3 and older kept deadlocked days in the figures and did not count the complete ones.
    s.complete = f.has_attribute(g, "complete_days") ? static_cast<std::size_t>(f.number_attribute(g, "complete_days"))
                                                     : s.replications - std::min(s.deadlocked, s.replications);
    if (f.has_attribute(g, "first_deadlock_replication")) {
        DeadlockedDay d;
        d.replication = static_cast<std::uint32_t>(f.number_attribute(g, "first_deadlock_replication"));
        d.report.deadlocked = true;
        d.report.time = f.number_attribute(g, "first_deadlock_time");
        d.report.cause = f.text_attribute(g, "first_deadlock_cause");
        d.report.description = f.text_attribute(g, "first_deadlock_description");
        s.first_deadlock = std::move(d);
    }
    s.knock_on_ratio = f.number_attribute(g, "knock_on_ratio");
    s.thresholds = f.number_array_attribute(g, "thresholds_s");
    out.partial = f.number_attribute(g, "partial") != 0.0;
    out.train_ids = ids(f, g + "/trains_index");
    out.section_ids = ids(f, g + "/sections_index");
    const std::size_t trains = out.train_ids.size(), sections = out.section_ids.size();
    std::vector<std::string> fields;
    for (double t : s.thresholds) fields.push_back(punctuality_field(t));

    {
        const Table t(f, g + "/per_day");
        const auto rep = t.num("replication"), dl = t.num("deadlocked"), ev = t.num("events"),
                   bp = t.num("block_passages"), pr = t.num("total_primary"), ko = t.num("total_knock_on"),
                   ma = t.num("mean_arrival_delay");
        std::vector<std::vector<double>> punct;
        for (const std::string& name : fields) punct.push_back(t.num(name));
        out.per_day.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i) {
            ReplicationStats& r = out.per_day[i];
            r.replication = static_cast<std::uint32_t>(rep[i]);
            r.deadlocked = dl[i] != 0.0;
            r.events = static_cast<std::uint64_t>(ev[i]);
            r.block_passages = static_cast<std::uint64_t>(bp[i]);
            r.total_primary = pr[i];
            r.total_knock_on = ko[i];
            r.mean_arrival_delay = ma[i];
            for (const auto& column : punct) r.punctuality.push_back(column[i]);
        }
    }
    {
        const Table t(f, g + "/summary");
        const auto figure = t.text("figure");
        const EstimateColumns estimates(t);
        auto find = [&](const std::string& name) {
            const auto it = std::find(figure.begin(), figure.end(), name);
            if (it == figure.end())
                throw ResultsFileError(f.path() + ": " + t.path() + ": no record for figure '" + name + "'");
            return estimates.at(static_cast<std::size_t>(it - figure.begin()));
        };
        s.total_primary = find("total_primary");
        s.total_knock_on = find("total_knock_on");
        s.mean_arrival_delay = find("mean_arrival_delay");
        for (const std::string& name : fields) s.punctuality.push_back(find(name));
    }
    {
        const Table t(f, g + "/timing_points");
        const auto train = t.index("train", trains, "trains_index");
        const auto station = t.text("station");
        const auto stops = t.num("stops"), reached = t.num("reached");
        const auto dm = t.num("delay_mean"), dh = t.num("delay_ci95_half_width");
        const auto p50 = t.num("p50"), p90 = t.num("p90"), p95 = t.num("p95"), mx = t.num("max");
        const auto km = t.num("knock_on_mean"), kh = t.num("knock_on_ci95_half_width");
        std::vector<std::vector<double>> share, lower, upper;
        for (const std::string& name : fields) {
            share.push_back(t.num(name + "_share"));
            lower.push_back(t.num(name + "_lower"));
            upper.push_back(t.num(name + "_upper"));
        }
        s.timing_points.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i) {
            TimingPointStats& tp = s.timing_points[i];
            tp.train = train[i];
            tp.station = station[i];
            tp.stops = stops[i] != 0.0;
            tp.reached = static_cast<std::size_t>(reached[i]);
            tp.delay = mean_estimate(dm[i], dh[i], tp.reached);
            tp.knock_on = mean_estimate(km[i], kh[i], s.complete);
            tp.delay_quantiles = {p50[i], p90[i], p95[i], mx[i]};
            for (std::size_t k = 0; k < fields.size(); ++k) {
                Estimate e;
                e.mean = share[k][i];
                e.lower = lower[k][i];
                e.upper = upper[k][i];
                e.half_width = (upper[k][i] - lower[k][i]) / 2.0;
                e.n = tp.reached;
                tp.punctuality.push_back(e);
            }
        }
    }
    {
        const Table t(f, g + "/trains");
        const auto train = t.index("train", trains, "trains_index");
        const auto pm = t.num("primary_mean"), ph = t.num("primary_ci95_half_width");
        const auto km = t.num("knock_on_mean"), kh = t.num("knock_on_ci95_half_width");
        const auto fm = t.num("final_delay_mean"), fh = t.num("final_delay_ci95_half_width");
        for (std::size_t i = 0; i < t.rows(); ++i)
            s.trains.push_back({train[i], mean_estimate(pm[i], ph[i], s.complete),
                                mean_estimate(km[i], kh[i], s.complete),
                                mean_estimate(fm[i], fh[i], s.complete)});
    }
    {
        const Table t(f, g + "/signals");
        const auto signal = t.text("signal");
        const auto hm = t.num("held_mean"), hh = t.num("held_ci95_half_width");
        for (std::size_t i = 0; i < t.rows(); ++i)
            s.signals.push_back({signal[i], mean_estimate(hm[i], hh[i], s.complete)});
    }
    {
        const Table t(f, g + "/sections");
        const auto section = t.index("section", sections, "sections_index");
        const auto bm = t.num("blocked_share_mean"), bh = t.num("blocked_share_ci95_half_width");
        s.section_blocked_share.assign(sections, Estimate{});
        for (std::size_t i = 0; i < t.rows(); ++i)
            s.section_blocked_share[section[i]] = mean_estimate(bm[i], bh[i], s.complete);
    }
    {
        const Table t(f, g + "/buffers");
        const auto leader = t.index("leader", trains, "trains_index");
        const auto follower = t.index("follower", trains, "trains_index");
        const auto line = t.text("line_section");
        const auto section = t.index("section", sections, "sections_index");
        const auto planned = t.num("planned"), am = t.num("as_run_mean"), ah = t.num("as_run_ci95_half_width");
        const auto p10 = t.num("p10"), n = t.num("n");
        for (std::size_t i = 0; i < t.rows(); ++i) {
            BufferStats b;
            b.pair = i;
            b.planned = planned[i];
            b.as_run = mean_estimate(am[i], ah[i], static_cast<std::size_t>(n[i]));
            b.p10 = p10[i];
            s.buffers.push_back(b);
            out.buffer_pairs.push_back(
                {out.train_ids[leader[i]], out.train_ids[follower[i]], line[i], out.section_ids[section[i]]});
        }
    }
    return out;
}

void read_comparison(const h5::InputFile& f, ResultsFile& out) {
    {
        const Table t(f, "/comparison/variants");
        const auto name = t.text("name"), description = t.text("description");
        const auto pairs = t.num("headway_pairs"), headway = t.num("mean_minimum_headway");
        const auto peak = t.num("peak_hour_consumption"), day = t.num("day_consumption");
        const auto peak_at = t.text("peak_hour_line_section"), day_at = t.text("day_line_section");
        for (std::size_t i = 0; i < t.rows(); ++i) {
            VariantFigures v;
            v.name = name[i];
            v.description = description[i];
            v.plan.headway_pairs = static_cast<std::size_t>(pairs[i]);
            v.plan.mean_minimum_headway = headway[i];
            v.plan.peak_consumption = peak[i];
            v.plan.peak_section = peak_at[i];
            v.plan.day_consumption = day[i];
            v.plan.day_section = day_at[i];
            v.study = read_study_group(f, "/variants/" + v.name);
            out.variants.push_back(std::move(v));
        }
    }
    if (out.variants.size() < 2)
        throw ResultsFileError(f.path() + ": /comparison/variants: a comparison needs at least two variants, holds " +
                               std::to_string(out.variants.size()));
    const Table t(f, "/comparison/differences");
    const auto variant = t.text("variant"), figure = t.text("figure"), unit = t.text("unit");
    const EstimateColumns estimates(t);
    for (std::size_t i = 0; i < t.rows(); ++i)
        out.differences.push_back({variant[i], figure[i], unit[i], estimates.at(i)});
}

ResultsFacts read_facts(const h5::InputFile& f) {
    ResultsFacts r;
    if (!f.has_attribute("/", "schema_version") || !f.has_attribute("/", "program"))
        throw ResultsFileError(f.path() + ": not a knockon results file (no schema_version or program attribute)");
    if (f.text_attribute("/", "program") != "knockon")
        throw ResultsFileError(f.path() + ": not a knockon results file (written by '" +
                               f.text_attribute("/", "program") + "')");
    r.schema_version = static_cast<int>(f.number_attribute("/", "schema_version"));
    if (r.schema_version > kSimHdf5SchemaVersion)
        throw ResultsFileError(f.path() + ": schema version " + std::to_string(r.schema_version) +
                               " is newer than this knockon reads (up to " + std::to_string(kSimHdf5SchemaVersion) +
                               ")");
    // Schema 1 day files lack the kind attribute and the knock-on of each timing record.
    if (r.schema_version < 2)
        throw ResultsFileError(f.path() + ": schema version " + std::to_string(r.schema_version) +
                               " is older than this knockon reads (2 and later); simulate the day again");
    const std::string kind = f.text_attribute("/", "kind");
    if (kind == "day") r.kind = ResultsKind::day;
    else if (kind == "study") r.kind = ResultsKind::study;
    else if (kind == "comparison") r.kind = ResultsKind::comparison;
    else
        throw ResultsFileError(f.path() + ": root attribute kind is '" + kind +
                               "'; known kinds: day, study, comparison");
    r.program_version = f.text_attribute("/", "program_version");
    r.scenario_file = f.text_attribute("/", "scenario_file");
    r.scenario_name = f.text_attribute("/", "scenario_name");
    r.command_line = f.text_attribute("/", "command_line");
    r.caution = f.has_attribute("/", "caution") ? f.text_attribute("/", "caution") : std::string();
    r.seed = static_cast<std::uint64_t>(f.number_attribute("/", "seed"));
    r.variant = f.has_attribute("/", "variant") ? f.text_attribute("/", "variant") : std::string();
    r.step = f.has_attribute("/", "step_m") ? f.number_attribute("/", "step_m") : kNaN;
    if (r.kind != ResultsKind::day) r.replications = static_cast<std::uint32_t>(f.number_attribute("/", "replications"));
    if (r.kind == ResultsKind::study) r.partial = f.number_attribute("/", "partial") != 0.0;
    return r;
}

// Replication numbers of the /replications/<k> groups (six or more digits).
std::vector<std::uint32_t> traced_replications(const h5::InputFile& f) {
    std::vector<std::uint32_t> out;
    for (const std::string& name : f.members("/replications")) {
        if (name.empty() || name.find_first_not_of("0123456789") != std::string::npos || name.size() > 9)
            throw ResultsFileError(f.path() + ": /replications/" + name + ": not a replication number");
        out.push_back(static_cast<std::uint32_t>(std::stoul(name)));
    }
    std::sort(out.begin(), out.end());
    return out;
}

}  // namespace

std::string to_string(ResultsKind kind) {
    switch (kind) {
        case ResultsKind::day: return "day";
        case ResultsKind::study: return "study";
        case ResultsKind::comparison: return "comparison";
    }
    return "day";
}

ResultsFile read_results(const std::string& path) {
    try {
        const h5::InputFile f(path);
        ResultsFile out;
        out.path = path;
        out.facts = read_facts(f);
        switch (out.facts.kind) {
            case ResultsKind::day: out.day = read_day_group(f, "/day"); break;
            case ResultsKind::study:
                out.study = read_study_group(f, "/study");
                out.traces = f.text_attribute("/replications", "traces");
                out.traced = traced_replications(f);
                break;
            case ResultsKind::comparison: read_comparison(f, out); break;
        }
        return out;
    } catch (const h5::Error& e) {
        throw ResultsFileError(e.what());
    }
}

SimResult read_traced_day(const std::string& path, std::uint32_t replication) {
    try {
        const h5::InputFile f(path);
        return read_day_group(f, "/replications/" + replication_group_name(replication));
    } catch (const h5::Error& e) {
        throw ResultsFileError(e.what());
    }
}

}  // namespace knockon
