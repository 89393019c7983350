// Focused tests of behaviours the simulation once got wrong: departures against a starter at
// stop, a hindered train that never ran free again, a starter at the stopping mark, a train
// standing on a signal's joint counted as past it.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <memory>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "sim/simulation.hpp"
#include "tools/read/scenario_reader.hpp"
#include "sim_test_support.hpp"

using namespace knockon;

namespace {

using namespace knockon::simtest;

constexpr double k0800 = 8 * 3600.0;

}  // namespace

TEST_CASE("a departure waits for the starter: follower's departure delay = max(0, D - b)", "[sim]") {
    // tests/REFERENCES.md P1; README: "A departure waits for the scheduled time, the minimum dwell and a
    // proceed aspect"; blocking_time.hpp: "it may not start against a signal at stop".
    // Observed: F leaves S on time whatever D, runs 300 m to the starter U02 and stands there
    // (a HoldRecord at U02); its recorded departure is not gated by the route.
    const double h_min = make_plan(departure_scenario({{"F1", k0800 + 300.0}})).headways.at(0).minimum_headway;
    const Scenario sc = departure_scenario({{"F1", k0800 + std::ceil(h_min) + 60.0}});
    const double b = headway_pair(make_plan(sc), "S-X", "L", "F1").buffer;
    for (double D : {120.0, 300.0}) {
        const DayPtr d = simulate(sc, {{"L", D}});
        INFO("buffer " << b << " s, leader delay " << D << " s");
        CHECK(timing_of(*d, "F1", "S").departure_delay == Approx(std::max(0.0, D - b)).margin(1.0));
        for (const HoldRecord& h : d->result.holds) CHECK(h.signal != "U02");
    }
}

TEST_CASE("max-plus chain of three departures (tests/REFERENCES.md P3)", "[sim]") {
    // Goverde's max-plus timetable model: x_k = max(d_k, x_{k-1} + h_min): with buffers b1, b2
    // the delays are d1 = max(0, D - b1), d2 = max(0, d1 - b2).  Needs departures gated at the
    // platform so that F1's whole stairway shifts by d1.
    const double h = make_plan(departure_scenario({{"F1", k0800 + 300.0}})).headways.at(0).minimum_headway;
    const double f1 = k0800 + std::ceil(h) + 60.0, f2 = f1 + std::ceil(h) + 30.0;
    const Scenario sc = departure_scenario({{"F1", f1}, {"F2", f2}});
    const PlanResult p = make_plan(sc);
    const double b1 = headway_pair(p, "S-X", "L", "F1").buffer, b2 = headway_pair(p, "S-X", "F1", "F2").buffer;
    for (double D : {30.0, 120.0, 300.0}) {
        const DayPtr d = simulate(sc, {{"L", D}});
        const double d1 = std::max(0.0, D - b1), d2 = std::max(0.0, d1 - b2);
        INFO("D " << D << ", b1 " << b1 << ", b2 " << b2);
        CHECK(timing_of(*d, "F1", "S").departure_delay == Approx(d1).margin(1.0));
        CHECK(timing_of(*d, "F2", "S").departure_delay == Approx(d2).margin(1.0));
    }
}

TEST_CASE("once the line ahead is clear, a follower that was hindered runs free again", "[sim]") {
    // Level line, no speed limits, no stops ahead: after the last route F had to wait for is set
    // (and the driver knows it), F has nothing left to brake for.  Observed: F brakes in every
    // block to the line end (speed saw-tooth 22-30 m/s on 120 km/h line), although every later
    // route is granted the moment it is asked for: each route is asked for only when the driver
    // sights the previous signal (the forecast of the warning point comes from a trajectory that
    // stops at the end of the authority), is set 18 s later, after the train has passed that
    // signal, and the driver learns it only at the next signal's sighting point.
    SimOptions opt;
    opt.sample_interval = 2.0;
    const DayPtr d = simulate(plain_line("three_aspect", 1.0, k0800 + 180.0), {{"L", 120.0}}, opt);
    const std::size_t f = index_of(d->plan, "F");
    double free_from = 0.0;
    for (const RouteRecord& r : d->result.routes)
        if (r.train == f && r.granted > r.requested + 0.5) free_from = std::max(free_from, r.cleared + 12.0);
    REQUIRE(free_from > 0.0);   // F was hindered
    double last_speed = -1.0;
    std::size_t drops = 0;
    for (const TrajectorySample& x : d->result.samples) {
        if (x.train != f || x.time < free_from + 30.0) continue;   // 30 s: let it finish a braking curve it is on
        if (x.speed < last_speed - 0.01) ++drops;
        last_speed = x.speed;
    }
    CHECK(drops == 0);
}

TEST_CASE("a starter at the stopping mark: its route is needed for the departure", "[sim]") {
    // blocking_time.cpp stop_in() takes stops with c.s < signal - 1e-6, so a train standing with
    // its head at the starter gets the starter's route blocked from its appearance (departure -
    // dwell - 18 s) and the NEXT route marked as the departure route; the simulation locks the
    // starter's route at appearance.  Both should use departure - sight/reaction - set-up.
    std::string y = departure_line_head("Starter at the stopping mark (test)", "1.3 km");
    y += R"(    - {id: U01, track: U, at: 0 km, direction: up}
    - {id: U02, track: U, at: 1.3 km, direction: up}
    - {id: U03, track: U, at: 4 km, direction: up}
    - {id: U04, track: U, at: 6 km, direction: up}
    - {id: U05, track: U, at: 8 km, direction: up}
    - {id: U06, track: U, at: 10 km, direction: up}
)";
    y += kEmu;
    y += R"(timetable:
  services:
    - {id: L, type: EMU10, category: stopping, direction: up, leave: true,
       calls: [{station: S, dep: "08:00"}, {station: X, pass: auto}]}
)";
    const Scenario sc = parse_scenario(y, "starter-at-stop.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const RouteBlocking& starter = plan[0].stairway.routes.at(0);
    REQUIRE(starter.entry_signal == "U02");
    CHECK(starter.departure_call == 0);
    CHECK(starter.start == Approx(k0800 - 18.0).margin(0.01));   // departure - 12 s - 6 s (B1-B3)
    CHECK(plan[0].stairway.routes.at(1).departure_call == -1);
    const DayPtr d = simulate(sc);
    for (const RouteRecord& r : d->result.routes)
        if (r.entry_signal == "U02") CHECK(r.requested == Approx(k0800 - 18.0).margin(1.0));
}

TEST_CASE("a train standing at a signal has not entered the section beyond it", "[sim]") {
    // A train brought to a stand at the end of its authority stops with its head exactly on the
    // signal's joint; the kEnter event for the section beyond fires at that moment (its time is
    // the end of the trajectory), so the record says the head entered the section when it
    // stopped, kPass counts the block passage then, and where no route of the train covers that
    // section the "unprotected stretch" branch of kEnter hands it to the train
    // (Interlocking::take overwrites any holder).  Seen on tests/data/sim/motion_line.yaml: FOLL
    // held at U04 (4.5 km) while LEAD dwells 330 s longer at B.
    const Scenario sc = read_scenario(kSource + "/tests/data/sim/motion_line.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    InjectedDelays delays = no_delays(plan);
    delays.dwell[index_of(plan, "LEAD")][1] = 330.0;
    const SimModel model(sc, plan);
    const SimResult r = simulate_day(model, delays, SimOptions{});
    const std::size_t f = index_of(plan, "FOLL");
    const HoldRecord* hold = nullptr;
    for (const HoldRecord& h : r.holds)
        if (h.train == f && h.signal == "U04") hold = &h;
    REQUIRE(hold != nullptr);
    for (const SectionRecord& x : r.sections)
        if (x.train == f && r.section_names[x.section] == "U:4.500-4.700") CHECK(x.head_enters >= hold->to - 0.01);
}


// ---- One rule for plan and simulation (tests/data/trust/) -----------------------------------------

namespace {

DayPtr simulate_file(const std::string& name, const std::vector<std::pair<std::string, double>>& entry = {}) {
    return simulate(read_scenario(kSource + "/tests/data/trust/" + name), entry);
}

// Every train of an undisturbed day runs as planned: no hold, no knock-on, no deadlock, each
// timing point within 0.5 s of the plan.
void check_runs_as_planned(const Day& d) {
    CHECK_FALSE(d.result.deadlock.deadlocked);
    CHECK(d.result.holds.empty());
    std::vector<std::size_t> next(d.plan.size(), 0);
    for (const TimingRecord& r : d.result.timing) {
        INFO("train " << d.result.train_ids[r.train] << " at " << r.station);
        const PlannedCall& c = d.plan[r.train].run.calls.at(next[r.train]++);
        CHECK(r.knock_on == 0.0);
        if (!std::isnan(c.planned_arrival)) CHECK(r.arrival == Approx(c.planned_arrival).margin(0.5));
    }
}

}  // namespace

TEST_CASE("no knock-on from nowhere: a starter 100 m beyond the stop", "[sim][trust]") {
    // The route beyond the starter is wanted while the train still stands: asked for from its
    // departure as the plan times it (it once came at departure, and the driver met a caution).
    check_runs_as_planned(*simulate_file("starter_100m_beyond_stop.yaml"));
}

TEST_CASE("no knock-on from nowhere: a lone freight and an undisturbed single line", "[sim][trust]") {
    check_runs_as_planned(*simulate_file("lone_freight_single_line.yaml"));
    check_runs_as_planned(*simulate_file("single_line_no_delays.yaml"));
}

TEST_CASE("trains enter over a line end whose first signal is out of sight", "[sim][trust]") {
    // First signal 500 m in, sighting 300 m: they once never entered (every day deadlocked).
    const DayPtr d = simulate_file("first_signal_out_of_sight_of_line_end.yaml");
    check_runs_as_planned(*d);
    CHECK(d->result.events > 0);
}

TEST_CASE("a starter out of sight of the stop: delays pass on as the plan's buffers say", "[sim][trust]") {
    // tests/REFERENCES.md P1 (max-plus): a follower's delay is max(0, leader's delay - buffer), the
    // buffers read from the plan's minimum headways.  The departure needs the route out in the
    // plan and in the simulation alike, starter in sight or not.
    const Scenario sc = read_scenario(kSource + "/tests/data/trust/starter_out_of_sight.yaml");
    const PlanResult plan = make_plan(sc);
    const DayPtr d = simulate_file("starter_out_of_sight.yaml", {{"T1", 300.0}});
    double delay = timing_of(*d, "T1", "BW").arrival_delay;
    CHECK(delay == Approx(300.0).margin(1.0));
    for (const auto& [leader, follower] : {std::pair{"T1", "T2"}, std::pair{"T2", "T3"}}) {
        const double b = headway_pair(plan, "AV-BW", leader, follower).buffer;
        delay = std::max(0.0, delay - b);
        INFO(follower << " behind " << leader << ", buffer " << b << " s");
        CHECK(timing_of(*d, follower, "BW").arrival_delay == Approx(delay).margin(0.5));
    }
}

TEST_CASE("no section is promised to a train behind the one holding it", "[sim][trust]") {
    // The plan has a conflict at the junction; under the timetable order the branch train got
    // ahead of the main-line train and then waited for sections promised to it, while it waited
    // behind: a deadlock on plain double track.
    const DayPtr d = simulate_file("junction_conflict_in_plan.yaml");
    CHECK_FALSE(d->result.deadlock.deadlocked);
    for (const TimingRecord& r : d->result.timing) CHECK_FALSE((std::isnan(r.arrival) && std::isnan(r.departure)));
}
