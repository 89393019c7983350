#pragma once
// What every knockon chart shares: the one style sheet (colours, dash patterns, fonts), the
// styles of train categories and of bar series, the legend layout and the document frame.  Kept
// in one place so the plan's charts and the results' charts speak the same visual language.
#include <cstddef>
#include <string>
#include <vector>

#include "tools/report/svg.hpp"

namespace knockon {

// The two marks of the charts and report tables, one symbol each so that they never read alike:
// a figure above its limit (or a conflict), and a difference whose 95 % interval excludes 0.
inline constexpr const char* kOverMark = "\u25B2";
inline constexpr const char* kSignificantMark = "\u25C6";

struct ChartOptions {
    double width = 1100.0;   // pixels of the drawing (it scales: the SVG has a viewBox)
    std::string title;       // drawn at the top when not empty
    std::string footnote;    // drawn at the bottom when not empty (e.g. the safety caution)
};

// The style sheet the charts carry inside themselves (also valid inside an HTML page).
const std::string& chart_css();

// "cat-k": the style of the k-th train category (five styles that differ in lightness and dash
// pattern as well as hue, then repeated).
std::string category_style(std::size_t k);
// The style of `category` among `categories` (the first style when it is not there).
std::string category_class(const std::vector<std::string>& categories, const std::string& category);
// "ser-k": the fill of the k-th bar series (five fills of distinct lightness, then repeated).
std::string series_style(std::size_t k);

// Rough width of a text in the charts' sans-serif font, for laying out legends and labels.
double text_width(const std::string& s, double font_px);

// Positions for labels wanted at `wanted` (any order) along one axis, each at least `gap` from the
// next and all within [lo, hi] where there is room: the wanted positions where they are far enough
// apart, else moved apart as little as a sweep each way allows (the order of the wanted positions is
// kept).  For station names beside a diagram, so that stations close together do not overlap.
std::vector<double> spread_labels(const std::vector<double>& wanted, double gap, double lo, double hi);

// A legend entry: a sample drawn in a 26 x 12 box whose top-left is (0, 0), and its label.
struct LegendItem {
    svg::Element sample;
    std::string label;
};
// Lays the items out left to right from (x0, y0), wrapping at `width`; returns the height used.
double draw_legend(svg::Element& parent, std::vector<LegendItem> items, double x0, double y0, double width);
// The height draw_legend will use, without drawing.
double legend_height(const std::vector<LegendItem>& items, double width);
// A short line sample in the given classes.
svg::Element sample_line(const std::string& cls);

// The outer <svg> with the shared style sheet, a white background, the title (if any) at the
// top-left of the plot area, and `classes` on the root ("knockon-chart <classes>").
svg::Element chart_document(double width, double height, const std::string& classes, const ChartOptions& options,
                            const std::string& fallback_label, double title_x);
// The footnote at the bottom-left (if any).
void draw_footnote(svg::Element& doc, const ChartOptions& options, double x, double height);

// A finished chart (from chart_document) under a framed statement that must be read before its
// figures, e.g. that days ended in deadlock: a new outer <svg> ("knockon-chart with-alert") that
// holds the statement (class "alert", wrapped to the width) and, below it, the chart unchanged.
svg::Element with_alert(svg::Element chart, const std::string& statement);

}  // namespace knockon
