#include "tools/report/svg.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>

namespace knockon::svg {

std::string escape(std::string_view text) {
    std::string out;
    out.reserve(text.size());
    for (char c : text) {
        switch (c) {
            case '&': out += "&amp;"; break;
            case '<': out += "&lt;"; break;
            case '>': out += "&gt;"; break;
            case '"': out += "&quot;"; break;
            case '\'': out += "&#39;"; break;
            default: out += c;
        }
    }
    return out;
}

std::string number(double value, int decimals) {
    if (!std::isfinite(value)) return "0";   // never write NaN into a drawing
    char buf[64];
    // std::to_chars never looks at the locale, unlike printf.
    auto [end, ec] = std::to_chars(buf, buf + sizeof buf, value, std::chars_format::fixed, decimals);
    if (ec != std::errc()) return "0";
    std::string s(buf, end);
    if (s.find('.') != std::string::npos) {
        while (s.back() == '0') s.pop_back();
        if (s.back() == '.') s.pop_back();
    }
    if (s == "-0") s = "0";
    return s;
}

std::string format_hhmm(double seconds) {
    if (!std::isfinite(seconds)) return "--:--";
    long long m = std::llround(seconds / 60.0);
    const bool negative = m < 0;
    if (negative) m = -m;
    char buf[32];
    std::snprintf(buf, sizeof buf, "%s%02lld:%02lld", negative ? "-" : "", m / 60, m % 60);
    return buf;
}

double LinearScale::operator()(double value) const {
    if (d1 == d0) return (r0 + r1) / 2.0;
    return r0 + (value - d0) * (r1 - r0) / (d1 - d0);
}

double LinearScale::invert(double pixel) const {
    if (r1 == r0) return (d0 + d1) / 2.0;
    return d0 + (pixel - r0) * (d1 - d0) / (r1 - r0);
}

namespace {

// 1, 2 or 5 times a power of ten, nearest to x (Heckbert, "Nice numbers for graph labels",
// Graphics Gems, 1990: rounding thresholds 1.5, 3 and 7).
double nice_number(double x) {
    const double exponent = std::floor(std::log10(x));
    const double power = std::pow(10.0, exponent);
    const double f = x / power;
    double nice = 10.0;
    if (f < 1.5)
        nice = 1.0;
    else if (f < 3.0)
        nice = 2.0;
    else if (f < 7.0)
        nice = 5.0;
    return nice * power;
}

// Multiples of step within [lo, hi], computed from integers so that no error accumulates.
std::vector<double> multiples_within(double lo, double hi, double step) {
    std::vector<double> ticks;
    if (!(step > 0.0)) return ticks;
    const double first = std::ceil(lo / step - 1e-9);
    const double last = std::floor(hi / step + 1e-9);
    for (double k = first; k <= last && ticks.size() < 1000; k += 1.0) {
        double v = k * step;
        if (std::abs(v) < step * 1e-9) v = 0.0;
        ticks.push_back(v);
    }
    return ticks;
}

}  // namespace

double nice_step(double lo, double hi, int target) {
    const double range = hi - lo;
    if (!std::isfinite(range) || range <= 0.0) return 0.0;
    return nice_number(range / std::max(1, target));
}

std::vector<double> nice_ticks(double lo, double hi, int target) {
    if (!std::isfinite(lo) || !std::isfinite(hi)) return {};
    if (hi <= lo) return {lo};
    return multiples_within(lo, hi, nice_step(lo, hi, target));
}

double time_step(double t0, double t1, int target) {
    static const double kSteps[] = {60,   120,  300,  600,   900,   1200,  1800,
                                    3600, 7200, 10800, 21600, 43200, 86400};
    const double range = t1 - t0;
    if (!std::isfinite(range) || range <= 0.0) return 0.0;
    const double wanted = range / std::max(1, target);
    for (double s : kSteps)
        if (s >= wanted - 1e-9) return s;
    return kSteps[std::size(kSteps) - 1];
}

std::vector<double> time_ticks(double t0, double t1, int target) {
    if (!std::isfinite(t0) || !std::isfinite(t1)) return {};
    if (t1 <= t0) return {t0};
    return multiples_within(t0, t1, time_step(t0, t1, target));
}

Element& Element::attr(std::string name, std::string value) {
    for (auto& [n, v] : attrs_)
        if (n == name) {
            v = std::move(value);
            return *this;
        }
    attrs_.emplace_back(std::move(name), std::move(value));
    return *this;
}

std::string Element::attribute(const std::string& name) const {
    for (const auto& [n, v] : attrs_)
        if (n == name) return v;
    return "";
}

Element& Element::attr(std::string name, double value) { return attr(std::move(name), number(value)); }

Element& Element::text(std::string content) {
    text_ = std::move(content);
    return *this;
}

Element& Element::tooltip(std::string content) {
    Element t("title");
    t.text(std::move(content));
    // The title goes first: SVG reads the first <title> child as the element's name.
    children_.insert(children_.begin(), std::move(t));
    return *this;
}

Element& Element::add(Element child) {
    children_.push_back(std::move(child));
    return children_.back();
}

void Element::write(std::string& out) const {
    out += '<';
    out += tag_;
    for (const auto& [n, v] : attrs_) {
        out += ' ';
        out += n;
        out += "=\"";
        out += escape(v);
        out += '"';
    }
    if (text_.empty() && children_.empty()) {
        out += "/>\n";
        return;
    }
    out += '>';
    // Style sheets hold '>' selectors; CSS text needs no escaping but '<' must not appear.
    if (tag_ == "style") {
        out += text_;
    } else {
        out += escape(text_);
    }
    if (!children_.empty()) {
        out += '\n';
        for (const Element& c : children_) c.write(out);
    }
    out += "</";
    out += tag_;
    out += ">\n";
}

Element document(double width, double height, const std::string& label) {
    Element svg("svg");
    svg.attr("xmlns", "http://www.w3.org/2000/svg")
        .attr("viewBox", "0 0 " + number(width) + " " + number(height))
        .attr("width", width)
        .attr("height", height)
        .attr("role", "img")
        .attr("aria-label", label);
    return svg;
}

Element group(const std::string& cls) {
    Element g("g");
    if (!cls.empty()) g.css_class(cls);
    return g;
}

Element rect(double x, double y, double width, double height, const std::string& cls) {
    // A rectangle given corner to corner in any order still draws: SVG refuses negative sizes.
    if (width < 0) {
        x += width;
        width = -width;
    }
    if (height < 0) {
        y += height;
        height = -height;
    }
    Element r("rect");
    r.attr("x", x).attr("y", y).attr("width", width).attr("height", height);
    if (!cls.empty()) r.css_class(cls);
    return r;
}

Element line(double x1, double y1, double x2, double y2, const std::string& cls) {
    Element l("line");
    l.attr("x1", x1).attr("y1", y1).attr("x2", x2).attr("y2", y2);
    if (!cls.empty()) l.css_class(cls);
    return l;
}

Element polyline(const std::vector<Point>& points, const std::string& cls) {
    std::string pts;
    pts.reserve(points.size() * 12);
    for (const Point& p : points) {
        if (!pts.empty()) pts += ' ';
        pts += number(p.x, 1);
        pts += ',';
        pts += number(p.y, 1);
    }
    Element l("polyline");
    l.attr("points", std::move(pts));
    if (!cls.empty()) l.css_class(cls);
    return l;
}

Element path(const std::string& d, const std::string& cls) {
    Element p("path");
    p.attr("d", d);
    if (!cls.empty()) p.css_class(cls);
    return p;
}

Element text(double x, double y, const std::string& content, const std::string& cls, const std::string& anchor) {
    Element t("text");
    t.attr("x", x).attr("y", y);
    if (anchor != "start") t.attr("text-anchor", anchor);
    if (!cls.empty()) t.css_class(cls);
    t.text(content);
    return t;
}

Element style(const std::string& css) {
    Element s("style");
    std::string safe = css;
    // A style sheet is raw text: keep it from closing the element early.
    for (std::size_t p; (p = safe.find('<')) != std::string::npos;) safe.erase(p, 1);
    s.text(std::move(safe));
    return s;
}

std::string to_string(const Element& root, bool xml_declaration) {
    std::string out;
    if (xml_declaration) out += "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
    root.write(out);
    return out;
}

}  // namespace knockon::svg
