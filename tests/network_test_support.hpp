#pragma once
// Small networks drawn by hand for the network tests, built in code, and a terse builder for them.
// Each layout says what was drawn; the tests beside their checks say what was counted by hand.
#include <string>
#include <vector>

#include "models/network/network.hpp"

namespace knockon::test {

using net::End;
using net::EndRef;
using net::Heading;
using net::NodeKind;

struct NetBuilder {
    net::Network n;

    std::size_t segment(const std::string& name, double length, bool forward = true, bool backward = true) {
        net::Segment s;
        s.name = name;
        s.length = length;
        s.forward = forward;
        s.backward = backward;
        n.segments.push_back(s);
        return n.segments.size() - 1;
    }
    EndRef start(const std::string& seg) const { return {n.find_segment(seg), End::start}; }
    EndRef end(const std::string& seg) const { return {n.find_segment(seg), End::end}; }
    void node(const std::string& name, NodeKind kind, std::vector<EndRef> ends, double fouling = 0.0) {
        net::Node nd;
        nd.name = name;
        nd.kind = kind;
        nd.fouling = fouling;
        for (const EndRef& e : ends) nd.ends.push_back({e, net::kNoLimit});
        n.nodes.push_back(nd);
    }
    void signal(const std::string& name, const std::string& seg, double offset, Heading h, double overlap = 0.0) {
        net::Signal s;
        s.name = name;
        s.at = {n.find_segment(seg), offset};
        s.heading = h;
        s.overlap = overlap;
        n.signals.push_back(s);
    }
    void station(const std::string& id, std::vector<std::pair<std::string, double>> places) {
        n.stations.push_back({id, id});
        for (const auto& [seg, offset] : places) n.timing_points.push_back({n.stations.size() - 1, {n.find_segment(seg), offset}});
    }
};

// Flat junction, single lead: a branch track J joins the main track M by one switch W.
//
//   M1 (1000 m) ---S1@500-->  W  --> M2 (1000 m) --S2@400 (overlap 100 m)-->|boundary Me
//   J  ( 800 m) ---SJ@600--/
//
// Trains run forward only.  W: toe at M2's start, legs M1's end (straight) and J's end (diverging),
// fouling points 30 m out on each leg.  Boundaries at the starts of M1 and J and the end of M2.
inline net::Network flat_junction() {
    NetBuilder b;
    b.segment("M1", 1000, true, false);
    b.segment("M2", 1000, true, false);
    b.segment("J", 800, true, false);
    b.node("Mw", NodeKind::boundary, {b.start("M1")});
    b.node("Jw", NodeKind::boundary, {b.start("J")});
    b.node("Me", NodeKind::boundary, {b.end("M2")});
    b.node("W", NodeKind::switch_, {b.start("M2"), b.end("M1"), b.end("J")}, 30);
    b.signal("S1", "M1", 500, Heading::forward);
    b.signal("SJ", "J", 600, Heading::forward);
    b.signal("S2", "M2", 400, Heading::forward, 100);
    b.station("MS", {{"M2", 200}});
    b.station("JS", {{"J", 300}});
    return b.n;
}

// Crossover: track A (forward only) and track B (both ways), joined by crossover C (both ways)
// from switch WA on A to switch WB on B.
//
//   A1 (400) -PA@100-SA@300(overlap 150)-> WA --> A2 (600) --TA@500-->|Ae
//                                            \C (200)
//   B1 (600) <------------------------------- WB <-- B2 (400) <-RB@200-- --TB@300-->|Be
//
// WA: toe A1's end, legs A2's start and C's start; WB: toe B2's start, legs B1's end and C's end;
// fouling points 25 m out on every leg.  Boundaries at the starts of A1 and B1, the ends of A2
// and B2.  RB faces trains running backward on B.
inline net::Network crossover() {
    NetBuilder b;
    b.segment("A1", 400, true, false);
    b.segment("A2", 600, true, false);
    b.segment("B1", 600);
    b.segment("B2", 400);
    b.segment("C", 200);
    b.node("Aw", NodeKind::boundary, {b.start("A1")});
    b.node("Ae", NodeKind::boundary, {b.end("A2")});
    b.node("Bw", NodeKind::boundary, {b.start("B1")});
    b.node("Be", NodeKind::boundary, {b.end("B2")});
    b.node("WA", NodeKind::switch_, {b.end("A1"), b.start("A2"), b.start("C")}, 25);
    b.node("WB", NodeKind::switch_, {b.start("B2"), b.end("B1"), b.end("C")}, 25);
    b.signal("PA", "A1", 100, Heading::forward);
    b.signal("SA", "A1", 300, Heading::forward, 150);
    b.signal("TA", "A2", 500, Heading::forward);
    b.signal("TB", "B2", 300, Heading::forward);
    b.signal("RB", "B2", 200, Heading::backward);
    return b.n;
}

// Double junction at grade: a double-track branch leaves a double-track main line.  Up trains
// run forward, down trains backward on the main; on the branch BU carries trains towards the
// junction, BD away from it.  Trains from the main down track to the branch cross the up main
// on diamond K.
//
//   up main:   Uw| U1a (900) -S1@500-> K -U1b (100)-> W1 --> U2 (1000) -S2@500-> |Ue
//   branch up: BU (1000) -B1@900-> W1
//   down main: Dw| <- D1 (1000, S4@500) <- W2 <- D2 (1000, S3@500) <- |De   (running backward)
//   to branch: W2 -> Xa (60) -> K -> BD (1000) -B2@500-> |BDw
//
// W1: toe U2's start, legs U1b's end and BU's end.  W2: toe D2's start (down trains reach it
// first), legs D1's end and Xa's start.  K: U1a's end to U1b's start one way, Xa's end to BD's
// start the other.  Fouling 30 m at W1 and W2, 20 m at K.
inline net::Network double_junction() {
    NetBuilder b;
    b.segment("U1a", 900, true, false);
    b.segment("U1b", 100, true, false);
    b.segment("U2", 1000, true, false);
    b.segment("D1", 1000, false, true);
    b.segment("D2", 1000, false, true);
    b.segment("BU", 1000, true, false);
    b.segment("Xa", 60, true, false);
    b.segment("BD", 1000, true, false);
    b.node("Uw", NodeKind::boundary, {b.start("U1a")});
    b.node("Ue", NodeKind::boundary, {b.end("U2")});
    b.node("Dw", NodeKind::boundary, {b.start("D1")});
    b.node("De", NodeKind::boundary, {b.end("D2")});
    b.node("BUw", NodeKind::boundary, {b.start("BU")});
    b.node("BDw", NodeKind::boundary, {b.end("BD")});
    b.node("K", NodeKind::diamond, {b.end("U1a"), b.start("U1b"), b.end("Xa"), b.start("BD")}, 20);
    b.node("W1", NodeKind::switch_, {b.start("U2"), b.end("U1b"), b.end("BU")}, 30);
    b.node("W2", NodeKind::switch_, {b.start("D2"), b.end("D1"), b.start("Xa")}, 30);
    b.signal("S1", "U1a", 500, Heading::forward);
    b.signal("S2", "U2", 500, Heading::forward);
    b.signal("B1", "BU", 900, Heading::forward);
    b.signal("S3", "D2", 500, Heading::backward);
    b.signal("S4", "D1", 500, Heading::backward);
    b.signal("B2", "BD", 500, Heading::forward);
    return b.n;
}

// Terminus: a single line L (both ways) ends at switch W, whose legs are platform tracks P1 and
// P2 (300 m each, both ways) ending at buffer stops.
//
//   |Lw -- L (1000) --E@100--> --H@800--> W ==> P1: <-X1@40-- ... stop 250 ...|BS1
//                                            ==> P2: <-X2@40-- ... stop 250 ...|BS2
//
// W: toe L's end, legs P1's start and P2's start, fouling 30 m.  Station T has a timing point
// 250 m along each platform track.
inline net::Network terminus() {
    NetBuilder b;
    b.segment("L", 1000);
    b.segment("P1", 300);
    b.segment("P2", 300);
    b.node("Lw", NodeKind::boundary, {b.start("L")});
    b.node("W", NodeKind::switch_, {b.end("L"), b.start("P1"), b.start("P2")}, 30);
    b.node("BS1", NodeKind::buffer_stop, {b.end("P1")});
    b.node("BS2", NodeKind::buffer_stop, {b.end("P2")});
    b.signal("E", "L", 100, Heading::forward);
    b.signal("H", "L", 800, Heading::forward);
    b.signal("X1", "P1", 40, Heading::backward);
    b.signal("X2", "P2", 40, Heading::backward);
    b.station("T", {{"P1", 250}, {"P2", 250}});
    b.station("Lx", {{"L", 500}});
    return b.n;
}

// Passing loop: A and B joined through a station with a main track M (400 m) and a loop P
// (450 m) between switches W1 and W2 (no fouling distance).  Trains run forward only.
//
//   |Aw -- A (500) -- W1 == M (400) == W2 -- B (500) --|Be     station X: M@200 and P@200
//                        \= P (450) =/                          Z: A@100, Y: B@250
inline net::Network passing_loop() {
    NetBuilder b;
    b.segment("A", 500, true, false);
    b.segment("M", 400, true, false);
    b.segment("P", 450, true, false);
    b.segment("B", 500, true, false);
    b.node("Aw", NodeKind::boundary, {b.start("A")});
    b.node("Be", NodeKind::boundary, {b.end("B")});
    b.node("W1", NodeKind::switch_, {b.end("A"), b.start("M"), b.start("P")});
    b.node("W2", NodeKind::switch_, {b.start("B"), b.end("M"), b.end("P")});
    b.signal("SA", "A", 400, Heading::forward);
    b.station("X", {{"M", 200}, {"P", 200}});
    b.station("Z", {{"A", 100}});
    b.station("Y", {{"B", 250}});
    return b.n;
}

}  // namespace knockon::test
