// The network file (knockon: 2): the example in tests/data/network read into the model as
// written, and every mistake of the broken one located at file:line:col, the reader's and the
// network checks' alike.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "cli_support.hpp"
#include "models/network/routes.hpp"
#include "tools/read/network_reader.hpp"

using namespace knockon;

namespace {

const std::string kTerminus = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/terminus.yaml";
const std::string kBroken = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/broken.yaml";

std::vector<std::string> problems_of(const std::string& text) {
    try {
        parse_network(text, "n.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    return {};
}

}  // namespace

TEST_CASE("network file: the terminus example is read as written") {
    const NetworkFile f = read_network(kTerminus);
    const net::Network& n = f.network;
    CHECK(f.name == "Brinmoor terminus");
    REQUIRE(n.segments.size() == 3);
    const net::Segment& l = n.segments[0];
    CHECK(l.length == Approx(1000.0));
    CHECK(l.forward);
    CHECK(l.backward);
    CHECK(l.gradient_at(700.0) == Approx(-0.004));
    CHECK(l.speed_at(900.0) == Approx(60.0 / 3.6));
    CHECK(l.shown_at(450.0) == Approx(12850.0));   // post 12.4 km at 0 m
    const net::Node& w = n.nodes[n.find_node("W1")];
    CHECK(w.kind == net::NodeKind::switch_);
    CHECK(w.fouling == Approx(30.0));
    REQUIRE(w.ends.size() == 3);
    CHECK(w.ends[2].at == net::EndRef{n.find_segment("P2"), net::End::start});
    CHECK(w.ends[2].speed == Approx(40.0 / 3.6));
    CHECK(w.ends[1].speed == net::kNoLimit);
    // The signalling defaults hold unless a signal gives its own.
    CHECK(n.signals[n.find_signal("E")].overlap == Approx(100.0));
    CHECK(n.signals[n.find_signal("H")].overlap == 0.0);
    CHECK(n.signals[n.find_signal("X1")].sighting_distance == Approx(250.0));
    CHECK(n.signals[n.find_signal("X1")].heading == net::Heading::backward);
    CHECK(n.interlocking.route_setup == Approx(8.0));
    CHECK(n.stopping_points.size() == 2);
    CHECK(n.stopping_points[1].max_train_length == Approx(120.0));
    REQUIRE(n.platforms.size() == 2);
    CHECK(n.platforms[0].length() == Approx(230.0));
    // Counted by hand: L cut at E (100 m), the joint (450 m) and H (800 m), with W1's toe at its
    // end: 4 pieces; P1 and P2 at the fouling point (30 m) and their starter (40 m): 3 each; the
    // two pieces inside W1's fouling points are one: 9.  Routes E-H, H to each buffer stop, each
    // starter out to the boundary: 5.
    REQUIRE(n.route_names.size() == 1);
    CHECK(n.route_names[0].name == "Into platform 2");
    CHECK(n.route_names[0].exit_signal == net::kNone);
    CHECK(n.route_names[0].via == std::vector<std::size_t>{n.find_segment("P2")});
    CHECK(f.sections == 9);
    CHECK(f.routes == 5);
}

TEST_CASE("network file: every mistake located at its field") {
    CHECK(problems_of(clitest::read_text(kBroken)) ==
          std::vector<std::string>{
              "n.yaml:8:24: network.segments[2].length: must be more than 0 km and at most 1000 km (README, input "
              "ranges), not 0 km",
              "n.yaml:9:43: network.segments[3].directions: \"sideways\" is not one of: forward, backward, both",
              "n.yaml:12:54: network.nodes[1].ends[2]: a segment end is written <segment id>.start or <segment "
              "id>.end, not \"P2.begin\"",
              "n.yaml:14:37: network.nodes[3].ends[0]: no segment has the id \"P9\"",
              "n.yaml:16:31: network.signals[0].at: signal 'E': offset 1200 m lies outside segment 'L' (0 to 1000 m)",
              "n.yaml:17:33: network.signals[1].at: signal 'X1': stands 10 m from switch 'W1', inside its fouling "
              "distance (30 m)",
          });
}

TEST_CASE("network file: the network's own checks are located at the object or its field") {
    const std::string text = R"(knockon: 2
network:
  segments:
    - {id: A, length: 500 m, directions: forward}
    - {id: A, length: 400 m, directions: forward}
  nodes:
    - {id: N1, kind: boundary, ends: [A.start]}
    - {id: N2, kind: switch, ends: [A.end], fouling: 10 m}
  signals:
    - {id: S, segment: A, at: 100 m, heading: backward}
  stations:
    - {id: Q, tracks: [{segment: A, at: 50 m}]}
)";
    // The second A is a second segment of that id; its ends are joined nowhere (the nodes name the
    // first A); a switch needs three ends; S faces a heading nobody runs on A.
    CHECK(problems_of(text) ==
          std::vector<std::string>{
              "n.yaml:5:7: network.segments[1]: segment 'A': its start is joined at no node",
              "n.yaml:5:7: network.segments[1]: segment 'A': its end is joined at no node",
              "n.yaml:5:12: network.segments[1].id: segment 'A': the name is used twice (also by segment 1)",
              "n.yaml:8:36: network.nodes[1].ends: switch 'N2': joins 1 segment ends, a switch needs at least 3",
              "n.yaml:10:47: network.signals[0].heading: signal 'S': faces trains running backward on segment 'A', "
              "where none may run",
          });
}

TEST_CASE("network file: a loop no signal faces is refused with the rest") {
    const std::string text = R"(knockon: 2
network:
  segments:
    - {id: T, length: 500 m, directions: both}
    - {id: R1, length: 400 m, directions: both}
    - {id: R2, length: 400 m, directions: both}
  nodes:
    - {id: Tw, kind: boundary, ends: [T.start]}
    - {id: W, kind: switch, ends: [R2.end, R1.start, T.end]}
    - {id: N, kind: link, ends: [R1.end, R2.start]}
  signals:
    - {id: F, segment: T, at: 100 m, heading: forward}
  stations:
    - {id: Q, tracks: [{segment: T, at: 50 m}]}
)";
    CHECK(problems_of(text) == std::vector<std::string>{
                                   "n.yaml:3:3: network: beyond signal 'F' the track runs round through segment 'R2' and "
                                   "back with no signal facing the train"});
}

TEST_CASE("network file: validate prints what it found, or every problem with exit status 2", "[cli]") {
    using namespace clitest;
    TempDir dir;
    Result r = clitest::knockon("validate " + q(kTerminus), dir, 60);
    CHECK(r.status == 0);
    CHECK(r.out == kTerminus + ": ok: network Brinmoor terminus; 3 segments, 4 nodes, 4 signals, 1 station; 9 "
                               "detection sections, 5 routes\n");
    r = clitest::knockon("validate " + q(kBroken), dir, 60);
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find(kBroken + ":17:33: network.signals[1].at: signal 'X1'") != std::string::npos);
    CHECK(r.err.find("6 problems found") != std::string::npos);
    // The commands that plan and run read it too: a layout with no timetable plans no trains.
    r = clitest::knockon("plan " + q(kTerminus), dir, 60);
    CHECK(r.status == 0);
    CHECK(r.out.find("0 trains") != std::string::npos);
}

TEST_CASE("network file: a route name that fits no route or several is located at it") {
    const std::string text = R"(knockon: 2
network:
  segments:
    - {id: A, length: 500 m, directions: forward}
    - {id: M, length: 400 m, directions: forward}
    - {id: P, length: 450 m, directions: forward}
    - {id: B, length: 500 m, directions: forward}
  nodes:
    - {id: Aw, kind: boundary, ends: [A.start]}
    - {id: Be, kind: boundary, ends: [B.end]}
    - {id: W1, kind: switch, ends: [A.end, M.start, P.start]}
    - {id: W2, kind: switch, ends: [B.start, M.end, P.end]}
  signals:
    - {id: SA, segment: A, at: 400 m, heading: forward}
  stations:
    - {id: X, tracks: [{segment: M, at: 200 m}, {segment: P, at: 200 m}]}
  routes:
    - {id: Loop, from: SA, via: [P]}
    - {id: Either, from: SA}
)";
    CHECK(problems_of(text) ==
          std::vector<std::string>{
              "n.yaml:19:7: network.routes[1]: route 'Either': 2 routes run from signal 'SA' to a buffer stop or "
              "boundary; name via tracks to say which",
          });
    // Names that refer to nothing are the reader's to say; routes are searched for (and their names
    // matched) only once the file has no other problem.
    CHECK(problems_of(text + "    - {id: Lost, from: SB, via: [Q]}\n") ==
          std::vector<std::string>{
              "n.yaml:20:24: network.routes[2].from: no signal has the id \"SB\"",
              "n.yaml:20:34: network.routes[2].via[0]: no segment has the id \"Q\"",
          });
}
