#pragma once
// A seeded generator of random small networks for the property tests, as network files
// (`knockon: 2`): a double-track main line with a flat junction where a single-track branch
// leaves the up line, crosses the down line on a diamond and joins the down line again on its
// way back, and a terminus of two platform tracks at buffer stops where branch trains turn back.
// What varies: every length, the aspect system, block lengths, sighting distances, the overlap
// of the terminus's home signal, line speeds, where the stations stand, which platform each
// branch train turns on and for how long, and when every train runs.  Whether a case keeps the
// spacing rule and whether its timetable is free of conflicts is left to the plan (the caller
// sets such cases aside).
//
//  WU |--U1 (ST)--J1------U2 (EA)--| EU              U, C1a, C1b: forward only
//                  \C1a                               D, C2: backward only
//  WD |--D1 (ST)----X--D2--J2--D3 (EA)--| ED          B, P1, P2: both ways
//                    \C1b  /C2
//                     J3---B---S5--P1--| QP1   (TRM)
//                               \--P2--| QP2
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "layout_generator.hpp"

namespace knockon::netgen {

using layoutgen::Layout;
using layoutgen::Rng;

inline std::string m(double metres) { return std::to_string(std::lround(metres)) + " m"; }

// Whole minutes after midnight as a quoted clock time.
inline std::string at_minute(double minutes) { return layoutgen::clock(60.0 * std::round(minutes)); }

inline Layout random_network(std::uint64_t seed) {
    Rng rng(seed);
    Layout out;
    auto round10 = [](double x) { return std::round(x / 10.0) * 10.0; };
    const char* systems[] = {"three_aspect", "four_aspect", "cab_fixed_block"};
    const int sys = rng.pick(3);
    const std::string system = systems[sys];
    const double sighting = std::round(rng.uniform(200.0, 500.0));
    const double main_kmh = 100.0 + 20.0 * rng.pick(3);   // 100-140 km/h
    const double branch_kmh = 60.0 + 10.0 * rng.pick(4);  // 60-90 km/h
    // Braking distances the blocks are drawn against (the types below: 0.8 and 0.7 m/s2, 2 s).
    auto braking = [](double kmh, double decel) { const double v = kmh / 3.6; return v * v / (2.0 * decel) + 2.0 * v + 50.0; };
    const double factor_lo = sys == 0 ? 1.0 : sys == 1 ? 0.55 : 0.4, factor_hi = sys == 0 ? 1.4 : sys == 1 ? 0.9 : 1.0;
    auto main_block = [&] { return round10(braking(main_kmh, 0.8) * rng.uniform(factor_lo, factor_hi)); };
    auto branch_block = [&] { return round10(braking(branch_kmh, 0.7) * rng.uniform(factor_lo, factor_hi)); };

    const double u1 = round10(rng.uniform(3000.0, 6000.0)), u2 = round10(rng.uniform(2500.0, 5000.0));
    const double d1 = u1 + 100.0, d3 = round10(rng.uniform(2500.0, 5000.0));
    const double b = round10(rng.uniform(2500.0, 7000.0));
    const double p1 = round10(rng.uniform(220.0, 400.0)), p2 = round10(rng.uniform(220.0, 400.0));
    const double home_overlap = rng.pick(2) * 50.0;   // the terminus's home signal: 0 or 50 m

    std::string y;
    y += "knockon: 2\nname: Random network " + std::to_string(seed) + "\nnetwork:\n";
    y += "  signalling:\n    system: " + system + "\n";
    y += "    defaults: {sighting_distance: " + m(sighting) + ", overlap: 100 m}\n";
    y += "    interlocking: {route_setup: 8 s, release: 4 s, sight_reaction: 12 s}\n";
    y += "  segments:\n";
    auto segment = [&](const std::string& id, double length, const char* dirs, double kmh) {
        y += "    - {id: " + id + ", length: " + m(length) + ", directions: " + dirs +
             ", speed_limits: [{from: 0 m, value: " + std::to_string(std::lround(kmh)) + " km/h}]}\n";
    };
    segment("U1", u1, "forward", main_kmh);
    segment("U2", u2, "forward", main_kmh);
    segment("D1", d1, "backward", main_kmh);
    segment("D2", 200.0, "backward", main_kmh);
    segment("D3", d3, "backward", main_kmh);
    segment("C1a", 150.0, "forward", 50.0);
    segment("C1b", 250.0, "forward", 50.0);
    segment("C2", 300.0, "backward", 50.0);
    segment("B", b, "both", branch_kmh);
    segment("P1", p1, "both", 30.0);
    segment("P2", p2, "both", 30.0);
    y += "  nodes:\n";
    y += "    - {id: WU, kind: boundary, ends: [U1.start]}\n";
    y += "    - {id: WD, kind: boundary, ends: [D1.start]}\n";
    y += "    - {id: EU, kind: boundary, ends: [U2.end]}\n";
    y += "    - {id: ED, kind: boundary, ends: [D3.end]}\n";
    y += "    - {id: J1, kind: switch, ends: [U1.end, U2.start, {end: C1a.start, speed: 50 km/h}], fouling: 30 m}\n";
    y += "    - {id: X, kind: diamond, ends: [D1.end, D2.start, C1a.end, C1b.start], fouling: 30 m}\n";
    y += "    - {id: J2, kind: switch, ends: [D2.end, D3.start, {end: C2.start, speed: 50 km/h}], fouling: 30 m}\n";
    y += "    - {id: J3, kind: switch, ends: [B.start, C1b.end, C2.end], fouling: 30 m}\n";
    y += "    - {id: S5, kind: switch, ends: [B.end, P1.start, {end: P2.start, speed: 30 km/h}], fouling: 30 m}\n";
    y += "    - {id: QP1, kind: buffer_stop, ends: [P1.end]}\n";
    y += "    - {id: QP2, kind: buffer_stop, ends: [P2.end]}\n";

    y += "  signals:\n";
    int n = 0;
    auto signal = [&](const std::string& seg, double at, const char* heading, const std::string& extra = "") {
        y += "    - {id: G" + std::to_string(++n) + ", segment: " + seg + ", at: " + m(at) + ", heading: " + heading +
             extra + "}\n";
    };
    // Up line: a home 100 m before J1, blocks back from it; beyond J1 blocks on from it.
    std::vector<double> up1;
    for (double x = u1 - 100.0; x >= 300.0; x -= main_block()) up1.push_back(x);
    for (auto it = up1.rbegin(); it != up1.rend(); ++it) signal("U1", *it, "forward");
    for (double x = std::max(200.0, main_block() - 100.0); x <= u2 - 300.0; x += main_block()) signal("U2", x, "forward");
    // Down line: blocks from near ED down to the signal protecting J2 and X, one 100 m past X,
    // and blocks on along D1.
    const double d_junction = std::max(100.0, main_block() - 300.0);
    std::vector<double> down3;
    for (double x = d_junction; x <= d3 - 300.0; x += main_block()) down3.push_back(x);
    for (auto it = down3.rbegin(); it != down3.rend(); ++it) signal("D3", *it, "backward");
    for (double x = d1 - 100.0; x >= 200.0; x -= main_block()) signal("D1", x, "backward");
    // Branch, towards the terminus: a home before S5, blocks back from it.
    std::vector<double> out_b;
    for (double x = b - round10(rng.uniform(100.0, 300.0)); x >= 200.0; x -= branch_block()) out_b.push_back(x);
    for (std::size_t k = out_b.size(); k-- > 0;)
        signal("B", out_b[k], "forward", k == 0 ? ", overlap: " + m(home_overlap) : std::string());
    // Branch, back towards the junction: the platform starters, blocks along B down to the
    // signal protecting J3, and one on C2 protecting J2.
    signal("P1", 40.0, "backward");
    signal("P2", 40.0, "backward");
    const double b_exit = round10(rng.uniform(400.0, 700.0));
    for (double x = b_exit; x <= b - 200.0; x += branch_block()) signal("B", x, "backward");
    signal("C2", 200.0, "backward", ", overlap: 50 m");

    const double st = round10(u1 * rng.uniform(0.35, 0.6));
    const double ea = round10(std::min(u2, d3) - 500.0);
    y += "  stations:\n";
    y += "    - {id: ST, name: Stanmoor, tracks: [{segment: U1, at: " + m(st) + "}, {segment: D1, at: " + m(st) + "}]}\n";
    y += "    - {id: EA, name: Eastly, tracks: [{segment: U2, at: " + m(ea) + "}, {segment: D3, at: " + m(ea) + "}]}\n";
    y += "    - {id: TRM, name: Tormouth, tracks: [{segment: P1, at: " + m(std::min(150.0, p1 - 60.0)) +
         "}, {segment: P2, at: " + m(std::min(150.0, p2 - 60.0)) + "}]}\n";

    y += R"(
train_types:
  - id: EMU
    length: 120 m
    mass: 240 t
    rotating_mass_factor: 1.08
    max_speed: 140 km/h
    traction: {max_force: 200 kN, power: 2.6 MW}
    resistance: {a: 2.6 kN, b: 32 N/(m/s), c: 6 N/(m/s)2}
    braking: {deceleration: 0.8 m/s2, delay: 2 s}
    min_dwell: 40 s
  - id: DMU
    length: 45 m
    mass: 90 t
    rotating_mass_factor: 1.08
    max_speed: 100 km/h
    traction: {max_force: 60 kN, power: 450 kW}
    resistance: {a: 1.2 kN, b: 15 N/(m/s), c: 3 N/(m/s)2}
    braking: {deceleration: 0.7 m/s2, delay: 2 s}
    min_dwell: 30 s

timetable:
  services:
)";
    // Main-line trains each way, an hour apart from each other in each direction, entering at
    // speed; each stops at ST or passes it.
    const double start = 360.0;   // 06:00
    for (int k = 0; k < 2; ++k) {
        const double t_up = start + 60.0 * k + rng.uniform(0.0, 20.0);
        y += "    - id: UP" + std::to_string(k) + "\n      type: EMU\n      enter: {at: WU, speed: " +
             std::to_string(std::lround(main_kmh * 0.8)) + " km/h}\n      leave: EU\n      calls:\n";
        if (rng.chance(0.5)) y += "        - {station: ST, arr: " + at_minute(t_up) + ", dep: " + at_minute(t_up + 1.0) + "}\n";
        else y += "        - {station: ST, pass: " + at_minute(t_up) + "}\n";
        y += "        - {station: EA, pass: auto}\n";
        const double t_dn = start + 60.0 * k + rng.uniform(0.0, 50.0);
        y += "    - id: DN" + std::to_string(k) + "\n      type: EMU\n      enter: {at: ED, speed: " +
             std::to_string(std::lround(main_kmh * 0.8)) + " km/h}\n      leave: WD\n      calls:\n";
        y += "        - {station: EA, pass: " + at_minute(t_dn) + "}\n";
        y += rng.chance(0.5) ? "        - {station: ST}\n" : "        - {station: ST, pass: auto}\n";
    }
    // Branch trains from ST out to the terminus and back, turning on a platform: one, or two
    // where the second comes in on the other platform while the first stands.
    const int branch_trains = 1 + rng.pick(2);
    const double t_b = start + 25.0 + rng.uniform(0.0, 10.0);
    const double out_run = 8.0 + (b + u1 - st) / 1000.0 * 0.8;   // generous running time [min]
    // (the first leaves the terminus once the second is in, the second once the first is back)
    const double back = t_b + out_run + (branch_trains - 1) * (out_run + 3.0) + rng.uniform(4.0, 12.0);
    for (int k = 0; k < branch_trains; ++k) {
        y += "    - id: BR" + std::to_string(k) + "\n      type: DMU\n      calls:\n";
        y += "        - {station: ST, track: U1, dep: " + at_minute(t_b + k * (out_run + 3.0)) + "}\n";
        y += "        - {station: TRM, track: " + std::string(k % 2 ? "P2" : "P1") + ", reverses: true, min_turnaround: " +
             std::to_string(3 + rng.pick(2)) + " min, dep: " + at_minute(back + k * (out_run + 3.0)) + "}\n";
        y += "        - {station: ST, track: D1}\n";
    }
    out.yaml = y;
    out.summary = system + ", main " + std::to_string(std::lround(main_kmh)) + " km/h, branch " +
                  std::to_string(std::lround(branch_kmh)) + " km/h " + m(b) + ", " + std::to_string(branch_trains) +
                  " branch train(s), home overlap " + m(home_overlap);
    return out;
}

}  // namespace knockon::netgen
