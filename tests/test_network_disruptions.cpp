// Disruptions on a network: placed by segment and offsets along it (README "Primary delays"),
// checked by the reader at file:line:col, mapped to the network's detection sections by the one
// rule both formats use (ServicePaths::sections_out_of_use), drawn by their place in the list and
// run by the engine as sections out of use.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <set>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "models/network/graph.hpp"
#include "models/network/sections.hpp"
#include "models/service_paths.hpp"
#include "sim/attribution.hpp"
#include "sim/delay_draws.hpp"
#include "sim/random_stream.hpp"
#include "sim_test_support.hpp"

using namespace knockon;

namespace {

const std::string kData = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/";
const std::string kDisrupted = kData + "disrupted_line.yaml";
const std::string kLoopLine = kData + "loop_line.yaml";

std::vector<std::string> problems_of(const std::string& text) {
    try {
        parse_scenario(text, "n.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    return {};
}

std::string replaced(std::string text, const std::string& from, const std::string& to) {
    const std::size_t at = text.find(from);
    REQUIRE(at != std::string::npos);
    return text.replace(at, from.size(), to);
}

// "line:col" (1-based) of the first `needle` after "disruptions:".
std::string where(const std::string& text, const std::string& needle) {
    const std::size_t pos = text.find(needle, text.find("disruptions:"));
    REQUIRE(pos != std::string::npos);
    const std::string upto = text.substr(0, pos);
    const auto line = 1 + std::count(upto.begin(), upto.end(), '\n');
    return std::to_string(line) + ":" + std::to_string(pos - upto.rfind('\n'));
}

// The names of the network's detection sections a disruption on `segment` over [from, to) takes
// out of use.
std::set<std::string> out_of_use(const Scenario& sc, const std::string& segment, double from, double to) {
    DisruptionRule rule;
    rule.segment = segment;
    rule.from = from;
    rule.to = to;
    const net::NetworkGraph graph(sc.network->network);
    const net::DetectionSections sections(graph);
    std::set<std::string> names;
    for (std::size_t i : service_paths(sc)->sections_out_of_use(rule)) names.insert(sections[i].name);
    return names;
}

}  // namespace

TEST_CASE("network disruptions: each mistake of place located at its field", "[delays][reader]") {
    const std::string text = clitest::read_text(kDisrupted);
    const std::string rule = "segment: A, from: 1800 m, to: 2000 m";
    SECTION("the example is read as written") {
        const Scenario sc = parse_scenario(text, "n.yaml");
        REQUIRE(sc.delays.disruptions.size() == 1);
        const DisruptionRule& r = sc.delays.disruptions[0];
        CHECK(r.segment == "A");
        CHECK(r.track.empty());
        CHECK(r.from == 1800.0);
        CHECK(r.to == 2000.0);
        CHECK(r.daily_probability == 1.0);
        CHECK(r.window_from == 5 * 3600.0 + 58 * 60.0);
        CHECK(r.window_to == 5 * 3600.0 + 58 * 60.0 + 1.0);
    }
    SECTION("a segment the network does not have") {
        const std::string t = replaced(text, rule, "segment: Z, from: 1800 m, to: 2000 m");
        CHECK(problems_of(t) == std::vector<std::string>{"n.yaml:" + where(t, "Z,") +
                                                         ": delays.disruptions[0].segment: no segment has the id \"Z\""});
    }
    SECTION("an offset beyond the segment's end") {
        const std::string t = replaced(text, rule, "segment: A, from: 1800 m, to: 3200 m");
        CHECK(problems_of(t) ==
              std::vector<std::string>{"n.yaml:" + where(t, "3200 m") +
                                       ": delays.disruptions[0].to: to 3200 m lies off segment A, whose offsets run "
                                       "from 0 m to 3000 m"});
    }
    SECTION("an offset before the segment's start") {
        const std::string t = replaced(text, rule, "segment: A, from: -50 m, to: 2000 m");
        CHECK(problems_of(t) ==
              std::vector<std::string>{"n.yaml:" + where(t, "-50 m") +
                                       ": delays.disruptions[0].from: from -50 m lies off segment A, whose offsets "
                                       "run from 0 m to 3000 m"});
    }
    SECTION("a range that does not end beyond its start") {
        const std::string t = replaced(text, rule, "segment: A, from: 2000 m, to: 2000 m");
        CHECK(problems_of(t) ==
              std::vector<std::string>{"n.yaml:" + where(t, "2000 m, daily") +
                                       ": delays.disruptions[0].to: the range must end beyond its start: to 2000 m "
                                       "is not beyond from 2000 m"});
    }
    SECTION("a line's track on a network file") {
        const std::string t = replaced(text, rule, "track: A, from: 1800 m, to: 2000 m");
        const auto problems = problems_of(t);
        REQUIRE(problems.size() == 1);
        CHECK_THAT(problems[0], Catch::StartsWith("n.yaml:" + where(t, "A,") + ": delays.disruptions[0].track: a "
                                                  "network file places a disruption by `segment`"));
        CHECK_THAT(problems[0], Catch::Contains("`track` (with chainage) belongs to a line file"));
    }
}

TEST_CASE("network disruptions: a scenario built in code gets the reader's checks of place", "[delays][network]") {
    // The reader's checks are the model's (disruption_place_problems): a rule set in code that
    // names no segment of the network, or a line's track, is refused when its sections are sought.
    simtest::Loaded f(kDisrupted);
    auto refused = [&](const std::string& what) {
        try {
            const DelayDrawer drawer(f.scenario, f.plan);
        } catch (const ScenarioError& e) {
            REQUIRE(e.messages.size() == 1);
            CHECK_THAT(e.messages[0], Catch::Contains(what));
            return;
        }
        FAIL("the disruption was accepted");
    };
    f.scenario.delays.disruptions[0].segment = "Z";
    refused("segment: no segment has the id \"Z\"");
    f.scenario.delays.disruptions[0].segment.clear();
    f.scenario.delays.disruptions[0].track = "A";
    refused("a disruption on a network is placed by `segment`");
    // And a line refuses a segment.
    Scenario line = read_scenario(std::string(KNOCKON_SOURCE_DIR) + "/tests/data/study/delayed_line.yaml");
    REQUIRE_FALSE(line.delays.disruptions.empty());
    line.delays.disruptions[0].segment = "U";
    const std::vector<TrainPlan> plan = plan_trains(line);
    CHECK_THROWS_AS(DelayDrawer(line, plan), ScenarioError);
}

TEST_CASE("network disruptions: the sections a range reaches, a switch's within its fouling points", "[delays][network]") {
    // tests/data/network/loop_line.yaml, counted by hand: A (1200 m) is cut at W0 (50 m), E1
    // (100 m), H1 (1150 m) and at its end, S1's toe (a switch's toe side is cut at the switch
    // itself); M (600 m) at S1's fouling point (30 m), M2 (50 m), M1 (550 m) and S2's fouling
    // point (570 m).
    const Scenario sc = read_scenario(kLoopLine);
    // Wholly inside one section of M.
    CHECK(out_of_use(sc, "M", 100.0, 200.0) == std::set<std::string>{"M:0.050-0.550"});
    // From M's start into S1's fouling points: the switch's one section, and the piece beyond.
    CHECK(out_of_use(sc, "M", 0.0, 40.0) == std::set<std::string>{"S1", "M:0.030-0.050"});
    // Ending exactly where a section begins takes nothing of it (the range is [from, to)).
    CHECK(out_of_use(sc, "M", 100.0, 550.0) == std::set<std::string>{"M:0.050-0.550"});
    // Across signal H1 up to the segment's end at S1's toe: both sides, not the switch.
    CHECK(out_of_use(sc, "A", 1100.0, 1200.0) == std::set<std::string>{"A:0.100-1.150", "A:1.150-1.200"});
}

TEST_CASE("network disruptions: the train waits at the signal in rear until the disruption ends", "[delays][network][simulation]") {
    const simtest::Loaded f(kDisrupted);
    REQUIRE(f.plan.size() == 1);
    const DelayDrawer drawer(f.scenario, f.plan);
    const InjectedDelays delays = drawer.draw(5, 3);

    // The draw: keyed by the rule's place in the list (disruption, 0, 0, 0), start uniform in the
    // window, ten minutes long; the block S2-S3 alone is out of use.
    const RandomStream rng(5, 3);
    const UniformPair u = rng.uniforms(StreamKind::disruption, 0, 0, 0);
    const double start = 5 * 3600.0 + 58 * 60.0 + u.second * 1.0;
    REQUIRE(delays.blocked.size() == 1);
    CHECK(delays.blocked[0].section == "A:1.500-2.500");
    CHECK(delays.blocked[0].from == start);
    CHECK(delays.blocked[0].to == Approx(start + 600.0).margin(1e-9));

    const SimResult day = simulate_day(*f.model, delays, SimOptions{});
    REQUIRE_FALSE(day.deadlock.deadlocked);
    // Hand-worked: P1 asks for the route S2-S3 on its approach, while the block is out of use;
    // the route is granted the moment the disruption ends (start + 600 s), set 8 s later
    // (interlocking route_setup), and the train, standing at S2, moves off after the 12 s of sight
    // and reaction (README: a held train starts when the route is set and the sight-and-reaction
    // time has passed), so it stands at S2 until start + 620 s.  Times are kept to the millisecond.
    const double end = start + 600.0;
    const RouteRecord* s2 = nullptr;
    for (const RouteRecord& r : day.routes)
        if (r.entry_signal == "S2") s2 = &r;
    REQUIRE(s2 != nullptr);
    CHECK(s2->requested < end);
    CHECK(s2->granted == Approx(end).margin(1e-3));
    CHECK(s2->cleared == Approx(end + 8.0).margin(1e-3));
    CHECK(s2->held_by.kind == HoldCause::Kind::disruption);
    REQUIRE(s2->held_by.section < day.section_names.size());
    CHECK(day.section_names[s2->held_by.section] == "A:1.500-2.500");
    REQUIRE(day.holds.size() == 1);
    const HoldRecord& hold = day.holds[0];
    CHECK(hold.signal == "S2");
    CHECK(hold.from < end);
    CHECK(hold.to == Approx(end + 20.0).margin(1e-3));
    CHECK(hold.cause.kind == HoldCause::Kind::disruption);

    // The arrival at BRK is late by about the time stood at S2, and all of its knock-on is the
    // disruption's (README "Where knock-on comes from": a section out of use is a source).
    const TimingRecord* brk = nullptr;
    for (const TimingRecord& r : day.timing)
        if (r.station == "BRK") brk = &r;
    REQUIRE(brk != nullptr);
    // Standing at S2 is lost, and braking to it and starting again lose more.
    CHECK(brk->knock_on > hold.to - hold.from);
    const DayAttribution a = attribute_knock_on(day, delays);
    double from_disruption = 0.0, all = 0.0;
    for (const DelayEdge& e : a.edges) {
        all += e.seconds;
        const DelaySource src = delay_source(a.index, e.source, day.timing);
        if (src.kind == DelaySource::Kind::disruption && day.section_names[src.section] == "A:1.500-2.500")
            from_disruption += e.seconds;
    }
    CHECK(all == Approx(brk->knock_on).margin(1e-6));
    CHECK(from_disruption == Approx(brk->knock_on).margin(1e-6));
    CHECK(std::string(to_string(DelaySource::Kind::disruption)) == "disruption");
}
