#pragma once
// A small SVG builder for knockon's charts: an element tree written out as text, a linear scale
// from data values to pixels, "nice" axis ticks for numbers and for times of day, and number
// formatting that does not depend on the locale.  Charts style their elements through CSS
// classes, so the same drawing reads the same standalone and inside the HTML report.
#include <list>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace knockon::svg {

// Escapes &, <, >, " and ' for XML and HTML text and attribute values.
std::string escape(std::string_view text);

// A coordinate or length as short text: at most `decimals` decimals, trailing zeros dropped,
// "-0" written as "0" (always '.' as the decimal mark).
std::string number(double value, int decimals = 2);

// Seconds after midnight as "HH:MM" (rounded to the nearest minute; hours go past 23 for
// after-midnight running, as in scenario files).
std::string format_hhmm(double seconds);

// Maps a data interval [d0, d1] linearly onto a pixel interval [r0, r1] (either may run
// backwards, e.g. a y axis growing upwards).  Values outside are extrapolated, not clamped.
struct LinearScale {
    double d0 = 0.0, d1 = 1.0;
    double r0 = 0.0, r1 = 1.0;
    double operator()(double value) const;
    double invert(double pixel) const;
};

// Tick values for [lo, hi] with a step of 1, 2 or 5 times a power of ten chosen so that about
// `target` intervals cover the range (Heckbert's "nice numbers"); ticks lie within [lo, hi].
std::vector<double> nice_ticks(double lo, double hi, int target = 6);
// The step nice_ticks uses.
double nice_step(double lo, double hi, int target = 6);

// Time-of-day ticks [s] for [t0, t1] on whole-clock steps (1, 2, 5, 10, 15, 20, 30 min, 1, 2, 3,
// 6, 12 h) giving about `target` intervals; ticks lie within [t0, t1].
std::vector<double> time_ticks(double t0, double t1, int target = 6);
double time_step(double t0, double t1, int target = 6);

struct Point {
    double x = 0.0, y = 0.0;
};

// One SVG element: a tag, attributes (escaped on output), text content (escaped) and children.
class Element {
public:
    explicit Element(std::string tag) : tag_(std::move(tag)) {}

    Element& attr(std::string name, std::string value);
    Element& attr(std::string name, double value);   // written with number()
    Element& css_class(std::string cls) { return attr("class", std::move(cls)); }
    Element& text(std::string content);
    // A <title> child: the tooltip browsers show on hover and the name screen readers read.
    Element& tooltip(std::string content);
    // Appends a child and returns it, so that groups can be filled in place.  The reference stays
    // valid while further children are added (the children are kept in a list, not a vector).
    Element& add(Element child);

    const std::string& tag() const { return tag_; }
    // The value of an attribute, or "" when it has none.
    std::string attribute(const std::string& name) const;
    const std::list<Element>& children() const { return children_; }
    // Writes the element and its children as XML.
    void write(std::string& out) const;

private:
    std::string tag_;
    std::vector<std::pair<std::string, std::string>> attrs_;
    std::string text_;
    std::list<Element> children_;
};

// The outer <svg> element with the SVG namespace, a viewBox of width x height and the same
// width/height (so the drawing has a natural size but scales with CSS).
Element document(double width, double height, const std::string& label);
Element group(const std::string& cls = "");
Element rect(double x, double y, double width, double height, const std::string& cls = "");
Element line(double x1, double y1, double x2, double y2, const std::string& cls = "");
Element polyline(const std::vector<Point>& points, const std::string& cls = "");
// A path from its "d" data (e.g. "M1,2 V8 M0,2 H2"), for marks made of several strokes.
Element path(const std::string& d, const std::string& cls = "");
// Text anchored at (x, y): anchor "start", "middle" or "end".
Element text(double x, double y, const std::string& content, const std::string& cls = "",
             const std::string& anchor = "start");
// A <style> element holding a CSS sheet.
Element style(const std::string& css);

// The document as text; with xml_declaration a standalone file (<?xml ...?> first), without it
// the <svg> element to embed in HTML.
std::string to_string(const Element& root, bool xml_declaration);

}  // namespace knockon::svg
