#pragma once
// The charts of a results file (day, study or comparison), by name, for `knockon report` and
// `knockon plot`: the figures are taken from the file (a study's statistics, or the records of a
// day) and shaped for the builders of result_charts.hpp, with the scenario's plan naming the
// train categories and placing stations and signals.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "models/scenario.hpp"
#include "tools/report/as_run.hpp"
#include "tools/report/result_charts.hpp"
#include "tools/results/results_file.hpp"

namespace knockon {

// A results file with what it is read against.
struct ResultsView {
    const ResultsFile* file = nullptr;
    const Scenario* scenario = nullptr;
    const PlanResult* plan = nullptr;
    const SimResult* day = nullptr;             // the day drawn as run: /day, or the chosen traced day
    std::optional<ReplicationChoice> choice;    // study: which traced day `day` is
    std::vector<double> day_thresholds = {180.0, 300.0};   // punctuality thresholds of a day file [s]

    // The punctuality thresholds [s]: the study's (or the comparison's reference variant's) own,
    // else day_thresholds.
    std::vector<double> thresholds() const;
};

// What the file states first about deadlock (tools/results/deadlock_output): of a day file that day's,
// of a study its deadlocked days, of a comparison each variant's; empty when none.
std::string results_deadlock_notice(const ResultsView& view);
// A day file whose day ended in deadlock: an incomplete day, of which no punctuality or delay
// distribution is drawn.
bool incomplete_day(const ResultsView& view);

// The charts a file of this kind offers besides `time-distance` and `capacity` (the plan's).
std::vector<std::string> result_chart_names(ResultsKind kind);

struct ResultChart {
    std::string name, title;
    std::string caption;   // what the chart shows and where its figures come from
    svg::Element svg{"svg"};
};
// Throws std::invalid_argument naming the charts of the file's kind when `name` is not one, and
// saying why for delay-cdf and punctuality of an incomplete day.
ResultChart make_result_chart(const std::string& name, const ResultsView& view, double width = 1100.0);

// ---- The figures behind the charts (also used by the report's tables) ---------------------------

// The empirical distribution function of `values`, F(x) = (values <= x) / n, as the corners of
// its steps: (v, F(v-)) then (v, F(v)) at each distinct value v.  With more distinct values than
// max_points / 2 it is evaluated on an even grid of that many steps instead.
std::vector<svg::Point> empirical_cdf(std::vector<double> values, std::size_t max_points = 1200);

// The distribution of delay over several timing points, each weighted by the days it was reached,
// from what a study file keeps of each: its quantiles p50, p90, p95 and max and its share of days
// below each threshold, joined linearly (and from (0, 0) up to the lowest of them when that lies
// above 0).  An approximation between those points, exact at none but them.
std::vector<svg::Point> quantile_mixture_cdf(const std::vector<const TimingPointStats*>& points,
                                             const std::vector<double>& thresholds);

// Punctuality of the arrivals and passes at one station, all days pooled, per threshold: the
// share with its 95 % Wilson score interval over the pooled count.
struct StationPunctuality {
    std::string station, name;
    double chainage = 0.0;
    std::size_t arrivals = 0;
    std::vector<Estimate> within;   // per threshold
};
std::vector<StationPunctuality> station_punctuality(const ResultsView& view);

// Primary and knock-on delay per day by train category (sums of the trains' means; NaN primary
// for a day file, which does not record it).
struct CategoryDelay {
    std::string category;
    std::size_t trains = 0;
    double primary = 0.0, knock_on = 0.0;   // [s per day]
};
std::vector<CategoryDelay> category_delays(const ResultsView& view);

// Time trains stood at each signal per day, largest first (study: mean with its 95 % CI; day:
// that day's total).
std::vector<SignalStats> held_at_signals(const ResultsView& view);

// As-run blocked share of the day per detection section, largest first.
struct SectionShare {
    std::string section;
    Estimate share;
};
std::vector<SectionShare> blocked_shares(const ResultsView& view);

}  // namespace knockon
