// The line scenario's model checks (models/infrastructure_checks, models/line_timetable_checks)
// hold for a scenario built in code as for one read from a file: planning refuses the scenario
// with the sentence, the reader locates the same fault at file:line:col.  The rules themselves
// are common practice, no source (a loop lies within the main track it leaves, a signal stands
// on its track, a call names a station of the line).
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "input_checks_support.hpp"
#include "models/infrastructure_checks.hpp"
#include "models/line_timetable_checks.hpp"
#include "models/plan.hpp"
#include "models/scenario_checks.hpp"
#include "models/scenario_error.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;
using inputcheck::changed;
using inputcheck::fixture;
using inputcheck::joined;
using inputcheck::reported;
using inputcheck::where;

namespace {

// The valid hand-check line, read, to be spoiled in code.
Scenario hand_check_line() { return parse_scenario(fixture("hand_check_line.yaml"), "hand.yaml"); }

// The messages make_plan refuses `sc` with; empty when it plans.
std::vector<std::string> planning_errors(const Scenario& sc) {
    try {
        (void)make_plan(sc, RunOptions{});
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    return {};
}

std::vector<std::string> read_errors(const std::string& text) {
    try {
        (void)parse_scenario(text, "t.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    return {};
}

bool holds(const std::vector<std::string>& messages, const std::string& what) {
    for (const std::string& m : messages)
        if (m.find(what) != std::string::npos) return true;
    return false;
}

}  // namespace

TEST_CASE("model checks: the hand-check line built in code plans as read", "[modelchecks]") {
    const Scenario sc = hand_check_line();
    CHECK(check_infrastructure(sc.infrastructure).problems.empty());
    CHECK_NOTHROW(check_scenario(sc));
    CHECK(planning_errors(sc).empty());
}

TEST_CASE("model checks: a loop outside its parent is refused in code and located in a file", "[modelchecks]") {
    SECTION("built in code") {
        Scenario sc = hand_check_line();
        Track loop;
        loop.id = "UL";
        loop.parent = "U";
        loop.from = 10.5e3;
        loop.to = 12.5e3;   // beyond U's end at 12 km
        loop.down = false;
        sc.infrastructure.tracks.push_back(loop);
        const InfrastructureCheck check = check_infrastructure(sc.infrastructure);
        REQUIRE(check.problems.size() == 1);
        CHECK(check.problems[0].kind == LineObject::track);
        CHECK(check.problems[0].index == 2);
        CHECK(check.problems[0].field == "to");
        const auto errors = planning_errors(sc);
        INFO(joined(errors));
        REQUIRE(errors.size() == 1);
        CHECK(errors[0] == "hand.yaml: track UL, to: 12.5 km lies beyond the line end (12 km)");
        // Within the line but not within U (which is cut short here): the loop as a whole.
        sc.infrastructure.tracks[2].to = 11.9e3;
        sc.infrastructure.tracks[0].to = 11.5e3;
        sc.infrastructure.tracks[0].from = 0.0;
        const auto within = planning_errors(sc);
        INFO(joined(within));
        CHECK(holds(within, "hand.yaml: track UL: loop UL (10.5 km to 11.9 km) does not lie within its parent U "
                            "(0 km to 11.5 km)"));
    }
    SECTION("read from a file") {
        const std::string text = changed(fixture("hand_check_line.yaml"), "    - {id: D, from: 0 km",
                                         "    - {id: UL, from: 10.5 km, to: 11.9 km, directions: up, parent: D}\n"
                                         "    - {id: D, from: 0 km");
        const auto errors = read_errors(text);
        INFO(joined(errors));
        CHECK(reported(errors, "t.yaml", where(text, "up, parent", "id: UL"),
                       "infrastructure.tracks[1].directions", "loop UL carries up trains but its parent D does not"));
    }
}

TEST_CASE("model checks: a signal beyond its track's end is refused in code and located in a file", "[modelchecks]") {
    SECTION("built in code") {
        Scenario sc = hand_check_line();
        sc.infrastructure.tracks[0].to = 11.0e3;   // U now ends before signal U06 (11.3 km)
        const auto errors = planning_errors(sc);
        INFO(joined(errors));
        CHECK(holds(errors, "hand.yaml: signal U06, at: signal at 11.3 km lies off track U, which runs from 0 km "
                            "to 11 km"));
    }
    SECTION("two signals at one place: the other is named, without a line") {
        Scenario sc = hand_check_line();
        sc.infrastructure.signals[3].at = 4.5e3;   // U04 onto U03
        const auto errors = planning_errors(sc);
        INFO(joined(errors));
        REQUIRE(errors.size() == 1);
        CHECK(errors[0] == "hand.yaml: signal U04, at: signal U04 stands at 4.5 km on track U facing up, where signal "
                           "U03 already stands; main signals of one direction on a track must be at least 1 m apart");
    }
    SECTION("read from a file") {
        const std::string text = changed(fixture("hand_check_line.yaml"), "{id: U06, track: U, at: 11.3 km",
                                         "{id: U06, track: U, at: 12.3 km");
        const auto errors = read_errors(text);
        INFO(joined(errors));
        CHECK(reported(errors, "t.yaml", where(text, "12.3 km"), "infrastructure.signals[5].at",
                       "signal at 12.3 km lies off track U, which runs from 0 km to 12 km"));
    }
}

TEST_CASE("model checks: a call at an unknown station is refused in code and located in a file", "[modelchecks]") {
    SECTION("built in code") {
        Scenario sc = hand_check_line();
        sc.timetable.services[1].calls[1].station = "CRX";
        const auto errors = planning_errors(sc);
        INFO(joined(errors));
        REQUIRE(errors.size() == 1);
        CHECK(errors[0] == "hand.yaml: service A2, call 1, station: unknown station \"CRX\"; known: ALD, BEX");
        // The service check alone names the service, call and field.
        const InfrastructureCheck infra = check_infrastructure(sc.infrastructure);
        const ServiceCheck check =
            check_line_service(sc.infrastructure, infra, sc.train_types, sc.timetable.services[1], 1);
        CHECK_FALSE(check.clean);
        REQUIRE(check.problems.size() == 1);
        CHECK(check.problems[0].call == 1);
        CHECK(check.problems[0].field == "station");
    }
    SECTION("calls out of running order, built in code") {
        Scenario sc = hand_check_line();
        std::swap(sc.timetable.services[0].calls[0].station, sc.timetable.services[0].calls[1].station);
        const auto errors = planning_errors(sc);
        INFO(joined(errors));
        CHECK(holds(errors, "hand.yaml: service A1, call 1, station: calls must follow the running order of an up "
                            "service (chainage increasing): ALD at 1 km comes after BEX at 11 km"));
    }
    SECTION("read from a file") {
        const std::string text = changed(fixture("hand_check_line.yaml"), "        - {station: BEX}\n    - id: A2",
                                         "        - {station: CRX}\n    - id: A2");
        const auto errors = read_errors(text);
        INFO(joined(errors));
        REQUIRE(errors.size() == 1);
        CHECK(reported(errors, "t.yaml", where(text, "CRX"), "timetable.services[0].calls[1].station",
                       "unknown station \"CRX\"; known: ALD, BEX"));
    }
}

TEST_CASE("model checks: a field the reader could not read is left out of the model's checks", "[modelchecks]") {
    // U's end unread: no "must end beyond its start", and U's signals and calls are not judged
    // against a track end that was never given.
    const std::string text = changed(fixture("hand_check_line.yaml"), "{id: U, from: 0 km, to: 12 km",
                                     "{id: U, from: 0 km, to: twelve");
    const auto errors = read_errors(text);
    INFO(joined(errors));
    REQUIRE(errors.size() == 1);
    CHECK(reported(errors, "t.yaml", where(text, "twelve"), "infrastructure.tracks[0].to", ""));
    // The same track built in code with its end at its start is refused for it.
    Scenario sc = hand_check_line();
    sc.infrastructure.tracks[0].to = 0.0;
    const auto planned = planning_errors(sc);
    INFO(joined(planned));
    CHECK(holds(planned, "hand.yaml: track U, to: a track must end beyond its start: to 0 km is not beyond from 0 km"));
}

TEST_CASE("model checks: signalling areas that leave the line uncovered are refused in code and located in a file",
          "[modelchecks]") {
    SECTION("built in code") {
        Scenario sc = hand_check_line();
        sc.infrastructure.areas[0].to = 6.0e3;
        const auto errors = planning_errors(sc);
        INFO(joined(errors));
        REQUIRE(errors.size() == 1);
        CHECK(errors[0] == "hand.yaml: signalling areas: the areas leave 6 km to 12 km (the line end) uncovered");
        CHECK_FALSE(check_signalling_areas(sc.infrastructure.areas, sc.infrastructure.length).covers);
        sc.infrastructure.areas.clear();
        CHECK(holds(planning_errors(sc), "hand.yaml: signalling areas: at least one area is needed"));
    }
    SECTION("read from a file") {
        const std::string text = changed(fixture("hand_check_line.yaml"), "      - {from: 0 km, to: 12 km, system: three_aspect}",
                                         "      - {from: 0 km, to: 7 km, system: three_aspect}\n"
                                         "      - {from: 6 km, to: 12 km, system: three_aspect}");
        const auto errors = read_errors(text);
        INFO(joined(errors));
        REQUIRE(errors.size() == 1);
        CHECK(reported(errors, "t.yaml", where(text, "6 km, to: 12 km"), "infrastructure.signalling.areas[1].from",
                       "this area overlaps the one before it, which ends at 7 km; list them in chainage order "
                       "without overlaps"));
    }
}
