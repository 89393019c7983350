// Single-track stretches and crossing places found on a network (models/network/single_track),
// against a branch drawn by hand: tests/data/network/branch_two_loops.yaml (the drawing is at its
// top).  Everything checked here was counted on that drawing (hand computation, no source).
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "models/network/single_track.hpp"
#include "tools/read/network_reader.hpp"

using namespace knockon;

namespace {
const std::string kBranch = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/branch_two_loops.yaml";
}

TEST_CASE("network single track: a branch with two loops has three stretches between four places") {
    const NetworkFile f = read_network(kBranch);
    const net::NetworkGraph graph(f.network);
    const net::DetectionSections sections(graph);
    const SingleTrackLayout layout = net::single_track_layout(graph, sections);

    // By hand: the boundary Jn ends the line; F1/F2 between S1 and S2 meet again (a loop, station
    // FEN); so do H1/H2 between S3 and S4 (HOL); T1/T2 beyond S5 end at buffer stops, so S5 ends
    // the single track (named after the terminus TRM on them).  The halt MID on B2 is no place.
    REQUIRE(layout.places.size() == 4);
    CHECK(layout.places[0].name == "Jn");
    CHECK(layout.places[0].kind == CrossingPlaceKind::line_end);
    CHECK(layout.places[1].name == "FEN");
    CHECK(layout.places[1].kind == CrossingPlaceKind::loop);
    CHECK(layout.places[2].name == "HOL");
    CHECK(layout.places[2].kind == CrossingPlaceKind::loop);
    CHECK(layout.places[3].name == "TRM");
    CHECK(layout.places[3].kind == CrossingPlaceKind::track_end);
    CHECK(layout.places[3].stations == std::vector<std::string>{"TRM"});

    // Tracks of the loops, from S1 (S3) onwards: F1 and F2 500 m with a starter 50 m from each
    // end, so 450 m of room either way; H1 400 m with starters 50 m from each end, 350 m either
    // way; H2 carries eastward trains only: 350 m that way, none the other.
    const CrossingPlace& fen = layout.places[1];
    REQUIRE(fen.tracks.size() == 2);
    CHECK(fen.tracks[0].track == "F1");
    CHECK_FALSE(fen.tracks[0].loop);
    CHECK(fen.tracks[1].track == "F2");
    CHECK(fen.tracks[1].loop);
    CHECK(fen.tracks[0].usable_up == Approx(450.0));
    CHECK(fen.tracks[0].usable_down == Approx(450.0));
    const CrossingPlace& hol = layout.places[2];
    REQUIRE(hol.tracks.size() == 2);
    CHECK(hol.tracks[0].usable_up == Approx(350.0));
    CHECK(hol.tracks[0].usable_down == Approx(350.0));
    CHECK(hol.tracks[1].usable_up == Approx(350.0));
    CHECK(hol.tracks[1].usable_down == 0.0);

    // Stretches: B1 from Jn to FEN; B2 from FEN to HOL; B3a and B3b (joined at the link K) from
    // HOL to TRM.  Sections by hand: B1 cut at 50, 100 and 1950 m and bounded at both ends: 4,
    // and the switch S1's at its end: 5; B2 cut at 50 and 2950 m: 3, with S2's and S3's: 5; B3a
    // cut at 50 m, its rest one section with B3b up to A3 at 750 m, then the last 50 m: 3, with
    // S4's and S5's: 5.  Loop tracks and platform tracks are no stretch.
    REQUIRE(layout.stretches.size() == 3);
    const SingleTrackStretch& s0 = layout.stretches[0];
    CHECK(s0.name == "Jn-FEN");
    CHECK(s0.segments == std::vector<std::string>{"B1"});
    CHECK(s0.lower == 0);
    CHECK(s0.upper == 1);
    CHECK(s0.x_hi == Approx(2000.0));
    CHECK(s0.sections.size() == 5);
    CHECK(s0.has_section("S1"));
    const SingleTrackStretch& s1 = layout.stretches[1];
    CHECK(s1.name == "FEN-HOL");
    CHECK(s1.lower == 1);
    CHECK(s1.upper == 2);
    CHECK(s1.sections.size() == 5);
    const SingleTrackStretch& s2 = layout.stretches[2];
    CHECK(s2.name == "HOL-TRM");
    CHECK(s2.segments == std::vector<std::string>{"B3a", "B3b"});
    CHECK(s2.x_hi == Approx(1800.0));
    CHECK(s2.sections.size() == 5);
    // Each stretch's sections belong to it alone.
    for (const std::string& id : s2.sections) CHECK(layout.stretch_of_section(id) == &s2);
}

TEST_CASE("network single track: a line with one loop and a terminus has two stretches") {
    const NetworkFile f = read_network(std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/loop_line.yaml");
    const net::NetworkGraph graph(f.network);
    const net::DetectionSections sections(graph);
    const SingleTrackLayout layout = net::single_track_layout(graph, sections);
    // By hand on loop_line.yaml's drawing: A from the boundary to the loop CBH (M both ways, N
    // eastward only), B from the loop to S3, beyond which T1 and T2 end at buffer stops (TRM).
    REQUIRE(layout.stretches.size() == 2);
    CHECK(layout.stretches[0].name == "Westmarch-CBH");
    CHECK(layout.stretches[1].name == "CBH-TRM");
    REQUIRE(layout.places.size() == 3);
    CHECK(layout.places[1].tracks.size() == 2);
    CHECK(layout.places[1].tracks[1].usable_down == 0.0);
}

TEST_CASE("network single track: the network demo's branch has three stretches and the main line none") {
    const NetworkFile f = read_network(std::string(KNOCKON_SOURCE_DIR) + "/scenarios/junction_branch.yaml");
    const net::NetworkGraph graph(f.network);
    const net::DetectionSections sections(graph);
    const SingleTrackLayout layout = net::single_track_layout(graph, sections);
    // By hand on the drawing at the top of the demo: the double track and the junction's one-way
    // connections carry one direction each; the branch runs from J3 (its two one-way legs meet
    // the main line at different switches, so J3 ends the single track) to the loop PLC, on to
    // the loop HTB and to the terminus QSB, whose platform tracks end at buffer stops.
    REQUIRE(layout.stretches.size() == 3);
    CHECK(layout.stretches[0].name == "J3-PLC");
    CHECK(layout.stretches[1].name == "PLC-HTB");
    CHECK(layout.stretches[2].name == "HTB-QSB");
    CHECK(layout.places[0].kind == CrossingPlaceKind::track_end);
    CHECK(layout.places[1].kind == CrossingPlaceKind::loop);
    CHECK(layout.places[2].kind == CrossingPlaceKind::loop);
    CHECK(layout.places[3].kind == CrossingPlaceKind::track_end);
}

TEST_CASE("network single track: the demo's doubled branch leaves one long crossing place") {
    const NetworkFile f = read_network(std::string(KNOCKON_SOURCE_DIR) + "/scenarios/junction_branch.yaml", "double_branch");
    const net::NetworkGraph graph(f.network);
    const net::DetectionSections sections(graph);
    const SingleTrackLayout layout = net::single_track_layout(graph, sections);
    // By hand: with BR2b beside BR2 and both joined by links to the loops' tracks, the tracks from
    // S1 meet again only at S4: one place from PLC to HTB (named after PLC, its first station),
    // so the branch has two stretches left.
    REQUIRE(layout.stretches.size() == 2);
    CHECK(layout.stretches[0].name == "J3-PLC");
    CHECK(layout.stretches[1].name == "PLC-QSB");
    const CrossingPlace& both = layout.places[1];
    CHECK(both.kind == CrossingPlaceKind::loop);
    CHECK(both.stations == std::vector<std::string>{"PLC", "HTB"});
    REQUIRE(both.tracks.size() == 2);
    CHECK(both.tracks[0].track == "L1a+BR2+L2a");
    CHECK(both.tracks[1].track == "L1b+BR2b+L2b");
}
