// Minimum headway of trains whose paths share only some sections: a branch train merging behind a
// main-line train at a flat junction, and two trains crossing on a diamond.  Blocking time theory
// for converging and crossing routes (the parts of a blocking time: tests/REFERENCES.md B1; the
// minimum headway as the smallest shift at which two stairways touch, over the sections both
// trains block: Pachl, Railway Operation and Control): models/headway compares the stairways
// section by section, so the sections two paths share are all that counts.  The stairways here
// are worked out by hand from the blocking-time parts, not by the program.
#include <catch2/catch.hpp>

#include <algorithm>
#include <iterator>
#include <set>
#include <string>
#include <vector>

#include "models/headway.hpp"
#include "models/network/train_path.hpp"
#include "tools/read/network_reader.hpp"

using namespace knockon;

namespace {

// Interlocking times of the hand computation: route setup 8 s, sight and reaction 12 s, release
// 4 s; three-aspect signals, so a block's approach time is the running time over the block before
// it; trains 100 m long, no overlap, each at a constant speed.
constexpr double kSetup = 8.0, kSight = 12.0, kRelease = 4.0, kLength = 100.0;

// The blocking of a block ending at the signal at `exit` (metres along the train's own path) for a
// train at `speed` whose head is at 0 at time 0, the warning point being the signal at `warning`
// (the entry signal of the block before).
SectionBlocking block(const char* id, double warning, double exit, double speed) {
    SectionBlocking b;
    b.section = id;
    b.start = warning / speed - kSight - kSetup;
    b.end = (exit + kLength) / speed + kRelease;
    return b;
}

}  // namespace

TEST_CASE("junction headway: a branch train merging behind a main-line train") {
    // Main line: block M1 from 0 to 1000 m, the junction's switch section J from 1000 to 1100 m,
    // M2 from 1100 to 2000 m; the main-line train runs at 20 m/s.  The branch train comes over its
    // own block B1 (0 to 1000 m on its path) to J and M2 at 10 m/s (the diverging leg).
    SectionStairway main_train{0, 0.0, {block("M1", -1000.0, 1000.0, 20.0), block("J", 0.0, 1100.0, 20.0),
                                        block("M2", 1000.0, 2000.0, 20.0)}};
    SectionStairway branch_train{1, 0.0, {block("B1", -1000.0, 1000.0, 10.0), block("J", 0.0, 1100.0, 10.0),
                                          block("M2", 1000.0, 2000.0, 10.0)}};
    // By hand, main-line train: J blocked from 0/20 - 12 - 8 = -20 s to (1100 + 100)/20 + 4 =
    // 64 s; M2 from 1000/20 - 20 = 30 s to 2100/20 + 4 = 109 s.  Branch train: J from 0 - 20 =
    // -20 s, M2 from 1000/10 - 20 = 80 s (ends 2100/10 + 4 = 214 s); J ends 1200/10 + 4 = 124 s.
    // Branch behind main: J needs 64 - (-20) = 84 s, M2 109 - 80 = 29 s: 84 s, critical at J.
    // B1 and M1 are not shared and count for nothing.
    auto behind = minimum_headway(main_train, branch_train);
    REQUIRE(behind);
    CHECK(behind->headway == Approx(84.0));
    CHECK(behind->critical_section == "J");
    // Main behind branch: J 124 - (-20) = 144 s, M2 214 - 30 = 184 s: 184 s, critical at M2 (the
    // slow branch train is still in M2 when the fast one would need it).
    auto ahead = minimum_headway(branch_train, main_train);
    REQUIRE(ahead);
    CHECK(ahead->headway == Approx(184.0));
    CHECK(ahead->critical_section == "M2");
}

TEST_CASE("junction headway: two trains crossing on a diamond share its section alone") {
    // The diamond's section X lies 1000 to 1050 m along each train's path, behind a signal at
    // 1000 m whose warning point is the signal at 0 m.  Train A at 20 m/s, train B at 15 m/s.
    SectionStairway a{0, 0.0, {block("A1", -1000.0, 1000.0, 20.0), block("X", 0.0, 1050.0, 20.0),
                               block("A2", 1000.0, 2000.0, 20.0)}};
    SectionStairway b{1, 0.0, {block("B1", -1000.0, 1000.0, 15.0), block("X", 0.0, 1050.0, 15.0),
                               block("B2", 1000.0, 2000.0, 15.0)}};
    // By hand: A blocks X from -20 s to (1050 + 100)/20 + 4 = 61.5 s; B from -20 s to
    // 1150/15 + 4 = 80.667 s.  B after A: 61.5 + 20 = 81.5 s; A after B: 80.667 + 20 = 100.667 s.
    auto b_after_a = minimum_headway(a, b);
    REQUIRE(b_after_a);
    CHECK(b_after_a->headway == Approx(81.5));
    CHECK(b_after_a->critical_section == "X");
    auto a_after_b = minimum_headway(b, a);
    REQUIRE(a_after_b);
    CHECK(a_after_b->headway == Approx(1150.0 / 15.0 + 4.0 + 20.0));
    // Paths that share no section have no headway between them.
    SectionStairway c{2, 0.0, {block("C1", -1000.0, 1000.0, 20.0)}};
    CHECK_FALSE(minimum_headway(a, c));
}

namespace {

// The detection sections (by the network's index, named) a train laid over the network demo
// blocks on its way, with the program's own paths (models/network/paths, train_path).
std::set<std::string> sections_of(const net::NetworkGraph& g, const net::DetectionSections& sections,
                                  const net::PathRequest& request) {
    const net::NetworkPath path = net::find_path(g, request);
    const TrainPath laid = net::train_path(g, sections, {}, request, path, {0.0, 0.0});
    std::set<std::string> out;
    for (const PathSection& s : laid.sections) out.insert(sections[s.index].name);
    return out;
}

std::vector<std::string> shared(const std::set<std::string>& a, const std::set<std::string>& b) {
    std::vector<std::string> out;
    std::set_intersection(a.begin(), a.end(), b.begin(), b.end(), std::back_inserter(out));
    return out;
}

}  // namespace

TEST_CASE("junction headway: paths over the network demo share the junction's sections as drawn") {
    // What the headway of two trains compares is the sections both block: on the demo's flat
    // junction (its drawing at the top of scenarios/junction_branch.yaml) an eastbound branch
    // train crosses the down line on the diamond X, and a westbound one joins it at J2.
    const NetworkFile f = read_network(std::string(KNOCKON_SOURCE_DIR) + "/scenarios/junction_branch.yaml");
    const net::Network& n = f.network;
    const net::NetworkGraph graph(n);
    const net::DetectionSections sections(graph);
    auto call = [&](const char* station, const char* track) {
        net::PathCall c;
        c.station = n.find_station(station);
        c.track = track ? n.find_segment(track) : net::kNone;
        return c;
    };
    net::PathRequest down_main;   // from the boundary ED past EMR, OLV and WRF to WD
    down_main.enters_at = n.find_node("ED");
    down_main.leaves_at = n.find_node("WD");
    down_main.calls = {call("EMR", nullptr), call("OLV", nullptr), call("WRF", nullptr)};
    net::PathRequest up_main = down_main;
    up_main.enters_at = n.find_node("WU");
    up_main.leaves_at = n.find_node("EU");
    up_main.calls = {call("WRF", nullptr), call("OLV", nullptr), call("EMR", nullptr)};
    net::PathRequest branch_out;   // OLV to the terminus
    branch_out.calls = {call("OLV", "U1"), call("PLC", "L1a"), call("QSB", "P1")};
    net::PathRequest branch_back;  // the terminus to OLV
    branch_back.calls = {call("QSB", "P1"), call("PLC", "L1b"), call("OLV", "D1")};

    const auto dm = sections_of(graph, sections, down_main), um = sections_of(graph, sections, up_main);
    const auto bo = sections_of(graph, sections, branch_out), bb = sections_of(graph, sections, branch_back);
    // Crossing: the eastbound branch train and a down main-line train share the diamond alone.
    CHECK(shared(dm, bo) == std::vector<std::string>{"X"});
    // Converging: the westbound branch train joins the down line at J2 and runs on over X to
    // OLV, so it shares J2's and X's sections and the down line's sections between them and OLV.
    const std::vector<std::string> merge = shared(dm, bb);
    CHECK(std::count(merge.begin(), merge.end(), "J2") == 1);
    CHECK(std::count(merge.begin(), merge.end(), "X") == 1);
    CHECK(std::count(merge.begin(), merge.end(), "J3") == 0);
    CHECK(merge.size() >= 4);
    // Diverging: the eastbound branch train leaves the up line at J1 and never meets X there.
    const std::vector<std::string> split = shared(um, bo);
    CHECK(std::count(split.begin(), split.end(), "J1") == 1);
    CHECK(std::count(split.begin(), split.end(), "X") == 0);
    // The westbound branch train and an up main-line train meet nowhere.
    CHECK(shared(um, bb).empty());
}
