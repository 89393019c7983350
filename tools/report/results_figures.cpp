#include "tools/report/results_figures.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <stdexcept>

#include "sim/day_summary.hpp"
#include "tools/results/deadlock_output.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/results/study_hdf5.hpp"

namespace knockon {

namespace {

constexpr std::size_t kRankedRows = 15;   // rows of the ranked charts; the tables hold more
constexpr double kCdfRightEnd = 0.99;     // the delay axis ends where 99 % of arrivals are in

const ValueFormat kPercent{100.0, 1, " %"};
const ValueFormat kPoints{100.0, 1, " pts"};
const ValueFormat kMinutes{1.0 / 60.0, 1, " min"};

std::string minutes_label(double seconds) { return svg::number(seconds / 60.0, 1) + " min"; }

std::map<std::string, std::string> category_of(const PlanResult& plan) {
    std::map<std::string, std::string> out;
    for (const TrainPlan& tp : plan.trains) out[tp.run.service->id] = tp.run.service->category;
    return out;
}

// Linear interpolation in a list of (x, F) knots with x ascending; 1 beyond the last.
double knot_value(const std::vector<svg::Point>& knots, double x) {
    if (knots.empty()) return 0.0;
    if (x >= knots.back().x) return 1.0;
    if (x < knots.front().x) return 0.0;
    const auto it = std::upper_bound(knots.begin(), knots.end(), x,
                                     [](double v, const svg::Point& p) { return v < p.x; });
    const svg::Point& b = *it;
    const svg::Point& a = *(it - 1);
    if (b.x == a.x) return b.y;
    return a.y + (b.y - a.y) * (x - a.x) / (b.x - a.x);
}

// The knots of one timing point's delay distribution (see quantile_mixture_cdf).
std::vector<svg::Point> timing_point_knots(const TimingPointStats& tp, const std::vector<double>& thresholds) {
    std::vector<svg::Point> k = {{tp.delay_quantiles.p50, 0.5},
                                 {tp.delay_quantiles.p90, 0.9},
                                 {tp.delay_quantiles.p95, 0.95},
                                 {tp.delay_quantiles.max, 1.0}};
    for (std::size_t i = 0; i < thresholds.size() && i < tp.punctuality.size(); ++i)
        k.push_back({thresholds[i], tp.punctuality[i].mean});
    k.erase(std::remove_if(k.begin(), k.end(),
                           [](const svg::Point& p) { return !std::isfinite(p.x) || !std::isfinite(p.y); }),
            k.end());
    std::sort(k.begin(), k.end(), [](const svg::Point& a, const svg::Point& b) {
        return a.x < b.x || (a.x == b.x && a.y < b.y);
    });
    // One knot per delay (the highest share), shares never falling.
    std::vector<svg::Point> out;
    for (const svg::Point& p : k) {
        const double y = out.empty() ? p.y : std::max(p.y, out.back().y);
        if (!out.empty() && out.back().x == p.x)
            out.back().y = y;
        else
            out.push_back({p.x, y});
    }
    if (!out.empty() && out.front().x > 0.0) out.insert(out.begin(), {0.0, 0.0});
    return out;
}

// The delay where a distribution function first reaches `share` (its right end if never).
double reaches(const std::vector<svg::Point>& cdf, double share) {
    for (const svg::Point& p : cdf)
        if (p.y >= share) return p.x;
    return cdf.empty() ? 0.0 : cdf.back().x;
}

const StoredStudy& study_of(const ResultsView& v) {
    if (!v.file || !v.file->study) throw std::invalid_argument("this chart needs a study file");
    return *v.file->study;
}

bool is_study(const ResultsView& v) { return v.file && v.file->facts.kind == ResultsKind::study; }

// "all 200 days", or "the 129 complete days" when some ended in deadlock.
std::string days_of(const StudySummary& s) {
    if (s.deadlocked == 0) return "all " + std::to_string(s.replications) + " days";
    return "the " + std::to_string(s.complete) + " complete days (" + std::to_string(s.deadlocked) + " of " +
           std::to_string(s.replications) + " ended in deadlock and are left out)";
}

const SimResult& day_of(const ResultsView& v) {
    if (!v.day) throw std::invalid_argument("this chart needs a day file");
    return *v.day;
}

// The CDF chart of a day or study file, with where its figures come from.
CdfChart delay_cdf(const ResultsView& v, std::string& source) {
    CdfChart chart;
    chart.thresholds = v.thresholds();
    const std::vector<std::string> categories = train_categories(*v.plan);
    const auto cat = category_of(*v.plan);
    std::vector<svg::Point> all;
    if (is_study(v)) {
        const StoredStudy& s = study_of(v);
        std::map<std::string, std::vector<const TimingPointStats*>> by_category;
        std::vector<const TimingPointStats*> every;
        for (const TimingPointStats& tp : s.summary.timing_points) {
            if (tp.reached == 0) continue;
            const auto it = cat.find(s.train_ids[tp.train]);
            by_category[it == cat.end() ? std::string("(not in the scenario)") : it->second].push_back(&tp);
            every.push_back(&tp);
        }
        for (std::size_t k = 0; k < categories.size(); ++k)
            if (by_category.count(categories[k]))
                chart.series.push_back({categories[k], category_style(k),
                                        quantile_mixture_cdf(by_category[categories[k]], s.summary.thresholds)});
        all = quantile_mixture_cdf(every, s.summary.thresholds);
        source = "From the study's statistics of every timing point over " + days_of(s.summary) +
                 ": its delay quantiles (p50, p90, p95, max) and its share of days within each threshold, "
                 "joined linearly and pooled over the timing points (each weighted by the days the train got "
                 "there); exact at those points only, an approximation between them.";
    } else {
        const SimResult& d = day_of(v);
        std::map<std::string, std::vector<double>> by_category;
        std::vector<double> every;
        for (const TimingRecord& r : d.timing) {
            if (!std::isfinite(r.arrival_delay) || r.train >= d.train_ids.size()) continue;
            const double delay = std::max(0.0, r.arrival_delay);
            const auto it = cat.find(d.train_ids[r.train]);
            if (it != cat.end()) by_category[it->second].push_back(delay);
            every.push_back(delay);
        }
        for (std::size_t k = 0; k < categories.size(); ++k)
            if (by_category.count(categories[k]))
                chart.series.push_back({categories[k], category_style(k), empirical_cdf(by_category[categories[k]])});
        all = empirical_cdf(every);
        source = "The empirical distribution of the " + std::to_string(every.size()) +
                 " arrivals and passes of " +
                 (v.choice ? "replication " + std::to_string(v.choice->replication) : std::string("the simulated day")) +
                 " (the share with at most that delay).";
    }
    if (!all.empty()) {
        chart.x_max = reaches(all, kCdfRightEnd);
        chart.series.push_back({"all trains", "all", std::move(all)});
    }
    return chart;
}

GroupedBars punctuality_chart_data(const ResultsView& v, std::string& source) {
    GroupedBars g;
    const std::vector<double> thresholds = v.thresholds();
    for (double t : thresholds) g.series.push_back("within " + minutes_label(t));
    g.format = kPercent;
    g.value_axis = "arrivals and passes with delay below the threshold [%]";
    g.group_axis = "all stations, then each station in line order";
    g.axis_max = 1.0;
    BarGroup all{"all stations", {}};
    if (is_study(v)) {
        const StudySummary& s = study_of(v).summary;
        for (const Estimate& e : s.punctuality) all.values.push_back({e.mean, e.lower, e.upper});
        source = "All stations: the mean of the daily shares over " + days_of(s) +
                 " with its 95 % Student-t interval. Each station: its arrivals and passes of all days "
                 "pooled, with the 95 % Wilson score interval of the pooled count; arrivals of one day are "
                 "not independent of each other, so read these intervals as the least uncertainty there is.";
    } else {
        const DaySummary d = summarize_day(day_of(v), thresholds);
        for (std::size_t i = 0; i < thresholds.size(); ++i) {
            const auto n = d.arrivals;
            const auto k = static_cast<std::size_t>(std::llround(d.punctuality[i] * static_cast<double>(n)));
            const Estimate e = estimate_share(k, n);
            all.values.push_back({e.mean, e.lower, e.upper});
        }
        source = "The arrivals and passes of one simulated day, with 95 % Wilson score intervals that treat "
                 "them as independent trials (they are not: trains of one day delay each other).";
    }
    g.groups.push_back(std::move(all));
    for (const StationPunctuality& sp : station_punctuality(v)) {
        BarGroup b{sp.name, {}};
        for (const Estimate& e : sp.within) b.values.push_back({e.mean, e.lower, e.upper});
        g.groups.push_back(std::move(b));
    }
    return g;
}

GroupedBars primary_knock_on_data(const ResultsView& v, std::string& source) {
    GroupedBars g;
    g.series = {"primary delay", "knock-on delay"};
    g.format = kMinutes;
    g.value_axis = "delay per day [min]";
    g.group_axis = "train category";
    for (const CategoryDelay& c : category_delays(v))
        g.groups.push_back({c.category + " (" + std::to_string(c.trains) + ")", {{c.primary}, {c.knock_on}}});
    if (is_study(v)) {
        const StudySummary& s = study_of(v).summary;
        g.groups.push_back({"all trains",
                            {{s.total_primary.mean, s.total_primary.lower, s.total_primary.upper},
                             {s.total_knock_on.mean, s.total_knock_on.lower, s.total_knock_on.upper}}});
        source = "Per category the sum of its trains' mean delay per day (number of trains in brackets); all "
                 "trains: the mean per day over " +
                 days_of(s) +
                 " with its 95 % Student-t interval. Primary delay is what the study injected into the "
                 "trains themselves; knock-on delay is what they lost to other trains and disruptions.";
    } else {
        double total = 0.0;
        for (const CategoryDelay& c : category_delays(v)) total += c.knock_on;
        g.groups.push_back({"all trains", {{kNoValue}, {total}}});
        source = "Knock-on delay of one simulated day; a day file does not record the primary delays given "
                 "with --delay, so only knock-on is shown.";
    }
    return g;
}

HBars signals_data(const ResultsView& v, std::string& source) {
    HBars h;
    h.format = kMinutes;
    h.value_axis = "time trains stood at the signal showing stop, per day [min]";
    const std::vector<SignalStats> held = held_at_signals(v);
    for (std::size_t i = 0; i < held.size() && i < kRankedRows; ++i) {
        const SignalStats& s = held[i];
        std::string label = s.signal;
        const std::optional<SignalPlace> at = signal_place(*v.scenario, s.signal);
        // A network's kilometres are each segment's own (two tracks may show the same km): with the segment.
        if (at && std::isfinite(at->km_m))
            label += " (" + (v.scenario->network ? at->track + " " : std::string()) + "km " +
                     svg::number(at->km_m / 1000.0, 1) + ")";
        else if (at) label += " (" + at->track + ")";
        BarValue value{s.held.mean};
        if (s.held.n > 1) value = {s.held.mean, s.held.lower, s.held.upper};
        h.bars.push_back({label, value, 0, ""});
    }
    source = is_study(v) ? "Mean per day over the study's days with 95 % Student-t intervals (a day without a "
                           "stand counts as 0); the " +
                               std::to_string(std::min(held.size(), kRankedRows)) + " signals with most of " +
                               std::to_string(held.size()) + "."
                         : "Total time of the simulated day; the " +
                               std::to_string(std::min(held.size(), kRankedRows)) + " signals with most of " +
                               std::to_string(held.size()) + ".";
    return h;
}

HBars blocked_data(const ResultsView& v, std::string& source) {
    HBars h;
    h.format = kPercent;
    h.value_axis = "share of the 24-hour day the section was blocked as run [%]";
    const std::vector<SectionShare> shares = blocked_shares(v);
    for (std::size_t i = 0; i < shares.size() && i < kRankedRows; ++i) {
        const Estimate& e = shares[i].share;
        BarValue value{e.mean};
        if (e.n > 1) value = {e.mean, e.lower, e.upper};
        h.bars.push_back({shares[i].section, value, 1, ""});
    }
    source = std::string("Time from the section's locking for a train to its release, summed over the trains, as a "
                         "share of 24 hours") +
             (is_study(v) ? ", mean over the days with 95 % Student-t intervals" : ", on the simulated day") +
             "; the " + std::to_string(std::min(shares.size(), kRankedRows)) + " busiest of " +
             std::to_string(shares.size()) + " detection sections.";
    return h;
}

const std::vector<VariantFigures>& variants_of(const ResultsView& v) {
    if (!v.file || v.file->variants.empty()) throw std::invalid_argument("this chart needs a comparison file");
    return v.file->variants;
}

const DifferenceRow* find_difference(const ResultsView& v, const std::string& variant, const std::string& figure) {
    for (const DifferenceRow& r : v.file->differences)
        if (r.variant == variant && r.figure == figure) return &r;
    return nullptr;
}

BarValue difference_value(const DifferenceRow* r) {
    if (!r) return {};
    const Estimate& e = r->difference;
    return r->paired() ? BarValue{e.mean, e.lower, e.upper} : BarValue{e.mean};
}

HBars variants_knock_on_data(const ResultsView& v, std::string& source) {
    HBars h;
    h.format = kMinutes;
    h.value_axis = "knock-on delay per day [min]";
    const auto& vs = variants_of(v);
    for (std::size_t i = 0; i < vs.size(); ++i) {
        const Estimate& e = vs[i].study.summary.total_knock_on;
        h.bars.push_back({vs[i].name, {e.mean, e.lower, e.upper}, i, ""});
    }
    source = "Mean knock-on delay of all trains per day over each variant's complete days (" +
             std::to_string(v.file->facts.replications) +
             " simulated, those that ended in deadlock left out), with its 95 % Student-t interval; every variant "
             "saw the same primary delays.";
    return h;
}

GroupedBars variants_punctuality_data(const ResultsView& v, std::string& source) {
    GroupedBars g;
    const auto& vs = variants_of(v);
    for (double t : v.thresholds()) g.series.push_back("within " + minutes_label(t));
    g.format = kPercent;
    g.value_axis = "arrivals and passes with delay below the threshold [%]";
    g.group_axis = "variant";
    g.axis_max = 1.0;
    for (const VariantFigures& f : vs) {
        BarGroup b{f.name, {}};
        for (const Estimate& e : f.study.summary.punctuality) b.values.push_back({e.mean, e.lower, e.upper});
        g.groups.push_back(std::move(b));
    }
    source = "Mean of the daily shares with its 95 % Student-t interval, per variant.";
    return g;
}

HBars differences_knock_on_data(const ResultsView& v, std::string& source) {
    HBars h;
    h.format = {1.0 / 60.0, 1, " min"};
    const auto& vs = variants_of(v);
    h.value_axis = "knock-on delay per day, variant minus " + vs.front().name + " [min]";
    for (std::size_t i = 1; i < vs.size(); ++i)
        h.bars.push_back({vs[i].name, difference_value(find_difference(v, vs[i].name, "total_knock_on")), i, ""});
    source = "Mean of the day-by-day differences (common random numbers) with its 95 % Student-t interval; an "
             "interval that excludes 0 is unlikely to be chance.";
    return h;
}

GroupedBars differences_punctuality_data(const ResultsView& v, std::string& source) {
    GroupedBars g;
    const auto& vs = variants_of(v);
    const std::vector<double> thresholds = v.thresholds();
    for (double t : thresholds) g.series.push_back("within " + minutes_label(t));
    g.format = kPoints;
    g.value_axis = "punctuality, variant minus " + vs.front().name + " [percentage points]";
    g.group_axis = "variant";
    for (std::size_t i = 1; i < vs.size(); ++i) {
        BarGroup b{vs[i].name, {}};
        for (double t : thresholds) b.values.push_back(difference_value(find_difference(v, vs[i].name, punctuality_field(t))));
        g.groups.push_back(std::move(b));
    }
    source = "Mean of the day-by-day differences in the share of punctual arrivals and passes, with its 95 % "
             "Student-t interval.";
    return g;
}

}  // namespace

std::vector<double> ResultsView::thresholds() const {
    if (file && file->study) return file->study->summary.thresholds;
    if (file && !file->variants.empty()) return file->variants.front().study.summary.thresholds;
    return day_thresholds;
}

bool incomplete_day(const ResultsView& v) {
    return v.file && v.file->facts.kind == ResultsKind::day && v.day && v.day->deadlock.deadlocked;
}

std::string results_deadlock_notice(const ResultsView& v) {
    if (!v.file) return "";
    switch (v.file->facts.kind) {
        case ResultsKind::day: {
            if (!v.day) return "";
            const DaySummary d = summarize_day(*v.day, v.thresholds());
            return day_deadlock_notice(v.day->deadlock, d.trains, d.trains - d.finished);
        }
        case ResultsKind::study: return v.file->study ? study_deadlock_notice(v.file->study->summary) : "";
        case ResultsKind::comparison: {
            std::vector<NamedSummary> named;
            for (const VariantFigures& f : v.file->variants) named.push_back({f.name, &f.study.summary});
            return comparison_deadlock_notice(named);
        }
    }
    return "";
}

std::vector<std::string> result_chart_names(ResultsKind kind) {
    if (kind == ResultsKind::comparison)
        return {"variants-knock-on", "variants-punctuality", "differences-knock-on", "differences-punctuality"};
    return {"delay-cdf", "punctuality", "primary-knock-on", "signals", "blocked-share"};
}

ResultChart make_result_chart(const std::string& name, const ResultsView& v, double width) {
    const std::vector<std::string> names = result_chart_names(v.file->facts.kind);
    if (std::find(names.begin(), names.end(), name) == names.end()) {
        std::string list = "time-distance, capacity";
        for (const std::string& n : names) list += ", " + n;
        throw std::invalid_argument("unknown chart '" + name + "' for a " + to_string(v.file->facts.kind) +
                                    " file; known: " + list);
    }
    if ((name == "delay-cdf" || name == "punctuality") && incomplete_day(v))
        throw std::invalid_argument("chart '" + name + "' is not drawn for a day that ended in deadlock: " +
                                    "a share of the arrivals it recorded is no punctuality of the day (" +
                                    results_deadlock_notice(v) + ")");
    ResultChart c;
    c.name = name;
    ChartOptions o;
    o.width = width;
    const std::string ref = v.file->variants.empty() ? std::string() : v.file->variants.front().name;
    if (name == "delay-cdf") {
        c.title = "Cumulative distribution of arrival delay by train category";
        const CdfChart d = delay_cdf(v, c.caption);
        c.caption += " The delay axis ends where 99 % of all arrivals and passes are in (" +
                     minutes_label(d.x_max) + "); the curves run on beyond it.";
        o.title = c.title;
        c.svg = cdf_chart(d, o);
    } else if (name == "punctuality") {
        c.title = "Punctuality by station";
        o.title = c.title;
        c.svg = grouped_bar_chart(punctuality_chart_data(v, c.caption), o);
    } else if (name == "primary-knock-on") {
        c.title = "Primary and knock-on delay by train category";
        o.title = c.title;
        c.svg = grouped_bar_chart(primary_knock_on_data(v, c.caption), o);
    } else if (name == "signals") {
        c.title = "Where trains stood: signals ranked by time held at stop";
        o.title = c.title;
        c.svg = hbar_chart(signals_data(v, c.caption), o);
    } else if (name == "blocked-share") {
        c.title = "As-run blocked share of the day by detection section";
        o.title = c.title;
        c.svg = hbar_chart(blocked_data(v, c.caption), o);
    } else if (name == "variants-knock-on") {
        c.title = "Knock-on delay per day by variant";
        o.title = c.title;
        c.svg = hbar_chart(variants_knock_on_data(v, c.caption), o);
    } else if (name == "variants-punctuality") {
        c.title = "Punctuality by variant";
        o.title = c.title;
        c.svg = grouped_bar_chart(variants_punctuality_data(v, c.caption), o);
    } else if (name == "differences-knock-on") {
        c.title = "Knock-on delay per day against " + ref + " (paired differences)";
        o.title = c.title;
        c.svg = hbar_chart(differences_knock_on_data(v, c.caption), o);
    } else {
        c.title = "Punctuality against " + ref + " (paired differences)";
        o.title = c.title;
        c.svg = grouped_bar_chart(differences_punctuality_data(v, c.caption), o);
    }
    return c;
}

// ---------------------------------------------------------------------------------------------

std::vector<svg::Point> empirical_cdf(std::vector<double> values, std::size_t max_points) {
    values.erase(std::remove_if(values.begin(), values.end(), [](double x) { return !std::isfinite(x); }),
                 values.end());
    std::vector<svg::Point> out;
    if (values.empty()) return out;
    std::sort(values.begin(), values.end());
    const double n = static_cast<double>(values.size());
    std::size_t distinct = 1;
    for (std::size_t i = 1; i < values.size(); ++i) distinct += values[i] != values[i - 1];
    const std::size_t steps = std::max<std::size_t>(max_points / 2, 1);
    if (distinct <= steps) {
        double below = 0.0;   // F just before the current value
        for (std::size_t i = 0; i < values.size();) {
            std::size_t j = i;
            while (j < values.size() && values[j] == values[i]) ++j;
            const double at = static_cast<double>(j) / n;
            out.push_back({values[i], below});
            out.push_back({values[i], at});
            below = at;
            i = j;
        }
        return out;
    }
    // An even grid from the smallest to the largest value: F at each grid point, as steps.
    const double lo = values.front(), hi = values.back();
    double below = 0.0;
    for (std::size_t k = 0; k <= steps; ++k) {
        const double x = lo + (hi - lo) * static_cast<double>(k) / static_cast<double>(steps);
        const double at =
            static_cast<double>(std::upper_bound(values.begin(), values.end(), x) - values.begin()) / n;
        out.push_back({x, below});
        out.push_back({x, at});
        below = at;
    }
    return out;
}

std::vector<svg::Point> quantile_mixture_cdf(const std::vector<const TimingPointStats*>& points,
                                             const std::vector<double>& thresholds) {
    std::vector<std::vector<svg::Point>> knots;
    std::vector<double> weight;
    std::vector<double> xs;
    double total = 0.0;
    for (const TimingPointStats* tp : points) {
        if (!tp || tp->reached == 0) continue;
        std::vector<svg::Point> k = timing_point_knots(*tp, thresholds);
        if (k.empty()) continue;
        for (const svg::Point& p : k) xs.push_back(p.x);
        weight.push_back(static_cast<double>(tp->reached));
        total += weight.back();
        knots.push_back(std::move(k));
    }
    std::vector<svg::Point> out;
    if (knots.empty()) return out;
    std::sort(xs.begin(), xs.end());
    xs.erase(std::unique(xs.begin(), xs.end()), xs.end());
    // Each timing point's function is linear between its knots, so the mixture is linear between
    // the union of all knots: evaluated there, the polyline is the mixture itself.  Many knots
    // are thinned to an even pick (keeping both ends).
    constexpr std::size_t kMaxPoints = 800;
    if (xs.size() > kMaxPoints) {
        std::vector<double> pick;
        for (std::size_t i = 0; i < kMaxPoints; ++i) pick.push_back(xs[i * (xs.size() - 1) / (kMaxPoints - 1)]);
        xs = std::move(pick);
    }
    for (double x : xs) {
        double f = 0.0;
        for (std::size_t j = 0; j < knots.size(); ++j) f += weight[j] * knot_value(knots[j], x);
        out.push_back({x, std::min(1.0, f / total)});
    }
    return out;
}

std::vector<StationPunctuality> station_punctuality(const ResultsView& v) {
    const std::vector<double> thresholds = v.thresholds();
    std::vector<StationPunctuality> out;
    std::map<std::string, std::size_t> row;
    for (const Station& s : v.scenario->infrastructure.stations) {
        row[s.id] = out.size();
        out.push_back({s.id, s.name.empty() ? s.id : s.name, s.at, 0, {}});
    }
    // A network has no one chainage: its stations in the order its corridors name them (no km).
    if (v.scenario->network)
        for (const net::Corridor& c : v.scenario->network->corridors)
            for (const std::string& id : c.stations)
                if (row.emplace(id, out.size()).second) out.push_back({id, station_name(*v.scenario, id), INFINITY, 0, {}});
    std::vector<std::vector<std::size_t>> within(out.size(), std::vector<std::size_t>(thresholds.size(), 0));
    auto station = [&](const std::string& id) -> std::size_t {
        const auto it = row.find(id);
        if (it != row.end()) return it->second;
        row[id] = out.size();   // a station the scenario no longer has: listed at the end by its id
        out.push_back({id, id, INFINITY, 0, {}});
        within.emplace_back(thresholds.size(), 0);
        return out.size() - 1;
    };
    if (is_study(v)) {
        for (const TimingPointStats& tp : study_of(v).summary.timing_points) {
            if (tp.reached == 0) continue;
            const std::size_t r = station(tp.station);
            out[r].arrivals += tp.reached;
            // The stored share is a count over `reached` days: recover the count exactly.
            for (std::size_t i = 0; i < thresholds.size() && i < tp.punctuality.size(); ++i)
                within[r][i] += static_cast<std::size_t>(
                    std::llround(tp.punctuality[i].mean * static_cast<double>(tp.reached)));
        }
    } else {
        for (const TimingRecord& t : day_of(v).timing) {
            if (!std::isfinite(t.arrival_delay)) continue;
            const std::size_t r = station(t.station);
            ++out[r].arrivals;
            for (std::size_t i = 0; i < thresholds.size(); ++i) within[r][i] += knockon::within(t.arrival_delay, thresholds[i]);
        }
    }
    std::vector<StationPunctuality> kept;
    for (std::size_t r = 0; r < out.size(); ++r) {
        if (out[r].arrivals == 0) continue;
        for (std::size_t i = 0; i < thresholds.size(); ++i) out[r].within.push_back(estimate_share(within[r][i], out[r].arrivals));
        kept.push_back(std::move(out[r]));
    }
    std::stable_sort(kept.begin(), kept.end(),
                     [](const StationPunctuality& a, const StationPunctuality& b) { return a.chainage < b.chainage; });
    return kept;
}

std::vector<CategoryDelay> category_delays(const ResultsView& v) {
    const std::vector<std::string> categories = train_categories(*v.plan);
    const auto cat = category_of(*v.plan);
    std::vector<CategoryDelay> out;
    for (const std::string& c : categories) out.push_back({c, 0, 0.0, 0.0});
    auto row = [&](const std::string& train) -> CategoryDelay* {
        const auto it = cat.find(train);
        if (it == cat.end()) return nullptr;
        for (CategoryDelay& c : out)
            if (c.category == it->second) return &c;
        return nullptr;
    };
    if (is_study(v)) {
        const StoredStudy& s = study_of(v);
        for (const TrainStats& t : s.summary.trains)
            if (CategoryDelay* c = row(s.train_ids[t.train])) {
                ++c->trains;
                c->primary += t.primary.mean;
                c->knock_on += t.knock_on.mean;
            }
    } else {
        const SimResult& d = day_of(v);
        std::vector<bool> counted(d.train_ids.size(), false);
        for (CategoryDelay& c : out) c.primary = kNoValue;
        for (const TimingRecord& r : d.timing) {
            if (r.train >= d.train_ids.size()) continue;
            if (CategoryDelay* c = row(d.train_ids[r.train])) {
                if (!counted[r.train]) ++c->trains;
                counted[r.train] = true;
                c->knock_on += r.knock_on;
            }
        }
    }
    out.erase(std::remove_if(out.begin(), out.end(), [](const CategoryDelay& c) { return c.trains == 0; }), out.end());
    return out;
}

std::vector<SignalStats> held_at_signals(const ResultsView& v) {
    if (is_study(v)) return study_of(v).summary.signals;
    std::map<std::string, double> held;
    for (const HoldRecord& h : day_of(v).holds)
        if (std::isfinite(h.to - h.from)) held[h.signal] += h.to - h.from;
    std::vector<SignalStats> out;
    for (const auto& [signal, seconds] : held) {
        Estimate e;
        e.mean = e.lower = e.upper = seconds;
        e.n = 1;
        out.push_back({signal, e});
    }
    std::stable_sort(out.begin(), out.end(),
                     [](const SignalStats& a, const SignalStats& b) { return a.held.mean > b.held.mean; });
    return out;
}

std::vector<SectionShare> blocked_shares(const ResultsView& v) {
    std::vector<SectionShare> out;
    if (is_study(v)) {
        const StoredStudy& s = study_of(v);
        for (std::size_t k = 0; k < s.section_ids.size() && k < s.summary.section_blocked_share.size(); ++k)
            out.push_back({s.section_ids[k], s.summary.section_blocked_share[k]});
    } else {
        const SimResult& d = day_of(v);
        std::vector<double> blocked(d.section_names.size(), 0.0);
        for (const SectionRecord& r : d.sections)
            if (r.section < blocked.size() && std::isfinite(r.released - r.locked)) blocked[r.section] += r.released - r.locked;
        for (std::size_t k = 0; k < blocked.size(); ++k) {
            Estimate e;
            e.mean = e.lower = e.upper = blocked[k] / 86400.0;
            e.n = 1;
            out.push_back({d.section_names[k], e});
        }
    }
    std::stable_sort(out.begin(), out.end(),
                     [](const SectionShare& a, const SectionShare& b) { return a.share.mean > b.share.mean; });
    return out;
}

}  // namespace knockon
