// The planner's views of a network along its corridors: where each corridor's stations lie on
// its distance axis, which part of each train lies along it, and the time-distance diagram drawn
// per corridor (elements counted by their CSS classes).
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <regex>
#include <string>
#include <vector>

#include "models/corridor_axis.hpp"
#include "models/plan.hpp"
#include "tools/report/diagram_axis.hpp"
#include "tools/report/plan_charts.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/read/scenario_reader.hpp"
#include "page_test_support.hpp"

using namespace knockon;

namespace {

const std::string kLoopLine = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/loop_line.yaml";
const std::string kJunction = std::string(KNOCKON_SOURCE_DIR) + "/scenarios/junction_branch.yaml";
const TimeWindow kWholeDay{0.0, 86400.0};

std::vector<double> distances(const CorridorAxis& axis) {
    std::vector<double> out;
    for (const CorridorStation& st : axis.stations) out.push_back(st.at);
    return out;
}

const CorridorAxis& axis_named(const std::vector<CorridorAxis>& axes, const std::string& name) {
    const auto it = std::find_if(axes.begin(), axes.end(), [&](const CorridorAxis& a) { return a.name == name; });
    REQUIRE(it != axes.end());
    return *it;
}

// The y of every point of every train-path polyline, and of every station line.
std::vector<double> path_ys(const std::string& markup) {
    static const std::regex poly(R"rx(<polyline points="([^"]*)" class="train-path)rx");
    static const std::regex pair(R"(([-0-9.]+),([-0-9.]+))");
    std::vector<double> out;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), poly); it != std::sregex_iterator(); ++it) {
        const std::string pts = (*it)[1].str();
        for (auto p = std::sregex_iterator(pts.begin(), pts.end(), pair); p != std::sregex_iterator(); ++p)
            out.push_back(std::stod((*p)[2].str()));
    }
    return out;
}
std::vector<double> station_ys(const std::string& markup) {
    static const std::regex line(R"rx(<line x1="[^"]*" y1="([-0-9.]+)"[^>]*class="station-line")rx");
    std::vector<double> out;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), line); it != std::sregex_iterator(); ++it)
        out.push_back(std::stod((*it)[1].str()));
    return out;
}

}  // namespace

TEST_CASE("a corridor's stations lie at the distance trains run between them", "[network][views]") {
    // Worked by hand from the layout of tests/data/network/loop_line.yaml: ASH at 600 m on A
    // (1200 m), CBH at 300 m on M or N (600 m each), TRM at 200 m on T1 or T2 beyond B (1500 m):
    // ASH-CBH = 600 + 300 = 900 m, CBH-TRM = 300 + 1500 + 200 = 2000 m.
    const Scenario loop = read_scenario(kLoopLine);
    const PlanResult lp = make_plan(loop);
    const std::vector<CorridorAxis> la = corridor_axes(loop, lp);
    REQUIRE(la.size() == 1);
    CHECK(distances(la[0]) == std::vector<double>{0.0, 900.0, 2900.0});

    // The network demo (its layout in scenarios/junction_branch.yaml), by hand: WRF-OLV is
    // 3100 - 600 = 2500 m on the up line and 2900 - 600 = 2300 m on the down line, the shorter
    // counts; OLV-EMR 2900 + 5500 = 8400 m up (5500 + 200 + 3200 = 8900 m down); OLV-PLC over the
    // junction 2900 + 150 + 250 + 3000 + 250 = 6550 m; PLC-HTB 250 + 4000 + 250; HTB-QSB
    // 250 + 3000 + 150.
    const Scenario net = read_scenario(kJunction);
    const PlanResult np = make_plan(net);
    const std::vector<CorridorAxis> na = corridor_axes(net, np);
    REQUIRE(na.size() == 2);
    CHECK(distances(axis_named(na, "Main")) == std::vector<double>{0.0, 2300.0, 10700.0});
    CHECK(distances(axis_named(na, "Branch")) == std::vector<double>{0.0, 6550.0, 11050.0, 14450.0});
    // A line has no corridors.
    const Scenario line = read_scenario(std::string(KNOCKON_SOURCE_DIR) + "/tests/data/two_trains.yaml");
    CHECK(corridor_axes(line, make_plan(line)).empty());
}

TEST_CASE("each train lies along the corridors it runs in either direction", "[network][views]") {
    const Scenario net = read_scenario(kJunction);
    const PlanResult plan = make_plan(net);
    const std::vector<CorridorAxis> axes = corridor_axes(net, plan);
    const CorridorAxis& main = axis_named(axes, "Main");
    const CorridorAxis& branch = axis_named(axes, "Branch");
    std::size_t up = 0, down = 0, out = 0, back = 0;
    for (std::size_t t = 0; t < plan.trains.size(); ++t) {
        const std::string& id = plan.trains[t].run.service->id;
        const TrainPath& path = plan.trains[t].run.path;
        const CorridorRun* m = main.run_of(t);
        const CorridorRun* b = branch.run_of(t);
        INFO(id);
        if (id.rfind("BR-", 0) == 0) {
            // A branch train passes Orlen Vale only on the main line: it lies along the branch alone.
            CHECK(m == nullptr);
            REQUIRE(b != nullptr);
            const bool returning = id.find(".2") != std::string::npos;
            CHECK(b->along == !returning);
            (returning ? back : out) += 1;
            // From its first corridor station to its last, Orlen Vale and Quenby Sands.
            CHECK(b->position(b->s_from()) == (returning ? 14450.0 : 0.0));
            CHECK(b->position(b->s_to()) == (returning ? 0.0 : 14450.0));
        } else {
            CHECK(b == nullptr);
            REQUIRE(m != nullptr);
            (m->along ? up : down) += 1;
            CHECK(m->along == (id.rfind("UP-", 0) == 0));
            // Between the stations, on the axis: Orlen Vale's timing point at 2300 m.
            CHECK(m->position(path.station_s("OLV")) == Approx(2300.0));
            CHECK(std::isnan(m->position(path.length + 1.0)));
        }
    }
    // The timetable's counts: UP every 30 min 06:01-20:31, DN 06:18-21:18, BR hourly 06:16-20:16.
    CHECK(up == 30);
    CHECK(down == 31);
    CHECK(out == 15);
    CHECK(back == 15);
}

TEST_CASE("a corridor diagram draws each train over its part with a crossing place's second track aside",
          "[network][views]") {
    const Scenario loop = read_scenario(kLoopLine);
    const PlanResult plan = make_plan(loop);
    const std::vector<std::unique_ptr<DiagramAxis>> axes = diagram_axes(loop, plan);
    REQUIRE(axes.size() == 1);
    const std::string svg = svg::to_string(time_distance_chart(*axes[0], plan, kWholeDay), true);
    CHECK(pagetest::count_class(svg, "train-path") == plan.trains.size());
    CHECK(pagetest::count_class(svg, "station-line") == 3);
    CHECK(pagetest::count_class(svg, "loop-band") == 1);
    // F1 runs through the loop's second track N at Cobbler's Hey (the R1 trains keep to M): it
    // alone is drawn aside there, over the crossing place's band (a window short enough for the
    // half minute it spends on N to be sampled; R1-0600.2 leaves the terminus in it too).
    const std::string near = svg::to_string(time_distance_chart(*axes[0], plan, {6 * 3600.0 + 900.0, 6 * 3600.0 + 2100.0}), true);
    CHECK(pagetest::count_class(near, "train-path") == 2);
    CHECK(pagetest::count_class(near, "loop-path") == 1);
    CHECK(near.find("F1 on track N at CBH") != std::string::npos);
    // Every point of every path lies between the first and last station's lines (and at most
    // the offset beyond): the diagram runs along the corridor, not along kilometre posts.
    const std::vector<double> st = station_ys(svg), ys = path_ys(svg);
    REQUIRE(st.size() == 3);
    REQUIRE(!ys.empty());
    for (double y : ys) {
        CHECK(y >= st.front() - 1e-6);
        CHECK(y <= st.back() + 4.0 + 1e-6);
    }
    // Signals: one tick per distinct signal the drawn trains pass between corridor stations,
    // within the axis.
    CHECK(pagetest::count_class(svg, "signal-tick") > 0);
    CHECK(svg.find("distance along ASH-TRM [km]") != std::string::npos);
}

TEST_CASE("the network demo's corridor diagrams split the trains by corridor", "[network][views]") {
    const Scenario net = read_scenario(kJunction);
    const PlanResult plan = make_plan(net);
    const std::vector<std::unique_ptr<DiagramAxis>> axes = diagram_axes(net, plan);
    REQUIRE(axes.size() == 2);
    const TimeWindow w{6 * 3600.0, 8 * 3600.0};
    for (const auto& axis : axes) {
        const std::string svg = svg::to_string(time_distance_chart(*axis, plan, w), true);
        INFO(axis->name);
        const bool main = axis->name == "Main";
        // Main, 06:00-08:00: UP 06:01 06:31 07:01 07:31, DN 06:18 06:48 07:18 07:48 (the one
        // entering at 05:48 never runs: the pattern starts at 06:18); Branch: BR-0616, -0716 out
        // and BR-0616.2, -0716.2 back (leaving Quenby Sands 06:46, 07:46).
        CHECK(pagetest::count_class(svg, "train-path") == (main ? 8u : 4u));
        CHECK((svg.find("<title>BR-") != std::string::npos) == !main);
        CHECK((svg.find("<title>UP-") != std::string::npos) == main);
        CHECK(pagetest::count_class(svg, "loop-band") == (main ? 0u : 2u));
        CHECK(pagetest::count_class(svg, "conflict") == 0);
    }
    // Layout facts in the plan's head line.
    CHECK(layout_summary(net) ==
          "Network of 17 segments, 6 stations, 32 signals; corridors Main (WRF OLV EMR), Branch (OLV PLC HTB QSB)");
}

TEST_CASE("a signal's place names its segment heading and kilometre-post km on a network and its km on a line",
          "[network][views]") {
    const Scenario net = read_scenario(kJunction);
    // scenarios/junction_branch.yaml: {id: D560, segment: D1, at: 6000 m, heading: backward}, and
    // D1's one kilometre post shows km 20 at offset 0: km 26.000 (hand reading, no source).
    const std::optional<SignalPlace> d560 = signal_place(net, "D560");
    REQUIRE(d560);
    CHECK(d560->track == "D1");
    CHECK(d560->direction == "backward");
    CHECK(d560->km_m == Approx(26000.0).margin(1e-6));
    // B1A stands at 450 m on L1a, a loop track without posts: its offset is shown.
    const std::optional<SignalPlace> b1a = signal_place(net, "B1A");
    REQUIRE(b1a);
    CHECK(b1a->km_m == Approx(450.0).margin(1e-6));
    CHECK(!signal_place(net, "NOPE"));
    const Scenario line = read_scenario(std::string(KNOCKON_SOURCE_DIR) + "/tests/data/two_trains.yaml");
    REQUIRE(!line.infrastructure.signals.empty());
    const Signal& first = line.infrastructure.signals.front();
    const std::optional<SignalPlace> s = signal_place(line, first.id);
    REQUIRE(s);
    CHECK(s->track == first.track);
    CHECK(s->km_m == first.at);
}
