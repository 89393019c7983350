// A TrainPath laid from a network path (models/network/train_path.hpp) on the hand-drawn flat
// junction (tests/network_test_support.hpp): the s coordinate, the reach behind and ahead, the
// sections shared at the switch, the signals met, the gradient as the train meets it and a
// switch leg's speed over the switch's own section.  Every expected value was measured off the
// drawing by hand (common practice, no source).
#include <catch2/catch.hpp>

#include <string>

#include "models/network/train_path.hpp"
#include "tests/network_test_support.hpp"

using namespace knockon;
using namespace knockon::net;

namespace {

PathCall stop_at(const Network& n, const std::string& station) {
    PathCall c;
    c.station = n.find_station(station);
    return c;
}

// The flat junction with a 40 km/h diverging leg (J) and a 5 per mille climb on J from 400 m.
Network junction_with_profiles() {
    Network n = test::flat_junction();
    const std::size_t w = n.find_node("W"), j = n.find_segment("J");
    n.nodes[w].ends[2].speed = 40.0 / 3.6;
    n.segments[j].gradient = {{0.0, 0.0}, {400.0, 0.005}};
    n.segments[j].speed = {{0.0, 100.0 / 3.6}};
    n.segments[n.find_segment("M1")].speed = {{0.0, 120.0 / 3.6}};
    n.segments[n.find_segment("M2")].speed = {{0.0, 120.0 / 3.6}};
    return n;
}

std::string ids(const TrainPath& p) {
    std::string out;
    for (const PathSection& s : p.sections) out += (out.empty() ? "" : " ") + s.id;
    return out;
}

}  // namespace

TEST_CASE("train path from the network: a branch train over the junction") {
    const Network n = junction_with_profiles();
    const NetworkGraph g(n);
    const DetectionSections sections(g);
    PathRequest r;
    r.calls = {stop_at(n, "JS"), stop_at(n, "MS")};
    const NetworkPath found = find_path(g, r);
    // From J at 300 m: 500 m to the switch, 200 m on M2 to MS; 100 m behind, 300 m ahead.
    const TrainPath p = train_path(g, sections, {}, r, found, {100.0, 300.0});
    CHECK(p.length == 700.0);
    CHECK(p.s_min == -100.0);
    CHECK(p.s_max == 1000.0);
    CHECK(p.direction == Direction::up);
    CHECK_FALSE(p.starts_at_edge);
    REQUIRE(p.timing_points.size() == 2);
    CHECK(p.timing_points[0].s == 0.0);
    CHECK(p.timing_points[1].s == 700.0);
    REQUIRE(p.pieces.size() == 2);
    CHECK(p.pieces[0].track == "J");
    CHECK(p.pieces[0].s_from == -100.0);
    CHECK(p.pieces[0].s_to == 500.0);
    CHECK(p.pieces[1].track == "M2");
    CHECK(p.pieces[1].x_from == 0.0);   // no kilometre posts: the offset shows
    CHECK(p.chainage_at(600.0) == 100.0);

    // SJ at 600 m of J (s 300) and S2 at 400 m of M2 (s 900): the path sees both.
    REQUIRE(p.signals.size() == 2);
    CHECK(p.signals[0].signal.name == "SJ");
    CHECK(p.signals[0].s == 300.0);
    CHECK(p.signals[1].signal.name == "S2");
    CHECK(p.signals[1].s == 900.0);
    CHECK(p.signals[1].signal.overlap == 100.0);

    // J is cut at SJ (600) and at its fouling point (770); the switch's section runs from there
    // over the node to nothing on the toe side; M2 is cut at S2 (400) and ends 100 m beyond it.
    CHECK(ids(p) == "J:0.000-0.600 J:0.600-0.770 W M2:0.000-0.400 M2:0.400-1.000");
    REQUIRE(p.sections.size() == 5);
    CHECK(p.sections[1].s_from == 300.0);
    CHECK(p.sections[1].s_to == 470.0);
    CHECK(p.sections[2].s_from == 470.0);
    CHECK(p.sections[2].s_to == 500.0);

    // Level to 400 m of J (s 100), then the 5 per mille climb up to the switch.
    CHECK(p.gradient_at(50.0) == 0.0);
    CHECK(p.gradient_at(150.0) == 0.005);
    CHECK(p.steepest_fall(-100.0, 1000.0).value == 0.0);
    // 100 km/h on J, 40 km/h over the 30 m of the diverging leg inside the fouling point,
    // 120 km/h on M2.
    CHECK(p.speed_limit_at(469.0) == Approx(100.0 / 3.6));
    CHECK(p.speed_limit_at(471.0) == Approx(40.0 / 3.6));
    CHECK(p.speed_limit_at(499.0) == Approx(40.0 / 3.6));
    CHECK(p.speed_limit_at(501.0) == Approx(120.0 / 3.6));
}

TEST_CASE("train path from the network: main and branch trains share the switch's section") {
    Network n = junction_with_profiles();
    n.segments[n.find_segment("M2")].posts = {{0.0, 1000.0}};   // M2 shown on from M1's end
    const NetworkGraph g(n);
    const DetectionSections sections(g);
    PathRequest main, branch;
    main.enters_at = n.find_node("Mw");
    main.leaves_at = n.find_node("Me");
    main.calls = {stop_at(n, "MS")};
    branch.enters_at = n.find_node("Jw");
    branch.calls = {stop_at(n, "JS")};
    branch.calls[0].stops = false;
    branch.calls.push_back(stop_at(n, "MS"));
    const TrainPath a = train_path(g, sections, {}, main, find_path(g, main), {});
    const TrainPath b = train_path(g, sections, {}, branch, find_path(g, branch), {});
    CHECK(a.starts_at_edge);
    CHECK(a.ends_at_edge);
    CHECK(ids(a) == "M1:0.000-0.500 M1:0.500-0.970 W M2:1.000-1.400 M2:1.400-2.000");
    // The branch train runs on to MS at 200 m of M2: it shares the switch's section and the
    // first section of M2, each under one id and one index.
    std::string shared;
    for (const PathSection& x : a.sections)
        for (const PathSection& y : b.sections)
            if (x.index == y.index) shared += x.id + (x.id == y.id ? " " : "(renamed) ");
    CHECK(shared == "W M2:1.000-1.400 ");
    // The main train takes the straight leg, which has no speed of its own.
    CHECK(a.speed_limit_at(990.0) == Approx(120.0 / 3.6));
    // Names given by the caller replace the network's own.
    PathNames names;
    names.sections.assign(sections.size(), "");
    for (std::size_t i = 0; i < sections.size(); ++i) names.sections[i] = "sec" + std::to_string(i);
    names.tracks.assign(n.segments.size(), "main");
    const TrainPath c = train_path(g, sections, names, main, find_path(g, main), {});
    CHECK(c.sections.front().id == "sec" + std::to_string(c.sections.front().index));
    REQUIRE(c.pieces.size() == 1);   // M1 and M2 are one track "main", joined end to end
    CHECK(c.pieces[0].s_to == 2000.0);
}

TEST_CASE("train path from the network: a backward run meets the gradient reversed") {
    const Network n = test::terminus();
    Network m = n;
    m.segments[m.find_segment("L")].gradient = {{0.0, 0.004}};
    const NetworkGraph g(m);
    const DetectionSections sections(g);
    PathRequest r;
    r.calls = {stop_at(m, "T"), stop_at(m, "Lx")};
    r.calls[0].track = m.find_segment("P1");
    const TrainPath p = train_path(g, sections, {}, r, find_path(g, r), {});
    // From P1 at 250 back over the switch and down L to 500: 250 + 500.
    CHECK(p.length == 750.0);
    CHECK(p.direction == Direction::down);
    CHECK(p.gradient_at(600.0) == -0.004);
    // X1 faces backward runs at 40 m of P1 (s 210); H and E face forward runs only.
    REQUIRE(p.signals.size() == 1);
    CHECK(p.signals[0].signal.name == "X1");
    CHECK(p.signals[0].s == 210.0);
}

TEST_CASE("train path from the network: a reversing path is refused") {
    const Network n = test::terminus();
    const NetworkGraph g(n);
    const DetectionSections sections(g);
    PathRequest r;
    r.calls = {stop_at(n, "Lx"), stop_at(n, "T"), stop_at(n, "Lx")};
    r.calls[1].reverses = true;
    const NetworkPath found = find_path(g, r);
    CHECK_THROWS_WITH(train_path(g, sections, {}, r, found, {}), Catch::Contains("reverses at call 2"));
}
