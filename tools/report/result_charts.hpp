#pragma once
// Charts of simulation results as SVG, in the visual language of the plan's charts (chart_kit.hpp):
// cumulative distributions of delay, grouped bars with 95 % confidence whiskers, and horizontal
// bars for ranked lists and comparisons.  They draw plain figures handed to them (SI units: s,
// shares 0..1) and know nothing of files; results_figures.hpp derives those figures.
//
// Elements carry CSS classes, so they can be restyled and counted: "cdf-line" (one polyline per
// distribution; the all-trains one also "cdf-all"), "threshold-line" (one per threshold);
// "bar" (one rectangle per group and series with a value), "hbar" (one per row with a value),
// "ci-whisker" (one per bar with a confidence interval), "zero-line".
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "tools/report/chart_kit.hpp"
#include "tools/report/svg.hpp"

namespace knockon {

inline constexpr double kNoValue = std::numeric_limits<double>::quiet_NaN();

// A figure with its 95 % confidence interval; the whisker is drawn when both ends are finite,
// the bar when the value is.
struct BarValue {
    double value = kNoValue;
    double lower = kNoValue, upper = kNoValue;
    bool has_interval() const { return std::isfinite(lower) && std::isfinite(upper); }
};

// How figures in SI show on a chart: value x scale, with `decimals` and `unit` in labels
// (e.g. shares as percent: scale 100, unit " %"; seconds as minutes: scale 1/60, unit " min").
struct ValueFormat {
    double scale = 1.0;
    int decimals = 1;
    std::string unit;
    std::string text(double value_si) const;     // number and unit, "-" when not finite
    std::string number(double value_si) const;   // the number alone
};

struct CdfSeries {
    std::string name;                 // legend label
    std::string style;                // "cat-k" (a train category's style) or "all" (black, bold)
    std::vector<svg::Point> points;   // (delay [s], cumulative share 0..1), delay ascending
};
struct CdfChart {
    std::vector<CdfSeries> series;
    std::vector<double> thresholds;   // [s]: marked as dashed verticals
    double x_max = 0.0;               // right end of the delay axis [s]; 0: the largest delay drawn
    std::string y_label = "cumulative share of arrivals and passes [%]";
};
// Delay in minutes to the right, cumulative share in percent upwards; curves beyond x_max are cut
// at the axis' end.
svg::Element cdf_chart(const CdfChart& chart, const ChartOptions& options = {});

struct BarGroup {
    std::string label;
    std::vector<BarValue> values;     // one per series
};
struct GroupedBars {
    std::vector<std::string> series;  // legend labels
    std::vector<BarGroup> groups;
    ValueFormat format;
    std::string value_axis;           // e.g. "arrivals and passes within the threshold [%]"
    std::string group_axis;           // e.g. "station (in line order)"
    double axis_min = kNoValue, axis_max = kNoValue;   // SI: the value axis spans at least these
};
// Vertical bars, one group per label along the bottom, one bar per series in each group, from 0
// (negative values hang below the zero line), with whiskers and value labels.
svg::Element grouped_bar_chart(const GroupedBars& chart, const ChartOptions& options = {});

struct HBar {
    std::string label;
    BarValue value;
    std::size_t style = 0;            // series style (ser-k)
    std::string tooltip;
};
struct HBars {
    std::vector<HBar> bars;           // drawn top to bottom in this order
    ValueFormat format;
    std::string value_axis;
    std::vector<std::string> legend;  // labels of the series styles used (empty: no legend)
};
// Horizontal bars from 0, labels on the left, with whiskers and value labels.
svg::Element hbar_chart(const HBars& chart, const ChartOptions& options = {});

}  // namespace knockon
