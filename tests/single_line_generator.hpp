#pragma once
// A seeded generator of random single lines with traffic both ways, for the dispatcher's property
// test: a single track between two terminal stations with 2-4 crossing loops, trains each way at
// random times (so the timetable itself may not work: the day must sort it out), down trains in
// the loops where they call with a track, up trains on the main track, some passing, some
// entering or leaving over the line ends, and drawn primary delays.  Unlike layout_generator.hpp
// nothing keeps the trains apart: opposing trains meet wherever their delays bring them.
#include <cmath>
#include <string>
#include <vector>

#include "layout_generator.hpp"

namespace knockon::layoutgen {

inline Layout random_single_line(std::uint64_t seed) {
    Rng rng(seed ^ 0x51D6u);
    Layout out;
    const int loops = 2 + rng.pick(3);
    const double spacing = std::round(rng.uniform(6000.0, 11000.0) / 10.0) * 10.0;
    const double L = spacing * (loops + 1);
    const double line_speed = 80.0 + 10.0 * rng.pick(5);
    const char* systems[] = {"two_aspect", "three_aspect", "four_aspect"};
    const std::string system = systems[rng.pick(3)];

    std::string tracks = "    - {id: S, from: 0 km, to: " + km(L) + ", directions: both}\n";
    std::string stations = "    - {id: E0, name: West end, at: 0.5 km}\n    - {id: EN, name: East end, at: " +
                           km(L - 500.0) + "}\n";
    std::string signals;
    int sig = 0;
    auto signal = [&](const std::string& track, double x, bool up, const std::string& extra = {}) {
        signals += "    - {id: G" + std::to_string(++sig) + ", track: " + track + ", at: " + km(x) +
                   ", direction: " + (up ? "up" : "down") + extra + "}\n";
    };
    // Line ends: the exit signals beyond the terminal platforms, the starters out of them.
    signal("S", 100.0, false, ", overlap: 50 m");
    signal("S", 900.0, true, ", overlap: 100 m");
    signal("S", L - 900.0, false, ", overlap: 100 m");
    signal("S", L - 100.0, true, ", overlap: 50 m");
    std::vector<double> centre(static_cast<std::size_t>(loops));
    std::vector<double> half(static_cast<std::size_t>(loops));
    for (int k = 0; k < loops; ++k) {
        const double c = std::round((spacing * (k + 1) + rng.uniform(-800.0, 800.0)) / 10.0) * 10.0;
        const double h = std::round(rng.uniform(400.0, 600.0) / 10.0) * 10.0;
        centre[static_cast<std::size_t>(k)] = c;
        half[static_cast<std::size_t>(k)] = h;
        const std::string loop = "L" + std::to_string(k + 1), place = "P" + std::to_string(k + 1);
        tracks += "    - {id: " + loop + ", parent: S, from: " + km(c - h) + ", to: " + km(c + h) +
                  ", directions: both, speed_limit: " + std::to_string(40 + 10 * rng.pick(3)) + " km/h}\n";
        stations += "    - {id: " + place + ", name: Place " + std::to_string(k + 1) + ", at: " + km(c) + "}\n";
        const double home = rng.uniform(300.0, 700.0);
        signal("S", c - h - home, true);
        signal("S", c + h - 150.0, true, ", overlap: 100 m");
        signal(loop, c + h - 150.0, true, ", overlap: 100 m");
        signal("S", c + h + home, false);
        signal("S", c - h + 150.0, false, ", overlap: 100 m");
        signal(loop, c - h + 150.0, false, ", overlap: 100 m");
    }
    // A block signal each way halfway between neighbouring places, on some stretches.
    for (int k = 0; k <= loops; ++k) {
        if (!rng.chance(0.5)) continue;
        const double a = k == 0 ? 0.0 : centre[static_cast<std::size_t>(k - 1)];
        const double b = k == loops ? L : centre[static_cast<std::size_t>(k)];
        const double m = std::round(0.5 * (a + b) / 10.0) * 10.0;
        signal("S", m - 100.0, true);
        signal("S", m + 100.0, false);
    }

    std::string services;
    int id = 0;
    auto service = [&](bool up, double start) {
        const bool freight = rng.chance(0.25);
        const bool edge = rng.chance(0.3);
        std::string s = "    - id: " + std::string(up ? "U" : "D") + std::to_string(++id) + "\n      type: " +
                        (freight ? "FRT" : "DMU") + "\n      category: " + (freight ? "freight" : "stopping") +
                        "\n      direction: " + (up ? "up" : "down") + "\n" +
                        (edge ? "      enter: {}\n      leave: true\n" : "") + "      calls:\n";
        const std::string first = up ? "E0" : "EN", last = up ? "EN" : "E0";
        s += "        - {station: " + first + (edge ? ", pass: " : ", dep: ") + clock(start) + "}\n";
        for (int j = 0; j < loops; ++j) {
            const int k = up ? j : loops - 1 - j;
            const std::string place = "P" + std::to_string(k + 1);
            const bool stops = !freight && rng.chance(0.7);
            // Down trains call in the loop; a few run through on the main track, where no
            // opposing train can pass them.
            const bool in_loop = !up && rng.chance(0.85);
            s += "        - {station: " + place + (stops ? "" : ", pass: auto") +
                 (in_loop ? ", track: L" + std::to_string(k + 1) : "") + "}\n";
        }
        s += "        - {station: " + last + (edge ? ", pass: auto" : "") + "}\n";
        services += s;
    };
    const int ups = 3 + rng.pick(4), downs = 3 + rng.pick(4);
    double t = 6 * 3600.0;
    for (int i = 0; i < ups; ++i) service(true, t += rng.uniform(900.0, 2700.0));
    t = 6 * 3600.0 + rng.uniform(0.0, 1800.0);
    for (int i = 0; i < downs; ++i) service(false, t += rng.uniform(900.0, 2700.0));

    out.yaml = "knockon: 1\nname: random single line " + std::to_string(seed) +
               " (invented)\nline_type: mixed\ninfrastructure:\n  length: " + km(L) +
               "\n  speed_limits:\n    - {from: 0 km, value: " + std::to_string(static_cast<int>(line_speed)) +
               " km/h}\n  tracks:\n" + tracks + "  stations:\n" + stations +
               "  signalling:\n    areas:\n      - {from: 0 km, to: " + km(L) + ", system: " + system +
               "}\n    defaults: {sighting_distance: 250 m, overlap: 200 m, distant_distance: 1000 m}\n"
               "    interlocking: {route_setup: 10 s, release: 4 s, sight_reaction: 12 s}\n  signals:\n" +
               signals +
               "train_types:\n"
               "  - {id: DMU, length: 60 m, mass: 110 t, rotating_mass_factor: 1.08, max_speed: 110 km/h,\n"
               "     traction: {max_force: 70 kN, power: 0.7 MW},\n"
               "     resistance: {a: 1.6 kN, b: 20 N/(m/s), c: 3 N/(m/s)2},\n"
               "     braking: {deceleration: 0.7 m/s2, delay: 2 s}, min_dwell: 30 s}\n"
               "  - {id: FRT, length: 350 m, mass: 900 t, rotating_mass_factor: 1.06, max_speed: 80 km/h,\n"
               "     traction: {max_force: 250 kN, power: 2 MW, adhesion_mass: 120 t},\n"
               "     resistance: {a: 9 kN, b: 90 N/(m/s), c: 7 N/(m/s)2},\n"
               "     braking: {deceleration: 0.3 m/s2, delay: 6 s}, min_dwell: 1 min}\n"
               "timetable:\n  rounding: 30 s\n  services:\n" +
               services +
               "delays:\n  entry:\n"
               "    - {probability: 50 %, distribution: exponential, mean: 8 min}\n"
               "  dwell:\n    - {category: stopping, probability: 20 %, distribution: exponential, mean: 2 min}\n";
    out.summary = std::to_string(loops) + " loops " + std::to_string(static_cast<int>(spacing)) + " m apart, " +
                  system + ", " + std::to_string(ups) + " up and " + std::to_string(downs) + " down trains";
    return out;
}

}  // namespace knockon::layoutgen
