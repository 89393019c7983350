// Running-time supplement (UIC Code 451-1 rule) and how the planned run uses it to construct
// scheduled times.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "models/service_run.hpp"
#include "models/supplement.hpp"
#include "tools/read/scenario_reader.hpp"
#include "scenario_text_support.hpp"

using namespace knockon;

namespace {

constexpr double kMin = 60.0;
constexpr double kKm = 1000.0;

SupplementRule rule(double share, double minutes_per_100km, double threshold_km = 30.0) {
    SupplementRule r;
    r.share = share;
    r.per_100km = minutes_per_100km * kMin;
    r.distance_threshold = threshold_km * kKm;
    return r;
}

// A level 10 km line, one stopping train A -> B over 9 km; the supplement rule is spliced in.
std::string stopping_line(const std::string& supplement) {
    using namespace scenariotext;
    return up_line_head({.name = "Supplement test line",
                         .length = "10 km",
                         .stations = {"{id: A, name: Amberlow, at: 0.5 km}", "{id: B, name: Bexcote, at: 9.5 km}"},
                         .distant_distance = ""}) +
           R"(    - {id: U1, track: U, at: 0 km, direction: up}
    - {id: U2, track: U, at: 0.8 km, direction: up}
    - {id: U3, track: U, at: 5 km, direction: up}
    - {id: U4, track: U, at: 9.8 km, direction: up}
)" + emu_train_types("EMU", supplement) +
           R"(timetable:
  rounding: 30 s
  services:
    - id: T1
      type: EMU
      direction: up
      calls:
        - {station: A, dep: "08:00"}
        - {station: B}
)";
}

ServiceRun plan_only_service(const Scenario& sc) {
    const Service& svc = sc.timetable.services.at(0);
    return plan_service(*service_paths(sc), svc, *sc.find_train_type(svc.train_type), sc.timetable.rounding);
}

}  // namespace

TEST_CASE("UIC 451-1 supplement: share of the running time plus minutes per 100 km", "[supplement]") {
    const double technical = 60.0 * kMin;
    // tests/REFERENCES.md C3: 60 min over 150 km at 5 %, loco-hauled 1.5 min/100 km -> 65.25 min.
    CHECK(technical + running_time_supplement(rule(0.05, 1.5), technical, 150 * kKm, 150 * kKm) ==
          Approx(65.25 * kMin).margin(1e-9));
    // tests/REFERENCES.md C3: multiple unit, 1.0 min/100 km -> 64.50 min.
    CHECK(technical + running_time_supplement(rule(0.05, 1.0), technical, 150 * kKm, 150 * kKm) ==
          Approx(64.50 * kMin).margin(1e-9));
    // tests/REFERENCES.md C3: a 25 km path is under the 30 km threshold: no distance part -> 63.0 min.
    CHECK(technical + running_time_supplement(rule(0.05, 1.5), technical, 25 * kKm, 25 * kKm) ==
          Approx(63.0 * kMin).margin(1e-9));
}

TEST_CASE("UIC 451-1 supplement: threshold and stretch", "[supplement]") {
    const double technical = 20.0 * kMin;
    // tests/REFERENCES.md C3: "no distance part on paths <= 30 km": exactly 30 km still gets none.
    CHECK(running_time_supplement(rule(0.05, 1.0), technical, 30 * kKm, 30 * kKm) ==
          Approx(0.05 * technical).margin(1e-9));
    // Just over the threshold the distance part applies in full (C3; [D]: 0.05*1200 + 60*30.001/100).
    CHECK(running_time_supplement(rule(0.05, 1.0), technical, 30.001 * kKm, 30.001 * kKm) ==
          Approx(60.0 + 18.0006).margin(1e-6));
    // The distance part is per stretch: 40 km of a 150 km path get 40 % of 1.5 min ([D] from C3).
    CHECK(running_time_supplement(rule(0.04, 1.5), technical, 40 * kKm, 150 * kKm) ==
          Approx(0.04 * technical + 0.4 * 90.0).margin(1e-9));
    // A stretch of a long path keeps its distance part even when the stretch alone is short
    // (the threshold looks at the whole path, C3).
    CHECK(running_time_supplement(rule(0.05, 1.0), 5 * kMin, 10 * kKm, 150 * kKm) ==
          Approx(15.0 + 6.0).margin(1e-9));
    // No rule, no supplement (common practice, no source).
    CHECK(running_time_supplement(SupplementRule{0.0, 0.0, 30000.0}, technical, 150 * kKm, 150 * kKm) == 0.0);
}

TEST_CASE("Planned run: scheduled running time = technical + UIC 451-1 supplement", "[supplement][plan]") {
    SECTION("9 km path under the 30 km threshold: percentage only") {
        // tests/REFERENCES.md C3: paths <= 30 km get no distance part.
        const Scenario sc = parse_scenario(stopping_line("{percent: 5 %, per_100km: 1 min, threshold: 30 km}"),
                                           "supplement.yaml");
        const ServiceRun run = plan_only_service(sc);
        REQUIRE(run.calls.size() == 2);
        const PlannedCall& b = run.calls[1];
        REQUIRE(b.technical_running > 0.0);
        CHECK(b.scheduled_running == Approx(1.05 * b.technical_running).margin(1e-6));
        // The constructed arrival is the departure plus scheduled running, rounded up to 30 s
        // (README, timetable.rounding).
        const double expected = std::ceil((8 * 3600.0 + b.scheduled_running) / 30.0) * 30.0;
        CHECK(b.scheduled_arrival == Approx(expected).margin(1e-6));
        CHECK(b.scheduled_arrival - 8 * 3600.0 >= b.scheduled_running);
        CHECK(b.scheduled_arrival - 8 * 3600.0 < b.scheduled_running + 30.0);
        CHECK(b.timetabled_running == Approx(b.scheduled_arrival - 8 * 3600.0).margin(1e-9));
        // The fastest run is what the train actually does (planned times, service_run.hpp).
        CHECK(b.planned_arrival == Approx(8 * 3600.0 + b.technical_running).margin(1e-6));
    }
    SECTION("threshold lowered to 5 km: the 9 km stretch gets 9 % of 1 min") {
        // tests/REFERENCES.md C3 rule with our own threshold; [D]: 60 s * 9 km / 100 km = 5.4 s.
        const Scenario sc = parse_scenario(stopping_line("{percent: 5 %, per_100km: 1 min, threshold: 5 km}"),
                                           "supplement.yaml");
        const ServiceRun run = plan_only_service(sc);
        const PlannedCall& b = run.calls.at(1);
        CHECK(b.scheduled_running == Approx(1.05 * b.technical_running + 5.4).margin(1e-6));
    }
}
