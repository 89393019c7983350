// The charts of simulation results: the SVG builders (cumulative distribution, grouped and
// horizontal bars) counted by their CSS classes and measured against their axes; the figures
// behind them (empirical distribution function, the distribution pooled from a study's quantiles,
// Wilson intervals of a station's punctuality, the choice of the traced day to draw); and the
// as-run paths drawn over the plan.
#include <catch2/catch.hpp>

#include <cmath>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "results_test_support.hpp"
#include "sim/simulation.hpp"
#include "sim_test_support.hpp"
#include "tools/report/as_run.hpp"
#include "tools/report/plan_charts.hpp"
#include "tools/report/result_charts.hpp"
#include "tools/report/results_figures.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;
using resultstest::count_class;

namespace {

const std::string kTwoTrains = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/two_trains.yaml";

// The points of every polyline with class `cls` (as the first class token), in pixels.
std::vector<std::vector<svg::Point>> polylines(const std::string& markup, const std::string& cls) {
    const std::regex re("<polyline points=\"([^\"]*)\" class=\"" + cls + "[ \"]");
    std::vector<std::vector<svg::Point>> out;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), re); it != std::sregex_iterator(); ++it) {
        std::vector<svg::Point> pts;
        std::istringstream in((*it)[1].str());
        std::string pair;
        while (in >> pair) {
            const auto comma = pair.find(',');
            pts.push_back({std::stod(pair.substr(0, comma)), std::stod(pair.substr(comma + 1))});
        }
        out.push_back(std::move(pts));
    }
    return out;
}

// (y, height) of every rect whose class starts with `cls`, in document order.
std::vector<std::pair<double, double>> rects(const std::string& markup, const std::string& cls) {
    const std::regex re("<rect x=\"[^\"]*\" y=\"([^\"]*)\" width=\"[^\"]*\" height=\"([^\"]*)\" class=\"" + cls +
                        "[ \"]");
    std::vector<std::pair<double, double>> out;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), re); it != std::sregex_iterator(); ++it)
        out.push_back({std::stod((*it)[1].str()), std::stod((*it)[2].str())});
    return out;
}

// (x, width) of every rect whose class starts with `cls`.
std::vector<std::pair<double, double>> rects_x(const std::string& markup, const std::string& cls) {
    const std::regex re("<rect x=\"([^\"]*)\" y=\"[^\"]*\" width=\"([^\"]*)\" height=\"[^\"]*\" class=\"" + cls +
                        "[ \"]");
    std::vector<std::pair<double, double>> out;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), re); it != std::sregex_iterator(); ++it)
        out.push_back({std::stod((*it)[1].str()), std::stod((*it)[2].str())});
    return out;
}

// Text of the tick labels, in document order.
std::vector<std::string> tick_labels(const std::string& markup) {
    const std::regex re("class=\"tick-label\"[^>]*>([^<]*)</text>");
    std::vector<std::string> out;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), re); it != std::sregex_iterator(); ++it)
        out.push_back((*it)[1].str());
    return out;
}

TimingPointStats timing_point(double p50, double p90, double p95, double max, std::vector<double> shares,
                              std::size_t reached) {
    TimingPointStats tp;
    tp.reached = reached;
    tp.delay_quantiles = {p50, p90, p95, max};
    for (double s : shares) {
        Estimate e;
        e.mean = s;
        tp.punctuality.push_back(e);
    }
    return tp;
}

// F at x of a polyline of (x, F) corners, taking the upper value at a vertical step.
double value_at(const std::vector<svg::Point>& cdf, double x) {
    double f = 0.0;
    for (std::size_t i = 0; i < cdf.size(); ++i) {
        if (cdf[i].x <= x) f = cdf[i].y;
        if (i > 0 && cdf[i - 1].x < x && cdf[i].x > x)
            return cdf[i - 1].y + (cdf[i].y - cdf[i - 1].y) * (x - cdf[i - 1].x) / (cdf[i].x - cdf[i - 1].x);
    }
    return f;
}

}  // namespace

TEST_CASE("the empirical distribution function steps by 1/n at each value", "[result_charts]") {
    // F_n(x) = (1/n) #{i : X_i <= x}, the empirical distribution function (textbook definition,
    // e.g. van der Vaart, Asymptotic Statistics, 1998, ch. 19; from memory).  7 values: 0 twice,
    // 60 once, 120 three times, 300 once.
    const std::vector<svg::Point> f = empirical_cdf({120, 0, 300, 120, 60, 0, 120});
    const std::vector<svg::Point> want = {{0, 0},       {0, 2.0 / 7},   {60, 2.0 / 7}, {60, 3.0 / 7},
                                          {120, 3.0 / 7}, {120, 6.0 / 7}, {300, 6.0 / 7}, {300, 1.0}};
    REQUIRE(f.size() == want.size());
    for (std::size_t i = 0; i < f.size(); ++i) {
        CHECK(f[i].x == want[i].x);
        CHECK(f[i].y == Approx(want[i].y));
    }
    // NaN (never reached) is left out; nothing gives nothing.
    CHECK(empirical_cdf({std::nan(""), 5.0}).back().y == 1.0);
    CHECK(empirical_cdf({}).empty());

    // Many distinct values go on an even grid: still non-decreasing, from 0 to 1, and F at a grid
    // point is the exact count (values 0..999, n = 1000: F(x) = (floor(x) + 1) / 1000).
    std::vector<double> many;
    for (int i = 0; i < 1000; ++i) many.push_back(i);
    const std::vector<svg::Point> g = empirical_cdf(many, 200);
    CHECK(g.size() <= 202 + 2);
    for (std::size_t i = 1; i < g.size(); ++i) {
        CHECK(g[i].x >= g[i - 1].x);
        CHECK(g[i].y >= g[i - 1].y);
    }
    CHECK(g.back().y == 1.0);
    for (std::size_t i = 1; i < g.size(); i += 2) CHECK(g[i].y == Approx((std::floor(g[i].x) + 1.0) / 1000.0));
}

TEST_CASE("the delay distribution pooled from stored quantiles", "[result_charts]") {
    // One timing point: the knots (0, 0.5), (60, 0.9), (120, 0.95), (180, 0.96), (300, 0.98),
    // (600, 1) joined linearly (hand computation, common practice, no source).
    const TimingPointStats a = timing_point(0, 60, 120, 600, {0.96, 0.98}, 10);
    const std::vector<double> thresholds = {180.0, 300.0};
    const std::vector<svg::Point> fa = quantile_mixture_cdf({&a}, thresholds);
    CHECK(value_at(fa, 0.0) == Approx(0.5));
    CHECK(value_at(fa, 30.0) == Approx(0.7));
    CHECK(value_at(fa, 90.0) == Approx(0.925));
    CHECK(value_at(fa, 240.0) == Approx(0.97));
    CHECK(value_at(fa, 450.0) == Approx(0.99));
    CHECK(fa.back().x == 600.0);
    CHECK(fa.back().y == Approx(1.0));

    // A timing point always late: nothing known below its lowest knot, joined from (0, 0).
    // Knots (0, 0), (180, 0), (240, 0.5), (300, 0.6) [threshold], (360, 0.9), (420, 0.95), (900, 1).
    const TimingPointStats b = timing_point(240, 360, 420, 900, {0.0, 0.6}, 30);
    const std::vector<svg::Point> fb = quantile_mixture_cdf({&b}, thresholds);
    CHECK(value_at(fb, 100.0) == Approx(0.0));
    CHECK(value_at(fb, 270.0) == Approx(0.55));
    CHECK(value_at(fb, 330.0) == Approx(0.75));

    // Pooled, each weighted by the days it was reached (10 and 30): F = (10 Fa + 30 Fb) / 40.
    const std::vector<svg::Point> f = quantile_mixture_cdf({&a, &b}, thresholds);
    for (double x : {0.0, 30.0, 90.0, 240.0, 270.0, 330.0, 450.0, 700.0})
        CHECK(value_at(f, x) == Approx((10 * value_at(fa, x) + 30 * value_at(fb, x)) / 40.0));
    for (std::size_t i = 1; i < f.size(); ++i) {
        CHECK(f[i].x > f[i - 1].x);
        CHECK(f[i].y >= f[i - 1].y);   // a distribution function never falls
    }
    // Points never reached add nothing.
    const TimingPointStats never = timing_point(NAN, NAN, NAN, NAN, {}, 0);
    CHECK(quantile_mixture_cdf({&never}, thresholds).empty());
}

TEST_CASE("the CDF chart: one curve per series, monotone, threshold marks, minutes on the axis", "[result_charts]") {
    CdfChart c;
    c.series.push_back({"stopping", "cat-0", empirical_cdf({0, 0, 30, 90, 200, 400})});
    c.series.push_back({"fast", "cat-1", empirical_cdf({0, 10, 20, 700})});
    c.series.push_back({"all trains", "all", empirical_cdf({0, 0, 30, 90, 200, 400, 0, 10, 20, 700})});
    c.thresholds = {180.0, 300.0};
    c.x_max = 400.0;
    const std::string s = svg::to_string(cdf_chart(c), true);
    CHECK(count_class(s, "cdf-line") == 3);
    CHECK(count_class(s, "cdf-all") == 1);
    CHECK(count_class(s, "threshold-line") == 2);
    CHECK(s.find(">3 min</text>") != std::string::npos);
    CHECK(s.find("arrival delay [min]") != std::string::npos);
    // 400 s = 6.7 min: the axis ends at the next whole step (1 min steps: 0..7).
    const std::vector<std::string> ticks = tick_labels(s);
    CHECK(std::find(ticks.begin(), ticks.end(), "7") != ticks.end());
    CHECK(std::find(ticks.begin(), ticks.end(), "8") == ticks.end());
    CHECK(std::find(ticks.begin(), ticks.end(), "100 %") != ticks.end());
    // Every curve runs right and upwards (pixels: x grows, y shrinks) and stays in the plot.
    const auto lines = polylines(s, "cdf-line");
    REQUIRE(lines.size() == 3);
    double right = 0.0;
    for (const auto& pts : lines) {
        for (std::size_t i = 1; i < pts.size(); ++i) {
            CHECK(pts[i].x >= pts[i - 1].x);
            CHECK(pts[i].y <= pts[i - 1].y + 1e-9);
        }
        right = std::max(right, pts.back().x);
    }
    // The fast trains' 700 s is beyond the axis: their curve is cut at its end, where the
    // stopping trains' ends (at 400 s) lies further left.
    CHECK(lines[1].back().x == Approx(right));
    CHECK(lines[0].back().x < right);
}

TEST_CASE("grouped bars: one bar per group and series, heights to scale, whiskers", "[result_charts]") {
    GroupedBars g;
    g.series = {"within 3 min", "within 5 min"};
    g.format = {100.0, 1, " %"};
    g.axis_max = 1.0;
    g.groups = {{"all", {{0.5, 0.45, 0.55}, {1.0, 0.98, 1.0}}},
                {"B", {{0.25, 0.2, 0.3}, {0.75, 0.7, 0.8}}},
                {"C", {{0.8}, {kNoValue}}}};   // no interval; no value: no bar
    const std::string s = svg::to_string(grouped_bar_chart(g), true);
    CHECK(count_class(s, "bar") == 5);
    CHECK(count_class(s, "ci-whisker") == 4);
    CHECK(count_class(s, "ser-0") == 3 + 1);   // bars and the legend sample
    CHECK(count_class(s, "ser-1") == 2 + 1);
    const auto bars = rects(s, "bar");
    REQUIRE(bars.size() == 5);
    // Heights in proportion to the values (0.5, 1.0, 0.25, 0.75, 0.8), all from one baseline.
    const double unit = bars[1].second;   // the 100 % bar
    CHECK(bars[0].second == Approx(0.5 * unit).margin(0.02));
    CHECK(bars[2].second == Approx(0.25 * unit).margin(0.02));
    CHECK(bars[3].second == Approx(0.75 * unit).margin(0.02));
    CHECK(bars[4].second == Approx(0.8 * unit).margin(0.02));
    for (const auto& [y, h] : bars) CHECK(y + h == Approx(bars[1].first + unit).margin(0.02));
    const std::vector<std::string> ticks = tick_labels(s);
    CHECK(ticks.front() == "0 %");
    CHECK(ticks.back() == "100 %");

    // Negative values hang below a zero line, and the axis reaches them.
    GroupedBars d;
    d.series = {"difference"};
    d.format = {100.0, 1, " pts"};
    d.groups = {{"V", {{-0.02, -0.03, -0.01}}}, {"W", {{0.01, -0.005, 0.025}}}};
    const std::string n = svg::to_string(grouped_bar_chart(d), true);
    CHECK(count_class(n, "zero-line") == 1);
    CHECK(count_class(n, "bar") == 2);
    const auto nb = rects(n, "bar");
    CHECK(nb[0].second == Approx(2.0 * nb[1].second).margin(0.02));   // |-2 pts| = 2 x 1 pt
    CHECK(nb[0].first == Approx(nb[1].first + nb[1].second).margin(0.02));   // one starts where the other ends
    const std::vector<std::string> nt = tick_labels(n);
    CHECK(nt.front() == "-3 pts");
}

TEST_CASE("horizontal bars: one per row, lengths to scale, whiskers", "[result_charts]") {
    HBars h;
    h.format = {1.0 / 60.0, 1, " min"};
    h.value_axis = "time held [min]";
    h.bars = {{"U04", {600.0, 480.0, 720.0}, 0, ""}, {"U03", {300.0}, 0, ""}, {"U07", {150.0, 100.0, 200.0}, 0, ""}};
    const std::string s = svg::to_string(hbar_chart(h), true);
    CHECK(count_class(s, "hbar") == 3);
    CHECK(count_class(s, "ci-whisker") == 2);
    CHECK(count_class(s, "row-label") == 3);
    const auto bars = rects_x(s, "hbar");
    REQUIRE(bars.size() == 3);
    CHECK(bars[1].second == Approx(bars[0].second / 2.0).margin(0.02));
    CHECK(bars[2].second == Approx(bars[0].second / 4.0).margin(0.02));
    CHECK(bars[0].first == bars[1].first);   // all from zero
    CHECK(s.find(">10 min</text>") != std::string::npos);   // the value label of the first
    CHECK(s.find(">2.5 min</text>") != std::string::npos);
}

TEST_CASE("station punctuality: the Wilson score interval of the pooled arrivals", "[result_charts]") {
    // 263 arrivals at one station, 81 of them less than 3 minutes late.  Wilson (1927) score
    // interval, z = 1.96: 0.2553 to 0.3662 (Newcombe, Statistics in Medicine 17 (1998) 857-872,
    // table I, example 81/263; the closed form (p + z²/2n ± z sqrt(p(1-p)/n + z²/4n²)) / (1 + z²/n)
    // gives the same).
    Scenario sc;
    sc.infrastructure.stations = {{"A", "Aston", 500.0}, {"B", "Brimwell", 5000.0}};
    SimResult day;
    day.train_ids = {"T"};
    for (int i = 0; i < 263; ++i) {
        TimingRecord r;
        r.station = "B";
        r.arrival_delay = i < 81 ? 100.0 : 250.0;
        day.timing.push_back(r);
    }
    TimingRecord origin;   // an origin has no arrival: not counted
    origin.station = "A";
    origin.arrival_delay = NAN;
    day.timing.push_back(origin);
    ResultsFile file;
    file.facts.kind = ResultsKind::day;
    ResultsView v;
    v.file = &file;
    v.scenario = &sc;
    v.day = &day;
    const std::vector<StationPunctuality> sp = station_punctuality(v);
    REQUIRE(sp.size() == 1);
    CHECK(sp[0].station == "B");
    CHECK(sp[0].arrivals == 263);
    REQUIRE(sp[0].within.size() == 2);
    CHECK(sp[0].within[0].mean == Approx(81.0 / 263.0));
    CHECK(sp[0].within[0].lower == Approx(0.2553).margin(0.0001));
    CHECK(sp[0].within[0].upper == Approx(0.3662).margin(0.0001));
    // All 263 within 5 minutes: the closed form gives [n / (n + z²), 1].
    CHECK(sp[0].within[1].mean == 1.0);
    CHECK(sp[0].within[1].lower == Approx(263.0 / (263.0 + 1.959963984540054 * 1.959963984540054)));
    CHECK(sp[0].within[1].upper == Approx(1.0));
    // The chart: one bar per threshold for all stations and for each station reached.
    const ResultChart c = make_result_chart("punctuality", v);
    const std::string s = svg::to_string(c.svg, true);
    CHECK(count_class(s, "bar") == 2 * 2);   // (all stations, B) x (3, 5 min)
    CHECK(count_class(s, "ci-whisker") == 2 * 2);
}

TEST_CASE("the traced day drawn is the one nearest the median knock-on", "[result_charts]") {
    auto day = [](std::uint32_t k, double knock_on) {
        ReplicationStats r;
        r.replication = k;
        r.total_knock_on = knock_on;
        return r;
    };
    const std::vector<ReplicationStats> days = {day(0, 10), day(1, 50), day(2, 20), day(3, 40), day(4, 30)};
    // Median of 10, 20, 30, 40, 50 is 30; of the traced days 1 (50) and 3 (40), 3 is nearer.
    auto c = choose_replication(days, {1, 3}, std::nullopt);
    REQUIRE(c);
    CHECK(c->replication == 3);
    CHECK(c->reason.find("nearest the median") != std::string::npos);
    // A tie (20 and 40 both 10 from 30): the lower number.
    CHECK(choose_replication(days, {2, 3}, std::nullopt)->replication == 2);
    // An even count: the median is the mean of the middle two (10, 20, 40, 50 -> 30).
    const std::vector<ReplicationStats> four = {day(0, 10), day(1, 20), day(2, 40), day(3, 50)};
    CHECK(median({10, 20, 40, 50}) == 30.0);
    CHECK(choose_replication(four, {0, 3}, std::nullopt)->replication == 0);   // tie 20/20: lower
    // Asked for: that one if traced, else an error naming the traced ones.
    CHECK(choose_replication(days, {1, 3}, 1u)->replication == 1);
    CHECK_THROWS_WITH(choose_replication(days, {1, 3}, 2u), Catch::Contains("traced: 1, 3"));
    CHECK_FALSE(choose_replication(days, {}, std::nullopt));
}

TEST_CASE("as-run paths: through the records of the day, and over the plan in the diagram", "[result_charts]") {
    const Scenario s = read_scenario(kTwoTrains);
    const PlanResult plan = make_plan(s);
    const SimModel model(s, plan.trains);
    SimOptions opt;
    const SimResult day = simulate_day(model, simtest::no_delays(plan.trains), opt);
    opt.sample_interval = 2.0;
    const SimResult sampled = simulate_day(model, simtest::no_delays(plan.trains), opt);

    const AsRunOverlay records = as_run_overlay(day, s.infrastructure, plan, "as run");
    const AsRunOverlay traj = as_run_overlay(sampled, s.infrastructure, plan, "as run");
    REQUIRE(records.paths.size() == 2);
    REQUIRE(traj.paths.size() == 2);
    for (const AsRunOverlay* o : {&records, &traj})
        for (const AsRunPath& p : o->paths) {
            const ServiceRun& run = plan.trains[p.train].run;
            // Up trains: time and chainage never fall; from the origin's stopping mark to the
            // terminus (A at 0.5 km, C at 9.5 km).
            for (std::size_t i = 1; i < p.points.size(); ++i) {
                CHECK(p.points[i].x >= p.points[i - 1].x);
                CHECK(p.points[i].y >= p.points[i - 1].y);
            }
            CHECK(p.points.front().y == Approx(500.0).margin(1.0));
            CHECK(p.points.back().y == Approx(9500.0).margin(1.0));
            // An undisturbed day runs as planned: at B (5 km) the path stands from the planned
            // arrival to the planned departure.
            const PlannedCall& b = run.calls.at(1);
            auto time_at = [&](double x, bool last) {
                double t = NAN;
                for (const svg::Point& q : p.points)
                    if (std::abs(q.y - x) < 0.5 && (last || std::isnan(t))) t = q.x;
                return t;
            };
            CHECK(time_at(5000.0, false) == Approx(b.planned_arrival).margin(2.5));
            CHECK(time_at(5000.0, true) == Approx(b.planned_departure).margin(2.5));
        }

    // Drawn over the plan: every planned path dimmed, one as-run path and halo per train.
    const TimeWindow all = plan_extent(plan);
    const std::string svg = svg::to_string(time_distance_chart(s.infrastructure, plan, all, {}, &records), true);
    CHECK(count_class(svg, "train-path") == 2);
    CHECK(count_class(svg, "dimmed") == 2 + 1);   // and the legend's sample
    CHECK(count_class(svg, "asrun-path") == 2);
    CHECK(count_class(svg, "asrun-halo") == 2);
    CHECK(count_class(svg, "asrun-hold") == 0);   // nobody stood at a signal
    CHECK(svg.find("as run (solid, bold") != std::string::npos);
    const std::string plain = svg::to_string(time_distance_chart(s.infrastructure, plan, all), true);
    CHECK(count_class(plain, "asrun-path") == 0);
    CHECK(count_class(plain, "dimmed") == 0);
}

TEST_CASE("a title too long for the drawing gets a smaller font", "[result_charts]") {
    ChartOptions o;
    o.width = 400;
    o.title = "short";
    CHECK(svg::to_string(hbar_chart({}, o), false).find("style=\"font-size: ") == std::string::npos);
    o.title = std::string(120, 'x');
    const std::string s = svg::to_string(hbar_chart({}, o), false);
    CHECK(s.find("style=\"font-size: ") != std::string::npos);
    CHECK(count_class(s, "empty-note") == 1);   // and an empty chart says so
}
