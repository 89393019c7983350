#include "tools/results/results_file.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>

#include "sim/deadlock_text.hpp"
#include "tools/results/hdf5_read.hpp"
#include "tools/results/sim_hdf5.hpp"
#include "tools/results/study_hdf5.hpp"

namespace knockon {

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

// ---- what each number read may hold ------------------------------------------------------------
// Every number is checked against its rule before it is used or cast, so that a damaged or
// foreign file is refused naming the first wrong value, no cast is undefined, and no NaN or
// infinity reaches a report where the layout (HDF5_LAYOUT.md) has none.  A new field gets the
// rule of its kind here, or a new rule beside these.
struct Rule {
    double lo, hi;
    bool whole = false;    // counts, indices, flags
    bool nan_ok = false;   // NaN: "does not apply / did not happen" (HDF5_LAYOUT.md)
    const char* is;        // for messages
};

// Times and durations: within ±10^9 s (about 30 years) of midnight, so that nothing downstream meets
// an infinity or a number too large to scale, round or cast.
constexpr double kSpan = 1e9;
constexpr double kMaxExact = 9007199254740992.0;   // 2^53: whole numbers above are not exact in a double
const Rule kFlag{0.0, 1.0, true, false, "a flag (0 or 1)"};
const Rule kCount{0.0, kMaxExact, true, false, "a count"};
const Rule kCount32{0.0, 4294967295.0, true, false, "a whole number below 2^32"};
const Rule kClock{-kSpan, kSpan, false, false, "a time of day in seconds"};
const Rule kClockOrNaN{-kSpan, kSpan, false, true, "a time of day in seconds, or NaN"};
const Rule kSeconds{-kSpan, kSpan, false, false, "a duration in seconds"};
const Rule kSecondsOrNaN{-kSpan, kSpan, false, true, "a duration in seconds, or NaN"};
const Rule kHalfWidth{0.0, kSpan, false, false, "a half-width (not negative)"};
const Rule kHalfWidthOrNaN{0.0, kSpan, false, true, "a half-width (not negative), or NaN"};
const Rule kShare{0.0, 1.0, false, false, "a share from 0 to 1"};
const Rule kShareOrNaN{0.0, 1.0, false, true, "a share from 0 to 1, or NaN"};
const Rule kConsumption{0.0, 1e6, false, false, "a capacity consumption (share, not negative)"};
const Rule kRatio{0.0, kSpan, false, false, "a ratio (not negative)"};
const Rule kMetres{-kSpan, kSpan, false, false, "a distance in metres"};
const Rule kMetresOrNaN{-kSpan, kSpan, false, true, "a distance in metres, or NaN"};
const Rule kSpeed{0.0, 1000.0, false, false, "a speed in m/s"};
// The motion integration step re-used to plan the scenario again: the commands' --step bounds at the
// top, and no finer than 0.1 m below (a finer grid would make the plan take gigabytes).
const Rule kStep{0.1, 50.0, false, false, "a distance step from 0.1 to 50 m"};
// Punctuality thresholds: --punctuality takes 0 < N <= 1440 minutes.
const Rule kThreshold{1e-9, 86400.0, false, false, "a threshold from 0 to 86400 s"};

// "holds 1e+300, should be a time of day in seconds"
std::string wrong(double v, const Rule& r) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return std::string("holds ") + buf + ", should be " + r.is;
}

bool obeys(double v, const Rule& r) {
    if (std::isnan(v)) return r.nan_ok;
    return v >= r.lo && v <= r.hi && (!r.whole || v == std::floor(v));
}

// A checked scalar attribute.
double number(const h5::InputFile& f, const std::string& object, const std::string& name, const Rule& r) {
    const double v = f.number_attribute(object, name);
    if (!obeys(v, r)) throw ResultsFileError(f.path() + ": " + object + ": attribute '" + name + "' " + wrong(v, r));
    return v;
}

// A checked integer attribute, read exactly (u64 seeds above 2^53 included).
std::uint64_t whole(const h5::InputFile& f, const std::string& object, const std::string& name,
                    std::uint64_t hi = UINT64_MAX) {
    const std::uint64_t v = f.whole_attribute(object, name);
    if (v > hi)
        throw ResultsFileError(f.path() + ": " + object + ": attribute '" + name + "' holds " + std::to_string(v) +
                               ", should be at most " + std::to_string(hi));
    return v;
}

// A text attribute that must say something.
std::string text(const h5::InputFile& f, const std::string& object, const std::string& name) {
    std::string v = f.text_attribute(object, name);
    if (v.empty()) throw ResultsFileError(f.path() + ": " + object + ": attribute '" + name + "' is empty");
    return v;
}

// The columns of one table, read as needed, each number checked against its rule, with the table's
// row count checked once (against the bytes it stores: hdf5_read.hpp).
class Table {
public:
    Table(const h5::InputFile& f, std::string path) : f_(f), path_(std::move(path)), rows_(f.rows(path_)) {}
    std::size_t rows() const { return rows_; }
    std::vector<double> num(const std::string& field, const Rule& r) const {
        std::vector<double> out = f_.number_column(path_, field);
        for (std::size_t i = 0; i < out.size(); ++i)
            if (!obeys(out[i], r))
                throw ResultsFileError(f_.path() + ": " + path_ + ": record " + std::to_string(i) + ", field '" + field +
                                       "' " + wrong(out[i], r));
        return out;
    }
    std::vector<std::string> text(const std::string& field) const { return f_.text_column(path_, field); }
    // An index column whose values must lie in [0, limit).
    std::vector<std::uint32_t> index(const std::string& field, std::size_t limit, const std::string& of) const {
        std::vector<std::uint32_t> out;
        out.reserve(rows_);
        for (double v : num(field, kCount32)) {
            if (!(v < static_cast<double>(limit)))
                throw ResultsFileError(f_.path() + ": " + path_ + ": field '" + field + "' holds " +
                                       std::to_string(static_cast<std::uint64_t>(v)) + ", not a row of " + of + " (" +
                                       std::to_string(limit) + " rows)");
            out.push_back(static_cast<std::uint32_t>(v));
        }
        return out;
    }
    // A count column, no larger than `limit` (e.g. the days of the study).
    std::vector<std::size_t> counts(const std::string& field, std::size_t limit, const std::string& of) const {
        std::vector<std::size_t> out;
        out.reserve(rows_);
        for (double v : num(field, kCount)) {
            if (v > static_cast<double>(limit))
                throw ResultsFileError(f_.path() + ": " + path_ + ": field '" + field + "' holds " +
                                       std::to_string(static_cast<std::uint64_t>(v)) + ", more than " + of + " (" +
                                       std::to_string(limit) + ")");
            out.push_back(static_cast<std::size_t>(v));
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
// ci95_upper, n), as /study/summary and /comparison/differences hold them.  Every summary figure
// has its interval; plan figures among the differences have none (NaN, n = 0).
class EstimateColumns {
public:
    enum class Interval { always, or_nan };
    EstimateColumns(const Table& t, std::size_t max_n, Interval interval)
        : mean_(t.num("mean", kSeconds)),
          half_(t.num("ci95_half_width", interval == Interval::always ? kHalfWidth : kHalfWidthOrNaN)),
          lower_(t.num("ci95_lower", interval == Interval::always ? kSeconds : kSecondsOrNaN)),
          upper_(t.num("ci95_upper", interval == Interval::always ? kSeconds : kSecondsOrNaN)),
          n_(t.counts("n", max_n, "the days simulated")) {}
    Estimate at(std::size_t i) const {
        Estimate e;
        e.mean = mean_[i];
        e.half_width = half_[i];
        e.lower = lower_[i];
        e.upper = upper_[i];
        e.n = n_[i];
        return e;
    }

private:
    std::vector<double> mean_, half_, lower_, upper_;
    std::vector<std::size_t> n_;
};

// An index field that may be NaN (does not apply): the name it refers to, or "" for NaN.
std::vector<std::string> names_or_empty(const h5::InputFile& f, const Table& t, const std::string& field,
                                        const std::vector<std::string>& names, const std::string& of) {
    const Rule rule{0.0, 4294967295.0, true, true, "a whole number below 2^32, or NaN"};
    std::vector<std::string> out;
    for (double v : t.num(field, rule)) {
        if (std::isnan(v)) {
            out.emplace_back();
            continue;
        }
        if (!(v < static_cast<double>(names.size())))
            throw ResultsFileError(f.path() + ": " + t.path() + ": field '" + field + "' holds " +
                                   std::to_string(static_cast<std::uint64_t>(v)) +
                                   ", not a row of " + of + " (" + std::to_string(names.size()) + " rows)");
        out.push_back(names[static_cast<std::size_t>(v)]);
    }
    return out;
}

// The ids of a trains or sections table: each must name something.
std::vector<std::string> ids(const h5::InputFile& f, const std::string& table) {
    std::vector<std::string> out = f.text_column(table, "id");
    for (std::size_t i = 0; i < out.size(); ++i)
        if (out[i].empty()) throw ResultsFileError(f.path() + ": " + table + ": record " + std::to_string(i) + " has an empty id");
    return out;
}

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
void read_deadlock(const h5::InputFile& f, const std::string& g, SimResult& day, int schema) {
    const std::size_t trains = day.train_ids.size(), sections = day.section_names.size();
    std::map<std::uint32_t, std::size_t> wait_of;   // train -> its entry
    {
        const Table t(f, g + "/deadlock");
        const auto train = t.index("train", trains, "trains");
        const auto kind = t.text("waits_for"), station = t.text("station"), signal = t.text("signal");
        const auto chainage = t.num("chainage", kMetresOrNaN), since = t.num("since", kClockOrNaN),
                   set = t.num("route_set", kClockOrNaN), read_from = t.num("read_from", kMetresOrNaN);
        // The link a link wait waits for (schema 9; older files have no link waits).
        const bool has_links = schema >= 9;
        const auto link = has_links ? t.text("link") : std::vector<std::string>(t.rows());
        const auto link_from = has_links ? t.text("link_from") : std::vector<std::string>(t.rows());
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
            if (w.waits_for == DeadlockWait::For::link) {
                const auto kind_of_link = link_kind_from_name(link[i]);
                const auto from = std::find(day.train_ids.begin(), day.train_ids.end(), link_from[i]);
                if (!kind_of_link || from == day.train_ids.end())
                    throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) +
                                           " waits for a link but names no kind of link or earlier train of the day");
                w.link_kind = *kind_of_link;
                w.link_from = static_cast<std::uint32_t>(from - day.train_ids.begin());
            }
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

SimResult read_day_group(const h5::InputFile& f, const std::string& g, int schema) {
    SimResult day;
    day.events = whole(f, g, "events");
    day.block_passages = whole(f, g, "block_passages");
    day.deadlock.deadlocked = whole(f, g, "deadlocked", 1) != 0;
    day.deadlock.description = f.text_attribute(g, "deadlock_description");
    day.deadlock.time = number(f, g, "last_event_time", kClock);
    day.train_ids = ids(f, g + "/trains");
    day.section_names = ids(f, g + "/sections");
    const std::size_t trains = day.train_ids.size(), sections = day.section_names.size();
    if (f.has_attribute(g, "deadlock_cause")) day.deadlock.cause = f.text_attribute(g, "deadlock_cause");
    if (f.exists(g + "/deadlock")) read_deadlock(f, g, day, schema);

    {
        const Table t(f, g + "/timing");
        const auto train = t.index("train", trains, "trains");
        const auto call = t.num("call", kCount32);
        const auto station = t.text("station");
        const auto stops = t.num("stops", kFlag);
        const auto sa = t.num("scheduled_arrival", kClockOrNaN), sd = t.num("scheduled_departure", kClockOrNaN);
        const auto a = t.num("arrival", kClockOrNaN), d = t.num("departure", kClockOrNaN);
        const auto ad = t.num("arrival_delay", kSecondsOrNaN), dd = t.num("departure_delay", kSecondsOrNaN);
        const auto k = t.num("knock_on", kSeconds);
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
        const auto lk = t.num("locked", kClockOrNaN), he = t.num("head_enters", kClockOrNaN),
                   hl = t.num("head_leaves", kClockOrNaN);
        const auto tc = t.num("tail_clears", kClockOrNaN), rl = t.num("released", kClockOrNaN);
        day.sections.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i)
            day.sections[i] = {train[i], section[i], lk[i], he[i], hl[i], tc[i], rl[i]};
    }
    {
        const Table t(f, g + "/holds");
        const auto train = t.index("train", trains, "trains");
        const auto signal = t.text("signal");
        const auto from = t.num("from", kClock), to = t.num("to", kClockOrNaN);
        day.holds.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i)
            day.holds[i] = {train[i], signal[i], from[i], to[i], std::string(), HoldCause{}};
    }
    if (schema >= 6) {   // single-track crossings and orders other than planned
        const Table t(f, g + "/crossing_changes");
        const auto kind = t.text("kind"), planned = t.text("planned_place"), actual = t.text("actual_place");
        const auto first = t.index("first", trains, "trains"), second = t.index("second", trains, "trains");
        const auto when = t.num("when", kClock), fc = t.num("first_change", kSecondsOrNaN),
                   sc = t.num("second_change", kSecondsOrNaN);
        for (std::size_t i = 0; i < t.rows(); ++i) {
            CrossingChange c;
            if (kind[i] == to_string(CrossingChange::Kind::moved_crossing)) c.kind = CrossingChange::Kind::moved_crossing;
            else if (kind[i] == to_string(CrossingChange::Kind::changed_order)) c.kind = CrossingChange::Kind::changed_order;
            else
                throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) + ": kind '" +
                                       kind[i] + "' is not a kind of crossing change");
            c.first = first[i];
            c.second = second[i];
            c.planned_place = planned[i];
            c.actual_place = actual[i];
            c.when = when[i];
            c.first_change = fc[i];
            c.second_change = sc[i];
            day.crossing_changes.push_back(std::move(c));
        }
    }
    {
        const Table t(f, g + "/trajectories");
        const auto train = t.index("train", trains, "trains");
        const auto time = t.num("time", kClock), pos = t.num("position", kMetres);
        const auto ch = t.num("chainage", kMetresOrNaN), v = t.num("speed", kSpeed);
        day.samples.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i) day.samples[i] = {train[i], time[i], pos[i], ch[i], v[i]};
    }
    return day;
}

// The punctuality thresholds of a study: at least one, each as --punctuality allows, ascending, and
// each with a field name of its own (the per_day, summary and timing_points fields are named after them).
std::vector<double> read_thresholds(const h5::InputFile& f, const std::string& g) {
    std::vector<double> out = f.number_array_attribute(g, "thresholds_s");
    const std::string where = f.path() + ": " + g + ": attribute 'thresholds_s' ";
    if (out.empty()) throw ResultsFileError(where + "is empty; a study has at least one punctuality threshold");
    for (std::size_t i = 0; i < out.size(); ++i) {
        if (!obeys(out[i], kThreshold)) throw ResultsFileError(where + wrong(out[i], kThreshold));
        if (i > 0 && !(out[i] > out[i - 1])) throw ResultsFileError(where + "is not in ascending order");
        if (i > 0 && punctuality_field(out[i]) == punctuality_field(out[i - 1]))
            throw ResultsFileError(where + "holds two thresholds of the same field name " + punctuality_field(out[i]));
    }
    return out;
}

// A delay source's kind as the attribution tables write it, or an error naming the record.
void check_source_kind(const h5::InputFile& f, const Table& t, std::size_t i, const std::string& kind) {
    if (kind != "entry" && kind != "dwell" && kind != "running" && kind != "disruption" && kind != "dispatch" &&
        kind != "timetable" && kind != "unexplained")
        throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) + ": kind '" + kind +
                               "' is not a kind of delay source");
}

// Where a day's knock-on came from: /attribution_sources of a day group (schema 8 and later; none
// where the file has no such table), each damage as the day's one figure (n = 1, no interval).
std::optional<std::vector<StoredAttribution::Source>> read_day_sources(const h5::InputFile& f, const std::string& g,
                                                                       const SimResult& day, int schema) {
    if (schema < 8 || !f.exists(g + "/attribution_sources")) return std::nullopt;
    const Table t(f, g + "/attribution_sources");
    const auto kind = t.text("kind"), place = t.text("place");
    const auto train = names_or_empty(f, t, "train", day.train_ids, "trains");
    const auto section = names_or_empty(f, t, "section", day.section_names, "sections");
    const auto damage = t.num("damage", kSeconds);
    std::vector<StoredAttribution::Source> out;
    for (std::size_t i = 0; i < t.rows(); ++i) {
        check_source_kind(f, t, i, kind[i]);
        StoredAttribution::Source x{kind[i], train[i], place[i], section[i], Estimate{}};
        x.damage.mean = damage[i];
        x.damage.n = 1;
        out.push_back(std::move(x));
    }
    return out;
}

// Where the knock-on came from: /attribution_* of a study group (schema 8 and later).
StoredAttribution read_attribution(const h5::InputFile& f, const std::string& g, const StoredStudy& study,
                                   std::size_t days) {
    StoredAttribution a;
    const auto est = [&](const Table& t, const std::string& name) {
        const auto m = t.num(name + "_mean", kSeconds), h = t.num(name + "_ci95_half_width", kHalfWidth);
        std::vector<Estimate> out;
        for (std::size_t i = 0; i < t.rows(); ++i) out.push_back(mean_estimate(m[i], h[i], study.summary.complete));
        return out;
    };
    {
        const Table t(f, g + "/attribution_sources");
        const auto kind = t.text("kind"), place = t.text("place");
        const auto train = names_or_empty(f, t, "train", study.train_ids, "trains_index");
        const auto section = names_or_empty(f, t, "section", study.section_ids, "sections_index");
        const auto damage = est(t, "damage");
        const auto n = t.counts("n", days, "the days simulated");
        for (std::size_t i = 0; i < t.rows(); ++i) {
            check_source_kind(f, t, i, kind[i]);
            StoredAttribution::Source x{kind[i], train[i], place[i], section[i], damage[i]};
            x.damage.n = n[i];
            a.sources.push_back(std::move(x));
        }
    }
    {
        const Table t(f, g + "/attribution_places");
        const auto place = t.text("place");
        const auto received = est(t, "received"), caused = est(t, "caused");
        for (std::size_t i = 0; i < t.rows(); ++i) a.places.push_back({place[i], received[i], caused[i]});
    }
    {
        const Table t(f, g + "/attribution_through");
        const auto kind = t.text("kind");
        const auto index = t.num("index", kCount32);
        const auto leader = names_or_empty(f, t, "leader", study.train_ids, "trains_index");
        const auto follower = names_or_empty(f, t, "follower", study.train_ids, "trains_index");
        const auto knock_on = est(t, "knock_on");
        for (std::size_t i = 0; i < t.rows(); ++i) {
            StoredAttribution::Through x;
            x.kind = kind[i];
            x.index = static_cast<std::uint32_t>(index[i]);
            x.leader = leader[i];
            x.follower = follower[i];
            x.knock_on = knock_on[i];
            if (kind[i] == "section") {
                if (!(index[i] < static_cast<double>(study.section_ids.size())))
                    throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) +
                                           ": index is not a row of sections_index");
                x.section = study.section_ids[x.index];
            } else if (kind[i] != "buffer" && kind[i] != "link") {
                throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) + ": kind '" +
                                       kind[i] + "' is not buffer, link or section");
            }
            a.through.push_back(std::move(x));
        }
    }
    const Table t(f, g + "/attribution_causes");
    const auto cause = t.text("cause");
    const auto knock_on = est(t, "knock_on");
    for (std::size_t i = 0; i < t.rows(); ++i) a.causes.push_back({cause[i], knock_on[i]});
    return a;
}

StoredStudy read_study_group(const h5::InputFile& f, const std::string& g, int schema) {
    StoredStudy out;
    StudySummary& s = out.summary;
    s.replications = whole(f, g, "replications", UINT32_MAX);
    if (s.replications == 0) throw ResultsFileError(f.path() + ": " + g + ": attribute 'replications' is 0; a study has days");
    s.deadlocked = whole(f, g, "deadlocked_days", s.replications);
    // Schema 3 and older kept deadlocked days in the figures and did not count the complete ones.
    s.complete = f.has_attribute(g, "complete_days") ? whole(f, g, "complete_days", s.replications - s.deadlocked)
                                                     : s.replications - s.deadlocked;
    if (f.has_attribute(g, "first_deadlock_replication")) {
        DeadlockedDay d;
        d.replication = static_cast<std::uint32_t>(whole(f, g, "first_deadlock_replication", s.replications - 1));
        d.report.deadlocked = true;
        d.report.time = number(f, g, "first_deadlock_time", kClock);
        d.report.cause = f.text_attribute(g, "first_deadlock_cause");
        d.report.description = f.text_attribute(g, "first_deadlock_description");
        s.first_deadlock = std::move(d);
    }
    s.knock_on_ratio = number(f, g, "knock_on_ratio", kRatio);
    s.thresholds = read_thresholds(f, g);
    out.partial = whole(f, g, "partial", 1) != 0;
    out.train_ids = ids(f, g + "/trains_index");
    out.section_ids = ids(f, g + "/sections_index");
    const std::size_t trains = out.train_ids.size(), sections = out.section_ids.size();
    const std::size_t days = s.replications;
    std::vector<std::string> fields;
    for (double t : s.thresholds) fields.push_back(punctuality_field(t));

    out.per_day = read_per_day_table(f, g + "/per_day", s.thresholds, schema);
    if (out.per_day.size() != days)
        throw ResultsFileError(f.path() + ": " + g + "/per_day: holds " + std::to_string(out.per_day.size()) +
                               " records for the " + std::to_string(days) + " days of attribute 'replications'");
    {
        const Table t(f, g + "/summary");
        const auto figure = t.text("figure");
        const EstimateColumns estimates(t, days, EstimateColumns::Interval::always);
        auto find = [&](const std::string& name) {
            const auto it = std::find(figure.begin(), figure.end(), name);
            if (it == figure.end())
                throw ResultsFileError(f.path() + ": " + t.path() + ": no record for figure '" + name + "'");
            return estimates.at(static_cast<std::size_t>(it - figure.begin()));
        };
        s.total_primary = find("total_primary");
        s.total_knock_on = find("total_knock_on");
        s.mean_arrival_delay = find("mean_arrival_delay");
        if (schema >= 6) {
            s.moved_crossings = find("moved_crossings");
            s.changed_orders = find("changed_orders");
        }
        if (schema >= 7) s.missed_connections = find("missed_connections");
        for (const std::string& name : fields) s.punctuality.push_back(find(name));
    }
    {
        const Table t(f, g + "/timing_points");
        const auto train = t.index("train", trains, "trains_index");
        const auto station = t.text("station");
        const auto stops = t.num("stops", kFlag);
        const auto reached = t.counts("reached", days, "the days simulated");
        const auto dm = t.num("delay_mean", kSecondsOrNaN), dh = t.num("delay_ci95_half_width", kHalfWidthOrNaN);
        const auto p50 = t.num("p50", kSecondsOrNaN), p90 = t.num("p90", kSecondsOrNaN),
                   p95 = t.num("p95", kSecondsOrNaN), mx = t.num("max", kSecondsOrNaN);
        const auto km = t.num("knock_on_mean", kSeconds), kh = t.num("knock_on_ci95_half_width", kHalfWidth);
        std::vector<std::vector<double>> share, lower, upper;
        for (const std::string& name : fields) {
            share.push_back(t.num(name + "_share", kShareOrNaN));
            lower.push_back(t.num(name + "_lower", kShareOrNaN));
            upper.push_back(t.num(name + "_upper", kShareOrNaN));
        }
        // NaN there says "no day got there": only where no day did.
        auto reached_yet_nan = [&](std::size_t i) -> const char* {
            for (const auto* column : {&dm, &dh, &p50, &p90, &p95, &mx})
                if (std::isnan((*column)[i])) return "a delay figure";
            for (std::size_t k = 0; k < fields.size(); ++k)
                if (std::isnan(share[k][i]) || std::isnan(lower[k][i]) || std::isnan(upper[k][i])) return "a share";
            return nullptr;
        };
        s.timing_points.resize(t.rows());
        for (std::size_t i = 0; i < t.rows(); ++i) {
            if (const char* what = reached[i] > 0 ? reached_yet_nan(i) : nullptr)
                throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) + ": " + what +
                                       " is NaN though the train got there on " + std::to_string(reached[i]) + " days");
            TimingPointStats& tp = s.timing_points[i];
            tp.train = train[i];
            tp.station = station[i];
            tp.stops = stops[i] != 0.0;
            tp.reached = reached[i];
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
        const auto pm = t.num("primary_mean", kSeconds), ph = t.num("primary_ci95_half_width", kHalfWidth);
        const auto km = t.num("knock_on_mean", kSeconds), kh = t.num("knock_on_ci95_half_width", kHalfWidth);
        const auto fm = t.num("final_delay_mean", kSeconds), fh = t.num("final_delay_ci95_half_width", kHalfWidth);
        for (std::size_t i = 0; i < t.rows(); ++i)
            s.trains.push_back({train[i], mean_estimate(pm[i], ph[i], s.complete),
                                mean_estimate(km[i], kh[i], s.complete),
                                mean_estimate(fm[i], fh[i], s.complete)});
    }
    {
        const Table t(f, g + "/signals");
        const auto signal = t.text("signal");
        const auto hm = t.num("held_mean", kSeconds), hh = t.num("held_ci95_half_width", kHalfWidth);
        for (std::size_t i = 0; i < t.rows(); ++i)
            s.signals.push_back({signal[i], mean_estimate(hm[i], hh[i], s.complete)});
    }
    {
        const Table t(f, g + "/sections");
        const auto section = t.index("section", sections, "sections_index");
        const auto bm = t.num("blocked_share_mean", kShare), bh = t.num("blocked_share_ci95_half_width", kHalfWidth);
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
        const auto planned = t.num("planned", kSeconds), am = t.num("as_run_mean", kSeconds),
                   ah = t.num("as_run_ci95_half_width", kHalfWidth);
        const auto p10 = t.num("p10", kSeconds);
        const auto n = t.counts("n", days, "the days simulated");
        for (std::size_t i = 0; i < t.rows(); ++i) {
            BufferStats b;
            b.pair = i;
            b.planned = planned[i];
            b.as_run = mean_estimate(am[i], ah[i], n[i]);
            b.p10 = p10[i];
            s.buffers.push_back(b);
            out.buffer_pairs.push_back(
                {out.train_ids[leader[i]], out.train_ids[follower[i]], line[i], out.section_ids[section[i]]});
        }
    }
    if (schema >= 8) out.attribution = read_attribution(f, g, out, days);
    return out;
}

void read_comparison(const h5::InputFile& f, ResultsFile& out) {
    {
        const Table t(f, "/comparison/variants");
        const auto name = t.text("name"), description = t.text("description");
        const auto pairs = t.num("headway_pairs", kCount), headway = t.num("mean_minimum_headway", kSeconds);
        const auto peak = t.num("peak_hour_consumption", kConsumption), day = t.num("day_consumption", kConsumption);
        const auto peak_at = t.text("peak_hour_line_section"), day_at = t.text("day_line_section");
        for (std::size_t i = 0; i < t.rows(); ++i) {
            // A name is a group under /variants: one step, and each variant once.
            if (name[i].empty() || name[i].find('/') != std::string::npos || name[i] == "." || name[i] == "..")
                throw ResultsFileError(f.path() + ": /comparison/variants: record " + std::to_string(i) +
                                       ": '" + name[i] + "' is not a variant name");
            if (std::find(name.begin(), name.begin() + static_cast<std::ptrdiff_t>(i), name[i]) !=
                name.begin() + static_cast<std::ptrdiff_t>(i))
                throw ResultsFileError(f.path() + ": /comparison/variants: variant '" + name[i] + "' is listed twice");
            VariantFigures v;
            v.name = name[i];
            v.description = description[i];
            v.plan.headway_pairs = static_cast<std::size_t>(pairs[i]);
            v.plan.mean_minimum_headway = headway[i];
            v.plan.peak_consumption = peak[i];
            v.plan.peak_section = peak_at[i];
            v.plan.day_consumption = day[i];
            v.plan.day_section = day_at[i];
            v.study = read_study_group(f, "/variants/" + v.name, out.facts.schema_version);
            if (!out.variants.empty() && v.study.summary.thresholds != out.variants.front().study.summary.thresholds)
                throw ResultsFileError(f.path() + ": /variants/" + v.name +
                                       ": attribute 'thresholds_s' differs from that of the first variant");
            out.variants.push_back(std::move(v));
        }
    }
    if (out.variants.size() < 2)
        throw ResultsFileError(f.path() + ": /comparison/variants: a comparison needs at least two variants, holds " +
                               std::to_string(out.variants.size()));
    const Table t(f, "/comparison/differences");
    const auto variant = t.text("variant"), figure = t.text("figure"), unit = t.text("unit");
    const EstimateColumns estimates(t, out.facts.replications, EstimateColumns::Interval::or_nan);
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
    const std::uint64_t schema = whole(f, "/", "schema_version");
    if (schema > static_cast<std::uint64_t>(kSimHdf5SchemaVersion))
        throw ResultsFileError(f.path() + ": schema version " + std::to_string(schema) +
                               " is newer than this knockon reads (up to " + std::to_string(kSimHdf5SchemaVersion) +
                               ")");
    r.schema_version = static_cast<int>(schema);
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
    r.program_version = text(f, "/", "program_version");
    r.scenario_file = text(f, "/", "scenario_file");
    r.scenario_name = f.text_attribute("/", "scenario_name");
    r.command_line = text(f, "/", "command_line");
    r.caution = f.has_attribute("/", "caution") ? f.text_attribute("/", "caution") : std::string();
    r.seed = whole(f, "/", "seed");
    r.variant = f.has_attribute("/", "variant") ? text(f, "/", "variant") : std::string();
    r.step = f.has_attribute("/", "step_m") ? number(f, "/", "step_m", kStep) : kNaN;
    if (r.kind != ResultsKind::day) {
        r.replications = static_cast<std::uint32_t>(whole(f, "/", "replications", UINT32_MAX));
        if (r.replications == 0) throw ResultsFileError(f.path() + ": root attribute 'replications' is 0");
    }
    if (r.kind == ResultsKind::study) r.partial = whole(f, "/", "partial", 1) != 0;
    return r;
}

// Replication numbers of the /replications/<k> groups (six or more digits), each a day of the study.
std::vector<std::uint32_t> traced_replications(const h5::InputFile& f, std::size_t days) {
    std::vector<std::uint32_t> out;
    for (const std::string& name : f.members("/replications")) {
        if (name.empty() || name.find_first_not_of("0123456789") != std::string::npos || name.size() > 9 ||
            std::stoul(name) >= days)
            throw ResultsFileError(f.path() + ": /replications/" + name + ": not a replication number of the " +
                                   std::to_string(days) + " days");
        out.push_back(static_cast<std::uint32_t>(std::stoul(name)));
    }
    std::sort(out.begin(), out.end());
    return out;
}

}  // namespace

std::vector<ReplicationStats> read_per_day_table(const h5::InputFile& f, const std::string& table,
                                                 const std::vector<double>& thresholds, int schema) {
    const Table t(f, table);
    const auto rep = t.num("replication", kCount32), dl = t.num("deadlocked", kFlag), ev = t.num("events", kCount),
               bp = t.num("block_passages", kCount), pr = t.num("total_primary", kSeconds),
               ko = t.num("total_knock_on", kSeconds), ma = t.num("mean_arrival_delay", kSecondsOrNaN);
    // Schema 6 and later count the single-track crossings and orders that differed from the plan.
    const bool counted = schema >= 6;
    const auto moved = counted ? t.num("moved_crossings", kCount32) : std::vector<double>(t.rows(), 0.0);
    const auto changed = counted ? t.num("changed_orders", kCount32) : std::vector<double>(t.rows(), 0.0);
    // Schema 7 and later count the connections missed (timetable links).
    const auto missed = schema >= 7 ? t.num("missed_connections", kCount32) : std::vector<double>(t.rows(), 0.0);
    std::vector<std::vector<double>> punct;
    for (double threshold : thresholds) punct.push_back(t.num(punctuality_field(threshold), kShareOrNaN));
    // A deadlocked day has no arrival delay or punctuality (NaN); a complete day must have them.
    for (std::size_t i = 0; i < t.rows(); ++i) {
        if (dl[i] != 0.0) continue;
        bool nan = std::isnan(ma[i]);
        for (const auto& column : punct) nan = nan || std::isnan(column[i]);
        if (nan)
            throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) +
                                   " is of a complete day but holds NaN for its arrival delay or punctuality");
    }
    std::vector<ReplicationStats> out(t.rows());
    for (std::size_t i = 0; i < t.rows(); ++i) {
        ReplicationStats& r = out[i];
        r.replication = static_cast<std::uint32_t>(rep[i]);
        r.deadlocked = dl[i] != 0.0;
        r.events = static_cast<std::uint64_t>(ev[i]);
        r.block_passages = static_cast<std::uint64_t>(bp[i]);
        r.total_primary = pr[i];
        r.total_knock_on = ko[i];
        r.mean_arrival_delay = ma[i];
        r.moved_crossings = static_cast<std::uint32_t>(moved[i]);
        r.changed_orders = static_cast<std::uint32_t>(changed[i]);
        r.missed_connections = static_cast<std::uint32_t>(missed[i]);
        for (const auto& column : punct) r.punctuality.push_back(column[i]);
    }
    return out;
}

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
            case ResultsKind::day:
                out.day = read_day_group(f, "/day", out.facts.schema_version);
                out.day_sources = read_day_sources(f, "/day", *out.day, out.facts.schema_version);
                break;
            case ResultsKind::study:
                out.study = read_study_group(f, "/study", out.facts.schema_version);
                if (out.study->summary.replications != out.facts.replications)
                    throw ResultsFileError(path + ": /study: attribute 'replications' (" +
                                           std::to_string(out.study->summary.replications) +
                                           ") differs from the root's (" + std::to_string(out.facts.replications) + ")");
                out.traces = text(f, "/replications", "traces");
                out.traced = traced_replications(f, out.study->summary.replications);
                break;
            case ResultsKind::comparison: read_comparison(f, out); break;
        }
        return out;
    } catch (const h5::Error& e) {
        throw ResultsFileError(e.what());
    }
}

std::optional<StoredDelayTrees> read_delay_trees(const std::string& path, std::optional<std::uint32_t> replication,
                                                 const SimResult& day) {
    try {
        const h5::InputFile f(path);
        const std::string g = replication ? "/replications/" + replication_group_name(*replication) : "/day";
        if (read_facts(f).schema_version < 8 || !f.exists(g + "/attribution_edges") ||
            !f.exists(g + "/attribution_sources"))
            return std::nullopt;
        StoredDelayTrees out;
        {
            const Table t(f, g + "/attribution_sources");
            const auto number = t.num("source", kCount32);
            const auto kind = t.text("kind"), place = t.text("place");
            const auto train = names_or_empty(f, t, "train", day.train_ids, "trains");
            const auto section = names_or_empty(f, t, "section", day.section_names, "sections");
            const auto damage = t.num("damage", kSeconds);
            for (std::size_t i = 0; i < t.rows(); ++i) {
                check_source_kind(f, t, i, kind[i]);
                StoredAttribution::Source x{kind[i], train[i], place[i], section[i], Estimate{}};
                x.damage.mean = damage[i];
                x.damage.n = 1;
                out.sources[static_cast<std::uint32_t>(number[i])] = std::move(x);
            }
        }
        const Table t(f, g + "/attribution_edges");
        const auto source = t.num("source", kCount32);
        const auto cause = t.text("cause");
        const auto from = t.num("from_train", Rule{0.0, 4294967295.0, true, true, "a whole number below 2^32, or NaN"});
        const auto record = t.index("record", day.timing.size(), "timing");
        const auto seconds = t.num("seconds", kSeconds);
        for (std::size_t i = 0; i < t.rows(); ++i) {
            // (a source that caused no knock-on has no row in attribution_sources, but may have
            // edges of 0 s)
            if (!std::isnan(from[i]) && !(from[i] < static_cast<double>(day.train_ids.size())))
                throw ResultsFileError(f.path() + ": " + t.path() + ": record " + std::to_string(i) +
                                       ", field 'from_train' names no train of the day");
            StoredDelayTrees::Edge e;
            e.source = static_cast<std::uint32_t>(source[i]);
            e.cause = cause[i];
            e.from = std::isnan(from[i]) ? StoredDelayTrees::kNoTrain : static_cast<std::uint32_t>(from[i]);
            e.record = record[i];
            e.seconds = seconds[i];
            out.edges.push_back(std::move(e));
        }
        return out;
    } catch (const h5::Error& e) {
        throw ResultsFileError(e.what());
    }
}

SimResult read_traced_day(const std::string& path, std::uint32_t replication) {
    try {
        const h5::InputFile f(path);
        return read_day_group(f, "/replications/" + replication_group_name(replication), read_facts(f).schema_version);
    } catch (const h5::Error& e) {
        throw ResultsFileError(e.what());
    }
}

}  // namespace knockon
