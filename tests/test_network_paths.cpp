// A service's path over hand-drawn networks (tests/network_test_support.hpp): the shortest way
// through its calls, via tracks, a reversal at a terminus and stopping points by train length.
// Each expected path was traced and its length added up by hand on the drawing (common
// practice, no source).
#include <catch2/catch.hpp>

#include <cstdio>
#include <string>

#include "models/network/paths.hpp"
#include "tests/network_test_support.hpp"

using namespace knockon;
using namespace knockon::net;

namespace {

// "A 0-500, P 0-450, reverse at T, ..." (offsets as run, so a backward run counts down).
std::string described(const Network& n, const NetworkPath& p) {
    std::string out;
    for (const PathStep& s : p.steps) {
        if (!out.empty()) out += ", ";
        if (s.kind == PathStep::Kind::reversal) {
            out += "reverse";
            continue;
        }
        char buf[64];
        std::snprintf(buf, sizeof buf, " %g-%g", s.run.from, s.run.to);
        out += n.segments[s.run.segment].name + buf;
    }
    return out;
}

PathCall call_at(const Network& n, const std::string& station, bool stops = true) {
    PathCall c;
    c.station = n.find_station(station);
    c.stops = stops;
    return c;
}

}  // namespace

TEST_CASE("network path: shortest way through a passing loop and a via track") {
    const Network n = test::passing_loop();
    const NetworkGraph g(n);
    PathRequest r;
    r.enters_at = n.find_node("Aw");
    r.leaves_at = n.find_node("Be");
    r.calls = {call_at(n, "Z", false), call_at(n, "Y", false)};
    // By the 400 m main track: 500 + 400 + 500.
    NetworkPath p = find_path(g, r);
    CHECK(described(n, p) == "A 0-500, M 0-400, B 0-500");
    CHECK(p.length == 1400);
    CHECK(p.calls[0].s == 100);
    CHECK(p.calls[1].s == 1150);
    // Via the 450 m loop: 50 m longer, and Y 50 m further on.
    r.calls[0].via = {n.find_segment("P")};
    p = find_path(g, r);
    CHECK(described(n, p) == "A 0-500, P 0-450, B 0-500");
    CHECK(p.length == 1450);
    CHECK(p.calls[1].s == 1200);
    // A call on a named track: the loop, by calling at X on P.
    r.calls = {call_at(n, "X")};
    r.calls[0].track = n.find_segment("P");
    p = find_path(g, r);
    CHECK(described(n, p) == "A 0-500, P 0-450, B 0-500");
    CHECK(p.calls[0].s == 700);
}

TEST_CASE("network path: a turnback at a terminus reverses at the stop") {
    const Network n = test::terminus();
    const NetworkGraph g(n);
    PathRequest r;
    r.enters_at = r.leaves_at = n.find_node("Lw");
    r.calls = {call_at(n, "T")};
    r.calls[0].reverses = true;
    // In over L (1000 m) to the stop 250 m along P1, back out the same way: 2500 m.  P1 and P2
    // are equally short; the first track of the station is taken.
    NetworkPath p = find_path(g, r);
    CHECK(described(n, p) == "L 0-1000, P1 0-250, reverse, P1 250-0, L 1000-0");
    CHECK(p.length == 2500);
    CHECK(p.calls[0].s == 1250);
    CHECK(p.calls[0].heading == Heading::forward);
    REQUIRE(p.steps[2].kind == PathStep::Kind::reversal);
    CHECK(p.steps[2].call == 0);
    // Named platform track.
    r.calls[0].track = n.find_segment("P2");
    CHECK(described(n, find_path(g, r)) == "L 0-1000, P2 0-250, reverse, P2 250-0, L 1000-0");
    // Without the reversal there is no way back out: the message names both ends of the leg.
    r.calls[0].reverses = false;
    try {
        find_path(g, r);
        FAIL("no error");
    } catch (const NetworkError& e) {
        CHECK(std::string(e.what()) == "no way over the network from call 1 (T) to the exit at 'Lw'");
    }
}

TEST_CASE("network path: a long train stops at the stop board, a short one at the platform middle") {
    Network n = test::terminus();
    const std::size_t t = n.find_station("T");
    const std::size_t p1 = n.find_segment("P1");
    // Trains up to 120 m stop at 200 m, longer ones draw up to the board at 280 m.
    n.stopping_points.push_back({t, {p1, 200}, Heading::forward, 120});
    n.stopping_points.push_back({t, {p1, 280}, Heading::forward, kNoLimit});
    const NetworkGraph g(n);
    PathRequest r;
    r.enters_at = n.find_node("Lw");
    r.calls = {call_at(n, "T")};
    r.calls[0].track = p1;
    r.train_length = 100;
    CHECK(find_path(g, r).calls[0].s == 1200);
    r.train_length = 300;
    CHECK(find_path(g, r).calls[0].s == 1280);
    // Backward no stopping point is given: the timing point (250 m).
    CHECK(stop_place(n, 0, Heading::backward, 300).offset == 250);
}

TEST_CASE("network path: a branch train joins the main line over the junction") {
    const Network n = test::flat_junction();
    const NetworkGraph g(n);
    PathRequest r;
    r.enters_at = n.find_node("Jw");
    r.leaves_at = n.find_node("Me");
    r.calls = {call_at(n, "MS", false)};
    const NetworkPath p = find_path(g, r);
    CHECK(described(n, p) == "J 0-800, M2 0-1000");
    CHECK(p.calls[0].s == 1000);
    // Starting at a call instead of a boundary: from JS (J 300 m) to MS (M2 200 m): 500 + 200.
    r.enters_at = kNone;
    r.leaves_at = kNone;
    r.calls = {call_at(n, "JS"), call_at(n, "MS")};
    CHECK(find_path(g, r).length == 700);
    // No way from the main line back to the branch: trains run forward only.
    r.calls = {call_at(n, "MS"), call_at(n, "JS")};
    CHECK_THROWS_AS(find_path(g, r), NetworkError);
}
