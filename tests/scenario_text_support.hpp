#pragma once
// Shared by the tests that write small scenarios inline (sim_test_support.hpp, test_supplement.cpp):
// the YAML text of a level, single-track up line and of the electric multiple unit they run.
#include <string>
#include <vector>

namespace knockon::scenariotext {

// A level up line with one track U from 0 km to `length`, 120 km/h throughout and one aspect
// system end to end; the caller writes its signals next (the text ends with "  signals:\n"),
// then the train types and the timetable.
struct UpLine {
    std::string name;
    std::string length = "12 km";
    std::vector<std::string> stations;  // flow maps: {id: S, name: ..., at: 1 km}
    std::string system = "three_aspect";
    std::string overlap = "200 m";
    std::string distant_distance = "1200 m";  // "" leaves the default
};

inline std::string up_line_head(const UpLine& line) {
    std::string y = "knockon: 1\nname: " + line.name + "\nline_type: suburban"
                    "\ninfrastructure:\n  length: " + line.length +
                    "\n  gradients: [{from: 0 km, value: 0 per mille}]"
                    "\n  speed_limits: [{from: 0 km, value: 120 km/h}]"
                    "\n  tracks: [{id: U, from: 0 km, to: " + line.length + ", directions: up}]"
                    "\n  stations:\n";
    for (const std::string& s : line.stations) y += "    - " + s + "\n";
    y += "  signalling:\n    areas: [{from: 0 km, to: " + line.length + ", system: " + line.system + "}]\n";
    y += "    defaults: {sighting_distance: 300 m, overlap: " + line.overlap;
    if (!line.distant_distance.empty()) y += ", distant_distance: " + line.distant_distance;
    y += "}\n    interlocking: {route_setup: 6 s, release: 3 s, sight_reaction: 12 s}\n  signals:\n";
    return y;
}

// The `train_types:` section with one electric multiple unit `id` (100 m, 200 t, 120 km/h) and
// its running-time supplement rule (a YAML flow map).
inline std::string emu_train_types(const std::string& id, const std::string& supplement) {
    return "train_types:\n  - id: " + id + R"(
    length: 100 m
    mass: 200 t
    rotating_mass_factor: 1.08
    max_speed: 120 km/h
    traction: {max_force: 200 kN, power: 2 MW}
    resistance: {a: 2 kN, b: 20 N/(m/s), c: 5 N/(m/s)2}
    braking: {deceleration: 0.8 m/s2, delay: 2 s}
    min_dwell: 30 s
    supplement: )" + supplement + "\n";
}

}  // namespace knockon::scenariotext
