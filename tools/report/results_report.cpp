#include "tools/report/results_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>

#include "models/links.hpp"
#include "models/units.hpp"
#include "sim/day_summary.hpp"
#include "sim/attribution_figures.hpp"
#include "sim/deadlock_text.hpp"
#include "tools/results/attribution_output.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/results/study_hdf5.hpp"

namespace knockon {

namespace {

constexpr std::size_t kTableRows = 30;         // rows of the ranked tables
constexpr std::size_t kTimingPointRows = 15;   // least punctual timing points
constexpr std::size_t kBufferRows = 10;

std::string fmt(const char* f, double a, double b = 0.0, double c = 0.0) {
    char buf[128];
    std::snprintf(buf, sizeof buf, f, a, b, c);
    return buf;
}
std::string min1(double s) { return std::isfinite(s) ? fmt("%.1f min", s / 60.0) : "-"; }
std::string min_ci(const Estimate& e) {
    return e.n > 1 ? fmt("%.2f \u00B1 %.2f min", e.mean / 60.0, e.half_width / 60.0) : min1(e.mean);
}
std::string pct(double share) { return std::isfinite(share) ? fmt("%.1f %%", 100.0 * share) : "-"; }
std::string pct_ci(const Estimate& e) {
    if (!std::isfinite(e.mean)) return "-";
    if (!(e.n > 1) || !std::isfinite(e.lower)) return pct(e.mean);
    return fmt("%.1f %% (%.1f-%.1f)", 100.0 * e.mean, 100.0 * e.lower, 100.0 * e.upper);
}
std::string sec(double s) { return std::isfinite(s) ? fmt("%.0f s", s) : "-"; }
std::string threshold_text(double t) { return svg::number(t / 60.0, 1) + " min"; }

std::string figure_of(const ResultChart& c) { return html_figure(c.svg, c.caption); }

const std::string& reference(const ResultsView& v) { return v.file->variants.front().name; }

// ---- head -------------------------------------------------------------------------------------

void add_facts(Report& r, const ResultsView& v) {
    const ResultsFacts& f = v.file->facts;
    for (auto& [label, value] : r.facts)
        if (label == "command") label = "report command";
    std::vector<std::pair<std::string, std::string>> facts = {{"results file", v.file->path},
                                                              {"kind of results", to_string(f.kind)}};
    if (f.kind == ResultsKind::study) {
        const StoredStudy& s = *v.file->study;
        facts.push_back({"simulated days", std::to_string(s.summary.replications) +
                                               (s.partial ? " (partial: stopped before the planned days)" : "") +
                                               (s.summary.deadlocked ? "; " + std::to_string(s.summary.deadlocked) +
                                                                           " ended in deadlock"
                                                                     : std::string())});
        facts.push_back({"traced days", v.file->traced.empty()
                                            ? std::string("none (--traces ") + v.file->traces + ")"
                                            : std::to_string(v.file->traced.size()) + " (--traces " +
                                                  v.file->traces + ")"});
    } else if (f.kind == ResultsKind::comparison) {
        std::string names;
        for (const VariantFigures& vf : v.file->variants) names += (names.empty() ? "" : ", ") + vf.name;
        facts.push_back({"variants", names + " (differences against " + reference(v) + ")"});
        facts.push_back({"simulated days per variant", std::to_string(f.replications)});
        facts.push_back({"plan drawn for", reference(v)});
    }
    if (!f.variant.empty()) facts.push_back({"variant", f.variant});
    facts.push_back({"seed", std::to_string(f.seed)});
    facts.push_back({"results command", f.command_line});
    facts.push_back({"results written by", "knockon " + f.program_version + " (schema " +
                                               std::to_string(f.schema_version) + ")"});
    r.facts.insert(r.facts.begin() + std::min<std::size_t>(2, r.facts.size()), facts.begin(), facts.end());
    r.notes.push_back(
        "Primary delay: what was injected into a train itself (late start or entry, extra dwell, slower "
        "running). Knock-on delay: time lost to other trains and to disruptions beyond that. Arrival delay "
        "counts arrivals and passes at timing points, early as 0; punctual within N minutes means strictly "
        "below N minutes.");
    r.notes.push_back("Confidence intervals are 95 %: Student t for means over days, Wilson score for shares of "
                      "arrivals.");
}

// ---- results at a glance ------------------------------------------------------------------------

// The trains a deadlocked day left waiting: where, what for, and who kept it from them.
std::string waiting_table(const SimResult& d) {
    HtmlTable t;
    t.caption = "Trains left waiting when the day stopped";
    t.headers = {"train", "where", "waiting since", "waits", "kept from it by"};
    t.numeric = {false, false, true, false, false};
    for (const DeadlockWait& w : d.deadlock.waiting) {
        std::string kept;
        if (w.waits_for == DeadlockWait::For::link && w.link_from < d.train_ids.size())
            kept = d.train_ids[w.link_from] + " (" + to_string(w.link_kind) + ", not arrived)";
        for (const DeadlockBlock& b : w.blocks) {
            const std::string who = b.by == DeadlockBlock::By::disruption ? std::string("a disruption")
                                    : b.train < d.train_ids.size()        ? d.train_ids[b.train]
                                                                          : std::string("?");
            kept += (kept.empty() ? "" : "; ") + (b.section < d.section_names.size() ? d.section_names[b.section] : "?") +
                    ": " + (b.by == DeadlockBlock::By::promised ? "promised to " : "") + who;
        }
        t.rows.push_back({w.train < d.train_ids.size() ? d.train_ids[w.train] : "?", where_it_stands(w),
                          std::isfinite(w.since) ? format_time_of_day(w.since) : "-", what_it_waits_for(w, d.train_ids),
                          kept.empty() ? "-" : kept});
    }
    return html_table(t);
}

// The drawn day's crossings and orders on single track other than planned.
std::string crossing_changes_table(const SimResult& d) {
    HtmlTable t;
    t.caption = "Single track: crossings and orders other than planned on the day drawn";
    t.headers = {"time", "what", "planned first", "then", "planned at", "ran at", "change, first", "change, then"};
    t.numeric = {false, false, false, false, false, false, true, true};
    const auto change = [](double v) { return std::isnan(v) ? std::string("-") : fmt("%+.1f min", v / 60.0); };
    const auto place = [](const std::string& p) { return p.empty() ? std::string("none") : p; };
    for (const CrossingChange& c : d.crossing_changes)
        t.rows.push_back({format_time_of_day(c.when), to_string(c.kind), d.train_ids[c.first], d.train_ids[c.second],
                          place(c.planned_place), place(c.actual_place), change(c.first_change),
                          change(c.second_change)});
    t.highlight.assign(t.rows.size(), false);
    return html_table(t) +
           html_paragraph("A crossing moved: the two opposing trains passed each other at another crossing place than "
                          "the timetable has them cross at. An order changed: two trains of one direction passed a "
                          "single-track stretch in another order (\"none\": no overtaking). Change: each train's delay "
                          "on leaving the later of the two places minus its delay on reaching the earlier one "
                          "(+ lost, - gained).");
}

// The replication numbers of the days that ended in deadlock (the first 20 named).
std::string deadlocked_days(const StoredStudy& s) {
    std::vector<std::uint32_t> days;
    for (const ReplicationStats& d : s.per_day)
        if (d.deadlocked) days.push_back(d.replication);
    if (days.empty()) return html_paragraph("No day ended in deadlock.");
    constexpr std::size_t kNamed = 20;
    std::string list;
    for (std::size_t i = 0; i < days.size() && i < kNamed; ++i) list += (i ? ", " : "") + std::to_string(days[i]);
    if (days.size() > kNamed) list += " and " + std::to_string(days.size() - kNamed) + " more";
    return html_paragraph("Days that ended in deadlock (replication numbers): " + list +
                          ". Their figures are left out of every figure of this report.");
}

// The study's attribution of knock-on to its sources, or none (a day file, a file of schema 7 or
// older).
const StoredAttribution* attribution_of(const ResultsView& v) {
    return v.file->study && v.file->study->attribution ? &*v.file->study->attribution : nullptr;
}

std::string source_text(const StoredAttribution::Source& s) {
    return describe_source(s.kind, s.train, s.place, s.section);
}
std::string buffer_text(const StoredAttribution::Through& b) { return b.leader + " -> " + b.follower; }

// What the knock-on passed through of one kind ("buffer", "link", "section"), largest mean first as
// the file keeps them.
std::vector<const StoredAttribution::Through*> through_of(const StoredAttribution& a, const std::string& kind) {
    std::vector<const StoredAttribution::Through*> out;
    for (const StoredAttribution::Through& t : a.through)
        if (t.kind == kind) out.push_back(&t);
    return out;
}

// One of the verdict's lists: at most three rows of (what, its knock-on), or the reason it is not
// given.
std::string verdict_list(const std::string& id, const std::string& title, const std::string& what,
                         const std::string& figure, const std::vector<std::pair<std::string, Estimate>>& entries,
                         const std::string& none) {
    std::string html = "<div id=\"" + id + "\">\n<h3>" + html_escape(title) + "</h3>\n";
    if (entries.empty()) return html + "<p class=\"not-given\">" + html_escape(none) + "</p>\n</div>\n";
    HtmlTable t;
    t.headers = {"", what, figure};
    t.numeric = {true, false, true};
    for (std::size_t i = 0; i < entries.size() && i < 3; ++i)
        t.rows.push_back({std::to_string(i + 1), entries[i].first, min_ci(entries[i].second)});
    t.css_class = "compact";
    return html + html_table(t) + "</div>\n";
}

// The two lists a decision starts from: where the knock-on comes from, and which buffers to widen
// first.  They are filled from a results file's attribution of knock-on to its sources: of a
// study (`a`, a study file's or one variant's of a comparison) each figure the mean per complete
// day with its 95 % interval as the file holds it, in its order; of a day file (`day`) the day's
// damage per source, largest first (the file holds no figure per buffer).  A file without an
// attribution says so (nothing is guessed in its place).  `id` follows the lists' ids
// ("top-sources<id>", "top-buffers<id>"), `of` their titles; `ranking` says whether the report
// has the full ranking ("Where knock-on comes from") to point to.
std::string attribution_lists(const StoredAttribution* a, const std::vector<StoredAttribution::Source>* day,
                              const std::string& id = "", const std::string& of = "", bool ranking = true) {
    const std::string missing =
        "Not given: this results file holds no attribution of knock-on delay to the primary delays that caused it.";
    std::vector<std::pair<std::string, Estimate>> sources, buffers;
    if (a) {
        for (const StoredAttribution::Source& s : a->sources) sources.push_back({source_text(s), s.damage});
        for (const StoredAttribution::Through* b : through_of(*a, "buffer")) buffers.push_back({buffer_text(*b), b->knock_on});
    } else if (day) {
        for (const StoredAttribution::Source& s : *day)
            if (s.damage.mean > 0.0) sources.push_back({source_text(s), s.damage});
        std::stable_sort(sources.begin(), sources.end(),
                         [](const auto& x, const auto& y) { return x.second.mean > y.second.mean; });
    }
    const bool held = a || day;
    const std::string no_sources = !held ? missing
                                   : a   ? "Not given: no knock-on on any complete day."
                                         : "Not given: no knock-on on this day.";
    const std::string no_buffers =
        !held ? missing
        : a   ? "Not given: no knock-on passed directly from one train to the next over a planned buffer on any "
                "complete day."
              : "Not given: a day file holds no knock-on per buffer; the results file of a study (simulate "
                "--replications N --out) has it.";
    const std::string figure = a || !day ? "knock-on per day" : "knock-on caused that day";
    std::string html = "<div class=\"verdict-lists\">\n";
    html += verdict_list("top-sources" + id, "Top three sources of knock-on delay" + of, "source", figure, sources,
                         no_sources);
    html += verdict_list("top-buffers" + id, "Top three buffers to widen" + of, "buffer (leader -> follower)", figure,
                         buffers, no_buffers);
    html += "</div>\n";
    if (a && (!sources.empty() || !buffers.empty()))
        html += html_paragraph(ranking ? "Mean knock-on per complete day with its 95 % interval; the full ranking "
                                         "is under \"Where knock-on comes from\"."
                                       : "Mean knock-on per complete day with its 95 % interval; the full ranking "
                                         "is in the results file.");
    return html;
}

// The lists of a study or day file.
std::string attribution_slots(const ResultsView& v) {
    if (!v.file->study && !v.day) return "";
    const bool day_file = !v.file->study;
    const auto& day = v.file->day_sources;
    return attribution_lists(attribution_of(v), day_file && day ? &*day : nullptr);
}

ReportSection verdict_section(const ResultsView& v) {
    HtmlTable t;
    t.headers = {"figure", "value"};
    t.numeric = {false, true};
    std::string intro;
    if (v.file->study) {
        const StudySummary& s = v.file->study->summary;
        // Deadlocked days first: they are no figure.
        t.rows = {{"days that ended in deadlock", std::to_string(s.deadlocked) + " of " + std::to_string(s.replications)},
                  {"complete days, which every figure is of", std::to_string(s.complete)}};
        t.caption = s.deadlocked > 0 ? "Per complete simulated day, mean with 95 % CI half-width (or interval); "
                                       "the days that ended in deadlock are left out"
                                     : "Per simulated day, mean with 95 % CI half-width (or interval)";
        t.rows.push_back({"primary delay injected", min_ci(s.total_primary)});
        t.rows.push_back({"knock-on delay", min_ci(s.total_knock_on)});
        t.rows.push_back({"knock-on / primary", std::isfinite(s.knock_on_ratio) ? fmt("%.2f", s.knock_on_ratio) : "-"});
        t.rows.push_back({"mean arrival delay", min_ci(s.mean_arrival_delay)});
        for (std::size_t i = 0; i < s.thresholds.size() && i < s.punctuality.size(); ++i)
            t.rows.push_back({"punctual within " + threshold_text(s.thresholds[i]), pct_ci(s.punctuality[i])});
        if (v.plan && !v.plan->single_track.empty() && v.file->facts.schema_version >= 6) {
            const auto count_ci = [](const Estimate& e) { return fmt("%.2f", e.mean) + fmt(" ± %.2f", e.half_width); };
            t.rows.push_back({"single track: crossings moved to another place", count_ci(s.moved_crossings)});
            t.rows.push_back({"single track: pairs of one direction in another order", count_ci(s.changed_orders)});
        }
        if (v.scenario && !v.scenario->timetable.links.empty() && v.file->facts.schema_version >= 7)
            t.rows.push_back({"connections missed", fmt("%.2f", s.missed_connections.mean) +
                                                        fmt(" ± %.2f", s.missed_connections.half_width)});
        t.highlight.assign(t.rows.size(), false);
        t.highlight.front() = s.deadlocked > 0;
        intro = "A Monte Carlo study: " + std::to_string(s.replications) +
                " simulated days, each with primary delays drawn afresh from the scenario's delays section.";
        if (s.first_deadlock)
            intro += " The first day that ended in deadlock is replication " +
                     std::to_string(s.first_deadlock->replication) + ": " + s.first_deadlock->report.cause + ".";
    } else if (incomplete_day(v)) {
        // What the day did before it stopped, and no share or mean that would pass for the day's.
        const SimResult& d = *v.day;
        const DaySummary s = summarize_day(d, v.thresholds());
        double knock_on = 0.0;
        for (const TimingRecord& r : d.timing) knock_on += r.knock_on;
        const std::string none = "not given: the day is incomplete";
        t.caption = "The simulated day, INCOMPLETE: it ended in deadlock";
        t.rows = {{"deadlock", "yes, the last event at " + format_time_of_day(d.deadlock.time)},
                  {"trains", std::to_string(s.trains)},
                  {"reached their last timing point", std::to_string(s.finished)},
                  {"never reached their last timing point", std::to_string(s.trains - s.finished)},
                  {"arrivals and passes recorded before the deadlock", std::to_string(s.arrivals)},
                  {"knock-on delay before the deadlock, all trains", min1(knock_on)},
                  {"time standing at signals, stands ended before the deadlock", min1(s.total_held)},
                  {"mean arrival delay", none},
                  {"delay at the last timing points", none}};
        for (std::size_t i = 0; i < s.thresholds.size(); ++i)
            t.rows.push_back({"punctual within " + threshold_text(s.thresholds[i]), none});
        t.highlight.assign(t.rows.size(), false);
        t.highlight[0] = t.highlight[3] = true;
        intro = "One simulated day (knockon simulate --out), which ended in deadlock: " + d.deadlock.cause + ".";
    } else {
        const SimResult& d = *v.day;
        const DaySummary s = summarize_day(d, v.thresholds());
        double knock_on = 0.0;
        for (const TimingRecord& r : d.timing) knock_on += r.knock_on;
        t.caption = "The simulated day";
        t.rows = {{"trains", std::to_string(s.trains)},
                  {"reached their last timing point", std::to_string(s.finished)},
                  {"arrivals and passes recorded", std::to_string(s.arrivals)},
                  {"mean arrival delay", min1(s.mean_arrival_delay)},
                  {"knock-on delay, all trains", min1(knock_on)},
                  {"delay at the last timing points, all trains", min1(s.total_final_delay)},
                  {"time standing at signals, all trains", min1(s.total_held)}};
        for (std::size_t i = 0; i < s.thresholds.size(); ++i)
            t.rows.push_back({"punctual within " + threshold_text(s.thresholds[i]), pct(s.punctuality[i])});
        t.rows.push_back({"deadlock", d.deadlock.deadlocked ? "yes, at " + format_time_of_day(d.deadlock.time) : std::string("no")});
        t.highlight.assign(t.rows.size(), false);
        t.highlight.back() = d.deadlock.deadlocked;
        intro = "One simulated day (knockon simulate --out).";
    }
    std::string html = html_paragraph(intro) + html_table(t);
    if (v.file->study) html += deadlocked_days(*v.file->study);
    if (incomplete_day(v)) html += waiting_table(*v.day);
    html += attribution_slots(v);
    html += html_table(plan_headline(*v.plan));
    return {"verdict", "Verdict", html};
}

// ---- delays -------------------------------------------------------------------------------------

std::string punctuality_table(const ResultsView& v, const std::vector<double>& thresholds) {
    HtmlTable p;
    p.caption = "Punctuality by station (95 % Wilson interval of the pooled arrivals and passes)";
    p.headers = {"station", "km", "arrivals and passes"};
    p.numeric = {false, true, true};
    for (double t : thresholds) {
        p.headers.push_back("within " + threshold_text(t));
        p.numeric.push_back(true);
    }
    for (const StationPunctuality& s : station_punctuality(v)) {
        std::vector<std::string> row = {s.name + " (" + s.station + ")",
                                        std::isfinite(s.chainage) ? svg::number(s.chainage / 1000.0, 1) : "-",
                                        std::to_string(s.arrivals)};
        for (const Estimate& e : s.within) row.push_back(pct_ci(e));
        p.rows.push_back(std::move(row));
    }
    return html_table(p);
}

ReportSection delays_section(const ResultsView& v) {
    std::string html = html_paragraph(
        "How late trains reached their timing points, and how much of that they brought with them (primary) "
        "and how much other trains gave them (knock-on).");
    const std::vector<double> thresholds = v.thresholds();
    if (incomplete_day(v)) {
        html += html_paragraph(
            "No distribution of arrival delay and no punctuality are given for this day: it ended in deadlock, so "
            "the trains left waiting never reached the rest of their timing points, and a share of the arrivals "
            "it did record would not be the day's.");
    } else {
        html += figure_of(make_result_chart("delay-cdf", v));
        html += figure_of(make_result_chart("punctuality", v));
        html += punctuality_table(v, thresholds);
    }
    html += figure_of(make_result_chart("primary-knock-on", v));
    HtmlTable c;
    c.caption = "Delay per day by train category";
    c.headers = {"category", "trains", "primary", "knock-on", "knock-on / primary"};
    c.numeric = {false, true, true, true, true};
    for (const CategoryDelay& d : category_delays(v))
        c.rows.push_back({d.category, std::to_string(d.trains), min1(d.primary), min1(d.knock_on),
                          std::isfinite(d.primary) && d.primary > 0.0 ? fmt("%.2f", d.knock_on / d.primary) : "-"});
    html += html_table(c);

    if (v.file->study) {
        // The least punctual timing points, with the Wilson intervals the study file stores.
        const StoredStudy& s = *v.file->study;
        std::vector<const TimingPointStats*> tps;
        for (const TimingPointStats& tp : s.summary.timing_points)
            if (tp.reached > 0 && !tp.punctuality.empty()) tps.push_back(&tp);
        std::stable_sort(tps.begin(), tps.end(), [](const TimingPointStats* a, const TimingPointStats* b) {
            return a->punctuality[0].mean < b->punctuality[0].mean;
        });
        HtmlTable t;
        t.caption = "Least punctual timing points (share of days within " + threshold_text(thresholds.front()) +
                    ", 95 % Wilson interval)";
        t.headers = {"train", "station", "days reached", "within " + threshold_text(thresholds.front()),
                     "mean delay", "p90", "p95", "max", "knock-on gathered"};
        t.numeric = {false, false, true, true, true, true, true, true, true};
        for (std::size_t i = 0; i < tps.size() && i < kTimingPointRows; ++i) {
            const TimingPointStats& tp = *tps[i];
            t.rows.push_back({s.train_ids[tp.train], tp.station, std::to_string(tp.reached), pct_ci(tp.punctuality[0]),
                              min1(tp.delay.mean), min1(tp.delay_quantiles.p90), min1(tp.delay_quantiles.p95),
                              min1(tp.delay_quantiles.max), min1(tp.knock_on.mean)});
        }
        if (!t.rows.empty()) html += html_table(t);
    }
    return {"delays", "Delays and punctuality", html};
}

// ---- where knock-on comes from ---------------------------------------------------------------------

// The study's "where knock-on comes from" as the text output has it, laid out: the sources ranked by
// the knock-on they caused, what held the trains, the places, the buffers and links it passed
// through, the sections.  Every figure is the file's; none is worked out here.
ReportSection sources_section(const StoredAttribution& a) {
    const auto shown = [](std::size_t n) { return std::min(n, kTableRows); };
    const auto more = [](std::size_t n) {
        return n > kTableRows ? html_paragraph(std::to_string(n - kTableRows) + " more in the results file.")
                              : std::string();
    };
    std::string html = html_paragraph(
        "Each second of knock-on delay traced back to the delays that started it (README, \"Where knock-on comes "
        "from\", states the rule); the sources' knock-on adds up to the knock-on measured. Figures are means per "
        "complete day with their 95 % intervals.");
    HtmlTable s;
    s.caption = "Sources of knock-on delay ranked across days";
    s.headers = {"rank", "source", "kind", "knock-on caused per day", "95 % interval"};
    s.numeric = {true, false, false, true, true};
    const auto interval = [](const Estimate& e) {
        return std::isfinite(e.lower) && e.n > 1 ? fmt("%.2f to %.2f min", e.lower / 60.0, e.upper / 60.0) : std::string("-");
    };
    for (std::size_t i = 0; i < shown(a.sources.size()); ++i)
        s.rows.push_back({std::to_string(i + 1), source_text(a.sources[i]), a.sources[i].kind,
                          min_ci(a.sources[i].damage), interval(a.sources[i].damage)});
    if (s.rows.empty()) s.rows.push_back({"-", "no knock-on on any complete day", "-", "-", "-"});
    html += html_table(s) + more(a.sources.size());

    HtmlTable c;
    c.caption = "By what held the trains";
    c.headers = {"direct cause", "knock-on per day"};
    c.numeric = {false, true};
    for (const StoredAttribution::Cause& x : a.causes) {
        if (!(x.knock_on.mean > 0.0)) continue;
        std::string label = x.cause;
        for (std::size_t k = 0; k < AttributionLayout::kCauses; ++k)
            if (x.cause == to_string(static_cast<HoldCause::Kind>(k))) label = cause_label(k);
        c.rows.push_back({label, min_ci(x.knock_on)});
    }
    if (!c.rows.empty()) html += html_table(c);

    std::vector<const StoredAttribution::Place*> places;
    for (const StoredAttribution::Place& p : a.places)
        if (p.received.mean > 0.0 || p.caused.mean > 0.0) places.push_back(&p);
    std::stable_sort(places.begin(), places.end(), [](const auto* x, const auto* y) { return x->received.mean > y->received.mean; });
    HtmlTable p;
    p.caption = "Places: knock-on received there, and caused by the primary delays drawn there";
    p.headers = {"place", "received per day", "caused per day"};
    p.numeric = {false, true, true};
    for (std::size_t i = 0; i < shown(places.size()); ++i)
        p.rows.push_back({places[i]->place, min_ci(places[i]->received), min_ci(places[i]->caused)});
    if (!p.rows.empty()) html += html_table(p) + more(places.size());

    HtmlTable b;
    b.caption = "Buffers to widen first (knock-on the leader passed to the follower directly) and links";
    b.headers = {"what", "leader or earlier train -> follower or later train", "knock-on per day"};
    b.numeric = {false, false, true};
    for (const char* kind : {"buffer", "link"}) {
        const auto rows = through_of(a, kind);
        for (std::size_t i = 0; i < shown(rows.size()); ++i)
            b.rows.push_back({kind, buffer_text(*rows[i]), min_ci(rows[i]->knock_on)});
    }
    if (!b.rows.empty()) html += html_table(b);

    HtmlTable t;
    t.caption = "Sections the knock-on passed through most";
    t.headers = {"section", "knock-on per day"};
    t.numeric = {false, true};
    const auto sections = through_of(a, "section");
    for (std::size_t i = 0; i < shown(sections.size()); ++i) t.rows.push_back({sections[i]->section, min_ci(sections[i]->knock_on)});
    if (!t.rows.empty()) html += html_table(t) + more(sections.size());
    return {"knock-on-sources", "Where knock-on comes from", html};
}

// ---- where delays grow ----------------------------------------------------------------------------

ReportSection growth_section(const ResultsView& v) {
    std::string html = html_paragraph(
        "Knock-on delay arises where trains are held: at signals showing stop because the route ahead is not "
        "free, and at stops waiting for a late train to clear. The signals are ranked by the time trains "
        "stood at them.");
    html += figure_of(make_result_chart("signals", v));
    const std::vector<SignalStats> held = held_at_signals(v);
    double total = 0.0;
    for (const SignalStats& s : held) total += s.held.mean;
    HtmlTable t;
    t.caption = "Signals where trains stood at stop, per day";
    t.headers = {"rank", "signal", "track", "direction", "km", "time held", "share of all time held"};
    t.numeric = {true, false, false, false, true, true, true};
    for (std::size_t i = 0; i < held.size() && i < kTableRows; ++i) {
        const std::optional<SignalPlace> s = signal_place(*v.scenario, held[i].signal);
        t.rows.push_back({std::to_string(i + 1), held[i].signal, s ? s->track : "-", s ? s->direction : "-",
                          s && std::isfinite(s->km_m) ? svg::number(s->km_m / 1000.0, 2) : "-", min_ci(held[i].held),
                          total > 0.0 ? pct(held[i].held.mean / total) : "-"});
    }
    if (t.rows.empty())
        html += html_paragraph("No train stood at a signal showing stop.");
    else
        html += html_table(t);
    if (held.size() > kTableRows)
        html += html_paragraph("... and " + std::to_string(held.size() - kTableRows) + " more signals.");

    // Knock-on gathered by station: the run there from the previous timing point and the wait to
    // leave it.
    std::map<std::string, double> by_station;
    if (v.file->study) {
        for (const TimingPointStats& tp : v.file->study->summary.timing_points) by_station[tp.station] += tp.knock_on.mean;
    } else {
        for (const TimingRecord& r : v.day->timing) by_station[r.station] += r.knock_on;
    }
    std::vector<std::pair<std::string, double>> rows(by_station.begin(), by_station.end());
    std::stable_sort(rows.begin(), rows.end(), [](const auto& a, const auto& b) { return a.second > b.second; });
    HtmlTable k;
    k.caption = "Knock-on delay gathered on the way to each timing point and waiting to leave it, per day";
    k.headers = {"station", "knock-on, all trains"};
    k.numeric = {false, true};
    for (const auto& [station, seconds] : rows) k.rows.push_back({station, min1(seconds)});
    html += html_table(k);
    if (v.day && !v.day->crossing_changes.empty()) html += crossing_changes_table(*v.day);
    return {"delay-growth", "Where delays grow", html};
}

// ---- capacity and buffers --------------------------------------------------------------------------

void add_as_run_capacity(ReportSection& capacity, const ResultsView& v) {
    std::string html = html_paragraph(
        "As run: how much of the day each detection section was blocked for trains (from the locking of a "
        "route through it to its release), the busiest first.");
    html += figure_of(make_result_chart("blocked-share", v));
    HtmlTable t;
    t.caption = "Busiest detection sections as run";
    t.headers = {"detection section", "blocked share of 24 h"};
    t.numeric = {false, true};
    const std::vector<SectionShare> shares = blocked_shares(v);
    for (std::size_t i = 0; i < shares.size() && i < kTableRows; ++i)
        t.rows.push_back({shares[i].section, pct_ci(shares[i].share)});
    capacity.html += html + html_table(t);
}

void add_as_run_buffers(ReportSection& buffers, const ResultsView& v) {
    if (!v.file->study) return;
    const StoredStudy& s = *v.file->study;
    HtmlTable t;
    t.caption = "Thinnest buffers as run (consecutive trains of the plan on their critical section)";
    t.headers = {"leader", "follower", "line section", "section", "planned", "as run", "10 % of days below"};
    t.numeric = {false, false, false, false, true, true, true};
    for (std::size_t i = 0; i < s.summary.buffers.size() && i < kBufferRows; ++i) {
        const BufferStats& b = s.summary.buffers[i];
        const BufferPairNames& n = s.buffer_pairs[i];
        t.rows.push_back({n.leader, n.follower, n.line_section, n.section, sec(b.planned),
                          fmt("%.0f \u00B1 %.0f s", b.as_run.mean, b.as_run.half_width), sec(b.p10)});
        t.highlight.push_back(b.as_run.mean < 0.0);
    }
    std::string html = html_paragraph(
        "As run, over the study's days: the follower's blocking start minus the leader's blocking end on the "
        "section where the planned buffer is thinnest (negative: the follower was held up by the leader).");
    buffers.html += html + (t.rows.empty() ? html_paragraph("No consecutive pair used its critical section.")
                                           : html_table(t));
}

// ---- comparison ---------------------------------------------------------------------------------

// A table of figures with one column per variant, headed by its name (the figure's label first).
void add_variant_columns(HtmlTable& t, const std::vector<VariantFigures>& vs) {
    t.headers = {"figure"};
    t.numeric = {false};
    for (const VariantFigures& f : vs) {
        t.headers.push_back(f.name);
        t.numeric.push_back(true);
    }
}

ReportSection variants_section(const ResultsView& v) {
    const auto& vs = v.file->variants;
    const std::vector<double> thresholds = v.thresholds();
    std::string html = html_paragraph(
        "The same study was run on each variant with the same seed, so replication k of every variant saw the "
        "same primary delays (common random numbers) and the day-to-day spread cancels in the differences.");
    HtmlTable d;
    d.caption = "Variants";
    d.headers = {"variant", "description"};
    for (const VariantFigures& f : vs) d.rows.push_back({f.name, f.description});
    html += html_table(d);

    HtmlTable s;
    s.caption = "Per complete simulated day (mean with 95 % CI; days that ended in deadlock left out) and from the "
                "plan";
    add_variant_columns(s, vs);
    auto row = [&](const std::string& label, auto cell) {
        std::vector<std::string> r = {label};
        for (const VariantFigures& f : vs) r.push_back(cell(f));
        s.rows.push_back(std::move(r));
    };
    row("primary delay injected", [](const VariantFigures& f) { return min_ci(f.study.summary.total_primary); });
    row("knock-on delay", [](const VariantFigures& f) { return min_ci(f.study.summary.total_knock_on); });
    row("mean arrival delay", [](const VariantFigures& f) { return min_ci(f.study.summary.mean_arrival_delay); });
    for (std::size_t i = 0; i < thresholds.size(); ++i)
        row("punctual within " + threshold_text(thresholds[i]),
            [i](const VariantFigures& f) { return pct_ci(f.study.summary.punctuality.at(i)); });
    row("days ended in deadlock", [](const VariantFigures& f) { return std::to_string(f.study.summary.deadlocked); });
    row("complete days, which its figures are of",
        [](const VariantFigures& f) { return std::to_string(f.study.summary.complete); });
    row("plan: mean minimum headway", [](const VariantFigures& f) { return fmt("%.1f s", f.plan.mean_minimum_headway); });
    row("plan: peak-hour consumption (max)",
        [](const VariantFigures& f) { return pct(f.plan.peak_consumption) + " " + f.plan.peak_section; });
    row("plan: day consumption (max)",
        [](const VariantFigures& f) { return pct(f.plan.day_consumption) + " " + f.plan.day_section; });
    html += html_table(s);

    HtmlTable t;
    t.caption = "Paired differences against " + reference(v) + " (variant minus " + reference(v) +
                ", day by day over the days complete in both; mean with 95 % CI; marked " + std::string(kSignificantMark) +
                " where the interval excludes 0)";
    t.headers = {"variant", "figure", "difference", "95 % CI", "days paired"};
    t.numeric = {false, false, true, true, true};
    for (const DifferenceRow& r : v.file->differences) {
        const Estimate& e = r.difference;
        const bool share = r.unit == "share";
        auto value = [&](double x) {
            if (!std::isfinite(x)) return std::string("-");
            return share ? fmt("%+.2f pts", 100.0 * x) : fmt("%+.2f min", x / 60.0);
        };
        std::string figure = r.figure;
        for (double th : thresholds)
            if (r.figure == punctuality_field(th)) figure = "punctual within " + threshold_text(th);
        if (r.figure == "total_knock_on") figure = "knock-on delay per day";
        if (r.figure == "mean_arrival_delay") figure = "mean arrival delay";
        if (r.figure == "total_primary") figure = "primary delay per day";
        if (r.figure == "plan_mean_minimum_headway") figure = "plan: mean minimum headway";
        if (r.figure == "plan_peak_hour_consumption") figure = "plan: peak-hour consumption (max)";
        if (r.figure == "plan_day_consumption") figure = "plan: day consumption (max)";
        if (r.figure == "plan_mean_minimum_headway") {
            t.rows.push_back({r.variant, figure, fmt("%+.1f s", e.mean), "(plan, no interval)", "-"});
        } else {
            t.rows.push_back({r.variant, figure, value(e.mean),
                              r.paired() ? value(e.lower) + " to " + value(e.upper) : "(plan, no interval)",
                              r.paired() ? std::to_string(e.n) : "-"});
        }
        t.significant.push_back(r.paired() && (e.lower > 0.0 || e.upper < 0.0));
    }
    html += html_table(t);
    for (const std::string& name : result_chart_names(ResultsKind::comparison))
        html += figure_of(make_result_chart(name, v));
    return {"variants", "Variants compared", html};
}

std::string reference_plan_headline(const ResultsView& v) {
    HtmlTable t = plan_headline(*v.plan);
    t.caption += " (" + reference(v) + ")";
    return html_table(t);
}

// A comparison in brief: each variant's headline figures side by side, the paired differences
// whose interval excludes 0, and the reference variant's plan.
ReportSection comparison_verdict(const ResultsView& v) {
    const auto& vs = v.file->variants;
    const std::vector<double> thresholds = v.thresholds();
    HtmlTable s;
    s.caption = "Per complete simulated day, mean with 95 % CI (days that ended in deadlock left out)";
    add_variant_columns(s, vs);
    auto row = [&](const std::string& label, auto cell) {
        std::vector<std::string> r = {label};
        for (const VariantFigures& f : vs) r.push_back(cell(f));
        s.rows.push_back(std::move(r));
    };
    row("days ended in deadlock", [](const VariantFigures& f) {
        return std::to_string(f.study.summary.deadlocked) + " of " + std::to_string(f.study.summary.replications);
    });
    row("knock-on delay", [](const VariantFigures& f) { return min_ci(f.study.summary.total_knock_on); });
    if (!thresholds.empty())
        row("punctual within " + threshold_text(thresholds.front()),
            [](const VariantFigures& f) { return pct_ci(f.study.summary.punctuality.at(0)); });
    std::size_t deadlocked = 0;
    for (const VariantFigures& f : vs) deadlocked += f.study.summary.deadlocked;
    s.highlight.assign(s.rows.size(), false);
    s.highlight.front() = deadlocked > 0;
    std::size_t significant = 0, paired = 0;
    for (const DifferenceRow& d : v.file->differences) {
        paired += d.paired();
        significant += d.paired() && (d.difference.lower > 0.0 || d.difference.upper < 0.0);
    }
    std::string html = html_paragraph(std::to_string(vs.size()) + " variants, each over the same " +
                                      std::to_string(v.file->facts.replications) +
                                      " days of primary delays (common random numbers).") +
                       html_table(s) +
                       html_paragraph(std::to_string(significant) + " of " + std::to_string(paired) +
                                      " paired differences against " + reference(v) + " have a 95 % interval that " +
                                      "excludes 0 (marked " + kSignificantMark + " in Variants compared).");
    // Per variant, the lists a study's verdict gives, from that variant's attribution.
    for (const VariantFigures& f : vs) {
        const StoredAttribution* a = f.study.attribution ? &*f.study.attribution : nullptr;
        html += "<div class=\"variant-lists\" id=\"lists-" + html_escape(f.name) + "\">\n" +
                attribution_lists(a, nullptr, "-" + html_escape(f.name), ": " + f.name, false) + "</div>\n";
    }
    html += reference_plan_headline(v);
    return {"verdict", "Verdict", html};
}

std::size_t section_index(const Report& r, const std::string& id) {
    for (std::size_t i = 0; i < r.sections.size(); ++i)
        if (r.sections[i].id == id) return i;
    return r.sections.size();
}

}  // namespace

Report results_report(const ResultsView& v, const PlanReportOptions& options) {
    Report r = plan_report(*v.scenario, *v.plan, options);
    const ResultsKind kind = v.file->facts.kind;
    r.title = (kind == ResultsKind::day ? "Simulated day report: "
               : kind == ResultsKind::study ? "Study report: "
                                            : "Comparison report: ") +
              v.scenario->name;
    add_facts(r, v);
    // A deadlock is said first of all, above the caution and the facts.
    if (const std::string notice = results_deadlock_notice(v); !notice.empty()) r.alerts.push_back(notice);

    std::vector<ReportSection> sections;
    auto take = [&](const std::string& id) {
        const std::size_t i = section_index(r, id);
        return i < r.sections.size() ? r.sections[i] : ReportSection{id, id, ""};
    };
    // The plan's reference tables close the views, after the results.
    const char* const reference_tables[] = {"running-times", "headway-matrix", "spacing"};
    if (kind == ResultsKind::comparison) {
        r.verdict = comparison_verdict(v);
        sections.push_back(variants_section(v));
        for (const char* id : {"time-distance", "capacity", "buffers", "conflicts", "running-times", "headway-matrix",
                               "spacing"}) {
            ReportSection s = take(id);
            s.title += " (" + reference(v) + ")";
            sections.push_back(std::move(s));
        }
    } else {
        r.verdict = verdict_section(v);
        sections.push_back(take("time-distance"));
        sections.push_back(delays_section(v));
        if (const StoredAttribution* a = attribution_of(v)) sections.push_back(sources_section(*a));
        sections.push_back(growth_section(v));
        ReportSection capacity = take("capacity");
        add_as_run_capacity(capacity, v);
        sections.push_back(std::move(capacity));
        ReportSection buffers = take("buffers");
        add_as_run_buffers(buffers, v);
        sections.push_back(std::move(buffers));
        sections.push_back(take("conflicts"));
        if (section_index(r, "crossings") < r.sections.size()) sections.push_back(take("crossings"));
        for (const char* id : reference_tables) sections.push_back(take(id));
    }
    r.sections = std::move(sections);
    return r;
}

}  // namespace knockon
