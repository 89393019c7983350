// What cannot run is named before it runs: the scenario reader refuses absurd numbers (each with
// its file:line:col, field and range) and layouts no train can work, and planning refuses a
// train that cannot make its run, located at its timetable entry.  Warnings (a timetable tighter
// than the trains can run, a signal giving too little warning on a fall) leave the plan made.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "input_checks_support.hpp"
#include "models/plan.hpp"
#include "models/train_type_checks.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;
using namespace inputcheck;
using Catch::Matchers::Contains;

namespace {

// The messages of a text that must be refused when read.
std::vector<std::string> read_errors(const std::string& text) {
    try {
        parse_scenario(text, "t.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    FAIL("the scenario was accepted");
    return {};
}

// The messages of a text that reads but must be refused when planned.
std::vector<std::string> plan_errors(const std::string& text, const RunOptions& options = {}) {
    const Scenario sc = parse_scenario(text, "t.yaml");
    try {
        plan_trains(sc, options);
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    FAIL("the scenario was planned");
    return {};
}

// The edge line with `from` replaced by `to` must be refused when read, with a message at
// `value` (within `to`), for `path`, holding `what`.
void expect_refused(const std::string& from, const std::string& to, const std::string& value, const std::string& path,
                    const std::string& what, const std::string& base = "edge_line.yaml") {
    const std::string text = changed(fixture(base), from, to);
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, value, to), path, what));
}

}  // namespace

// ---------------------------------------------------------------- absurd numbers (one per field)

TEST_CASE("checks: a supplement of 1e308 % is refused with its range", "[checks][ranges]") {
    expect_refused("percent: 5 %", "percent: 1e308 %", "1e308 %", "train_types[0].supplement.percent",
                   "must be between 0 % and 100 % (README, input ranges), not 1e+308 %");
}

TEST_CASE("checks: a rounding of 1e308 s is refused with its range", "[checks][ranges]") {
    expect_refused("rounding: 30 s", "rounding: 1e308 s", "1e308 s", "timetable.rounding",
                   "must be more than 0 s and at most 3600 s");
}

TEST_CASE("checks: a mass of 1e308 t is refused: not finite in kg", "[checks][ranges]") {
    expect_refused("mass: 200 t", "mass: 1e308 t", "1e308 t", "train_types[0].mass", "\"1e308 t\" is too large to compute with");
}

TEST_CASE("checks: a train of 1e6 km is refused with its range", "[checks][ranges]") {
    expect_refused("length: 100 m", "length: 1000000 km", "1000000 km", "train_types[0].length",
                   "must be more than 0 m and at most 5000 m (README, input ranges), not 1e+09 m");
}

TEST_CASE("checks: a line of 1e303 m is refused: not finite on the micrometre grid", "[checks][ranges]") {
    expect_refused("length: 10 km", "length: 1e303 m", "1e303 m", "infrastructure.length", "too large to compute with");
}

TEST_CASE("checks: a maximum speed of 1e308 km/h is refused with its range", "[checks][ranges]") {
    expect_refused("max_speed: 120 km/h", "max_speed: 1e308 km/h", "1e308 km/h", "train_types[0].max_speed",
                   "must be more than 0 km/h and at most 500 km/h");
}

TEST_CASE("checks: a repeat every 1e-300 s is refused with its range", "[checks][ranges]") {
    const std::string text = changed(fixture("edge_line.yaml"), "      direction: up\n",
                                     "      direction: up\n      repeat: {every: 1e-300 s, until: \"08:10\"}\n");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, "1e-300 s"), "timetable.services[0].repeat.every",
                   "must be between 1 min and 1440 min"));
}

TEST_CASE("checks: a log-normal sigma of 1000 is refused with its range", "[checks][ranges]") {
    expect_refused("sigma: 0.8", "sigma: 1000", "1000", "delays.dwell[0].sigma", "must be more than 0 and at most 5");
}

TEST_CASE("checks: a gamma scale of 1e308 s is refused with its range", "[checks][ranges]") {
    expect_refused("scale: 30 s", "scale: 1e308 s", "1e308 s", "delays.running[0].scale",
                   "must be more than 0 min and at most 1440 min");
}

TEST_CASE("checks: a minimum dwell of 1e308 s is refused with its range", "[checks][ranges]") {
    expect_refused("min_dwell: 30 s", "min_dwell: 1e308 s", "1e308 s", "train_types[0].min_dwell",
                   "must be between 0 min and 120 min");
}

TEST_CASE("checks: a Weibull shape of 0.01 is refused with its range", "[checks][ranges]") {
    expect_refused("distribution: gamma, shape: 2, scale: 30 s", "distribution: weibull, shape: 0.01, scale: 30 s", "0.01",
                   "delays.running[0].shape", "must be between 0.1 and 100");
}

TEST_CASE("checks: parameters in range whose mean delay exceeds a day are refused", "[checks][ranges]") {
    // Weibull mean = scale * Gamma(1 + 1/shape): 1 h * Gamma(11) = 3 628 800 h.
    const std::string text = changed(fixture("edge_line.yaml"), "distribution: gamma, shape: 2, scale: 30 s",
                                     "distribution: weibull, shape: 0.1, scale: 1 h");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, "{probability: 20 %, distribution: weibull"), "delays.running[0]",
                   "mean delay of 3.629e+06 h, more than 24 h"));
}

TEST_CASE("checks: a time of day beyond 30:00 is refused with its range", "[checks][ranges]") {
    expect_refused("{station: ALD, dep: \"08:00\"}", "{station: ALD, dep: \"47:00\"}", "\"47:00\"",
                   "timetable.services[0].calls[0].dep", "must be between 00:00 and 30:00 (README, input ranges), not 47:00",
                   "hand_check_line.yaml");
    const std::string text = changed(fixture("edge_line.yaml"), "window: [\"07:00\", \"09:00\"]",
                                     "window: [\"07:00\", \"31:00\"]");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, "\"31:00\""), "delays.disruptions[0].window[1]", "not 31:00"));
}

TEST_CASE("checks: braking above 3 m/s2 is refused, in a table too", "[checks][ranges]") {
    expect_refused("deceleration: 0.5 m/s2", "deceleration: 50 m/s2", "50 m/s2", "train_types[0].braking.deceleration",
                   "at most 3 m/s2 (README, input ranges), not 50 m/s2", "hand_check_line.yaml");
    const std::string text = changed(fixture("hand_check_line.yaml"), "deceleration: 0.5 m/s2",
                                     "deceleration: [[0 km/h, 0.6 m/s2], [100 km/h, 4 m/s2]]");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, "4 m/s2"), "train_types[0].braking.deceleration[1][1]",
                   "not 4 m/s2"));
}

// ---------------------------------------------------------------- what no train can work

TEST_CASE("checks: a train longer than the line is refused", "[checks]") {
    // 4.5 km is a plausible freight train, but the line is 4 km long.
    const std::string text = changed(changed(fixture("edge_line.yaml"), "length: 10 km", "length: 4 km"),
                                     "length: 100 m", "length: 4.5 km");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, "4.5 km", "length: 4.5 km"), "train_types[0].length",
                   "the train (4.5 km) is longer than the whole line (4 km)"));
}

TEST_CASE("checks: an adhesion mass above the train's mass is refused", "[checks]") {
    const std::string text =
        changed(fixture("edge_line.yaml"), "power: 2 MW}", "power: 2 MW, adhesion_mass: 250 t}");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, "250 t"), "train_types[0].traction.adhesion_mass",
                   "the adhesion mass (250 t) is more than the train's mass (200 t)"));
}

TEST_CASE("checks: two signals of one direction at one place on a track are refused", "[checks]") {
    const std::string text = changed(fixture("hand_check_line.yaml"), "{id: U04, track: U, at: 7.8 km",
                                     "{id: U04, track: U, at: 4.5 km");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    REQUIRE(errors.size() == 1);
    CHECK(reported(errors, "t.yaml", where(text, "4.5 km", "id: U04"), "infrastructure.signals[3].at",
                   "signal U04 stands at 4.5 km on track U facing up, where signal U03 (line " +
                       where(text, "{id: U03").substr(0, where(text, "{id: U03").find(':')) + ") already stands"));
    // Signals of the two directions may share a place (up and down tracks, or single line).
    CHECK_NOTHROW(parse_scenario(changed(fixture("hand_check_line.yaml"), "{id: D03, track: D, at: 1.5 km",
                                         "{id: D03, track: D, at: 4.5 km"),
                                 "t.yaml"));
}

TEST_CASE("checks: two loops meeting at one point of their track are refused at the tracks", "[checks]") {
    // Paths are laid over the network the line is read into, where two switches need a piece of
    // track between them.
    const std::string text = changed(fixture("edge_line.yaml"), "    - {id: U, from: 0 km, to: 10 km, directions: up}\n",
                                     "    - {id: U, from: 0 km, to: 10 km, directions: up}\n"
                                     "    - {id: L1, parent: U, from: 2 km, to: 4 km, directions: up}\n"
                                     "    - {id: L2, parent: U, from: 4 km, to: 6 km, directions: up}\n");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    REQUIRE(errors.size() == 1);
    CHECK(reported(errors, "t.yaml", where(text, "- {id: U,"), "infrastructure.tracks",
                   "loops 'L1' and 'L2' meet at km 4.000 of track 'U': a network needs a piece of track between their switches"));
}

TEST_CASE("checks: traction too weak to start on level track is refused", "[checks]") {
    // 100 N on 100 t: 0.001 m/s2 at standstill, against the 0.01 m/s2 asked for.
    const std::string text = changed(fixture("hand_check_line.yaml"), "max_force: 100 kN", "max_force: 100 N");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    CHECK(reported(errors, "t.yaml", where(text, "{max_force: 100 N"), "train_types[0].traction",
                   "train type BOX cannot get going on level track: at standstill its tractive effort (0.1 kN) exceeds "
                   "its resistance (0 kN) by 0.1 kN, an acceleration of 0.001 m/s2"));
}

TEST_CASE("checks: power written in kW where MW was meant is refused", "[checks]") {
    const std::string text = fixture("power_in_kilowatts.yaml");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    REQUIRE(errors.size() == 1);
    // Balancing speed on level track: P / v = A + B v + C v^2 with P 2.2 kW, A 2.2 kN,
    // B 22 N s/m, C 5.5 N s2/m2, solved here by bisection (closed form of the force balance).
    auto net = [](double v) { return 2200.0 / v - (2200.0 + 22.0 * v + 5.5 * v * v); };
    double lo = 0.01, hi = 10.0;
    for (int k = 0; k < 100; ++k) (net(0.5 * (lo + hi)) > 0 ? lo : hi) = 0.5 * (lo + hi);
    char expected[64];
    std::snprintf(expected, sizeof expected, "reaches only %.3g km/h on level track", 0.5 * (lo + hi) * 3.6);
    CHECK(std::string(expected) == "reaches only 3.56 km/h on level track");
    CHECK(reported(errors, "t.yaml", where(text, "{max_force: 210 kN"), "train_types[0].traction", expected));
}

TEST_CASE("checks: a train longer than the loop it stops in is refused", "[checks]") {
    const std::string text = fixture("train_longer_than_loop.yaml");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    REQUIRE(errors.size() == 2);   // the up and the down stopping train at Ferrowby Cross
    // Up: the stopping mark at 18.8 km, 2 km of train behind it: the tail at 16.8 km, before the
    // loop's start at 18.4 km.
    CHECK(reported(errors, "t.yaml", where(text, "U2", "{station: FRX, dep: \"06:20\""),
                   "timetable.services[0].calls[3].track",
                   "service SU (train type EMU4, 2 km long) stops at FRX in loop U2 (18.4 km to 19.2 km), but its "
                   "tail would stand at 16.8 km, outside the loop"));
    // The same train passing through a loop, or stopping on the main line, is not refused.
    CHECK_NOTHROW(parse_scenario(changed(changed(text, "track: U2, min_dwell: 5 min", "min_dwell: 5 min"),
                                         "track: D2, min_dwell: 5 min", "min_dwell: 5 min"),
                                 "t.yaml"));
}

// ---------------------------------------------------------------- what planning finds

TEST_CASE("checks: a train that stalls on a climb is refused, located at its service", "[checks][plan]") {
    const std::string text = fixture("stall_on_climb.yaml");
    const auto errors = plan_errors(text);
    INFO(joined(errors));
    REQUIRE(errors.size() == 1);
    // Gradient force m g i = 1600 t x 9.81 m/s2 x 0.020 = 313.92 kN (physics, small-angle form);
    // with 11 kN resistance, 280 kN of tractive effort is 44.92 kN short at standstill.
    const double gradient_force = 1600e3 * 9.81 * 0.020;
    CHECK(gradient_force == Approx(313920.0));
    CHECK((gradient_force + 11e3 - 280e3) / 1000.0 == Approx(44.92));
    CHECK(reported(errors, "t.yaml", where(text, "id: G1"), "timetable.services[0]",
                   "service G1 (train type FRT): stalls at km 5.936 on a 20 per mille climb: at standstill its "
                   "tractive effort (280 kN) falls short of its resistance (11 kN) plus the gradient force (313.9 kN) "
                   "by 44.92 kN"));
    // The climb runs from 3 km to 11 km: the stall lies on it (path distance 4936 m from CWB at 1 km).
    const std::string km = errors[0].substr(errors[0].find("km ") + 3, 5);
    CHECK(std::stod(km) > 3.0);
    CHECK(std::stod(km) < 11.0);
}

TEST_CASE("checks: brakes that cannot hold a train on its steepest fall are refused", "[checks][plan]") {
    const std::string text = fixture("brakes_cannot_hold_fall.yaml");
    const auto errors = plan_errors(text);
    INFO(joined(errors));
    REQUIRE(errors.size() == 1);
    // A 35 per mille fall takes g i = 9.81 x 0.035 = 0.343 m/s2, more than the 0.3 m/s2 of
    // service braking (physics).
    CHECK(9.81 * 0.035 == Approx(0.34335));
    CHECK(reported(errors, "t.yaml", where(text, "id: G1"), "timetable.services[0]",
                   "service G1 (train type FRT): its service braking (0.3 m/s2) cannot hold it on the 35 per mille "
                   "fall from km 2.000 to km 8.000: the fall takes 0.343 m/s2 of it, leaving -0.0434 m/s2"));
    // On a 20 per mille fall the same brakes leave 0.104 m/s2: planned.
    CHECK_NOTHROW(plan_trains(parse_scenario(changed(text, "value: -35 per mille", "value: -20 per mille"), "t.yaml")));
}

TEST_CASE("checks: the brake-hold rule takes the steepest fall of the path, at every speed", "[checks][plan]") {
    const Scenario sc = parse_scenario(changed(fixture("brakes_cannot_hold_fall.yaml"), "value: -35 per mille",
                                               "value: -20 per mille"),
                                       "t.yaml");
    const std::vector<TrainPlan> trains = plan_trains(sc);
    const TrainPath& path = trains.at(0).run.path;
    TrainType t = *sc.find_train_type("FRT");
    CHECK(brake_hold_problem(t, path, 0.0, path.length).empty());
    // Braking that fades to 0.2 m/s2 at 60 km/h leaves 0.2 - 0.196 = 0.004 m/s2 there.
    t.braking_table = {{0.0, 0.3}, {60.0 / 3.6, 0.2}};
    CHECK_THAT(brake_hold_problem(t, path, 0.0, path.length), Contains("leaving 0.0038 m/s2"));
    // Before the fall (the first 1 km of the path) nothing falls.
    CHECK(brake_hold_problem(t, path, 0.0, 900.0).empty());
}

TEST_CASE("checks: a plan too large for memory is refused before any work", "[checks][plan]") {
    // Every minute from 06:00 to 29:59, 9 km each: 1440 runs, 12 960 train-km, 6.48e6 grid points
    // at 2 m; at 0.2 m ten times as many, beyond the 5e7 allowed.
    const std::string text = changed(fixture("edge_line.yaml"), "    - id: T2\n",
                                     "    - id: T3\n      type: EMU10\n      category: stopping\n      direction: up\n"
                                     "      repeat: {every: 1 min, until: \"29:59\"}\n      calls:\n"
                                     "        - {station: A, dep: \"06:00\"}\n        - {station: C}\n    - id: T2\n");
    const Scenario sc = parse_scenario(text, "t.yaml");
    const PlanSize size = plan_size(sc, RunOptions{0.2});
    CHECK(size.runs == 1442);
    CHECK(size.train_km == Approx(1442 * 9.0));
    CHECK(size.grid_points == Approx(1442 * (9000.0 / 0.2 + 1.0)));
    const auto errors = plan_errors(text, RunOptions{0.2});
    REQUIRE(errors.size() == 1);
    CHECK_THAT(errors[0], Contains("t.yaml: the plan would integrate 6.49e+07 grid points (1442 train runs, 12978 "
                                   "train-km at a step of 0.2 m"));
}

// ---------------------------------------------------------------- warnings: planned all the same

TEST_CASE("checks: a timetable tighter than running time plus supplement is a warning", "[checks][plan]") {
    const std::string text =
        changed(fixture("hand_check_line.yaml"), "{station: BEX}", "{station: BEX, arr: \"08:04\"}");
    const Scenario sc = parse_scenario(text, "t.yaml");
    const PlanResult plan = make_plan(sc);
    REQUIRE(plan.tight_stretches.size() == 1);
    const TightStretch& w = plan.tight_stretches[0];
    // 10 km at 120 km/h under 100 kN on 100 t (1 m/s2), braking at 0.5 m/s2, no resistance and
    // no supplement: 33.3 s accelerating over 555.6 m, 66.7 s braking over 1111.1 m and 250 s
    // at speed over the 8333.3 m between: 350 s (closed form, constant acceleration), against the
    // 240 s from 08:00 to 08:04.
    CHECK(w.technical == Approx(350.0).margin(0.1));
    CHECK(w.scheduled == Approx(350.0).margin(0.1));
    CHECK(w.timetabled == Approx(240.0));
    CHECK(plan.trains[w.train].run.service->id == "A1");
    CHECK(plan.trains[w.train].run.calls[w.from_call].station == "ALD");
    CHECK(plan.trains[w.train].run.calls[w.call].station == "BEX");
    CHECK(sc.where(*plan.trains[w.train].run.service, plan.trains[w.train].run.calls[w.call].call) ==
          "t.yaml:" + where(text, "{station: BEX, arr") + ": timetable.services[0].calls[1]");
}

TEST_CASE("checks: constructed pass times are not taken for a tight timetable", "[checks][plan]") {
    // The demo's fast and freight trains pass most stations at constructed times, each rounded up
    // from the last given time: one stretch may be a few seconds short of its own running time
    // while the train keeps time.
    const Scenario sc = read_scenario(std::string(KNOCKON_SOURCE_DIR) + "/scenarios/demo.yaml");
    const PlanResult plan = make_plan(sc);
    CHECK(plan.tight_stretches.empty());
    bool short_stretch = false;   // the per-stretch figure the rule must not warn about
    for (const TrainPlan& tp : plan.trains)
        for (const PlannedCall& c : tp.run.calls)
            if (c.technical_running > 0 && c.timetabled_running < c.scheduled_running - 1.0) short_stretch = true;
    CHECK(short_stretch);
}

TEST_CASE("checks: a signal's warning counts the steepest fall over the whole braking distance", "[checks][plan]") {
    // FRT at 80 km/h braking at 0.3 m/s2 on the 20 per mille fall: v^2 / (2 (b - g i)) =
    // 22.22^2 / (2 x (0.3 - 0.1962)) = 2378.7 m (stopping distance, closed form), more than the
    // 1000 m from the distant signal.  Signal U03 stands on the fall in one file and 50 m beyond
    // its foot in the other: the braking happens on the fall either way.
    const double v = 80.0 / 3.6, needed = v * v / (2.0 * (0.3 - 9.81 * 0.020));
    CHECK(needed == Approx(2378.7).margin(0.1));
    for (const char* file : {"signal_on_fall.yaml", "signal_beyond_foot_of_fall.yaml"}) {
        INFO(file);
        const PlanResult plan = make_plan(parse_scenario(fixture(file), file));
        REQUIRE(plan.spacing_warnings.size() == 1);
        CHECK(plan.spacing_warnings[0].signal == "U03");
        CHECK(plan.spacing_warnings[0].available == Approx(1000.0));
        CHECK(plan.spacing_warnings[0].needed == Approx(needed).margin(0.5));
    }
    // The level-track figure for the same train, 823 m, fits the 1000 m: beyond the foot of a
    // fall ending 1 km before the distant there is no warning.
    const std::string away = changed(fixture("signal_beyond_foot_of_fall.yaml"), "{from: 8.0 km, value: 0 per mille}",
                                     "{from: 6.0 km, value: 0 per mille}");
    CHECK(v * v / (2.0 * 0.3) == Approx(823.0).margin(0.1));
    CHECK(make_plan(parse_scenario(away, "t.yaml")).spacing_warnings.empty());
}
