// The SVG builder under the report's charts: scales, ticks, time labels, number formatting and
// escaping; and the HTML page's escaping of what the scenario file says.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "tools/report/html_report.hpp"
#include "tools/report/svg.hpp"

using namespace knockon;

TEST_CASE("a linear scale maps both ends and the middle, also running backwards", "[svg]") {
    // Common practice, no source: the affine map through (d0, r0) and (d1, r1).
    const svg::LinearScale x{0.0, 38000.0, 100.0, 600.0};
    CHECK(x(0.0) == Approx(100.0));
    CHECK(x(38000.0) == Approx(600.0));
    CHECK(x(19000.0) == Approx(350.0));
    CHECK(x.invert(350.0) == Approx(19000.0));
    // A y axis that grows upwards: pixels decrease with the value.
    const svg::LinearScale y{0.0, 100.0, 400.0, 100.0};
    CHECK(y(0.0) == Approx(400.0));
    CHECK(y(100.0) == Approx(100.0));
    CHECK(y(25.0) == Approx(325.0));
    // Outside the domain it extrapolates (the charts clip themselves).
    CHECK(y(110.0) == Approx(70.0));
    // A degenerate domain draws in the middle rather than dividing by zero.
    const svg::LinearScale flat{5.0, 5.0, 0.0, 10.0};
    CHECK(flat(5.0) == Approx(5.0));
}

TEST_CASE("nice ticks step by 1, 2 or 5 times a power of ten", "[svg]") {
    // Heckbert, "Nice numbers for graph labels", Graphics Gems (1990), from memory:
    // step = nice(range / intervals) with thresholds 1.5, 3, 7.
    // 0..38 km in about 6 intervals: 38/6 = 6.3 -> 5 km.
    CHECK(svg::nice_step(0.0, 38.0, 6) == Approx(5.0));
    CHECK(svg::nice_ticks(0.0, 38.0, 6) == std::vector<double>{0, 5, 10, 15, 20, 25, 30, 35});
    // The same line in metres: 38000/8 = 4750 -> 5000 m.
    const std::vector<double> m = svg::nice_ticks(0.0, 38000.0, 8);
    REQUIRE(m.size() == 8);
    CHECK(m.front() == 0.0);
    CHECK(m.back() == Approx(35000.0));
    // 0..100 % in 5 intervals: 20 % steps, both ends included.
    CHECK(svg::nice_ticks(0.0, 100.0, 5) == std::vector<double>{0, 20, 40, 60, 80, 100});
    // 2.6/5 = 0.52 -> 0.5; ticks start at the first multiple inside the range.
    const std::vector<double> t = svg::nice_ticks(0.3, 2.9, 5);
    REQUIRE(t.size() == 5);
    CHECK(t.front() == Approx(0.5));
    CHECK(t.back() == Approx(2.5));
    // 0..14: 14/6 = 2.33 -> 2.
    CHECK(svg::nice_step(0.0, 14.0, 6) == Approx(2.0));
    CHECK(svg::nice_ticks(7.0, 7.0).size() == 1);
}

TEST_CASE("time ticks fall on whole clock steps and print as HH:MM", "[svg]") {
    // Common practice, no source: clock steps of 1, 2, 5, 10, 15, 20, 30 min, 1, 2, 3, 6, 12 h.
    const std::vector<double> t = svg::time_ticks(6 * 3600.0, 7 * 3600.0, 6);
    REQUIRE(t.size() == 7);   // 10-minute steps, both ends
    std::vector<std::string> labels;
    for (double x : t) labels.push_back(svg::format_hhmm(x));
    CHECK(labels == std::vector<std::string>{"06:00", "06:10", "06:20", "06:30", "06:40", "06:50", "07:00"});
    // A whole day in about 8 intervals: 3-hour steps.
    CHECK(svg::time_step(0.0, 86400.0, 8) == Approx(10800.0));
    // An odd window starts at the first whole step inside it.
    const std::vector<double> u = svg::time_ticks(6 * 3600.0 + 7 * 60.0, 6 * 3600.0 + 53 * 60.0, 4);
    REQUIRE_FALSE(u.empty());
    CHECK(svg::format_hhmm(u.front()) == "06:15");
    CHECK(svg::format_hhmm(u.back()) == "06:45");
}

TEST_CASE("times of day format as HH:MM, rounded to the minute, past midnight", "[svg]") {
    CHECK(svg::format_hhmm(0.0) == "00:00");
    CHECK(svg::format_hhmm(6 * 3600.0) == "06:00");
    CHECK(svg::format_hhmm(6 * 3600.0 + 30 * 60.0 + 29.0) == "06:30");
    CHECK(svg::format_hhmm(3599.6) == "01:00");
    // Hours go past 23 as in scenario files (after-midnight running).
    CHECK(svg::format_hhmm(86400.0 + 1800.0) == "24:30");
    CHECK(svg::format_hhmm(-60.0) == "-00:01");
}

TEST_CASE("numbers are short and locale-free", "[svg]") {
    CHECK(svg::number(1.0) == "1");
    CHECK(svg::number(2.50) == "2.5");
    CHECK(svg::number(1234.5678) == "1234.57");
    CHECK(svg::number(-0.0001) == "0");
    CHECK(svg::number(12.0, 0) == "12");
}

TEST_CASE("text and attributes are escaped", "[svg]") {
    CHECK(svg::escape("a<b & \"c\"") == "a&lt;b &amp; &quot;c&quot;");
    CHECK(svg::escape("it's > 0") == "it&#39;s &gt; 0");

    svg::Element doc = svg::document(200, 100, "chart of <T&1>");
    doc.add(svg::text(10, 20, "T<1> & \"T2\"", "train-label"));
    doc.add(svg::rect(0, 0, 5, 5, "block")).tooltip("route A->B \"late\"");
    const std::string s = svg::to_string(doc, false);
    CHECK(s.rfind("<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 200 100\"", 0) == 0);
    CHECK(s.find(">T&lt;1&gt; &amp; &quot;T2&quot;</text>") != std::string::npos);
    CHECK(s.find("aria-label=\"chart of &lt;T&amp;1&gt;\"") != std::string::npos);
    CHECK(s.find("<title>route A-&gt;B &quot;late&quot;</title>") != std::string::npos);
    CHECK(s.find("T<1>") == std::string::npos);
    // Standalone files carry the XML declaration first.
    CHECK(svg::to_string(doc, true).rfind("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<svg", 0) == 0);
}

TEST_CASE("shapes: negative sizes are turned round, polylines list their points", "[svg]") {
    const std::string r = svg::to_string(svg::rect(10, 20, -4, -6, "block"), false);
    CHECK(r == "<rect x=\"6\" y=\"14\" width=\"4\" height=\"6\" class=\"block\"/>\n");
    const std::string p = svg::to_string(svg::polyline({{0, 0}, {1.26, 2}, {3, 4.04}}, "train-path"), false);
    CHECK(p == "<polyline points=\"0,0 1.3,2 3,4\" class=\"train-path\"/>\n");
    // A style sheet may hold '>' selectors but can never close its element early.
    const std::string st = svg::to_string(svg::style("a > b { x: 1 } </style><script>"), false);
    CHECK(st.find("a > b") != std::string::npos);
    CHECK(st.find("<script") == std::string::npos);
}

TEST_CASE("the HTML page escapes what the scenario says", "[svg][report]") {
    Report r;
    r.title = "Line <script>alert(1)</script> & co";
    r.caution = "careful";
    r.facts = {{"file", "a\"b.yaml"}};
    r.sections.push_back({"s1", "Part <1>", "<p>body</p>\n"});
    const std::string html = render_html(r);
    CHECK(html.rfind("<!DOCTYPE html>", 0) == 0);
    CHECK(html.find("<script") == std::string::npos);
    CHECK(html.find("Line &lt;script&gt;alert(1)&lt;/script&gt; &amp; co") != std::string::npos);
    CHECK(html.find("a&quot;b.yaml") != std::string::npos);
    CHECK(html.find("<h2>Part &lt;1&gt;</h2>") != std::string::npos);
    CHECK(html.find("<a href=\"#s1\">") != std::string::npos);

    HtmlTable t;
    t.headers = {"train", "buffer"};
    t.numeric = {false, true};
    t.rows = {{"T<1>", "-12 s"}, {"T2", "30 s"}};
    t.highlight = {true, false};
    const std::string tab = html_table(t);
    CHECK(tab.find("<tr class=\"warn\"><td>T&lt;1&gt;</td><td class=\"num\">-12 s</td></tr>") != std::string::npos);
    CHECK(tab.find("<tr><td>T2</td>") != std::string::npos);
}

TEST_CASE("a child added through an earlier reference lands in its group", "[svg]") {
    // Charts keep a reference to a layer (e.g. the axis) and add to it after later layers: the
    // reference must survive the siblings added in between.
    svg::Element doc = svg::document(100, 100, "layers");
    svg::Element& axis = doc.add(svg::group("axis"));
    for (int i = 0; i < 100; ++i) doc.add(svg::group("layer"));
    axis.add(svg::line(0, 0, 1, 1, "baseline"));
    const std::string s = svg::to_string(doc, false);
    CHECK(s.find("<g class=\"axis\">\n<line x1=\"0\" y1=\"0\" x2=\"1\" y2=\"1\" class=\"baseline\"/>\n</g>") !=
          std::string::npos);
    CHECK(svg::to_string(svg::path("M0,0 L1,1", "ci-whisker"), false) == "<path d=\"M0,0 L1,1\" class=\"ci-whisker\"/>\n");
}
