// Scenario reader: a valid file gives the right SI model; each kind of mistake is reported with
// file:line:col and the field path, and all mistakes of a file are reported together.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cstdint>
#include <string>
#include <vector>

#include "models/units.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;
using Catch::Matchers::Contains;

namespace {

// A small invented line: 10 km double track, a loop U2 at BB, three stations.
const std::string kValid = R"(knockon: 1
name: Test line
line_type: suburban
infrastructure:
  length: 10 km
  gradients:
    - {from: 0 km, value: 0 per mille}
    - {from: 4 km, value: 6 per mille}
  speed_limits:
    - {from: 0 km, value: 100 km/h}
    - {from: 2 km, value: 160 km/h}
  tracks:
    - {id: U, from: 0 km, to: 10 km, directions: up}
    - {id: D, from: 0 km, to: 10 km, directions: down}
    - {id: U2, parent: U, from: 4.5 km, to: 5.5 km, directions: up, speed_limit: 60 km/h}
  stations:
    - {id: AA, name: Alpha, at: 0.5 km}
    - {id: BB, name: Beta, at: 5 km}
    - {id: CC, at: 9.5 km}
  signalling:
    areas:
      - {from: 0 km, to: 6 km, system: three_aspect}
      - {from: 6 km, to: 10 km, system: four_aspect}
    defaults: {sighting_distance: 300 m, overlap: 200 m}
    interlocking: {route_setup: 8 s}
  signals:
    - {id: U01, track: U, at: 0.7 km, direction: up}
    - {id: U02, track: U, at: 3 km, direction: up, overlap: 150 m}
    - {id: U03, track: U2, at: 5.4 km, direction: up}
    - {id: D01, track: D, at: 9.3 km, direction: down}
    - {id: D02, track: D, at: 5 km, direction: down}
  joints:
    - {track: U, at: 6.5 km}
train_types:
  - id: EMU
    length: 100 m
    mass: 200 t
    rotating_mass_factor: 1.08
    max_speed: 140 km/h
    traction: {max_force: 180 kN, power: 2 MW}
    resistance: {a: 2.4 kN, b: 30 N/(m/s), c: 6.5 N/(m/s)2}
    braking: {deceleration: 0.8 m/s2, delay: 2 s}
    performance: 95 %
    min_dwell: 40 s
    supplement: {percent: 5 %, per_100km: 1 min, threshold: 30 km}
  - id: LOCO
    length: 300 m
    mass: 1200 t
    max_speed: 100 km/h
    traction:
      table: [[0 km/h, 300 kN], [50 km/h, 250 kN], [100 km/h, 120 kN]]
    resistance: {a: 10 kN}
    braking:
      deceleration: [[0 km/h, 0.5 m/s2], [100 km/h, 0.4 m/s2]]
timetable:
  rounding: 60 s
  services:
    - id: S1
      type: EMU
      category: stopping
      direction: up
      calls:
        - {station: AA, dep: "06:00"}
        - {station: BB, arr: "06:05", dep: "06:06", track: U2, min_dwell: 45 s}
        - {station: CC}
    - id: G1
      type: LOCO
      direction: down
      enter: {speed: 80 km/h}
      leave: true
      calls:
        - {station: CC, pass: "07:00"}
        - {station: BB, pass: auto}
        - {station: AA, pass: auto}
)";

// kValid with the first occurrence of `from` replaced by `to` (which must be there).
std::string with(const std::string& from, const std::string& to, std::string text = kValid) {
    const auto pos = text.find(from);
    REQUIRE(pos != std::string::npos);
    text.replace(pos, from.size(), to);
    return text;
}

// "line:col" (1-based) of the n-th occurrence of `needle` in `text`: where an error about the
// node written there must point.
std::string loc(const std::string& text, const std::string& needle, int nth = 0) {
    std::size_t pos = text.find(needle);
    for (int i = 0; i < nth && pos != std::string::npos; ++i) pos = text.find(needle, pos + 1);
    REQUIRE(pos != std::string::npos);
    int line = 1, col = 1;
    for (std::size_t i = 0; i < pos; ++i) {
        if (text[i] == '\n') {
            ++line;
            col = 1;
        } else {
            ++col;
        }
    }
    return std::to_string(line) + ":" + std::to_string(col);
}

// "line:col" of the first `needle` after the first `anchor`.
std::string loc_in(const std::string& text, const std::string& anchor, const std::string& needle) {
    const std::size_t a = text.find(anchor);
    REQUIRE(a != std::string::npos);
    const std::size_t pos = text.find(needle, a);
    REQUIRE(pos != std::string::npos);
    const std::string upto = text.substr(0, pos);
    const auto line = 1 + std::count(upto.begin(), upto.end(), '\n');
    const auto col = pos - (upto.rfind('\n') == std::string::npos ? std::size_t(-1) : upto.rfind('\n'));
    return std::to_string(line) + ":" + std::to_string(col);
}

// The messages of a scenario that must fail.
std::vector<std::string> errors_of(const std::string& text) {
    try {
        parse_scenario(text, "t.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    FAIL("the scenario was accepted");
    return {};
}

// True when one message is exactly "t.yaml:<where>: <path>: " followed by text containing `what`.
bool reported(const std::vector<std::string>& msgs, const std::string& where,
              const std::string& path, const std::string& what) {
    const std::string head = "t.yaml:" + where + ": " + path + ": ";
    for (const auto& m : msgs)
        if (m.rfind(head, 0) == 0 && m.find(what, head.size()) != std::string::npos) return true;
    return false;
}

std::string all(const std::vector<std::string>& msgs) {
    std::string out;
    for (const auto& m : msgs) out += m + "\n";
    return out;
}

}  // namespace

TEST_CASE("a valid scenario reads into SI values", "[reader]") {
    const Scenario s = parse_scenario(kValid, "t.yaml");
    CHECK(s.name == "Test line");
    CHECK(s.source_file == "t.yaml");
    CHECK(s.line_type == LineType::suburban);
    const Infrastructure& inf = s.infrastructure;
    CHECK(inf.length == 10000.0);

    // Bands run to the next band's from, the last to the line end.
    REQUIRE(inf.gradients.size() == 2);
    CHECK(inf.gradients[0].to == 4000.0);
    CHECK(inf.gradients[1].from == 4000.0);
    CHECK(inf.gradients[1].to == 10000.0);
    CHECK(inf.gradients[1].value == Approx(0.006));
    CHECK(inf.gradient_at(3999.0) == 0.0);
    CHECK(inf.gradient_at(4000.0) == Approx(0.006));
    CHECK(inf.gradient_at(10000.0) == Approx(0.006));
    CHECK(inf.line_speed_at(1000.0) == Approx(100 / 3.6));
    CHECK(inf.line_speed_at(2000.0) == Approx(160 / 3.6));

    REQUIRE(inf.tracks.size() == 3);
    const Track* u2 = inf.find_track("U2");
    REQUIRE(u2 != nullptr);
    CHECK(u2->is_loop());
    CHECK(u2->parent == "U");
    CHECK(u2->up);
    CHECK_FALSE(u2->down);
    CHECK(u2->speed_limit == Approx(60 / 3.6));
    CHECK(inf.main_track_at(5000.0, Direction::up)->id == "U");
    CHECK(inf.main_track_at(5000.0, Direction::down)->id == "D");

    REQUIRE(inf.stations.size() == 3);
    CHECK(inf.find_station("CC")->name == "CC");  // name defaults to the id
    CHECK(inf.find_station("BB")->at == 5000.0);

    REQUIRE(inf.areas.size() == 2);
    CHECK(inf.aspect_system_at(5999.0) == AspectSystem::three_aspect);
    CHECK(inf.aspect_system_at(6000.0) == AspectSystem::four_aspect);
    CHECK(inf.aspect_system_at(10000.0) == AspectSystem::four_aspect);
    // Given: route_setup.  Omitted: release 3 s (common practice, no source) and sight and
    // reaction 12 s (tests/REFERENCES.md B3).
    CHECK(inf.interlocking.route_setup == 8.0);
    CHECK(inf.interlocking.release == 3.0);
    CHECK(inf.interlocking.sight_reaction == 12.0);

    REQUIRE(inf.signals.size() == 5);
    CHECK(inf.signals[0].sighting_distance == 300.0);  // from the defaults
    CHECK(inf.signals[0].overlap == 200.0);
    CHECK(inf.signals[1].overlap == 150.0);  // its own
    CHECK_FALSE(inf.signals[0].distant_distance.has_value());
    CHECK(inf.signals[3].direction == Direction::down);
    REQUIRE(inf.extra_joints.size() == 1);
    CHECK(inf.extra_joints[0] == std::make_pair(std::string("U"), 6500.0));

    REQUIRE(s.train_types.size() == 2);
    const TrainType* emu = s.find_train_type("EMU");
    REQUIRE(emu != nullptr);
    CHECK(emu->length == 100.0);
    CHECK(emu->mass == 200000.0);
    CHECK(emu->rotating_mass_factor == 1.08);
    CHECK(emu->max_speed == Approx(140 / 3.6));
    CHECK(emu->max_force == 180000.0);
    CHECK(emu->power == 2.0e6);
    CHECK(emu->davis_a == 2400.0);
    CHECK(emu->davis_b == 30.0);
    CHECK(emu->davis_c == 6.5);
    CHECK(emu->braking == 0.8);
    CHECK(emu->brake_delay == 2.0);
    CHECK(emu->performance == Approx(0.95));
    CHECK(emu->min_dwell == 40.0);
    CHECK(emu->supplement.share == Approx(0.05));
    CHECK(emu->supplement.per_100km == 60.0);
    CHECK(emu->supplement.distance_threshold == 30000.0);
    const TrainType* loco = s.find_train_type("LOCO");
    REQUIRE(loco != nullptr);
    CHECK(loco->rotating_mass_factor == 1.0);
    CHECK(loco->performance == 1.0);
    REQUIRE(loco->force_table.size() == 3);
    CHECK(loco->force_table[1].first == Approx(50 / 3.6));
    CHECK(loco->force_table[1].second == 250000.0);
    REQUIRE(loco->braking_table.size() == 2);
    CHECK(loco->braking_table[1].second == 0.4);
    CHECK(loco->davis_b == 0.0);  // b and c default to 0
    CHECK(loco->davis_c == 0.0);
    CHECK(s.find_train_type("nope") == nullptr);

    CHECK(s.timetable.rounding == 60.0);
    REQUIRE(s.timetable.services.size() == 2);
    const Service& s1 = s.timetable.services[0];
    CHECK(s1.id == "S1");  // no repeat: the id stays
    CHECK(s1.category == "stopping");
    CHECK(s1.direction == Direction::up);
    CHECK_FALSE(s1.enters_at_edge);
    CHECK_FALSE(s1.leaves_at_edge);
    REQUIRE(s1.calls.size() == 3);
    CHECK(s1.calls[0].departure == 6 * 3600.0);
    CHECK_FALSE(s1.calls[0].arrival.has_value());
    CHECK(s1.calls[1].arrival == 6 * 3600.0 + 300);
    CHECK(s1.calls[1].track == "U2");
    CHECK(s1.calls[1].min_dwell == 45.0);
    CHECK(s1.calls[2].stops);
    CHECK_FALSE(s1.calls[2].departure.has_value());
    const Service& g1 = s.timetable.services[1];
    CHECK(g1.direction == Direction::down);
    CHECK(g1.enters_at_edge);
    CHECK(g1.entry_speed == Approx(80 / 3.6));
    CHECK(g1.leaves_at_edge);
    CHECK_FALSE(g1.calls[0].stops);
    CHECK(g1.calls[0].departure == 7 * 3600.0);
    CHECK_FALSE(g1.calls[1].departure.has_value());  // pass: auto
    CHECK(g1.category.empty());
}

TEST_CASE("defaults: line type, rounding, level line", "[reader]") {
    std::string t = with("line_type: suburban\n", "");
    t = with("  rounding: 60 s\n", "", t);
    t = with("  gradients:\n    - {from: 0 km, value: 0 per mille}\n    - {from: 4 km, value: 6 per mille}\n",
             "", t);
    const Scenario s = parse_scenario(t, "t.yaml");
    CHECK(s.line_type == LineType::mixed);
    CHECK(s.timetable.rounding == 30.0);
    REQUIRE(s.infrastructure.gradients.size() == 1);
    CHECK(s.infrastructure.gradients[0].to == 10000.0);
    CHECK(s.infrastructure.gradient_at(5000.0) == 0.0);
}

TEST_CASE("repeat patterns expand into shifted runs with -HHMM ids", "[reader]") {
    const std::string t = with("      category: stopping\n",
                               "      category: stopping\n      repeat: {every: 15 min, until: \"07:00\"}\n");
    const Scenario s = parse_scenario(t, "t.yaml");
    // 06:00, 06:15, 06:30, 06:45, 07:00 (until is inclusive), then G1.
    REQUIRE(s.timetable.services.size() == 6);
    const std::vector<std::string> ids = {"S1-0600", "S1-0615", "S1-0630", "S1-0645", "S1-0700", "G1"};
    for (std::size_t k = 0; k < ids.size(); ++k) CHECK(s.timetable.services[k].id == ids[k]);
    const Service& third = s.timetable.services[2];
    CHECK(third.calls[0].departure == 6 * 3600.0 + 30 * 60);
    CHECK(third.calls[1].arrival == 6 * 3600.0 + 35 * 60);
    CHECK(third.calls[1].departure == 6 * 3600.0 + 36 * 60);
    CHECK_FALSE(third.calls[2].departure.has_value());  // omitted stays omitted
    CHECK(third.calls[1].track == "U2");
}

TEST_CASE("a repeat that gives clashing ids is an error", "[reader]") {
    // The pattern's first run is S1-0600, the id the second entry gives itself.
    const std::string t0 = with("      category: stopping\n",
                                "      category: stopping\n      repeat: {every: 30 min, until: \"06:31\"}\n");
    const std::string t = with("    - id: G1", "    - id: S1-0600", t0);
    const auto e = errors_of(t);
    CHECK(reported(e, loc(t, "S1-0600"), "timetable.services[1].id", "\"S1-0600\" is used twice"));
}

TEST_CASE("draw identity: the id or the draw_key and a repeat's run number", "[reader]") {
    const Scenario plain = parse_scenario(kValid, "t.yaml");
    REQUIRE(plain.timetable.services.size() == 2);
    CHECK(plain.timetable.services[0].draw.name == "S1");
    CHECK_FALSE(plain.timetable.services[0].draw.occurrence.has_value());
    CHECK(plain.timetable.services[1].draw_name() == "G1");

    // Runs of a pattern: the pattern's id (or its draw_key) and the run's number, in time order.
    const std::string t = with("      category: stopping\n",
                               "      category: stopping\n      repeat: {every: 15 min, until: \"07:00\"}\n");
    const Scenario runs = parse_scenario(t, "t.yaml");
    REQUIRE(runs.timetable.services.size() == 6);
    for (std::uint32_t k = 0; k < 5; ++k) {
        CHECK(runs.timetable.services[k].draw.name == "S1");
        CHECK(runs.timetable.services[k].draw.occurrence == k);
    }
    const Scenario keyed = parse_scenario(with("    - id: S1\n", "    - id: S1\n      draw_key: morning stopper\n", t), "t.yaml");
    CHECK(keyed.timetable.services[3].id == "S1-0645");
    CHECK(keyed.timetable.services[3].draw.name == "morning stopper");
    CHECK(keyed.timetable.services[3].draw.occurrence == 3u);
    const Scenario keyed_single = parse_scenario(with("    - id: G1\n", "    - id: G1\n      draw_key: 4711\n"), "t.yaml");
    CHECK(keyed_single.timetable.services[1].draw_name() == "4711");
    CHECK_FALSE(keyed_single.timetable.services[1].draw.occurrence.has_value());
}

TEST_CASE("draw_key: empty or shared keys are located errors", "[reader]") {
    SECTION("empty") {
        const std::string t = with("    - id: G1\n", "    - id: G1\n      draw_key: \"\"\n");
        const auto e = errors_of(t);
        CHECK(e.size() == 1);
        CHECK(reported(e, loc(t, "\"\""), "timetable.services[1].draw_key", "must not be empty"));
    }
    SECTION("not a single value") {
        const std::string t = with("    - id: G1\n", "    - id: G1\n      draw_key: [a, b]\n");
        const auto e = errors_of(t);
        CHECK(e.size() == 1);
        CHECK(reported(e, loc(t, "[a, b]"), "timetable.services[1].draw_key", ""));
    }
    SECTION("another service's id") {
        // Both would get the same primary delays every day.
        const std::string t = with("    - id: G1\n", "    - id: G1\n      draw_key: S1\n");
        const auto e = errors_of(t);
        CHECK(e.size() == 1);
        CHECK(reported(e, loc(t, "S1", 1), "timetable.services[1].draw_key",
                       "primary delays are drawn by the key \"S1\" here and in timetable.services[0] too"));
    }
    SECTION("two patterns of one id: their runs 0, 1, ... would share draws; once per pair") {
        const std::string pattern = "      category: stopping\n      repeat: {every: 30 min, until: \"07:00\"}\n";
        const std::string t = with("      category: stopping\n", pattern) +
                              "    - id: S1\n      type: EMU\n      direction: up\n"
                              "      repeat: {every: 30 min, until: \"07:15\"}\n"
                              "      calls:\n        - {station: AA, dep: \"06:15\"}\n        - {station: CC}\n";
        const auto e = errors_of(t);
        CHECK(e.size() == 1);
        CHECK(reported(e, loc(t, "S1", 1), "timetable.services[2].id",
                       "primary delays are drawn by the key \"S1\" run 0 here and in timetable.services[0] too"));
        CHECK_THAT(all(e), Contains("give one of them a draw_key of its own"));
        // The way out the message gives.
        CHECK_NOTHROW(parse_scenario(with("    - id: S1\n      type: EMU\n      direction: up\n      repeat",
                                          "    - id: S1\n      draw_key: S1 late\n      type: EMU\n      direction: up\n      repeat", t),
                                     "t.yaml"));
    }
}

TEST_CASE("unknown key", "[reader]") {
    const std::string t = with("    min_dwell: 40 s\n", "    min_dwell: 40 s\n    colour: red\n");
    const auto e = errors_of(t);
    CHECK(e.size() == 1);
    CHECK(reported(e, loc(t, "colour"), "train_types[0].colour", "unknown key \"colour\"; allowed here: id, length"));
}

TEST_CASE("duplicate key", "[reader]") {
    const std::string t = with("    mass: 200 t\n", "    mass: 200 t\n    mass: 210 t\n");
    const auto e = errors_of(t);
    CHECK(e.size() == 1);
    CHECK(reported(e, loc(t, "mass", 1), "train_types[0].mass",
                   "duplicate key \"mass\" (first given at line " + std::to_string(std::stoi(loc(t, "mass"))) + ")"));
}

TEST_CASE("bad unit", "[reader]") {
    const std::string t = with("max_speed: 140 km/h", "max_speed: 140 kmh");
    const auto e = errors_of(t);
    CHECK(e.size() == 1);
    CHECK(reported(e, loc(t, "140 kmh"), "train_types[0].max_speed",
                   "unknown unit \"kmh\" for a speed; use km/h or m/s"));
}

TEST_CASE("negative or zero lengths", "[reader]") {
    const std::string t = with("    length: 100 m", "    length: -100 m");
    CHECK(reported(errors_of(t), loc(t, "-100 m"), "train_types[0].length",
                   "must be more than 0 m and at most 5000 m (README, input ranges), not -100 m"));
    const std::string t2 = with("  length: 10 km", "  length: 0 km");
    CHECK(reported(errors_of(t2), loc(t2, "0 km"), "infrastructure.length", "must be more than 0 km"));
}

TEST_CASE("octal-looking numbers are decimal and YAML words are not numbers", "[reader]") {
    // 010 m: ten metres, not octal eight (sim/ENGINEERING.md, yaml-cpp pitfalls).
    const Scenario s = parse_scenario(with("    length: 100 m", "    length: 010 m"), "t.yaml");
    CHECK(s.train_types[0].length == 10.0);
    const std::string t = with("rotating_mass_factor: 1.08", "rotating_mass_factor: yes");
    CHECK(reported(errors_of(t), loc(t, "yes"), "train_types[0].rotating_mass_factor", "does not start with a number"));
    // leave takes true/false only, not YAML 1.1's yes/no.
    const std::string t2 = with("leave: true", "leave: yes");
    CHECK(reported(errors_of(t2), loc(t2, "yes"), "timetable.services[1].leave", "\"yes\" is not true or false"));
}

TEST_CASE("signal off its track, or against its direction", "[reader]") {
    const std::string t = with("{id: U03, track: U2, at: 5.4 km", "{id: U03, track: U2, at: 6.4 km");
    const auto e = errors_of(t);
    CHECK(e.size() == 1);
    CHECK(reported(e, loc(t, "6.4 km"), "infrastructure.signals[2].at",
                   "signal at 6.4 km lies off track U2, which runs from 4.5 km to 5.5 km"));
    const std::string t2 = with("at: 9.3 km, direction: down", "at: 9.3 km, direction: up");
    CHECK(reported(errors_of(t2), loc_in(t2, "{id: D01", "up}"), "infrastructure.signals[3].direction",
                   "track D does not carry up trains"));
    const std::string t3 = with("{id: U01, track: U,", "{id: U01, track: X,");
    CHECK(reported(errors_of(t3), loc(t3, "X,"), "infrastructure.signals[0].track",
                   "unknown track \"X\"; known: U, D, U2"));
}

TEST_CASE("unknown train type", "[reader]") {
    const std::string t = with("type: EMU\n", "type: EMX\n");
    const auto e = errors_of(t);
    CHECK(e.size() == 1);
    CHECK(reported(e, loc(t, "EMX"), "timetable.services[0].type", "unknown train type \"EMX\"; known: EMU, LOCO"));
}

TEST_CASE("calls out of running order", "[reader]") {
    // Up service: chainage must increase; CC (9.5 km) before BB (5 km) is backwards.
    std::string t = with("        - {station: BB, arr: \"06:05\", dep: \"06:06\", track: U2, min_dwell: 45 s}\n"
                         "        - {station: CC}\n",
                         "        - {station: CC}\n"
                         "        - {station: BB, arr: \"06:05\", dep: \"06:06\", track: U2, min_dwell: 45 s}\n");
    const auto e = errors_of(t);
    CHECK(reported(e, loc(t, "BB, arr"), "timetable.services[0].calls[2].station",
                   "calls must follow the running order of an up service"));
    // Down service listed in up order.
    std::string t2 = with("        - {station: CC, pass: \"07:00\"}\n", "        - {station: AA, pass: \"07:00\"}\n");
    t2 = with("        - {station: AA, pass: auto}\n", "        - {station: CC, pass: auto}\n", t2);
    CHECK(reported(errors_of(t2), loc(t2, "BB, pass"), "timetable.services[1].calls[1].station",
                   "running order of a down service (chainage decreasing): BB at 5 km comes after AA at 0.5 km"));
}

TEST_CASE("times out of order", "[reader]") {
    const std::string t = with("arr: \"06:05\", dep: \"06:06\"", "arr: \"05:55\", dep: \"06:06\"");
    const auto e = errors_of(t);
    CHECK(e.size() == 1);
    CHECK(reported(e, loc(t, "\"05:55\""), "timetable.services[0].calls[1].arr",
                   "arr 05:55:00 is earlier than dep 06:00:00 at AA"));
    // arr after dep within one call.
    const std::string t2 = with("arr: \"06:05\", dep: \"06:06\"", "arr: \"06:07\", dep: \"06:06\"");
    CHECK(reported(errors_of(t2), loc(t2, "\"06:06\""), "timetable.services[0].calls[1].dep",
                   "dep 06:06:00 is earlier than arr 06:07:00 at BB"));
}

TEST_CASE("missing required key points at the parent map and names the key", "[reader]") {
    const std::string t = with("    mass: 200 t\n", "");
    const auto e = errors_of(t);
    CHECK(e.size() == 1);
    // The parent is the train type's block map, which starts at its first key.
    CHECK(reported(e, loc(t, "id: EMU"), "train_types[0].mass", "missing required key \"mass\""));
    const std::string t2 = with("{id: D01, track: D, at: 9.3 km, direction: down}", "{id: D01, track: D, at: 9.3 km}");
    CHECK(reported(errors_of(t2), loc(t2, "{id: D01"), "infrastructure.signals[3].direction",
                   "missing required key \"direction\""));
}

TEST_CASE("several errors in one file are all reported, in file order", "[reader]") {
    std::string t = with("  length: 10 km", "  length: 10 parsecs");
    t = with("type: EMU\n", "type: EMX\n", t);
    t = with("    mass: 200 t\n", "    mass: 200 t\n    colour: red\n", t);
    t = with("{id: U03, track: U2, at: 5.4 km", "{id: U03, track: U2, at: 6.4 km", t);
    const auto e = errors_of(t);
    INFO(all(e));
    REQUIRE(e.size() == 4);
    CHECK(reported(e, loc(t, "10 parsecs"), "infrastructure.length", "unknown unit \"parsecs\" for a length"));
    CHECK(reported(e, loc(t, "6.4 km"), "infrastructure.signals[2].at", "lies off track U2"));
    CHECK(reported(e, loc(t, "colour"), "train_types[0].colour", "unknown key"));
    CHECK(reported(e, loc(t, "EMX"), "timetable.services[0].type", "unknown train type"));
    CHECK(e[0].find("infrastructure.length") != std::string::npos);
    CHECK(e[3].find("timetable.services[0].type") != std::string::npos);
}

TEST_CASE("format version", "[reader]") {
    const std::string t = with("knockon: 1", "knockon: 3");
    CHECK(reported(errors_of(t), "1:10", "knockon", "format version \"3\" is not supported; this program reads knockon: 1"));
    // knockon: 2 is a network file, read as one: a line's sections are not its keys.
    const std::string net = with("knockon: 1", "knockon: 2");
    CHECK(reported(errors_of(net), "1:1", "network", "missing required key \"network\""));
    const std::string t2 = with("knockon: 1\n", "");
    CHECK(reported(errors_of(t2), "1:1", "knockon", "missing required key"));
}

TEST_CASE("YAML syntax errors and empty files are located errors", "[reader]") {
    const auto e = errors_of("knockon: 1\ninfrastructure: {length: 10 km\n");
    REQUIRE(e.size() == 1);
    CHECK_THAT(e[0], Contains("t.yaml:") && Contains("YAML syntax error"));
    const auto e2 = errors_of("");
    REQUIRE(e2.size() == 1);
    CHECK_THAT(e2[0], Contains("t.yaml:1:1: the file holds no scenario"));
    const auto e3 = errors_of("- just\n- a list\n");
    CHECK_THAT(e3[0], Contains("t.yaml:1:1: expected a map"));
}

TEST_CASE("read_scenario reports a missing file", "[reader]") {
    try {
        read_scenario("/nonexistent/dir/x.yaml");
        FAIL("no error");
    } catch (const ScenarioError& e) {
        CHECK_THAT(e.what(), Contains("/nonexistent/dir/x.yaml: cannot open the file"));
    }
}

TEST_CASE("infrastructure consistency checks", "[reader]") {
    // A track ending before it starts.
    const std::string t1 = with("{id: U2, parent: U, from: 4.5 km, to: 5.5 km", "{id: U2, parent: U, from: 4.5 km, to: 4.5 km");
    CHECK(reported(errors_of(t1), loc(t1, "4.5 km", 1), "infrastructure.tracks[2].to", "must end beyond its start"));
    // A loop whose parent does not exist, and one outside its parent.
    const std::string t2 = with("parent: U,", "parent: Q,");
    CHECK(reported(errors_of(t2), loc(t2, "Q,"), "infrastructure.tracks[2].parent", "unknown track \"Q\""));
    std::string t3 = with("{id: U, from: 0 km, to: 10 km", "{id: U, from: 0 km, to: 5 km");
    t3 = with("{id: U01, track: U, at: 0.7 km, direction: up}\n", "", t3);  // keep signals on U
    const auto e3 = errors_of(t3);
    INFO(all(e3));
    CHECK(reported(e3, loc(t3, "{id: U2"), "infrastructure.tracks[2]", "does not lie within its parent U"));
    // Duplicate ids.
    const std::string t4 = with("{id: D, from", "{id: U, from");
    CHECK(reported(errors_of(t4), loc(t4, "U, from", 1), "infrastructure.tracks[1].id", "track id \"U\" is used twice"));
    const std::string t5 = with("{id: CC, at: 9.5 km}", "{id: AA, at: 9.5 km}");
    CHECK(reported(errors_of(t5), loc(t5, "AA, at"), "infrastructure.stations[2].id", "station id \"AA\" is used twice"));
    const std::string t6 = with("{id: D02,", "{id: D01,");
    CHECK(reported(errors_of(t6), loc(t6, "D01", 1), "infrastructure.signals[4].id", "signal id \"D01\" is used twice"));
    // Station beyond the line end.
    const std::string t7 = with("{id: CC, at: 9.5 km}", "{id: CC, at: 10.5 km}");
    CHECK(reported(errors_of(t7), loc(t7, "10.5 km"), "infrastructure.stations[2].at",
                   "10.5 km lies beyond the line end (10 km)"));
}

TEST_CASE("bands must start at 0 and be sorted", "[reader]") {
    const std::string t = with("{from: 0 km, value: 100 km/h}", "{from: 1 km, value: 100 km/h}");
    CHECK(reported(errors_of(t), loc(t, "1 km"), "infrastructure.speed_limits[0].from",
                   "the first band must start at 0 km, not 1 km"));
    const std::string t2 = with("{from: 4 km, value: 6 per mille}", "{from: 0 km, value: 6 per mille}");
    CHECK(reported(errors_of(t2), loc_in(t2, "value: 0 per mille}", "0 km"), "infrastructure.gradients[1].from",
                   "increasing order of from: 0 km follows 0 km"));
    const std::string t3 = with("{from: 2 km, value: 160 km/h}", "{from: 2 km, value: 0 km/h}");
    CHECK(reported(errors_of(t3), loc_in(t3, "from: 2 km", "0 km/h"), "infrastructure.speed_limits[1].value", "must be more than 0 km/h"));
}

TEST_CASE("signalling areas must cover the line; defaults are needed only where used", "[reader]") {
    const std::string t = with("{from: 6 km, to: 10 km, system: four_aspect}", "{from: 6.5 km, to: 10 km, system: four_aspect}");
    CHECK(reported(errors_of(t), loc(t, "6.5 km"), "infrastructure.signalling.areas[1].from",
                   "the areas leave 6 km to 6.5 km uncovered"));
    const std::string t2 = with("{from: 6 km, to: 10 km, system: four_aspect}", "{from: 6 km, to: 9 km, system: four_aspect}");
    CHECK(reported(errors_of(t2), loc(t2, "- {from: 0 km, to: 6 km"), "infrastructure.signalling.areas",
                   "the areas leave 9 km to 10 km (the line end) uncovered"));
    // A signal without overlap and no default for it.
    const std::string t3 = with(", overlap: 200 m}", "}");
    const auto e3 = errors_of(t3);
    INFO(all(e3));
    CHECK(e3.size() == 4);  // four signals lack an overlap; U02 gives its own
    CHECK(reported(e3, loc(t3, "{id: U01"), "infrastructure.signals[0].overlap",
                   "not given here, and signalling.defaults gives no overlap"));
    // Two-aspect area: distant_distance needed on signals there, and only there.
    const std::string t4 = with("system: four_aspect", "system: two_aspect");
    const auto e4 = errors_of(t4);
    INFO(all(e4));
    CHECK(e4.size() == 1);  // only D01 at 9.3 km stands in the two-aspect area
    CHECK(reported(e4, loc(t4, "{id: D01"), "infrastructure.signals[3].distant_distance", "not given here"));
    const std::string t5 = with("overlap: 200 m}", "overlap: 200 m, distant_distance: 1200 m}", t4);
    CHECK(parse_scenario(t5, "t.yaml").infrastructure.signals[3].distant_distance == 1200.0);
}

TEST_CASE("train type checks", "[reader]") {
    const std::string t = with("[50 km/h, 250 kN], [100 km/h", "[50 km/h, 250 kN], [40 km/h");
    CHECK(reported(errors_of(t), loc_in(t, "[50 km/h", "40 km/h"), "train_types[1].traction.table[2][0]",
                   "rows must be sorted by speed, ascending"));
    const std::string t2 = with("traction: {max_force: 180 kN, power: 2 MW}", "traction: {adhesion_mass: 200 t}");
    CHECK(reported(errors_of(t2), loc(t2, "{adhesion_mass"), "train_types[0].traction", "give max_force and/or power, or a table"));
    const std::string t3 = with("rotating_mass_factor: 1.08", "rotating_mass_factor: 0.9");
    CHECK(reported(errors_of(t3), loc(t3, "0.9"), "train_types[0].rotating_mass_factor",
                   "must be between 1 and 1.5"));
    const std::string t4 = with("performance: 95 %", "performance: 120 %");
    CHECK(reported(errors_of(t4), loc(t4, "120 %"), "train_types[0].performance", "at most 100 %"));
    const std::string t5 = with("deceleration: 0.8 m/s2", "deceleration: 0 m/s2");
    CHECK(reported(errors_of(t5), loc(t5, "0 m/s2"), "train_types[0].braking.deceleration",
                   "must be more than 0 m/s2 and at most 3 m/s2"));
    const std::string t6 = with("  - id: LOCO", "  - id: EMU");
    CHECK(reported(errors_of(t6), loc(t6, "EMU", 1), "train_types[1].id", "train type id \"EMU\" is used twice"));
}

TEST_CASE("service start, end and call-track rules", "[reader]") {
    // A service starting on the line must start with a stop giving dep.
    const std::string t = with("{station: AA, dep: \"06:00\"}", "{station: AA}");
    CHECK(reported(errors_of(t), loc(t, "{station: AA}"), "timetable.services[0].calls[0]",
                   "must be a stop with dep given"));
    // A service entering from beyond the line end gives a time at its first call.
    const std::string t2 = with("{station: CC, pass: \"07:00\"}", "{station: CC, pass: auto}");
    CHECK(reported(errors_of(t2), loc(t2, "{station: CC, pass"), "timetable.services[1].calls[0]",
                   "must give a time at its first call"));
    // The named track must reach the station and carry the direction.
    const std::string t3 = with("track: U2, min_dwell", "track: D, min_dwell");
    CHECK(reported(errors_of(t3), loc_in(t3, "{station: BB", "D,"), "timetable.services[0].calls[1].track", "track D does not carry up trains"));
    const std::string t4 = with("{station: AA, dep: \"06:00\"}", "{station: AA, dep: \"06:00\", track: U2}");
    CHECK(reported(errors_of(t4), loc(t4, "U2}"), "timetable.services[0].calls[0].track",
                   "track U2 (4.5 km to 5.5 km) does not reach station AA at 0.5 km"));
    // A pass cannot have a dwell.
    const std::string t5 = with("{station: BB, pass: auto}", "{station: BB, pass: auto, min_dwell: 30 s}");
    CHECK(reported(errors_of(t5), loc(t5, "30 s}"), "timetable.services[1].calls[1].min_dwell", "a passing call"));
    // Unknown station.
    const std::string t6 = with("{station: CC}", "{station: ZZ}");
    CHECK(reported(errors_of(t6), loc(t6, "ZZ"), "timetable.services[0].calls[2].station", "unknown station \"ZZ\"; known: AA, BB, CC"));
    // Repeat that ends before it starts.
    const std::string t7 = with("      category: stopping\n",
                                "      category: stopping\n      repeat: {every: 15 min, until: \"05:00\"}\n");
    CHECK(reported(errors_of(t7), loc(t7, "\"05:00\""), "timetable.services[0].repeat.until",
                   "until 05:00:00 is before the first call's time 06:00:00"));
}

TEST_CASE("a path that does not connect is reported at its service", "[reader]") {
    // The up main track has a gap between 5 and 6 km: S1 cannot run from AA to CC.
    std::string t = with("    - {id: U, from: 0 km, to: 10 km, directions: up}\n",
                         "    - {id: U, from: 0 km, to: 5 km, directions: up}\n"
                         "    - {id: UE, from: 6 km, to: 10 km, directions: up}\n");
    t = with("{id: U2, parent: U, from: 4.5 km, to: 5.5 km", "{id: U2, parent: U, from: 4.5 km, to: 5 km", t);
    t = with("{id: U03, track: U2, at: 5.4 km", "{id: U03, track: U2, at: 4.9 km", t);
    t = with("{track: U, at: 6.5 km}", "{track: UE, at: 6.5 km}", t);
    const auto e = errors_of(t);
    INFO(all(e));
    REQUIRE(e.size() == 1);
    CHECK(reported(e, loc(t, "id: S1"), "timetable.services[0]", "service S1: "));
}

TEST_CASE("main track lookup at junctions", "[infrastructure]") {
    Infrastructure inf;
    inf.length = 10000;
    Track a{"A", 0, 5000, true, true, "", 1e9};
    Track b{"B", 5000, 10000, true, true, "", 1e9};
    Track loop{"L", 4000, 6000, true, true, "A", 1e9};
    inf.tracks = {a, b, loop};
    // Common practice, no source: at a junction the train runs onto the track ahead of it.
    CHECK(inf.main_track_at(5000, Direction::up)->id == "B");
    CHECK(inf.main_track_at(5000, Direction::down)->id == "A");
    CHECK(inf.main_track_at(4500, Direction::up)->id == "A");
    CHECK(inf.main_track_at(0, Direction::down)->id == "A");
    CHECK(inf.main_track_at(10001, Direction::up) == nullptr);
    inf.tracks[0].up = false;
    CHECK(inf.main_track_at(4500, Direction::up) == nullptr);
}

TEST_CASE("damaged files give ScenarioError, never another failure", "[reader]") {
    // Every single-line deletion and every truncation of the valid file either still reads or
    // is reported as located errors (common practice, no source: bad input must never crash).
    std::vector<std::string> lines;
    std::size_t start = 0;
    for (std::size_t i = 0; i < kValid.size(); ++i)
        if (kValid[i] == '\n') {
            lines.push_back(kValid.substr(start, i + 1 - start));
            start = i + 1;
        }
    auto survives = [](const std::string& text) {
        try {
            parse_scenario(text, "t.yaml");
        } catch (const ScenarioError& e) {
            return !e.messages.empty() && e.messages[0].rfind("t.yaml:", 0) == 0;
        } catch (...) {
            return false;
        }
        return true;
    };
    for (std::size_t drop = 0; drop < lines.size(); ++drop) {
        std::string text;
        for (std::size_t i = 0; i < lines.size(); ++i)
            if (i != drop) text += lines[i];
        INFO("without line " << drop + 1 << ": " << lines[drop]);
        CHECK(survives(text));
    }
    for (std::size_t cut = 0; cut < kValid.size(); cut += 7) {
        INFO("cut at " << cut);
        CHECK(survives(kValid.substr(0, cut)));
    }
}
