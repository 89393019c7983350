// Blocking times by blocking time theory: the six components of a route's blocking time, the
// warning point each aspect system gives, the route out of a stop, and the detection-section
// intervals built from the routes.
//
// The test line is level, line speed 160 km/h, and the train (no resistance, far more power
// than it needs, max 160 km/h) comes in from beyond the line end at 160 km/h and runs through:
// it holds 160 km/h = 44.444 m/s exactly, so every time is distance / speed.
#include <catch2/catch.hpp>

#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

namespace {

constexpr double kV = 160.0 / 3.6;   // m/s
constexpr double kSetupSight = 18.0; // route setup 6 s + sight and reaction 12 s (tests/REFERENCES.md B2, B3)
constexpr double k0800 = 8 * 3600.0;

std::string signal_id(double at_m) {
    std::string id = "S";
    id += std::to_string(std::lround(at_m));
    return id;
}

struct LineSpec {
    std::string system = "three_aspect";
    std::vector<double> signals_m{0, 1000, 3000, 5000, 7000, 9000};
    double brake_delay_s = 0.0;
    std::string extra_signal_fields;   // appended to the signal at 5000 m, e.g. "distant_distance: 1500 m"
    // Timetable services (YAML list items, indented by 4).
    std::string services =
        "    - {id: P1, type: FAST, direction: up, enter: {speed: 160 km/h}, leave: true,\n"
        "       calls: [{station: P, pass: \"08:00:00\"}]}\n";
};

// Stations: P at 1 km (the pass), Q at 4.5 km (between the 3000 m and 5000 m signals), R at 9.5 km.
std::string line_yaml(const LineSpec& spec) {
    std::ostringstream y;
    y << R"(knockon: 1
name: Constant-speed test line
line_type: mixed
infrastructure:
  length: 12 km
  gradients:
    - {from: 0 km, value: 0 per mille}
  speed_limits:
    - {from: 0 km, value: 160 km/h}
  tracks:
    - {id: U, from: 0 km, to: 12 km, directions: up}
  stations:
    - {id: P, name: Pellow Halt, at: 1 km}
    - {id: Q, name: Quillan Cross, at: 4.5 km}
    - {id: R, name: Rushby End, at: 9.5 km}
  signalling:
    areas:
      - {from: 0 km, to: 12 km, system: )"
      << spec.system << R"(}
    defaults: {sighting_distance: 300 m, overlap: 200 m, distant_distance: 1200 m}
    interlocking: {route_setup: 6 s, release: 3 s, sight_reaction: 12 s}
  signals:
)";
    for (double s : spec.signals_m) {
        y << "    - {id: " << signal_id(s) << ", track: U, at: " << s << " m, direction: up";
        if (s == 5000 && !spec.extra_signal_fields.empty()) y << ", " << spec.extra_signal_fields;
        y << "}\n";
    }
    y << R"(train_types:
  - id: FAST
    length: 200 m
    mass: 400 t
    max_speed: 160 km/h
    traction: {max_force: 4000 kN, power: 100 MW}
    resistance: {a: 0 kN}
    braking: {deceleration: 0.5 m/s2, delay: )"
      << spec.brake_delay_s << R"( s}
    min_dwell: 30 s
timetable:
  rounding: 30 s
  services:
)" << spec.services;
    return y.str();
}

struct Planned {
    Scenario scenario;
    std::vector<TrainPlan> trains;
};

Planned plan_line(const LineSpec& spec) {
    Planned p{parse_scenario(line_yaml(spec), "blocking_test.yaml"), {}};
    p.trains = plan_trains(p.scenario);
    return p;
}

const RouteBlocking& route_from(const TrainPlan& tp, const std::string& entry) {
    for (const RouteBlocking& r : tp.stairway.routes)
        if (r.entry_signal == entry) return r;
    FAIL("no route from signal " << entry);
    throw;  // not reached
}

const SectionBlocking& section(const TrainPlan& tp, const std::string& id) {
    for (const SectionBlocking& b : tp.stairway.sections)
        if (b.section == id) return b;
    FAIL("no blocking of section " << id);
    throw;  // not reached
}

}  // namespace

TEST_CASE("The test train holds 160 km/h", "[blocking]") {
    // Precondition of every closed form below (common practice, no source).
    const Planned p = plan_line({});
    REQUIRE(p.trains.size() == 1);
    const ServiceRun& run = p.trains[0].run;
    for (double s : {0.0, 1000.0, 2500.0, 6000.0, 11999.0}) CHECK(run.speed_at(s) == Approx(kV).epsilon(1e-9));
    CHECK(run.head_reach(1000.0) == Approx(k0800).margin(1e-6));
    CHECK(run.head_reach(3000.0) - run.head_reach(1000.0) == Approx(45.0).margin(1e-6));
}

TEST_CASE("Blocking time = setup + sight/reaction + approach + running + clearing + release", "[blocking]") {
    // tests/REFERENCES.md B1 (blocking time theory, Pachl; Hansen & Pachl 2014): v = 160 km/h,
    // setup 6 s, sight 12 s, approach 1000 m, block 2000 m, overlap 200 m, train 200 m,
    // release 3 s -> 6 + 12 + 22.5 + 45 + 9 + 3 = 97.5 s.
    const Planned p = plan_line({});
    const RouteBlocking& r = route_from(p.trains[0], "S1000");
    CHECK(r.exit_signal == "S3000");
    CHECK(r.s_entry == Approx(1000.0).margin(1e-6));
    CHECK(r.s_exit == Approx(3000.0).margin(1e-6));
    CHECK(r.overlap == Approx(200.0).margin(1e-9));
    CHECK(r.warning_point == Approx(0.0).margin(1e-6));  // 3-aspect: the previous main signal (models/DOMAIN.md 4)
    CHECK(r.setup == Approx(6.0).margin(1e-9));           // B1 / B2
    CHECK(r.sight_reaction == Approx(12.0).margin(1e-9)); // B1 / B3
    CHECK(r.approach == Approx(22.5).margin(0.01));       // B1: 1000 m at 44.44 m/s
    CHECK(r.running == Approx(45.0).margin(0.01));        // B1: 2000 m
    CHECK(r.clearing == Approx(9.0).margin(0.01));        // B1: overlap 200 m + train 200 m
    CHECK(r.release == Approx(3.0).margin(1e-9));         // B1
    CHECK(r.end - r.start == Approx(97.5).margin(0.01));  // B1 total
    // Absolute placing: the head passes the 1000 m signal at 08:00:00 (the pass at P).
    CHECK(r.start == Approx(k0800 - 22.5 - 18.0).margin(0.01));
    CHECK(r.end == Approx(k0800 + 45.0 + 9.0 + 3.0).margin(0.01));
}

TEST_CASE("Detection sections: blocked from the first route that takes them to sectional release",
          "[blocking]") {
    // models/DOMAIN.md 4: possession (blocking) and physical occupation differ; a section is possessed
    // before the train arrives and after it has left.  [D] at constant 44.444 m/s.
    const Planned p = plan_line({});
    const TrainPlan& tp = p.trains[0];
    // U:1.200-3.000 is taken only by the route S1000 -> S3000.
    const SectionBlocking& b = section(tp, "U:1.200-3.000");
    CHECK(b.start == Approx(k0800 - 22.5 - kSetupSight).margin(0.01));
    CHECK(b.occupied_from == Approx(k0800 + 200.0 / kV).margin(0.01));          // head at 1200 m
    CHECK(b.occupied_to == Approx(k0800 + (2000.0 + 200.0) / kV).margin(0.01)); // tail past 3000 m
    CHECK(b.end == Approx(b.occupied_to + 3.0).margin(1e-6));                   // + release (B1)
    CHECK(b.start < b.occupied_from);
    // U:3.000-3.200, the overlap of S3000, is taken already by the route S1000 -> S3000 (its
    // overlap), one block (1000 m, 22.5 s) before the route S3000 -> S5000 would take it.
    const SectionBlocking& o = section(tp, "U:3.000-3.200");
    CHECK(o.start == Approx(route_from(tp, "S1000").start).margin(1e-9));
    CHECK(o.start == Approx(route_from(tp, "S3000").start - 22.5).margin(0.01));
    CHECK(o.end == Approx(k0800 + (2200.0 + 200.0) / kV + 3.0).margin(0.01));
}

TEST_CASE("Warning points by aspect system", "[blocking][aspects]") {
    SECTION("three-aspect: the previous main signal, one block back") {
        // tests/REFERENCES.md B5/B6 and models/DOMAIN.md 4: 3-aspect approach = running over the previous block.
        LineSpec spec;
        spec.signals_m = {0, 1200, 2400, 3600, 4800, 6000, 7200, 8400, 9600, 10800};
        const Planned p = plan_line(spec);
        const RouteBlocking& r = route_from(p.trains[0], "S3600");
        CHECK(r.warning_point == Approx(2400.0).margin(1e-6));
        CHECK(r.approach == Approx(1200.0 / kV).margin(0.01));  // 27 s
    }
    SECTION("four-aspect, blocks shorter than the braking distance: two blocks back") {
        // tests/REFERENCES.md B5/B6: with 4 aspects two blocks together cover the braking distance.
        // Braking distance 160 km/h at 0.5 m/s2 = 1975.3 m (tests/REFERENCES.md D11) > block 1200 m.
        LineSpec spec;
        spec.system = "four_aspect";
        spec.signals_m = {0, 1200, 2400, 3600, 4800, 6000, 7200, 8400, 9600, 10800};
        const Planned p = plan_line(spec);
        const TrainPlan& tp = p.trains[0];
        for (const char* id : {"S2400", "S3600", "S6000", "S9600"}) {
            const RouteBlocking& r = route_from(tp, id);
            INFO("route from " << id);
            CHECK(r.s_entry - r.warning_point == Approx(2400.0).margin(1e-6));
            CHECK(r.approach == Approx(2400.0 / kV).margin(0.01));  // 54 s
        }
        const RouteBlocking& r = route_from(tp, "S3600");
        CHECK(r.end - r.start == Approx(18.0 + 54.0 + 27.0 + 9.0 + 3.0).margin(0.01));  // B1 composition
    }
    SECTION("four-aspect, blocks longer than the braking distance: one block back") {
        // tests/REFERENCES.md B6: the second block back is needed only when one block is shorter than
        // the braking distance (1975.3 m, D11); here blocks are 2000 m.
        LineSpec spec;
        spec.system = "four_aspect";
        const Planned p = plan_line(spec);
        const RouteBlocking& r = route_from(p.trains[0], "S5000");
        CHECK(r.warning_point == Approx(3000.0).margin(1e-6));
        CHECK(r.approach == Approx(45.0).margin(0.01));
    }
    SECTION("two-aspect: the distant signal") {
        // tests/REFERENCES.md B5: with 2 aspects the driver learns the main signal's aspect at its
        // distant signal; default distant distance 1200 m, one signal given 1500 m.
        LineSpec spec;
        spec.system = "two_aspect";
        spec.extra_signal_fields = "distant_distance: 1500 m";
        const Planned p = plan_line(spec);
        const RouteBlocking& r3 = route_from(p.trains[0], "S3000");
        CHECK(r3.warning_point == Approx(1800.0).margin(1e-6));
        CHECK(r3.approach == Approx(1200.0 / kV).margin(0.01));  // 27 s
        const RouteBlocking& r5 = route_from(p.trains[0], "S5000");
        CHECK(r5.warning_point == Approx(3500.0).margin(1e-6));
        CHECK(r5.approach == Approx(1500.0 / kV).margin(0.01));  // 33.75 s
    }
    SECTION("cab signalling, fixed blocks: the braking distance plus brake delay") {
        // tests/REFERENCES.md D11, closed form: v^2/(2b) + v*t = 44.444^2/(2*0.5) + 44.444*2
        // = 1975.31 + 88.89 = 2064.20 m ahead of the block marker.
        LineSpec spec;
        spec.system = "cab_fixed_block";
        spec.brake_delay_s = 2.0;
        const Planned p = plan_line(spec);
        const double d = kV * kV / (2 * 0.5) + kV * 2.0;
        REQUIRE(d == Approx(2064.20).margin(0.01));
        for (const char* id : {"S3000", "S5000", "S7000"}) {
            const RouteBlocking& r = route_from(p.trains[0], id);
            INFO("route from " << id);
            // The braking point is a point of the running-time grid (2 m): up to one step in rear
            // of the closed form, never beyond it.
            CHECK(r.s_entry - r.warning_point >= d - 1e-6);
            CHECK(r.s_entry - r.warning_point <= d + 2.0);
            CHECK(r.approach == Approx(d / kV).margin(2.0 / kV + 0.01));  // 46.44 s
        }
    }
}

TEST_CASE("Four-aspect: every route's approach covers at least the braking distance", "[blocking][aspects]") {
    // Guards against the second signal of a path that starts at the line end getting a warning
    // point only one short block (1200 m) back (models/blocking_time.cpp, warning_point).
    // models/DOMAIN.md 4: the warning point lies (at least) a braking distance in rear of the
    // signal; tests/REFERENCES.md B6: with 4 aspects the signal two back gives the first warning
    // when one block is shorter than the braking distance (1975.3 m, D11).  This holds for
    // the second signal of the path too, whose signal two back lies beyond the line end
    // (the train enters there at 160 km/h): its warning point is not on the modelled line,
    // so at least the braking distance must be assumed, as the first signal already does.
    LineSpec spec;
    spec.system = "four_aspect";
    spec.signals_m = {0, 1200, 2400, 3600, 4800, 6000, 7200, 8400, 9600, 10800};
    const Planned p = plan_line(spec);
    const double braking = kV * kV / (2 * 0.5);  // D11: 1975.3 m
    for (const RouteBlocking& r : p.trains[0].stairway.routes) {
        INFO("route from " << r.entry_signal);
        CHECK(r.s_entry - r.warning_point >= braking - 0.5);
        CHECK(r.approach >= braking / kV - 0.02);
    }
}

TEST_CASE("Route out of a stop starts at the departure less sight/reaction and setup", "[blocking]") {
    // models/DOMAIN.md 4 / blocking_time.hpp: a train standing at a stop needs the route ahead only for
    // its departure; the route must be set and seen (setup 6 s + sight 12 s, B1-B3) by then.
    LineSpec spec;
    spec.services =
        "    - {id: T1, type: FAST, direction: up, enter: {speed: 160 km/h}, calls: [\n"
        "        {station: P, pass: \"08:00:00\"}, {station: Q, dep: \"08:10:00\"}, {station: R}]}\n";
    const Planned p = plan_line(spec);
    const TrainPlan& tp = p.trains[0];
    REQUIRE(tp.run.calls.size() == 3);
    const PlannedCall& q = tp.run.calls[1];
    REQUIRE(q.stops);
    REQUIRE(q.planned_departure == Approx(k0800 + 600.0).margin(1e-9));  // the given dep (arrives well before)

    // S5000 is Q's exit signal (Q at 4500 m); its 3-aspect warning point (S3000) lies behind Q.
    const RouteBlocking& out = route_from(tp, "S5000");
    CHECK(out.start == Approx(q.planned_departure - kSetupSight).margin(1e-6));
    CHECK(out.approach == Approx(tp.run.head_reach(5000.0) - q.planned_departure).margin(1e-6));
    CHECK(out.approach > 0.0);
    CHECK(out.approach < 60.0);  // 500 m from a standstill, not the 10-minute wait
    // The route into Q is blocked as for a running train: from passing its warning point, the
    // signal S1000, at 08:00:00 (the pass at P).
    const RouteBlocking& in = route_from(tp, "S3000");
    CHECK(in.start == Approx(tp.run.head_reach(1000.0) - kSetupSight).margin(1e-6));
    CHECK(in.start == Approx(k0800 - kSetupSight).margin(0.01));
}
