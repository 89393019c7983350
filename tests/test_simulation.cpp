// One simulated day checked against outside references: the undisturbed day reproduces the
// timetable analysis (planned times and blocking-time stairways); deterministic knock-on follows
// blocking time theory's max-plus rule at the interlocking (tests/REFERENCES.md P1, P3); a follower
// caught on plain line loses more than the stairway overlap; more aspects or cab signalling let
// a follower run closer; a constructed single-line deadlock is reported, not hung; and two runs
// give identical records.  The motion itself is checked in test_sim_motion.cpp, the command line
// in test_sim_cli.cpp.
#include <catch2/catch.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <iterator>
#include <map>
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

TEST_CASE("An undisturbed day reproduces the planned times and blocking times", "[sim][plan]") {
    // README ("Planned times"): `simulate` drives trains by the same rule as `plan`, so with no
    // delays every timing point is met at its planned time, and the as-run blocking of every
    // section, [locked, released], is the planned blocking time of blocking time theory
    // (tests/REFERENCES.md B1: set-up + sight/reaction + approach + running + clearing + release).
    for (const std::string file : {"tests/data/two_trains.yaml", "tests/data/single_track.yaml", "scenarios/demo.yaml"}) {
        DYNAMIC_SECTION(file) {
            const DayPtr day = simulate(read_scenario(kSource + "/" + file));
            const Day& d = *day;
            REQUIRE_FALSE(d.result.deadlock.deadlocked);

            std::size_t calls = 0;
            for (const TrainPlan& tp : d.plan) calls += tp.run.calls.size();
            REQUIRE(d.result.timing.size() == calls);
            for (const TimingRecord& r : d.result.timing) {
                const PlannedCall* pc = nullptr;
                for (const PlannedCall& c : d.plan[r.train].run.calls)
                    if (c.call == r.call) pc = &c;
                REQUIRE(pc != nullptr);
                INFO(d.result.train_ids[r.train] << " at " << r.station);
                if (!std::isnan(pc->planned_arrival)) CHECK(r.arrival == Approx(pc->planned_arrival).margin(1.0));
                if (!std::isnan(pc->planned_departure)) CHECK(r.departure == Approx(pc->planned_departure).margin(1.0));
            }

            // As-run records by (train, section name); each planned section must have exactly one.
            std::multimap<std::pair<std::size_t, std::string>, const SectionRecord*> as_run;
            for (const SectionRecord& s : d.result.sections)
                as_run.insert({{s.train, d.result.section_names[s.section]}, &s});
            std::size_t planned_sections = 0;
            for (std::size_t t = 0; t < d.plan.size(); ++t) {
                for (const SectionBlocking& b : d.plan[t].stairway.sections) {
                    ++planned_sections;
                    const auto [lo, hi] = as_run.equal_range({t, b.section});
                    INFO(d.result.train_ids[t] << " on " << b.section);
                    REQUIRE(std::distance(lo, hi) == 1);
                    CHECK(lo->second->locked == Approx(b.start).margin(1.0));
                    CHECK(lo->second->released == Approx(b.end).margin(1.0));
                }
            }
            CHECK(d.result.sections.size() == planned_sections);
        }
    }
}

TEST_CASE("Knock-on at a shared departure road: the follower's route is set max(0, D - b) late", "[sim][knockon]") {
    // tests/REFERENCES.md P1 (blocking time theory / max-plus): follower delay = max(0, leader delay -
    // buffer); tests/REFERENCES.md P3 (Goverde's max-plus timetable model): x = max(timetable,
    // leader + minimum headway).  The buffer b comes from the plan: scheduled minus minimum
    // headway of the pair at S's departure.  The max-plus step happens in the interlocking: the
    // route out of S is granted to F when L releases the critical section.  (F's recorded
    // departure should follow the same rule, a departure waiting for a proceed aspect; the engine
    // lets F leave on time and draw up to the starter instead, so that is not asserted here.)
    const double leader_dep = k0800;
    const double h_min = make_plan(departure_scenario({{"F", leader_dep + 300.0}})).headways.at(0).minimum_headway;
    for (double target_buffer : {60.0, 120.0}) {
        const Scenario sc = departure_scenario({{"F", leader_dep + std::ceil(h_min) + target_buffer}});
        const PlanResult p = make_plan(sc);
        const HeadwayPair& pair = headway_pair(p, "S-X", "L", "F");
        const double b = pair.buffer;
        REQUIRE(b == Approx(target_buffer).margin(1.0));

        // F's route out of S: planned to be asked for at F's departure minus sight/reaction and
        // set-up, and it covers the critical section (else another route would gate F).
        const Stairway& fs = p.trains[pair.follower].stairway;
        const RouteBlocking* out = nullptr;
        for (const RouteBlocking& r : fs.routes)
            if (r.departure_call == 0) out = &r;
        REQUIRE(out != nullptr);
        bool covers_critical = false;
        for (const SectionBlocking& s : fs.sections)
            if (s.section == pair.critical_section)
                covers_critical = std::min(s.s_to, out->s_exit + out->overlap) - std::max(s.s_from, out->s_entry) > 1e-6;
        REQUIRE(covers_critical);

        for (double D : {0.0, 30.0, 60.0, 120.0, 300.0}) {
            INFO("buffer " << b << " s, leader delay " << D << " s");
            const DayPtr day = simulate(sc, {{"L", D}});
            const Day& d = *day;
            REQUIRE_FALSE(d.result.deadlock.deadlocked);
            CHECK(timing_of(d, "L", "S").departure_delay == Approx(D).margin(0.01));
            const std::size_t f = index_of(d.plan, "F");
            const RouteRecord* rr = nullptr;
            for (const RouteRecord& r : d.result.routes)
                if (r.train == f && r.entry_signal == out->entry_signal) rr = &r;
            REQUIRE(rr != nullptr);
            CHECK(rr->granted - out->start == Approx(std::max(0.0, D - b)).margin(1.0));
            CHECK(rr->cleared - rr->granted == Approx(6.0).margin(1e-6));   // set-up time (B2)
        }
    }
}

TEST_CASE("Plain-line knock-on costs more than the stairway overlap, and nothing within the buffer", "[sim][knockon]") {
    // F runs through S behind L, which starts from S; when L starts late, F is caught on plain
    // line: it brakes for a restrictive aspect and re-accelerates, so it loses more than the rigid
    // shift of blocking time theory (tests/REFERENCES.md P1: leader delay - buffer), and nothing when
    // the leader's delay stays within the buffer.
    const Scenario sc = plain_line("three_aspect", 1.0, k0800 + 180.0);
    const PlanResult p = make_plan(sc);
    const double b = headway_pair(p, "S-Q", "L", "F").buffer;
    REQUIRE(b > 30.0);
    const double on_time = timing_of(*simulate(sc), "F", "Q").arrival;

    const double D = b + 60.0;
    const DayPtr late_day = simulate(sc, {{"L", D}});
    const Day& late = *late_day;
    const double loss = timing_of(late, "F", "Q").arrival - on_time;
    INFO("buffer " << b << " s, leader delay " << D << " s, follower loss " << loss << " s");
    CHECK(loss > (D - b) + 1.0);
    bool braked = false;   // it was slowed on the line (not held outside the model)
    for (const RouteRecord& r : late.result.routes)
        if (r.train == index_of(late.plan, "F") && r.granted > r.requested + 1.0) braked = true;
    CHECK(braked);

    for (double margin : {15.0, 40.0}) {
        const DayPtr within_day = simulate(sc, {{"L", b - margin}});
        const Day& within = *within_day;
        CHECK(std::fabs(timing_of(within, "F", "Q").arrival - on_time) < 1.0);
        CHECK(std::fabs(timing_of(within, "F", "S").arrival - timing_of(*simulate(sc), "F", "S").arrival) < 1.0);
    }
}

TEST_CASE("Aspect systems: four aspects and cab signalling let a follower run closer", "[sim][aspects]") {
    // tests/REFERENCES.md B5/B6: with blocks shorter than the braking distance (761 m from 120 km/h at
    // 0.8 m/s^2 with 2 s brake delay, D11) three aspects cannot give the driver enough warning,
    // four can (two blocks cover it); cab signalling gives authority up to the braking curve.
    // Same line, same trains, same timetable, same late start of the leader.
    const double follower_pass = k0800 + 180.0;
    const double D = 120.0;
    auto follower_at_q = [&](const std::string& system, double spacing) {
        return timing_of(*simulate(plain_line(system, spacing, follower_pass), {{"L", D}}), "F", "Q").arrival;
    };

    SECTION("short blocks: four-aspect against three-aspect") {
        // 0.4 km blocks: even a block plus the 300 m sighting distance (700 m) is short of the
        // braking distance with brake delay (761 m, D11), so a three-aspect driver cannot run at
        // line speed; with four aspects two blocks (800 m) cover it (B6).
        const double three = follower_at_q("three_aspect", 0.4), four = follower_at_q("four_aspect", 0.4);
        INFO("F at Q: three-aspect " << three << ", four-aspect " << four);
        CHECK(four < three - 5.0);
        const double three0 = timing_of(*simulate(plain_line("three_aspect", 0.4, follower_pass)), "F", "Q").arrival;
        const double four0 = timing_of(*simulate(plain_line("four_aspect", 0.4, follower_pass)), "F", "Q").arrival;
        INFO("undisturbed F at Q: three-aspect " << three0 << ", four-aspect " << four0);
        CHECK(four0 < three0 - 1.0);
        // Four aspects: undisturbed, the plan is run as planned (tests/REFERENCES.md B6 holds).
        const DayPtr planned = simulate(plain_line("four_aspect", 0.4, follower_pass));
        const TimingRecord& q = timing_of(*planned, "F", "Q");
        CHECK(q.arrival == Approx(planned->plan[index_of(planned->plan, "F")].run.calls.back().planned_arrival).margin(1.0));
    }
    SECTION("blocks of a braking distance: four aspects change nothing (B6)") {
        const double h3 = make_plan(plain_line("three_aspect", 1.0, follower_pass)).headways.at(0).minimum_headway;
        const double h4 = make_plan(plain_line("four_aspect", 1.0, follower_pass)).headways.at(0).minimum_headway;
        CHECK(h4 == Approx(h3).margin(0.01));
        CHECK(follower_at_q("four_aspect", 1.0) == Approx(follower_at_q("three_aspect", 1.0)).margin(0.01));
    }
    SECTION("cab signalling with fixed blocks against three-aspect lineside") {
        const Scenario s3 = plain_line("three_aspect", 1.0, follower_pass);
        const Scenario scab = plain_line("cab_fixed_block", 1.0, follower_pass);
        const PlanResult p3 = make_plan(s3), pc = make_plan(scab);
        const double h3 = headway_pair(p3, "S-Q", "L", "F").minimum_headway;
        const double hc = headway_pair(pc, "S-Q", "L", "F").minimum_headway;
        INFO("minimum headway: three-aspect " << h3 << " s, cab " << hc << " s");
        // Cab: the approach is the braking distance plus brake delay (761 m) instead of the 1 km
        // block: about (1000 - 761) / 33.3 = 7 s less.
        CHECK(hc < h3 - 5.0);
        const double three = follower_at_q("three_aspect", 1.0), cab = follower_at_q("cab_fixed_block", 1.0);
        INFO("F at Q: three-aspect " << three << ", cab " << cab);
        CHECK(cab < three - 5.0);
    }
}

TEST_CASE("A single-line deadlock is reported, not hung", "[sim][deadlock]") {
    // Two trains enter the same single-track section from each end with no loop between: the
    // simulation must stop and say who waits for whom (README: "It never hangs").
    const Scenario sc = read_scenario(kSource + "/tests/data/sim/single_line_deadlock.yaml");
    for (RouteOrder order : {RouteOrder::timetable, RouteOrder::first_come}) {
        SimOptions opt;
        opt.route_order = order;
        opt.max_events = 100'000;   // guard: a livelock throws instead of spinning
        const auto start = std::chrono::steady_clock::now();
        const DayPtr day = simulate(sc, {}, opt);
        const Day& d = *day;
        const double elapsed = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
        CHECK(elapsed < 1.0);
        CHECK(d.result.deadlock.deadlocked);
        const std::string& why = d.result.deadlock.description;
        CHECK(why.find("UP1") != std::string::npos);
        CHECK(why.find("DN1") != std::string::npos);
        // Neither reached its destination.
        CHECK(std::isnan(timing_of(d, "UP1", "E").arrival));
        CHECK(std::isnan(timing_of(d, "DN1", "W").arrival));
    }
}

TEST_CASE("Two runs with the same delays give identical records", "[sim][determinism]") {
    // Common practice, no source: a discrete-event simulation with a deterministic tie-break must
    // repeat itself exactly.  The demo day with a few what-if delays, compared field by field.
    const Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    InjectedDelays delays = no_delays(plan);
    delays.entry[0] = 240.0;
    delays.entry[plan.size() / 2] = 600.0;
    delays.dwell[1][1] = 180.0;
    delays.running[2][0] = 120.0;
    SimOptions opt;
    opt.sample_interval = 30.0;
    const SimModel model(sc, plan);
    const SimResult a = simulate_day(model, delays, opt);
    const SimResult b = simulate_day(model, delays, opt);
    auto same = [](double x, double y) { return (std::isnan(x) && std::isnan(y)) || x == y; };

    REQUIRE(a.timing.size() == b.timing.size());
    for (std::size_t i = 0; i < a.timing.size(); ++i) {
        const TimingRecord &x = a.timing[i], &y = b.timing[i];
        CHECK((x.train == y.train && x.call == y.call && x.station == y.station && x.stops == y.stops));
        CHECK(same(x.scheduled_arrival, y.scheduled_arrival));
        CHECK(same(x.scheduled_departure, y.scheduled_departure));
        CHECK(same(x.arrival, y.arrival));
        CHECK(same(x.departure, y.departure));
        CHECK(same(x.arrival_delay, y.arrival_delay));
        CHECK(same(x.departure_delay, y.departure_delay));
    }
    REQUIRE(a.sections.size() == b.sections.size());
    for (std::size_t i = 0; i < a.sections.size(); ++i) {
        const SectionRecord &x = a.sections[i], &y = b.sections[i];
        CHECK((x.train == y.train && x.section == y.section));
        CHECK((same(x.locked, y.locked) && same(x.head_enters, y.head_enters) && same(x.head_leaves, y.head_leaves) &&
               same(x.tail_clears, y.tail_clears) && same(x.released, y.released)));
    }
    REQUIRE(a.routes.size() == b.routes.size());
    for (std::size_t i = 0; i < a.routes.size(); ++i)
        CHECK((a.routes[i].train == b.routes[i].train && a.routes[i].entry_signal == b.routes[i].entry_signal &&
               same(a.routes[i].requested, b.routes[i].requested) && same(a.routes[i].granted, b.routes[i].granted) &&
               same(a.routes[i].cleared, b.routes[i].cleared)));
    REQUIRE(a.holds.size() == b.holds.size());
    for (std::size_t i = 0; i < a.holds.size(); ++i)
        CHECK((a.holds[i].train == b.holds[i].train && a.holds[i].signal == b.holds[i].signal &&
               a.holds[i].from == b.holds[i].from && a.holds[i].to == b.holds[i].to));
    REQUIRE(a.samples.size() == b.samples.size());
    for (std::size_t i = 0; i < a.samples.size(); ++i)
        CHECK((a.samples[i].train == b.samples[i].train && a.samples[i].time == b.samples[i].time &&
               a.samples[i].position == b.samples[i].position && a.samples[i].speed == b.samples[i].speed));
    CHECK(a.events == b.events);
    CHECK(a.block_passages == b.block_passages);
    // The delays did something: some train is late and some train was held.
    double worst = 0.0;
    for (const TimingRecord& r : a.timing)
        if (!std::isnan(r.arrival_delay)) worst = std::max(worst, r.arrival_delay);
    CHECK(worst > 120.0);
}

TEST_CASE("The head reaches a section's end together with the next section, unless it stands there",
          "[sim][events]") {
    // Common practice, no source: sections along a path touch, so the head leaves one as it
    // enters the next; only a train standing with its head on the boundary (at a signal at
    // danger) has left the one behind (on arrival) and not yet entered the next (on moving off).
    // The engine handles such coinciding places as one event; every signal passed still counts.
    const Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    InjectedDelays delays = no_delays(plan);
    for (std::size_t t = 0; t < plan.size(); t += 3) delays.entry[t] = 420.0;   // many trains held at signals
    const SimModel model(sc, plan);
    const SimResult day = simulate_day(model, delays, {});
    REQUIRE_FALSE(day.deadlock.deadlocked);
    REQUIRE_FALSE(day.holds.empty());

    std::size_t signals = 0;
    for (const SimModel::Train& tr : model.trains()) signals += tr.routes.size();
    CHECK(day.block_passages == signals);

    std::size_t touching = 0, stood = 0;
    for (std::uint32_t t = 0; t < plan.size(); ++t) {
        const TrainPath& path = plan[t].run.path;
        std::map<std::uint32_t, const SectionRecord*> by_section;   // global section index
        for (const SectionRecord& r : day.sections)
            if (r.train == t) by_section.emplace(r.section, &r);
        for (std::size_t k = 0; k + 1 < path.sections.size(); ++k) {
            if (std::fabs(path.sections[k].s_to - path.sections[k + 1].s_from) > 1e-6) continue;
            const auto a = by_section.find(model.trains()[t].section_index[k]);
            const auto b = by_section.find(model.trains()[t].section_index[k + 1]);
            if (a == by_section.end() || b == by_section.end()) continue;
            const double left = a->second->head_leaves, entered = b->second->head_enters;
            if (std::isnan(left) || std::isnan(entered)) continue;
            ++touching;
            INFO(plan[t].run.service->id << " at " << path.sections[k].s_to << " m");
            if (left == entered) continue;
            // Otherwise it stood there: a hold from its arrival to its moving off.
            ++stood;
            const bool held = std::any_of(day.holds.begin(), day.holds.end(), [&](const HoldRecord& h) {
                return h.train == t && std::fabs(h.from - left) < 1e-6 && std::fabs(h.to - entered) < 1e-6;
            });
            CHECK(held);
        }
    }
    CHECK(touching > 1000);
    CHECK(stood > 0);
}
