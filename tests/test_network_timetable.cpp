// A network file's train types, timetable, corridors and delays (tools/read/network_reader,
// models/network/timetable): read as written, every service's path laid, and each mistake located
// at file:line:col of the call, via, track or field that breaks it.  The example is
// tests/data/network/loop_line.yaml (drawn at its top); each broken case changes one line of it.
#include <catch2/catch.hpp>

#include <fstream>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "models/network/timetable.hpp"
#include "tools/read/network_reader.hpp"

using namespace knockon;

namespace {

const std::string kLoopLine = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/loop_line.yaml";

std::vector<std::string> problems_of(const std::string& text) {
    try {
        parse_network(text, "n.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    return {};
}

// The example with `from` (which must occur) replaced by `to`.
std::string changed(const std::string& from, const std::string& to) {
    std::string text = clitest::read_text(kLoopLine);
    const auto at = text.find(from);
    REQUIRE(at != std::string::npos);
    return text.replace(at, from.size(), to);
}

}  // namespace

TEST_CASE("network timetable: the example is read as written") {
    const NetworkFile f = read_network(kLoopLine);
    REQUIRE(f.train_types.size() == 1);
    CHECK(f.train_types[0].length == Approx(45.0));
    CHECK(f.train_types[0].power == Approx(450e3));
    const net::NetworkTimetable& tt = f.timetable;
    REQUIRE(tt.services.size() == 2);
    const net::NetworkService& r1 = tt.services[0];
    CHECK(r1.enters_at.empty());
    REQUIRE(r1.repeat);
    CHECK(r1.repeat->every == Approx(3600.0));
    CHECK(r1.repeat->until == Approx(8 * 3600.0));
    REQUIRE(r1.calls.size() == 5);
    CHECK(r1.calls[0].call.departure == Approx(6 * 3600.0));
    CHECK(r1.calls[2].reverses);
    CHECK(r1.calls[2].call.track == "T1");
    REQUIRE(r1.calls[2].min_turnaround);
    CHECK(*r1.calls[2].min_turnaround == Approx(240.0));
    const net::NetworkService& f1 = tt.services[1];
    CHECK(f1.enters_at == "Westmarch");
    REQUIRE(f1.entry_speed);
    CHECK(*f1.entry_speed == Approx(80.0 / 3.6));
    CHECK_FALSE(f1.calls[1].call.stops);
    CHECK_FALSE(f1.calls[1].call.departure);   // pass: auto
    CHECK(f.delays.entry.size() == 1);
    CHECK(f.delays.dwell.size() == 1);
    CHECK(f.delays.dwell[0].station == "TRM");
    // No corridors written: one per distinct route.  R1 runs ASH CBH TRM and back (the way back is
    // the same route reversed), F1 ASH CBH TRM: one corridor.
    const std::vector<net::Corridor> corridors = net::corridors_of(tt);
    REQUIRE(corridors.size() == 1);
    CHECK(corridors[0].name == "ASH-TRM");
    CHECK(corridors[0].stations == std::vector<std::string>{"ASH", "CBH", "TRM"});
}

TEST_CASE("network timetable: a reversing service's path turns at its platform") {
    const NetworkFile f = read_network(kLoopLine);
    const net::NetworkGraph graph(f.network);
    const net::NetworkService& r1 = f.timetable.services[0];
    const net::NetworkPath path = net::find_path(graph, net::path_request(f.network, r1, 45.0));
    // Counted by hand on the drawing: ASH at 600 m of A, 600 m on to A's end, M (600 m), B
    // (1500 m), 200 m into T1 to its timing point (no stopping point given): 2900 m out, the same
    // back to ASH: 5800 m; one reversal, at call 3.
    CHECK(path.length == Approx(5800.0));
    std::size_t reversals = 0;
    for (const net::PathStep& s : path.steps)
        if (s.kind == net::PathStep::Kind::reversal) {
            ++reversals;
            CHECK(s.call == 2);
        }
    CHECK(reversals == 1);
    CHECK(path.calls[2].at.segment == f.network.find_segment("T1"));
    CHECK(path.calls[4].s == Approx(5800.0));
}

TEST_CASE("network timetable: each mistake located at the call or field that breaks it") {
    // A station no station is.
    CHECK(problems_of(changed("        - {station: CBH, track: M}\n        - {station: TRM, track: T1",
                              "        - {station: CBX, track: M}\n        - {station: TRM, track: T1")) ==
          std::vector<std::string>{"n.yaml:63:21: timetable.services[0].calls[1].station: no station has the id \"CBX\""});
    // A track no segment is, and a segment that is no track of the station.
    CHECK(problems_of(changed("{station: CBH, track: N, pass: auto}", "{station: CBH, track: Q, pass: auto}")) ==
          std::vector<std::string>{"n.yaml:74:33: timetable.services[1].calls[1].track: no segment has the id \"Q\""});
    CHECK(problems_of(changed("{station: CBH, track: N, pass: auto}", "{station: CBH, track: A, pass: auto}")) ==
          std::vector<std::string>{"n.yaml:74:33: timetable.services[1].calls[1].track: segment 'A' is not a track of "
                                   "station CBH (its tracks: M, N)"});
    // A via on no way: after turning back at the terminus the train runs west, and N carries
    // eastbound trains only.
    CHECK(problems_of(changed("        - {station: CBH, track: M}\n        - {station: ASH}",
                              "        - {station: CBH, track: M, via: [N]}\n        - {station: ASH}")) ==
          std::vector<std::string>{"n.yaml:65:42: timetable.services[0].calls[3].via[0]: service R1: no way over the "
                                   "network from call 4 (CBH) to via segment 'N'"});
    // A call behind the train: after CBH on the way back, TRM lies behind it.
    CHECK(problems_of(changed("        - {station: ASH}\n    # From beyond", "        - {station: TRM}\n    # From beyond")) ==
          std::vector<std::string>{"n.yaml:66:21: timetable.services[0].calls[4].station: service R1: no way over the "
                                   "network from call 4 (CBH) to call 5 (TRM)"});
    // A reversal on a track worked one way only.
    CHECK(problems_of(changed("        - {station: CBH, track: N, pass: auto}\n        - {station: TRM, track: T2}",
                              "        - {station: CBH, track: N, dep: \"06:25\", reverses: true}\n"
                              "        - {station: ASH}")) ==
          std::vector<std::string>{"n.yaml:74:60: timetable.services[1].calls[1].reverses: service F1 cannot reverse at "
                                   "CBH: track N carries trains one way only (directions: both is needed)"});
    // A train leaves only at a boundary.
    CHECK(problems_of(changed("        - {station: TRM, track: T2}", "        - {station: TRM, track: T2}\n      leave: Stop1")) ==
          std::vector<std::string>{"n.yaml:76:14: timetable.services[1].leave: node 'Stop1' is a buffer stop, not a "
                                   "boundary: trains enter and leave the network only at boundaries"});
    // Corridors: a station no station is, a name twice, a corridor of one station.
    CHECK(problems_of(changed("delays:", "corridors:\n  - {id: Branch, stations: [ASH, CBH, TRX]}\n"
                                         "  - {id: Branch, stations: [TRM]}\ndelays:")) ==
          std::vector<std::string>{"n.yaml:78:39: corridors[0].stations[2]: no station has the id \"TRX\"",
                                   "n.yaml:79:10: corridors[1].id: corridor id \"Branch\" is used twice",
                                   "n.yaml:79:28: corridors[1].stations: a corridor runs through at least two stations"});
    // Bad units, in a call and in a train type (read as a line scenario reads them).
    CHECK(problems_of(changed("min_turnaround: 4 min,", "min_turnaround: 4 kg,")) ==
          std::vector<std::string>{"n.yaml:64:69: timetable.services[0].calls[2].min_turnaround: unknown unit \"kg\" "
                                   "for a duration; use s, min or h"});
    CHECK(problems_of(changed("    length: 45 m", "    length: 45 kN")) ==
          std::vector<std::string>{"n.yaml:46:13: train_types[0].length: unknown unit \"kN\" for a length; use m or km"});
    // Times run backwards, as a line scenario's rule says.
    CHECK(problems_of(changed("{station: ASH, pass: \"06:20\"}", "{station: ASH, pass: \"06:20\"}\n"
                                                                  "        - {station: ASH, pass: \"06:10\"}")) ==
          std::vector<std::string>{
              "n.yaml:74:32: timetable.services[1].calls[1].pass: pass 06:10:00 is earlier than pass 06:20:00 at ASH"});
}

TEST_CASE("network timetable: a timetable built in code gets the same checks") {
    const NetworkFile f = read_network(kLoopLine);
    const net::NetworkGraph graph(f.network);
    net::NetworkTimetable tt = f.timetable;
    CHECK(net::check_timetable(graph, f.train_types, tt).empty());
    // F1 turns back in the eastward-only track N of the loop.
    net::NetworkService& f1 = tt.services[1];
    f1.calls[1].call.stops = true;
    f1.calls[1].call.departure = 6 * 3600.0 + 25 * 60.0;
    f1.calls[1].reverses = true;
    f1.calls[2].call.station = "ASH";
    f1.calls[2].call.track.clear();
    tt.corridors.push_back({"Short", {"ASH"}});
    const std::vector<net::TimetableProblem> problems = net::check_timetable(graph, f.train_types, tt);
    REQUIRE(problems.size() == 2);
    CHECK(problems[0].part == net::TimetablePart::service);
    CHECK(problems[0].index == 1);
    CHECK(problems[0].call == 1);
    CHECK(problems[0].field == "reverses");
    CHECK(problems[0].message == "service F1 cannot reverse at CBH: track N carries trains one way only (directions: "
                                 "both is needed)");
    CHECK(problems[1].part == net::TimetablePart::corridor);
    CHECK(problems[1].field == "stations");
}

TEST_CASE("network timetable: validate names the paths and corridors or every problem", "[cli]") {
    using namespace clitest;
    TempDir dir;
    Result r = clitest::knockon("validate " + q(kLoopLine), dir, 60);
    CHECK(r.status == 0);
    CHECK(r.out == kLoopLine + ": ok: network Tarnwick branch; 6 segments, 6 nodes, 10 signals, 3 stations; 19 "
                               "detection sections, 12 routes\n" +
                       kLoopLine + ": ok: 1 train type, 2 services with their paths; corridors: ASH-TRM (ASH CBH TRM); "
                                   "one per route of the services\n");
    const fs::path broken = dir.path / "broken.yaml";
    std::ofstream(broken) << changed("{station: CBH, track: N, pass: auto}", "{station: CBH, track: Q, pass: auto}");
    r = clitest::knockon("validate " + q(broken.string()), dir, 60);
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find(broken.string() + ":74:33: timetable.services[1].calls[1].track: no segment has the id \"Q\"") !=
          std::string::npos);
}

TEST_CASE("network timetable: validate accepts the network demo", "[cli]") {
    using namespace clitest;
    TempDir dir;
    const std::string demo = kSource + "/scenarios/junction_branch.yaml";
    Result r = clitest::knockon("validate " + q(demo), dir, 60);
    CHECK(r.status == 0);
    CHECK(r.err.empty());
    CHECK(r.out.find(": ok: 2 train types, 3 services with their paths; corridors: Main (WRF OLV EMR); Branch (OLV PLC "
                     "HTB QSB); as written") != std::string::npos);
    CHECK(r.out.find(demo + ": ok (base and 2 variants)\n") != std::string::npos);
    // The grade-separated junction has no diamond left.
    const NetworkFile gs = read_network(demo, "grade_separated");
    CHECK(gs.network.find_node("X") == net::kNone);
    CHECK(gs.network.find_node("XU") != net::kNone);
    // A variant the file does not have is named as such.
    try {
        read_network(demo, "flyover");
        FAIL("no error");
    } catch (const ScenarioError& e) {
        REQUIRE(e.messages.size() == 1);
        CHECK(e.messages[0].find("variants: no variant named \"flyover\"; known: grade_separated, double_branch") !=
              std::string::npos);
    }
}

TEST_CASE("network timetable: the README shows the example as it stands") {
    const std::string readme = clitest::read_text(clitest::kSource + "/README.md");
    CHECK(readme.find("```yaml\n" + clitest::read_text(kLoopLine) + "```") != std::string::npos);
}
