// The report's charts drawn from fixtures (elements counted by their CSS classes) and end-to-end
// runs of `knockon report` and `knockon plot`.
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "tools/report/html_report.hpp"
#include "tools/report/plan_charts.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/read/scenario_reader.hpp"
#include "results_test_support.hpp"

namespace fs = std::filesystem;
using namespace knockon;

namespace {

using namespace resultstest;

const TimeWindow kWholeDay{0.0, 86400.0};

// The train-path polylines: train id (first word of the tooltip) -> number of points.
std::map<std::string, std::size_t> train_paths(const std::string& markup) {
    static const std::regex path(R"rx(<polyline points="([^"]*)" class="train-path[^"]*">\n<title>([^ <]+))rx");
    std::map<std::string, std::size_t> out;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), path); it != std::sregex_iterator(); ++it) {
        const std::string pts = (*it)[1].str();
        out[(*it)[2].str()] += 1 + static_cast<std::size_t>(std::count(pts.begin(), pts.end(), ' '));
    }
    return out;
}

std::size_t routes_of(const PlanResult& plan) {
    std::size_t n = 0;
    for (const TrainPlan& tp : plan.trains) n += tp.stairway.routes.size();
    return n;
}

// A copy of the two-train fixture with an unknown key in it, and the line where it stands.
int write_malformed_two_trains(const fs::path& to) {
    std::istringstream in(read_text(kTwoTrains));
    std::ofstream out(to);
    std::string line;
    int n = 0, bad = 0;
    while (std::getline(in, line)) {
        out << line << "\n";
        ++n;
        if (line.rfind("  length: 10 km", 0) == 0) {
            out << "  colour: red\n";
            bad = ++n;
        }
    }
    return bad;
}

}  // namespace

TEST_CASE("the busiest hour counts departures and passes, not terminus arrivals", "[report]") {
    // two_trains.yaml: T1 and T2 leave A at 08:00 and 08:05 and B a few minutes later, then end
    // at C; hand count: 2 trains x 2 departures in the 08 hour (common practice, no source).
    const Scenario s = read_scenario(kTwoTrains);
    const PlanResult plan = make_plan(s);
    const BusiestHour b = busiest_hour(plan);
    CHECK(b.window.from == Approx(8 * 3600.0));
    CHECK(b.window.to == Approx(9 * 3600.0));
    CHECK(b.events == 4);
    // The whole span runs from the hour of the first blocking to the hour after the last.
    const TimeWindow all = plan_extent(plan);
    CHECK(all.from == Approx(7 * 3600.0));   // T1's first route is set up just before 08:00
    CHECK(all.to == Approx(9 * 3600.0));
    std::string why;
    CHECK_THROWS_AS(choose_window(plan, {false, 9 * 3600.0, 8 * 3600.0, std::nullopt}, &why), std::invalid_argument);
    const TimeWindow one = choose_window(plan, {false, 8.5 * 3600.0, std::nullopt, std::nullopt}, &why);
    CHECK(one.to - one.from == Approx(3600.0));
}

TEST_CASE("a train's path runs through its planned times and stands level at stops", "[report]") {
    const Scenario s = read_scenario(kTwoTrains);
    const PlanResult plan = make_plan(s);
    const ServiceRun& t1 = plan.trains.at(0).run;
    const std::vector<svg::Point> pts = train_path_points(t1, kWholeDay, 10.0);
    REQUIRE(pts.size() > 10);
    // Starts at A (0.5 km) at the 08:00 departure, ends at C (9.5 km) at the planned arrival.
    CHECK(pts.front().x == Approx(8 * 3600.0));
    CHECK(pts.front().y == Approx(500.0).margin(1.0));
    CHECK(pts.back().x == Approx(t1.calls.back().planned_arrival).margin(0.01));
    CHECK(pts.back().y == Approx(9500.0).margin(1.0));
    bool level_at_b = false;
    for (std::size_t i = 1; i < pts.size(); ++i) {
        CHECK(pts[i].x >= pts[i - 1].x);
        CHECK(pts[i].y >= pts[i - 1].y - 1e-6);   // an up train never runs back
        // Samples no further apart than the step, except across a stop.
        if (std::abs(pts[i].y - pts[i - 1].y) > 1e-6) CHECK(pts[i].x - pts[i - 1].x <= 10.0 + 1e-6);
        // At B (5 km) it stands at least its 30 s minimum dwell.
        if (std::abs(pts[i].y - 5000.0) < 1.0 && std::abs(pts[i - 1].y - 5000.0) < 1.0 &&
            pts[i].x - pts[i - 1].x >= 30.0 - 1e-6)
            level_at_b = true;
    }
    CHECK(level_at_b);
    // Clipped to a window, it starts and ends exactly on the window's edges.
    const std::vector<svg::Point> part = train_path_points(t1, {8 * 3600.0 + 120.0, 8 * 3600.0 + 180.0}, 10.0);
    REQUIRE(part.size() >= 2);
    CHECK(part.front().x == Approx(8 * 3600.0 + 120.0));
    CHECK(part.back().x == Approx(8 * 3600.0 + 180.0));
    CHECK(train_path_points(t1, {6 * 3600.0, 7 * 3600.0}, 10.0).empty());
}

TEST_CASE("the time-distance diagram draws one path per train and one block per route", "[report]") {
    const Scenario s = read_scenario(kTwoTrains);
    const PlanResult plan = make_plan(s);
    REQUIRE(plan.trains.size() == 2);
    const std::string svg = svg::to_string(time_distance_chart(s.infrastructure, plan, kWholeDay), true);
    CHECK(count_class(svg, "train-path") == 2);
    const auto paths = train_paths(svg);
    CHECK(paths.size() == 2);
    CHECK(paths.count("T1") == 1);
    CHECK(paths.count("T2") == 1);
    CHECK(count_class(svg, "block") == routes_of(plan));
    // Hand count: entry signals U02..U07 for each train (U01 lies behind A, U08 beyond C).
    CHECK(routes_of(plan) == 12);
    CHECK(count_class(svg, "conflict") == 0);
    CHECK(count_class(svg, "station-line") == s.infrastructure.stations.size());
    CHECK(count_class(svg, "signal-tick") == s.infrastructure.signals.size());

    // A window before T2 starts holds T1 only, and only the routes blocked in it.
    const TimeWindow early{7 * 3600.0 + 55 * 60.0, 8 * 3600.0 + 4 * 60.0};
    const std::string part = svg::to_string(time_distance_chart(s.infrastructure, plan, early), false);
    CHECK(train_paths(part).size() == 1);
    CHECK(train_paths(part).count("T1") == 1);
    std::size_t in_window = 0;
    for (const TrainPlan& tp : plan.trains)
        for (const RouteBlocking& r : tp.stairway.routes) in_window += r.end > early.from && r.start < early.to;
    CHECK(count_class(part, "block") == in_window);
    CHECK(in_window < routes_of(plan));
}

TEST_CASE("conflicts are marked where the plan finds them", "[report]") {
    // two_speed_line.yaml hand-check notes: F3 -> F4 run 95 s apart against a 120 s minimum
    // headway (tests/REFERENCES.md B1, B7), so their blocking times overlap section by section.
    const Scenario s = read_scenario(kTwoSpeed);
    const PlanResult plan = make_plan(s);
    REQUIRE_FALSE(plan.conflicts.empty());
    const std::string svg = svg::to_string(time_distance_chart(s.infrastructure, plan, plan_extent(plan)), true);
    CHECK(count_class(svg, "conflict") == plan.conflicts.size());
    CHECK(count_class(svg, "train-path") == plan.trains.size());
    CHECK(svg.find("url(#knockon-hatch)") != std::string::npos);
    CHECK(svg.find("id=\"knockon-hatch\"") != std::string::npos);
}

TEST_CASE("the capacity chart has one bar and one limit per line section and window", "[report]") {
    const Scenario s = read_scenario(kTwoTrains);
    const PlanResult plan = make_plan(s);
    REQUIRE(plan.capacity.size() == 4);   // A-B and B-C, each peak hour and day
    const std::string svg = svg::to_string(capacity_chart(plan), true);
    CHECK(count_class(svg, "cap-bar") == plan.capacity.size());
    CHECK(count_class(svg, "cap-limit") == plan.capacity.size());
    CHECK(count_class(svg, "win-peak") == 3);   // two bars and the legend's sample
    CHECK(count_class(svg, "win-day") == 3);
}

TEST_CASE("a full day of the demo is thinned to about a point per pixel column", "[report]") {
    // The demo's trains take about 25 minutes; sampled every 10 s a path would have ~150 points,
    // at one sample per ~100 s (86400 s over 840 px) about 15 plus the ends of its legs.
    const Scenario s = read_scenario(kDemo);
    const PlanResult plan = make_plan(s);
    const std::string svg = svg::to_string(time_distance_chart(s.infrastructure, plan, kWholeDay), true);
    const auto paths = train_paths(svg);
    CHECK(paths.size() == plan.trains.size());
    std::size_t most = 0;
    for (const auto& [id, n] : paths) most = std::max(most, n);
    CHECK(most < 60);
    CHECK(most > 10);
    // Too many trains for labels: they are named in tooltips only.
    CHECK(count_class(svg, "train-label") == 0);
}

TEST_CASE("knockon report writes one self-contained HTML page", "[cli][report]") {
    TempDir dir;
    const fs::path html = dir.path / "plan.html";
    const Result r = run_knockon("report " + q(kTwoTrains) + " -o " + q(html), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    CHECK(page.find("<svg") != std::string::npos);
    CHECK(page.find(kSafetyCaution) != std::string::npos);
    CHECK(page.find("UIC Code 406") != std::string::npos);
    CHECK(page.find("knockon report ") != std::string::npos);   // the command line, for the record
    CHECK(page.find("busiest clock hour") != std::string::npos);
    check_self_contained(page);   // no scripts and no outside references
    // Both charts and the tables are there.
    CHECK(count_class(page, "train-path") == 2);
    CHECK(count_class(page, "cap-bar") == 4);
    CHECK(page.find("Thinnest buffers") != std::string::npos);
    CHECK(page.find("No conflicts") != std::string::npos);
    // Nothing else was left in the directory (no temporary file).
    std::size_t files = 0;
    for (const auto& e : fs::directory_iterator(dir.path)) files += e.path().extension() != ".txt";
    CHECK(files == 1);
}

TEST_CASE("knockon report lists the conflicts of a timetable that has them", "[cli][report]") {
    TempDir dir;
    const fs::path html = dir.path / "x.html";
    const Result r = run_knockon("report " + q(kTwoSpeed) + " -o " + q(html) + " --all", dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    const Scenario s = read_scenario(kTwoSpeed);
    const PlanResult plan = make_plan(s);
    CHECK(count_class(page, "conflict") == plan.conflicts.size());
    CHECK(page.find(std::to_string(plan.conflicts.size()) + " pairs of blocking times overlap") != std::string::npos);
    CHECK(page.find("<tr class=\"warn\">") != std::string::npos);   // a negative buffer, marked
}

TEST_CASE("knockon report refuses a bad scenario and writes nothing", "[cli][report]") {
    TempDir dir;
    const fs::path bad = dir.path / "bad.yaml";
    const int line = write_malformed_two_trains(bad);
    REQUIRE(line > 0);
    const fs::path html = dir.path / "plan.html";
    const Result r = run_knockon("report " + q(bad) + " -o " + q(html), dir);
    CHECK(r.status == 2);
    CHECK(r.err.find("bad.yaml:" + std::to_string(line) + ":") != std::string::npos);
    CHECK(r.err.find("colour") != std::string::npos);
    CHECK_FALSE(fs::exists(html));
    // Usage errors too: no output named, or a window that ends before it starts.
    CHECK(run_knockon("report " + q(kTwoTrains), dir).status == 2);
    CHECK(run_knockon("report " + q(kTwoTrains) + " -o " + q(html) + " --from 09:00 --to 08:00", dir).status == 2);
    CHECK(run_knockon("report " + q(kTwoTrains) + " -o " + q(html) + " --from 9h", dir).status == 2);
    CHECK_FALSE(fs::exists(html));
}

TEST_CASE("knockon plot writes one chart as a standalone SVG", "[cli][report]") {
    TempDir dir;
    const fs::path cap = dir.path / "cap.svg";
    Result r = run_knockon("plot " + q(kTwoTrains) + " --chart capacity --svg " + q(cap), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string c = read_text(cap);
    CHECK((c.rfind("<?xml", 0) == 0 || c.rfind("<svg", 0) == 0));
    CHECK(c.find("xmlns=\"http://www.w3.org/2000/svg\"") != std::string::npos);
    CHECK(count_class(c, "cap-bar") == 4);

    const fs::path td = dir.path / "td.svg";
    r = run_knockon("plot " + q(kTwoTrains) + " --chart time-distance --from 07:30 --to 09:00 --svg " + q(td), dir);
    REQUIRE(r.status == 0);
    const std::string t = read_text(td);
    CHECK(t.rfind("<?xml", 0) == 0);
    CHECK(count_class(t, "train-path") == 2);
    CHECK(t.find(kSafetyCaution) != std::string::npos);
    CHECK(t.find("07:30-09:00") != std::string::npos);

    const fs::path none = dir.path / "none.svg";
    CHECK(run_knockon("plot " + q(kTwoTrains) + " --chart pie --svg " + q(none), dir).status == 2);
    CHECK(run_knockon("plot " + q(kTwoTrains) + " --chart capacity", dir).status == 2);
    CHECK(run_knockon("plot " + q(kTwoTrains) + " --chart capacity --all --svg " + q(none), dir).status == 2);
    CHECK_FALSE(fs::exists(none));
}
