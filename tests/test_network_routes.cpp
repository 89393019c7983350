// Detection sections and routes found over hand-drawn networks (tests/network_test_support.hpp
// draws each).  Every expected list below was counted by hand from the drawing (common practice,
// no source): sections from the cuts at signals, joints, fouling points and switch toes; routes
// by walking from each signal to the next one facing the same way on every leg.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cstdio>
#include <string>
#include <vector>

#include "models/network/routes.hpp"
#include "tests/network_test_support.hpp"

using namespace knockon;
using namespace knockon::net;

namespace {

std::vector<std::string> section_names(const DetectionSections& s) {
    std::vector<std::string> out;
    for (const DetectionSection& d : s.all()) out.push_back(d.name);
    std::sort(out.begin(), out.end());
    return out;
}

std::string names(const DetectionSections& s, const std::vector<std::size_t>& ids) {
    std::string out;
    for (std::size_t id : ids) {
        out += ' ';
        out += s[id].name;
    }
    return out;
}

// "<name> <length> <sections...>", then " | overlap <length> <sections...>" per alternative.
std::vector<std::string> described(const std::vector<Route>& routes, const DetectionSections& s) {
    std::vector<std::string> out;
    for (const Route& r : routes) {
        char len[32];
        std::snprintf(len, sizeof len, " %g", r.length);
        std::string d = r.name + len + names(s, r.sections);
        for (const Overlap& o : r.overlaps) {
            std::snprintf(len, sizeof len, " %g", o.length);
            d += " | overlap" + std::string(len) + names(s, o.sections);
        }
        out.push_back(d);
    }
    std::sort(out.begin(), out.end());
    return out;
}

struct Found {
    Network network;
    NetworkGraph graph;
    DetectionSections sections;
    std::vector<Route> routes;
    explicit Found(Network n) : network(std::move(n)), graph(network), sections(graph), routes(find_routes(graph, sections)) {}
};

}  // namespace

TEST_CASE("network flat junction: sections and converging routes found from the graph") {
    const Found f(test::flat_junction());
    // Cuts: M1 at 500 (S1) and 970 (W's fouling point); J at 600 (SJ) and 770; M2 at 0 (W's
    // toe) and 400 (S2).  Eight pieces, the two inside W's fouling points are one: seven.
    CHECK(section_names(f.sections) == std::vector<std::string>{
                                           "J:0.000-0.600", "J:0.600-0.770", "M1:0.000-0.500", "M1:0.500-0.970",
                                           "M2:0.000-0.400", "M2:0.400-1.000", "W"});
    // W's section is two pieces, one on each leg, and belongs to W.
    const auto& all = f.sections.all();
    const auto w = std::find_if(all.begin(), all.end(), [](const DetectionSection& d) { return d.name == "W"; });
    REQUIRE(w != all.end());
    CHECK(w->pieces.size() == 2);
    CHECK(w->node == f.network.find_node("W"));
    // S1 to S2: 500 m to W, 400 m beyond; SJ to S2: 200 + 400 m; S2 runs out at the boundary
    // 600 m on.  Both routes into S2 share W (the converging conflict) and hold its 100 m overlap.
    CHECK(described(f.routes, f.sections) ==
          std::vector<std::string>{
              "S1-S2 900 M1:0.500-0.970 W M2:0.000-0.400 | overlap 100 M2:0.400-1.000",
              "S2-Me 600 M2:0.400-1.000",
              "SJ-S2 600 J:0.600-0.770 W M2:0.000-0.400 | overlap 100 M2:0.400-1.000",
          });
}

TEST_CASE("network crossover: routes over both legs and overlap alternatives") {
    const Found f(test::crossover());
    // Pieces: A1 3 (PA, SA, WA's toe), A2 3 (fouling 25, TA), C 3 (fouling at 25 and 175),
    // B1 2 (fouling 575), B2 3 (RB, TB): 14, less one each for WA and WB: 12.
    CHECK(f.sections.size() == 12);
    // SA's overlap of 150 m runs 100 m to WA and 50 m on over either leg: two alternatives.
    // RB's way back over C would run backward on A1, where no train may: only the way over B1.
    CHECK(described(f.routes, f.sections) ==
          std::vector<std::string>{
              "PA-SA 200 A1:0.100-0.300 | overlap 150 A1:0.300-0.400 WA A2:0.025-0.500 | overlap 150 "
              "A1:0.300-0.400 WA C:0.025-0.175",
              "RB-Bw 800 B2:0.000-0.200 WB B1:0.000-0.575",
              "SA-TA 600 A1:0.300-0.400 WA A2:0.025-0.500",
              "SA-TB 600 A1:0.300-0.400 WA C:0.025-0.175 WB B2:0.000-0.200 B2:0.200-0.300",
              "TA-Ae 100 A2:0.500-0.600",
              "TB-Be 100 B2:0.300-0.400",
          });
}

TEST_CASE("network double junction: the crossing conflict is a shared diamond section") {
    const Found f(test::double_junction());
    // 22 pieces; K joins 4, W1 2, W2 2: 22 - 3 - 1 - 1 = 17.
    CHECK(f.sections.size() == 17);
    CHECK(described(f.routes, f.sections) ==
          std::vector<std::string>{
              "B1-S2 600 BU:0.900-0.970 W1 U2:0.000-0.500",
              "B2-BDw 500 BD:0.500-1.000",
              "S1-S2 1000 U1a:0.500-0.880 K U1b:0.020-0.070 W1 U2:0.000-0.500",
              "S2-Ue 500 U2:0.500-1.000",
              "S3-B2 1060 D2:0.000-0.500 W2 Xa:0.030-0.040 K BD:0.020-0.500",
              "S3-S4 1000 D2:0.000-0.500 W2 D1:0.500-0.970",
              "S4-Dw 500 D1:0.000-0.500",
          });
}

TEST_CASE("network terminus: routes end at buffer stops and starters lead out past the switch") {
    const Found f(test::terminus());
    // L: 3 pieces (E, H, W's toe); P1 and P2: 3 each (fouling 30, X at 40): 9, W joins 2: 8.
    CHECK(f.sections.size() == 8);
    CHECK(described(f.routes, f.sections) ==
          std::vector<std::string>{
              "E-H 700 L:0.100-0.800",
              "H-BS1 500 L:0.800-1.000 W P1:0.030-0.040 P1:0.040-0.300",
              "H-BS2 500 L:0.800-1.000 W P2:0.030-0.040 P2:0.040-0.300",
              "X1-Lw 1040 P1:0.030-0.040 W L:0.800-1.000 L:0.100-0.800 L:0.000-0.100",
              "X2-Lw 1040 P2:0.030-0.040 W L:0.800-1.000 L:0.100-0.800 L:0.000-0.100",
          });
    const Route& h1 = f.routes[1];
    REQUIRE(h1.name == "H-BS1");
    CHECK(h1.exit_signal == kNone);
    CHECK(h1.end_node == f.network.find_node("BS1"));
}

TEST_CASE("network routes: a ring with a signal each way has a route from each signal to itself") {
    // A ring: R1 and R2 joined end to end twice; F faces forward, Q backward.
    test::NetBuilder b;
    b.segment("R1", 500);
    b.segment("R2", 500);
    b.node("N1", NodeKind::link, {b.end("R1"), b.start("R2")});
    b.node("N2", NodeKind::link, {b.end("R2"), b.start("R1")});
    b.signal("Q", "R1", 100, Heading::backward);
    b.signal("F", "R1", 200, Heading::forward);
    const Found f(b.n);
    // Each comes round the 1000 m ring to itself.  Links cut nothing, the two signals do: two
    // sections, R1 from 100 to 200 and the rest of the ring (named by its first piece, R1 0-100).
    CHECK(f.sections.size() == 2);
    CHECK(described(f.routes, f.sections) ==
          std::vector<std::string>{"F-F 1000 R1:0.000-0.100 R1:0.100-0.200", "Q-Q 1000 R1:0.000-0.100 R1:0.100-0.200"});
}

TEST_CASE("network routes: a loop of track that no signal faces is refused") {
    // A spur T runs into a switch W whose toe leads round the ring R2, R1 back to W's other leg:
    // a train from F would run round for ever without meeting a signal.
    test::NetBuilder b;
    b.segment("T", 500);
    b.segment("R1", 400);
    b.segment("R2", 400);
    b.node("Tw", NodeKind::boundary, {b.start("T")});
    b.node("W", NodeKind::switch_, {b.end("R2"), b.start("R1"), b.end("T")});
    b.node("N", NodeKind::link, {b.end("R1"), b.start("R2")});
    b.signal("F", "T", 100, Heading::forward);
    const Network n = b.n;
    const NetworkGraph g(n);
    const DetectionSections s(g);
    try {
        find_routes(g, s);
        FAIL("no error");
    } catch (const NetworkError& e) {
        CHECK(std::string(e.what()) == "beyond signal 'F' the track runs round through segment 'R2' and back with no signal facing the train");
    }
}

TEST_CASE("network routes: a layout that branches too often without a signal is refused, not searched for ever") {
    // Twenty loops in a row, each left and rejoined by a switch, with one signal before them all:
    // 2^20 ways to the boundary at the end, far past the search's limit.
    test::NetBuilder b;
    const int n = 20;
    auto nm = [](const char* prefix, int k) {
        std::string out = prefix;
        out += std::to_string(k);
        return out;
    };
    for (int i = 0; i <= n; ++i) b.segment(nm("T", i), 100);
    for (int i = 0; i < n; ++i) {
        b.segment(nm("A", i), 50);
        b.segment(nm("B", i), 60);
    }
    b.node("Tw", NodeKind::boundary, {b.start("T0")});
    b.node("Te", NodeKind::boundary, {b.end(nm("T", n))});
    for (int i = 0; i < n; ++i) {
        b.node(nm("V", i), NodeKind::switch_, {b.end(nm("T", i)), b.start(nm("A", i)), b.start(nm("B", i))});
        b.node(nm("U", i), NodeKind::switch_, {b.start(nm("T", i + 1)), b.end(nm("A", i)), b.end(nm("B", i))});
    }
    b.signal("F", "T0", 50, Heading::forward);
    const Network net = b.n;
    const NetworkGraph g(net);
    const DetectionSections s(g);
    CHECK_THROWS_WITH(find_routes(g, s), Catch::Contains("too many switches with no signal between them"));
}

TEST_CASE("network routes: a route takes the name the network gives it") {
    Network n = test::passing_loop();
    const std::size_t sa = n.find_signal("SA");
    // From SA two routes run out to the boundary Be: over M and over the loop P.
    n.route_names.push_back({"Loop", sa, kNone, {n.find_segment("P")}});
    {
        const Found f(n);
        REQUIRE(f.routes.size() == 2);
        CHECK(f.routes[0].name == "SA-Be");
        CHECK(f.routes[1].name == "Loop");
        CHECK(f.routes[1].length == 100 + 450 + 500);
    }
    // Without a via track the name fits both; to SA itself it fits none; each a problem of its name.
    n.route_names = {{"Either", sa, kNone, {}}, {"Back", sa, sa, {}}};
    const NetworkGraph g(n);
    const DetectionSections s(g);
    try {
        find_routes(g, s);
        FAIL("no error");
    } catch (const NetworkError& e) {
        REQUIRE(e.problems.size() == 2);
        CHECK(e.problems[0].kind == ObjectKind::route_name);
        CHECK(e.problems[0].index == 0);
        CHECK(e.problems[0].message ==
              "route 'Either': 2 routes run from signal 'SA' to a buffer stop or boundary; name via tracks to say which");
        CHECK(e.problems[1].message == "route 'Back': no route runs from signal 'SA' to signal 'SA'");
    }
}
