#include "tools/report/result_charts.hpp"

#include <algorithm>
#include <cmath>

namespace knockon {

using svg::Element;
using svg::Point;

namespace {

// A value axis in display units covering [lo, hi] and zero, widened to whole nice steps.
struct ValueAxis {
    double lo = 0.0, hi = 1.0;
    std::vector<double> ticks;
};
ValueAxis value_axis(double lo, double hi, int target) {
    lo = std::min(lo, 0.0);
    hi = std::max(hi, 0.0);
    if (!(hi > lo)) hi = lo + 1.0;
    const double step = svg::nice_step(lo, hi, target);
    ValueAxis a;
    a.lo = std::floor(lo / step + 1e-9) * step;
    a.hi = std::ceil(hi / step - 1e-9) * step;
    a.ticks = svg::nice_ticks(a.lo, a.hi, target);
    return a;
}

// The span [lo, hi] of all finite values and interval ends, in display units.
void widen(double& lo, double& hi, const BarValue& v, double scale) {
    for (double x : {v.value, v.lower, v.upper})
        if (std::isfinite(x)) {
            lo = std::min(lo, x * scale);
            hi = std::max(hi, x * scale);
        }
}

// Path data of an interval mark: the line from (a0, b) to (a1, b) with end caps across it, in
// (x, y) order for a horizontal mark and (y, x) for a vertical one.
std::string whisker(bool vertical, double across, double from, double to) {
    auto pt = [&](double along, double off) {
        return vertical ? svg::number(across + off) + "," + svg::number(along)
                        : svg::number(along) + "," + svg::number(across + off);
    };
    std::string d;
    d.append("M").append(pt(from, 0)).append(" L").append(pt(to, 0));
    d.append(" M").append(pt(from, -3.5)).append(" L").append(pt(from, 3.5));
    d.append(" M").append(pt(to, -3.5)).append(" L").append(pt(to, 3.5));
    return d;
}
std::string whisker_vertical(double x, double y0, double y1) { return whisker(true, x, y0, y1); }
std::string whisker_horizontal(double y, double x0, double x1) { return whisker(false, y, x0, x1); }

LegendItem whisker_legend() {
    Element g = svg::group();
    g.add(svg::path(whisker_horizontal(6, 3, 23), "legend-whisker"));
    return {std::move(g), "95 % confidence interval"};
}

// Cuts a polyline (x ascending) at x = x_max, interpolating the crossing.
std::vector<Point> cut_at(const std::vector<Point>& pts, double x_max) {
    std::vector<Point> out;
    for (std::size_t i = 0; i < pts.size(); ++i) {
        if (pts[i].x <= x_max) {
            out.push_back(pts[i]);
            continue;
        }
        if (i > 0 && pts[i - 1].x < x_max) {
            const Point& a = pts[i - 1];
            const Point& b = pts[i];
            out.push_back({x_max, a.y + (b.y - a.y) * (x_max - a.x) / (b.x - a.x)});
        }
        break;
    }
    return out;
}

std::string interval_text(const BarValue& v, const ValueFormat& f) {
    std::string s = f.text(v.value);
    if (v.has_interval()) s += " (95 % CI " + f.text(v.lower) + " to " + f.text(v.upper) + ")";
    return s;
}

}  // namespace

std::string ValueFormat::text(double value_si) const {
    if (!std::isfinite(value_si)) return "-";
    return number(value_si) + unit;
}

std::string ValueFormat::number(double value_si) const {
    // Small figures keep two significant digits (0.19 min, not 0.2 min).
    const double v = std::abs(value_si * scale);
    const int extra = v == 0.0 || v >= 1.0 ? 0 : v >= 0.1 ? 1 : 2;
    return svg::number(value_si * scale, decimals + extra);
}

Element cdf_chart(const CdfChart& chart, const ChartOptions& options) {
    const double W = options.width;
    const double left = 72.0, right = 24.0;
    const double top = options.title.empty() ? 20.0 : 50.0;
    const double plot_h = 320.0;
    const double plot_w = std::max(200.0, W - left - right);

    double x_max = chart.x_max;
    if (!(x_max > 0.0))
        for (const CdfSeries& s : chart.series)
            if (!s.points.empty()) x_max = std::max(x_max, s.points.back().x);
    for (double t : chart.thresholds) x_max = std::max(x_max, t * 1.2);
    const double max_min = std::max(x_max / 60.0, 1.0);   // the axis in minutes
    const double step = svg::nice_step(0.0, max_min, 8);
    const double axis_max = std::ceil(max_min / step - 1e-9) * step;
    const svg::LinearScale X{0.0, axis_max * 60.0, left, left + plot_w};
    const svg::LinearScale Y{0.0, 1.0, top + plot_h, top};
    const double axis_bottom = top + plot_h;

    std::vector<LegendItem> legend;
    for (const CdfSeries& s : chart.series)
        legend.push_back({sample_line(s.style == "all" ? "legend-cdf-all" : "legend-line " + s.style), s.name});
    if (!chart.thresholds.empty())
        legend.push_back({sample_line("legend-threshold"), "punctuality threshold"});
    const double legend_y = axis_bottom + 52.0;
    const double H = legend_y + legend_height(legend, plot_w) + (options.footnote.empty() ? 6.0 : 24.0);

    Element doc = chart_document(W, H, "delay-cdf", options, "cumulative distribution of arrival delay", left);
    Element& axis = doc.add(svg::group("axis"));
    for (double v : svg::nice_ticks(0.0, 100.0, 5)) {
        const double y = Y(v / 100.0);
        axis.add(svg::line(left, y, left + plot_w, y, "grid"));
        axis.add(svg::line(left - 5, y, left, y, "tick"));
        axis.add(svg::text(left - 8, y + 4, svg::number(v, 0) + " %", "tick-label", "end"));
    }
    for (double m : svg::nice_ticks(0.0, axis_max, 8)) {
        const double x = X(m * 60.0);
        axis.add(svg::line(x, top, x, axis_bottom, "grid"));
        axis.add(svg::line(x, axis_bottom, x, axis_bottom + 5, "tick"));
        axis.add(svg::text(x, axis_bottom + 18, svg::number(m, 1), "tick-label", "middle"));
    }
    axis.add(svg::text(left + plot_w / 2, axis_bottom + 38, "arrival delay [min] (early counted as 0)", "axis-label",
                       "middle"));
    {
        const double cx = 16, cy = top + plot_h / 2;
        axis.add(svg::text(cx, cy, chart.y_label, "axis-label", "middle"))
            .attr("transform", "rotate(-90 " + svg::number(cx) + " " + svg::number(cy) + ")");
    }

    Element& marks = doc.add(svg::group("thresholds"));
    for (double t : chart.thresholds) {
        const double x = X(t);
        marks.add(svg::line(x, top, x, axis_bottom, "threshold-line"));
        // At the foot of the line: the curves mostly run high up.
        marks.add(svg::text(x + 3, axis_bottom - 6, svg::number(t / 60.0, 1) + " min", "threshold-label"));
    }

    Element& lines = doc.add(svg::group("curves"));
    for (const CdfSeries& s : chart.series) {
        std::vector<Point> pts = cut_at(s.points, axis_max * 60.0);
        if (pts.empty()) continue;
        if (pts.size() == 1) pts.push_back({axis_max * 60.0, pts.front().y});   // all at one delay
        for (Point& p : pts) p = {X(p.x), Y(p.y)};
        lines.add(svg::polyline(pts, s.style == "all" ? "cdf-line cdf-all" : "cdf-line " + s.style)).tooltip(s.name);
    }
    if (chart.series.empty())
        doc.add(svg::text(left + plot_w / 2, top + plot_h / 2, "no arrivals recorded", "empty-note", "middle"));
    doc.add(svg::rect(left, top, plot_w, plot_h, "frame"));
    draw_legend(doc, std::move(legend), left, legend_y, plot_w);
    draw_footnote(doc, options, left, H);
    return doc;
}

Element grouped_bar_chart(const GroupedBars& chart, const ChartOptions& options) {
    const ValueFormat& f = chart.format;
    double lo = 0.0, hi = 0.0;
    for (const BarGroup& g : chart.groups)
        for (const BarValue& v : g.values) widen(lo, hi, v, f.scale);
    if (std::isfinite(chart.axis_min)) lo = std::min(lo, chart.axis_min * f.scale);
    if (std::isfinite(chart.axis_max)) hi = std::max(hi, chart.axis_max * f.scale);
    const ValueAxis va = value_axis(lo, hi, 5);

    const double W = options.width;
    const double left = 72.0, right = 20.0;
    const double top = options.title.empty() ? 20.0 : 50.0;
    const double plot_h = 300.0;
    const double plot_w = std::max(200.0, W - left - right);
    const std::size_t n_groups = std::max<std::size_t>(chart.groups.size(), 1);
    const double group_w = plot_w / static_cast<double>(n_groups);
    const double label_font = 11.0;
    std::size_t longest = 0;
    for (const BarGroup& g : chart.groups) longest = std::max(longest, g.label.size());
    const double label_w = text_width(std::string(longest, 'M'), label_font);
    const bool slanted = label_w > group_w - 6;
    const double label_h = slanted ? 14.0 + 0.6 * label_w : 22.0;
    const svg::LinearScale Y{va.lo, va.hi, top + plot_h, top};
    const double axis_bottom = top + plot_h;

    std::vector<LegendItem> legend;
    for (std::size_t k = 0; k < chart.series.size(); ++k)
        legend.push_back({svg::rect(1, 0, 24, 12, "legend-bar " + series_style(k)), chart.series[k]});
    bool any_interval = false;
    for (const BarGroup& g : chart.groups)
        for (const BarValue& v : g.values) any_interval = any_interval || v.has_interval();
    if (any_interval) legend.push_back(whisker_legend());
    const double legend_y = axis_bottom + label_h + 30.0;
    const double H = legend_y + legend_height(legend, plot_w) + (options.footnote.empty() ? 6.0 : 24.0);

    Element doc = chart_document(W, H, "bars", options, "bar chart", left);
    Element& axis = doc.add(svg::group("axis"));
    for (double v : va.ticks) {
        const double y = Y(v);
        axis.add(svg::line(left, y, left + plot_w, y, "grid"));
        axis.add(svg::line(left - 5, y, left, y, "tick"));
        axis.add(svg::text(left - 8, y + 4, svg::number(v, 2) + f.unit, "tick-label", "end"));
    }
    {
        const double cx = 16, cy = top + plot_h / 2;
        axis.add(svg::text(cx, cy, chart.value_axis, "axis-label", "middle"))
            .attr("transform", "rotate(-90 " + svg::number(cx) + " " + svg::number(cy) + ")");
    }

    Element& bars = doc.add(svg::group("bars"));
    for (std::size_t gi = 0; gi < chart.groups.size(); ++gi) {
        const BarGroup& g = chart.groups[gi];
        const double gx = left + group_w * static_cast<double>(gi);
        const double n = static_cast<double>(std::max<std::size_t>(g.values.size(), 1));
        const double gap = 3.0;
        const double bar_w = std::min(34.0, (group_w * 0.78 - gap * (n - 1)) / n);
        const double x_start = gx + (group_w - bar_w * n - gap * (n - 1)) / 2.0;
        for (std::size_t k = 0; k < g.values.size(); ++k) {
            const BarValue& v = g.values[k];
            if (!std::isfinite(v.value)) continue;
            const double x = x_start + static_cast<double>(k) * (bar_w + gap);
            const double y0 = Y(0.0), y1 = Y(v.value * f.scale);
            const std::string series = k < chart.series.size() ? chart.series[k] : std::string();
            bars.add(svg::rect(x, std::min(y0, y1), bar_w, std::abs(y1 - y0), "bar " + series_style(k)))
                .tooltip(g.label + ", " + series + ": " + interval_text(v, f));
            double label_y = v.value >= 0.0 ? y1 - 4 : y1 + 12;
            if (v.has_interval()) {
                const double ya = Y(v.lower * f.scale), yb = Y(v.upper * f.scale);
                const std::string d = whisker_vertical(x + bar_w / 2, ya, yb);
                bars.add(svg::path(d, "ci-halo"));
                bars.add(svg::path(d, "ci-whisker"))
                    .tooltip(g.label + ", " + series + ": 95 % CI " + f.text(v.lower) + " to " + f.text(v.upper));
                label_y = v.value >= 0.0 ? std::min(y1, std::min(ya, yb)) - 4 : std::max(y1, std::max(ya, yb)) + 12;
            }
            if (bar_w >= 14.0)
                bars.add(svg::text(x + bar_w / 2, label_y, f.number(v.value), "bar-value",
                                   "middle"));
        }
        const double cx = gx + group_w / 2, ly = axis_bottom + 16;
        if (slanted)
            bars.add(svg::text(cx, ly, g.label, "group-label", "end"))
                .attr("transform", "rotate(-35 " + svg::number(cx) + " " + svg::number(ly) + ")");
        else
            bars.add(svg::text(cx, ly, g.label, "group-label", "middle"));
    }
    if (chart.groups.empty())
        doc.add(svg::text(left + plot_w / 2, top + plot_h / 2, "nothing to show", "empty-note", "middle"));
    axis.add(svg::line(left, Y(0.0), left + plot_w, Y(0.0), va.lo < 0.0 ? "zero-line" : "baseline"));
    axis.add(svg::text(left + plot_w / 2, axis_bottom + label_h + 14, chart.group_axis, "axis-label", "middle"));
    draw_legend(doc, std::move(legend), left, legend_y, plot_w);
    draw_footnote(doc, options, left, H);
    return doc;
}

Element hbar_chart(const HBars& chart, const ChartOptions& options) {
    const ValueFormat& f = chart.format;
    double lo = 0.0, hi = 0.0;
    for (const HBar& b : chart.bars) widen(lo, hi, b.value, f.scale);
    const ValueAxis va = value_axis(lo, hi, 6);

    const double W = options.width;
    const double label_font = 11.0;
    double label_w = 40.0;
    for (const HBar& b : chart.bars) label_w = std::max(label_w, 1.1 * text_width(b.label, label_font));
    const double left = std::min(320.0, label_w + 16.0), right = 80.0;
    const double top = options.title.empty() ? 16.0 : 46.0;
    const double row_h = 22.0;
    const double plot_h = row_h * static_cast<double>(std::max<std::size_t>(chart.bars.size(), 1));
    const double plot_w = std::max(200.0, W - left - right);
    const svg::LinearScale X{va.lo, va.hi, left, left + plot_w};
    const double axis_bottom = top + plot_h;

    std::vector<LegendItem> legend;
    for (std::size_t k = 0; k < chart.legend.size(); ++k)
        legend.push_back({svg::rect(1, 0, 24, 12, "legend-bar " + series_style(k)), chart.legend[k]});
    bool any_interval = false;
    for (const HBar& b : chart.bars) any_interval = any_interval || b.value.has_interval();
    if (any_interval) legend.push_back(whisker_legend());
    const double legend_y = axis_bottom + 52.0;
    const double H = legend_y + (legend.empty() ? 0.0 : legend_height(legend, plot_w)) +
                     (options.footnote.empty() ? 6.0 : 24.0);

    Element doc = chart_document(W, H, "hbars", options, "bar chart", left);
    Element& axis = doc.add(svg::group("axis"));
    for (double v : va.ticks) {
        const double x = X(v);
        axis.add(svg::line(x, top, x, axis_bottom, "grid"));
        axis.add(svg::line(x, axis_bottom, x, axis_bottom + 5, "tick"));
        axis.add(svg::text(x, axis_bottom + 18, svg::number(v, 2), "tick-label", "middle"));
    }
    axis.add(svg::text(left + plot_w / 2, axis_bottom + 38, chart.value_axis, "axis-label", "middle"));

    Element& bars = doc.add(svg::group("bars"));
    for (std::size_t i = 0; i < chart.bars.size(); ++i) {
        const HBar& b = chart.bars[i];
        const double y = top + row_h * static_cast<double>(i);
        const double cy = y + row_h / 2;
        bars.add(svg::text(left - 8, cy + 4, b.label, "row-label", "end"));
        if (!std::isfinite(b.value.value)) continue;
        const double x0 = X(0.0), x1 = X(b.value.value * f.scale);
        bars.add(svg::rect(std::min(x0, x1), y + 4, std::abs(x1 - x0), row_h - 8, "hbar " + series_style(b.style)))
            .tooltip(b.tooltip.empty() ? b.label + ": " + interval_text(b.value, f) : b.tooltip);
        double end = b.value.value >= 0.0 ? x1 : x0;
        if (b.value.has_interval()) {
            const double xa = X(b.value.lower * f.scale), xb = X(b.value.upper * f.scale);
            const std::string d = whisker_horizontal(cy, xa, xb);
            bars.add(svg::path(d, "ci-halo"));
            bars.add(svg::path(d, "ci-whisker"))
                .tooltip(b.label + ": 95 % CI " + f.text(b.value.lower) + " to " + f.text(b.value.upper));
            end = std::max(end, std::max(xa, xb));
        }
        bars.add(svg::text(end + 5, cy + 4, f.text(b.value.value), "bar-value"));
    }
    if (chart.bars.empty())
        doc.add(svg::text(left + plot_w / 2, top + plot_h / 2, "nothing to show", "empty-note", "middle"));
    axis.add(svg::line(X(0.0), top, X(0.0), axis_bottom, "zero-line"));
    if (!legend.empty()) draw_legend(doc, std::move(legend), left, legend_y, plot_w);
    draw_footnote(doc, options, left, H);
    return doc;
}

}  // namespace knockon
