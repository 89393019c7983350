// The network's own checks: every problem found at once, each a sentence naming the object, tied
// to the object's kind and index so that a reader can put its file:line:col in front.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "models/network/graph.hpp"
#include "tests/network_test_support.hpp"

using namespace knockon;
using namespace knockon::net;

namespace {

std::vector<std::string> messages(const std::vector<NetworkProblem>& problems) {
    std::vector<std::string> out;
    for (const NetworkProblem& p : problems) out.push_back(p.message);
    return out;
}

}  // namespace

TEST_CASE("network checks: the hand-drawn layouts have no problems") {
    for (const Network& n : {test::flat_junction(), test::crossover(), test::double_junction(), test::terminus(),
                             test::passing_loop()})
        CHECK(check_network(n).empty());
}

TEST_CASE("network checks: a broken layout gets one sentence per problem") {
    Network n = test::terminus();
    Segment z;
    z.name = "Z";               // no length, joined nowhere
    n.segments.push_back(z);
    n.nodes[n.find_node("W")].fouling = 400;                      // beyond P1 and P2 (300 m)
    n.nodes.push_back({"K", NodeKind::diamond, {{{0, End::start}, kNoLimit}}, 0.0});   // one end, no fouling
    n.signals[n.find_signal("X1")].at.offset = 350;                // beyond P1's end
    n.signals.push_back(n.signals[n.find_signal("E")]);           // the name E twice
    n.signals[n.find_signal("H")].heading = Heading::backward;     // allowed: L runs both ways
    n.stations.push_back({"Q", "Quiet"});                          // no timing point
    n.stopping_points.push_back({n.find_station("T"), {n.find_segment("L"), 10}, Heading::forward, 100});
    n.platforms.push_back({"1", n.find_station("T"), n.find_segment("P1"), 200, 100});
    const auto problems = check_network(n);
    CHECK(messages(problems) ==
          std::vector<std::string>{
              "segment 'Z': length must be more than 0 m (it is 0 m)",
              "switch 'W': its fouling point lies 400 m into segment 'P1', which is only 300 m long",
              "switch 'W': its fouling point lies 400 m into segment 'P2', which is only 300 m long",
              "diamond 'K': joins 1 segment ends, a diamond needs 4",
              "diamond 'K': a diamond crossing needs a fouling distance above 0 m, or the two ways over it would share no section",
              "segment 'L': its start is joined at both 'Lw' and 'K'",
              "segment 'Z': its start is joined at no node",
              "segment 'Z': its end is joined at no node",
              "signal 'X1': offset 350 m lies outside segment 'P1' (0 to 300 m)",
              "signal 'X2': stands 40 m from switch 'W', inside its fouling distance (400 m)",
              "signal 'E': the name is used twice (also by signal 1)",
              "station 'Q': has no timing point on any track",
              "stopping point of station 'T': segment 'L' is not one of the station's tracks (it holds no timing point of it)",
              "platform '1' of station 'T': must run from a lower to a higher offset within segment 'P1' (0 to 300 m), not 200 m to 100 m",
          });
    // Each names the object it is about, for the reader to locate.
    CHECK(problems[0].kind == ObjectKind::segment);
    CHECK(problems[0].index == 3);
    CHECK(problems[8].kind == ObjectKind::signal);   // X1
    CHECK(problems[8].index == n.find_signal("X1"));
    // The graph is made only from a network without problems, and says them all.
    try {
        const NetworkGraph g(n);
        FAIL("no error");
    } catch (const NetworkError& e) {
        CHECK(e.problems.size() == problems.size());
    }
}

TEST_CASE("network checks: a signal inside a switch's fouling distance and one facing a closed heading") {
    Network n = test::flat_junction();
    // 10 m before W on the branch: inside W's 30 m fouling distance.
    n.signals[n.find_signal("SJ")].at.offset = 790;
    // M2 is worked forward only.
    n.signals[n.find_signal("S2")].heading = Heading::backward;
    CHECK(messages(check_network(n)) ==
          std::vector<std::string>{
              "signal 'SJ': stands 10 m from switch 'W', inside its fouling distance (30 m)",
              "signal 'S2': faces trains running backward on segment 'M2', where none may run",
          });
}

TEST_CASE("network checks: a route name must name its signals and via tracks") {
    Network n = test::flat_junction();
    n.route_names.push_back({"Main", n.find_signal("S1"), n.find_signal("S2"), {}});
    CHECK(check_network(n).empty());
    n.route_names.push_back({"Main", kNone, 99, {42}});
    CHECK(messages(check_network(n)) == std::vector<std::string>{
                                            "route name 'Main': the name is used twice (also by route name 1)",
                                            "route 'Main': names no signal to start at",
                                            "route 'Main': names no signal to end at",
                                            "route 'Main': a via track names no segment",
                                        });
}
