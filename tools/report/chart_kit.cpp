#include "tools/report/chart_kit.hpp"

#include <algorithm>

namespace knockon {

namespace {

constexpr std::size_t kCategoryStyles = 5;   // cat-0 .. cat-4 in chart_css(), then repeated
constexpr std::size_t kSeriesStyles = 5;     // ser-0 .. ser-4

constexpr double kTitleFont = 15.0;   // .title in chart_css()
constexpr double kLegendRow = 20.0, kLegendBox = 26.0, kLegendGap = 18.0, kLegendFont = 11.0;

double item_width(const LegendItem& item) { return kLegendBox + 6.0 + text_width(item.label, kLegendFont); }

}  // namespace

std::string category_style(std::size_t k) { return "cat-" + std::to_string(k % kCategoryStyles); }

std::string category_class(const std::vector<std::string>& categories, const std::string& category) {
    auto it = std::find(categories.begin(), categories.end(), category);
    return category_style(it == categories.end() ? 0 : static_cast<std::size_t>(it - categories.begin()));
}

std::string series_style(std::size_t k) { return "ser-" + std::to_string(k % kSeriesStyles); }

double text_width(const std::string& s, double font_px) {
    // Characters, not bytes: UTF-8 continuation bytes take no width.
    std::size_t n = 0;
    for (unsigned char c : s) n += (c & 0xC0) != 0x80;
    return 0.58 * font_px * static_cast<double>(n);
}

std::vector<double> spread_labels(const std::vector<double>& wanted, double gap, double lo, double hi) {
    std::vector<std::size_t> order(wanted.size());
    for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return wanted[a] < wanted[b]; });
    std::vector<double> at(wanted.size());
    // Downwards: each no closer than `gap` below the one before it, none above `lo`.
    double last = lo - gap;
    for (std::size_t i : order) last = at[i] = std::max(wanted[i], last + gap);
    // Upwards from `hi`: pulls back whatever the first sweep pushed past the end (when there is
    // room for all; else the first sweep's positions stand at the top).
    if (!order.empty() && lo + gap * static_cast<double>(order.size() - 1) <= hi) {
        double next = hi + gap;
        for (auto it = order.rbegin(); it != order.rend(); ++it) next = at[*it] = std::min(at[*it], next - gap);
    }
    return at;
}

double legend_height(const std::vector<LegendItem>& items, double width) {
    double x = 0.0, y = 0.0;
    for (const LegendItem& item : items) {
        const double w = item_width(item);
        if (x > 0.0 && x + w > width) {
            x = 0.0;
            y += kLegendRow;
        }
        x += w + kLegendGap;
    }
    return y + kLegendRow;
}

double draw_legend(svg::Element& parent, std::vector<LegendItem> items, double x0, double y0, double width) {
    svg::Element& g = parent.add(svg::group("legend"));
    double x = x0, y = y0;
    for (LegendItem& item : items) {
        const double w = item_width(item);
        if (x > x0 && x + w > x0 + width) {
            x = x0;
            y += kLegendRow;
        }
        svg::Element& cell = g.add(svg::group());
        cell.attr("transform", "translate(" + svg::number(x) + "," + svg::number(y) + ")");
        cell.add(std::move(item.sample));
        cell.add(svg::text(kLegendBox + 6.0, 10.0, item.label, "legend-label"));
        x += w + kLegendGap;
    }
    return y - y0 + kLegendRow;
}

svg::Element sample_line(const std::string& cls) { return svg::line(1, 6, 25, 6, cls); }

svg::Element chart_document(double width, double height, const std::string& classes, const ChartOptions& options,
                            const std::string& fallback_label, double title_x) {
    svg::Element doc = svg::document(width, height, options.title.empty() ? fallback_label : options.title);
    doc.css_class("knockon-chart " + classes);
    doc.add(svg::style(chart_css()));
    doc.add(svg::rect(0, 0, width, height, "background"));
    if (!options.title.empty()) {
        svg::Element& t = doc.add(svg::text(title_x, 28, options.title, "title"));
        // A title longer than the drawing is wide gets a smaller font rather than being cut off.
        const double room = width - title_x - 10.0, wanted = text_width(options.title, kTitleFont);
        if (wanted > room && room > 0.0)
            t.attr("style", "font-size: " + svg::number(std::max(8.0, kTitleFont * room / wanted), 1) + "px");
    }
    return doc;
}

void draw_footnote(svg::Element& doc, const ChartOptions& options, double x, double height) {
    if (!options.footnote.empty()) doc.add(svg::text(x, height - 8, options.footnote, "footnote"));
}

svg::Element with_alert(svg::Element chart, const std::string& statement) {
    constexpr double kFont = 13.0, kLine = 17.0, kPad = 10.0;
    const double width = std::stod(chart.attribute("width")), height = std::stod(chart.attribute("height"));
    // Words wrapped greedily to the width.
    std::vector<std::string> lines(1);
    std::size_t start = 0;
    while (start < statement.size()) {
        std::size_t end = statement.find(' ', start);
        if (end == std::string::npos) end = statement.size();
        const std::string word = statement.substr(start, end - start);
        const std::string joined = lines.back().empty() ? word : lines.back() + " " + word;
        if (!lines.back().empty() && text_width(joined, kFont) > width - 4.0 * kPad) lines.push_back(word);
        else lines.back() = joined;
        start = end + 1;
    }
    const double band = 2.0 * kPad + kLine * static_cast<double>(lines.size()) + kPad;
    svg::Element doc = svg::document(width, height + band, statement);
    doc.css_class("knockon-chart with-alert");
    doc.add(svg::style(chart_css()));
    doc.add(svg::rect(0, 0, width, height + band, "background"));
    doc.add(svg::rect(kPad / 2.0, kPad / 2.0, width - kPad, band - kPad, "alert-box"));
    for (std::size_t i = 0; i < lines.size(); ++i)
        doc.add(svg::text(2.0 * kPad, kPad + kLine * static_cast<double>(i + 1), lines[i], "alert"));
    chart.attr("y", band);
    doc.add(std::move(chart));
    return doc;
}

const std::string& chart_css() {
    // Train categories differ in lightness and dash pattern as well as in hue, and bar series in
    // lightness, so they stay apart in greyscale print and for colour-blind readers; no red/green
    // pair is used anywhere.
    static const std::string css = R"(
.knockon-chart { font-family: "DejaVu Sans", "Liberation Sans", Arial, Helvetica, sans-serif; font-size: 11px; }
.knockon-chart text { fill: #1a1a1a; }
.knockon-chart .background { fill: #ffffff; stroke: none; }
.knockon-chart .title { font-size: 15px; font-weight: bold; }
.knockon-chart .axis-label { font-size: 12px; fill: #333333; }
.knockon-chart .axis-label.small { font-size: 10px; }
.knockon-chart .tick-label { font-size: 10.5px; fill: #333333; }
.knockon-chart .tick { stroke: #555555; stroke-width: 1; }
.knockon-chart .grid { stroke: #dddddd; stroke-width: 0.7; }
.knockon-chart .baseline { stroke: #444444; stroke-width: 1; }
.knockon-chart .zero-line { stroke: #1a1a1a; stroke-width: 1.2; }
.knockon-chart .frame { fill: none; stroke: #555555; stroke-width: 1; }
.knockon-chart .station-line, .knockon-chart .legend-station { stroke: #999999; stroke-width: 0.8; stroke-dasharray: 4 2; }
.knockon-chart .station-label { font-size: 11px; font-weight: bold; }
.knockon-chart .label-leader { stroke: #777777; stroke-width: 0.8; }
.knockon-chart .signal-tick, .knockon-chart .legend-signal { stroke: #444444; stroke-width: 1.2; }
.knockon-chart .sig-down { stroke: #777777; }
.knockon-chart polyline.train-path, .knockon-chart line.legend-line { fill: none; stroke-width: 1.8; stroke-linejoin: round; }
.knockon-chart polyline.train-path.dimmed, .knockon-chart line.legend-line.dimmed { stroke-opacity: 0.45; }
.knockon-chart polyline.asrun-halo { fill: none; stroke: #ffffff; stroke-width: 5; stroke-opacity: 0.85; stroke-linejoin: round; }
.knockon-chart polyline.asrun-path, .knockon-chart line.legend-asrun { fill: none; stroke-width: 2.6; stroke-linejoin: round; }
.knockon-chart .asrun-hold, .knockon-chart .legend-hold { stroke: #000000; stroke-width: 4.5; }
.knockon-chart .tree-arrow, .knockon-chart .legend-tree { fill: none; stroke-width: 1.6; }
.knockon-chart .tree-head { stroke: none; }
.knockon-chart .tree-1 { stroke: #c2185b; fill: #c2185b; }
.knockon-chart .tree-2 { stroke: #00796b; fill: #00796b; }
.knockon-chart .tree-arrow.tree-2, .knockon-chart .legend-tree.tree-2 { stroke-dasharray: 6 3; }
.knockon-chart .tree-3 { stroke: #8d6e00; fill: #8d6e00; }
.knockon-chart .tree-arrow.tree-3, .knockon-chart .legend-tree.tree-3 { stroke-dasharray: 2 2.5; stroke-width: 2; }
.knockon-chart .block, .knockon-chart .legend-block { stroke-width: 0.5; fill-opacity: 0.2; stroke-opacity: 0.55; }
.knockon-chart .cat-0 { stroke: #1b3b6f; fill: #1b3b6f; }
.knockon-chart .cat-1 { stroke: #b8660b; fill: #b8660b; }
.knockon-chart .cat-2 { stroke: #6c3f99; fill: #6c3f99; }
.knockon-chart .cat-3 { stroke: #3f3f3f; fill: #3f3f3f; }
.knockon-chart .cat-4 { stroke: #2f8fc4; fill: #2f8fc4; }
.knockon-chart .train-path.cat-1, .knockon-chart .cdf-line.cat-1, .knockon-chart .legend-line.cat-1 { stroke-dasharray: 7 3; }
.knockon-chart .train-path.cat-2, .knockon-chart .cdf-line.cat-2, .knockon-chart .legend-line.cat-2 { stroke-dasharray: 1.5 2.5; stroke-width: 2.4; stroke-linecap: round; }
.knockon-chart .train-path.cat-3, .knockon-chart .cdf-line.cat-3, .knockon-chart .legend-line.cat-3 { stroke-dasharray: 9 3 2 3; }
.knockon-chart .train-path.cat-4, .knockon-chart .cdf-line.cat-4, .knockon-chart .legend-line.cat-4 { stroke-dasharray: 12 4; stroke-width: 1.4; }
.knockon-chart polyline.cdf-line { fill: none; stroke-width: 1.8; stroke-linejoin: round; }
.knockon-chart polyline.cdf-all, .knockon-chart line.legend-cdf-all { fill: none; stroke: #000000; stroke-width: 2.8; }
.knockon-chart .threshold-line, .knockon-chart .legend-threshold { stroke: #555555; stroke-width: 1; stroke-dasharray: 2 3; }
.knockon-chart .threshold-label { font-size: 10px; fill: #333333; }
.knockon-chart .conflict, .knockon-chart .legend-conflict { fill: url(#knockon-hatch); stroke: #000000; stroke-width: 1.6; }
.knockon-chart .loop-band { fill: #eef3e6; stroke: none; }
.knockon-chart .loop-path { fill: none; stroke: #1a1a1a; stroke-width: 1; stroke-dasharray: 2 2; }
.knockon-chart .train-label { font-size: 9px; fill: #222222; }
.knockon-chart .legend-label { font-size: 11px; }
.knockon-chart .empty-note { font-size: 14px; fill: #555555; }
.knockon-chart .footnote { font-size: 9.5px; fill: #444444; }
.knockon-chart .alert { font-size: 13px; font-weight: bold; }
.knockon-chart .alert-box { fill: #ffffff; stroke: #1a1a1a; stroke-width: 2.5; }
.knockon-chart .cap-bar, .knockon-chart .hour-bar, .knockon-chart .legend-bar, .knockon-chart .bar, .knockon-chart .hbar { stroke: #1a1a1a; stroke-width: 0.6; }
.knockon-chart .win-peak, .knockon-chart .ser-0 { fill: #1b3b6f; }
.knockon-chart .win-day, .knockon-chart .ser-1 { fill: #a9c1e0; }
.knockon-chart .win-other, .knockon-chart .ser-2 { fill: #b8660b; }
.knockon-chart .ser-3 { fill: #ffffff; stroke-dasharray: 3 2; stroke-width: 1.2; }
.knockon-chart .ser-4 { fill: #6c3f99; }
.knockon-chart .ci-whisker, .knockon-chart .legend-whisker { fill: none; stroke: #000000; stroke-width: 1.3; }
.knockon-chart .ci-halo { fill: none; stroke: #ffffff; stroke-width: 3.5; }
.knockon-chart .cap-limit, .knockon-chart .legend-limit { stroke: #000000; stroke-width: 2.4; }
.knockon-chart .cap-limit-halo { stroke: #ffffff; stroke-width: 5.5; }
.knockon-chart .bar-value { font-size: 10px; }
.knockon-chart .bar-value.over { font-weight: bold; font-size: 11px; }
.knockon-chart .group-label { font-size: 11px; }
.knockon-chart .group-sub { font-size: 10px; fill: #555555; }
.knockon-chart .row-label { font-size: 11px; }
)";
    return css;
}

}  // namespace knockon
