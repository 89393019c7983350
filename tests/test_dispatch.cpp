// The dispatcher (route order `dispatch`, sim/dispatch.hpp): first come, but a grant is made only
// when every train on the line keeps a way to run to the end of its path.  Checked on a single
// line with two crossing loops (tests/data/study/single_line_crossings.yaml) where first come
// deadlocks on many days, and for undisturbed days on random layouts.
#include <catch2/catch.hpp>

#include <cmath>
#include <memory>
#include <string>
#include <vector>

#include "layout_generator.hpp"
#include "models/plan.hpp"
#include "sim/delay_draws.hpp"
#include "sim/dispatch.hpp"
#include "sim/simulation.hpp"
#include "sim/study.hpp"
#include "sim_test_support.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

namespace {

const std::string kCrossings = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/study/single_line_crossings.yaml";

using simtest::Loaded;

StudyResult study_of(const Loaded& f, RouteOrder order, std::uint32_t days) {
    StudyOptions opt;
    opt.replications = days;
    opt.threads = 2;
    opt.sim.route_order = order;
    opt.draw = [&f](std::uint32_t k) { return draw_delays(f.scenario, f.plan, 1, k); };
    return run_study(*f.model, opt);
}

}  // namespace

TEST_CASE("dispatch: no deadlocked day where first come deadlocks", "[dispatch][study]") {
    const Loaded f(kCrossings);
    const std::uint32_t days = 200;
    const StudyResult first_come = study_of(f, RouteOrder::first_come, days);
    const StudyResult dispatch = study_of(f, RouteOrder::dispatch, days);
    const StudySummary fc = summarize_study(*f.model, first_come, {180.0, 300.0});
    const StudySummary d = summarize_study(*f.model, dispatch, {180.0, 300.0});
    // The same drawn delays (seed 1): first come locks the single line on many days.
    CHECK(fc.deadlocked >= 20);
    CHECK(d.deadlocked == 0);
    CHECK(d.replications == days);
    // Every train of every day reaches its last timing point.
    for (const ReplicationStats& r : dispatch.replications) CHECK_FALSE(r.deadlocked);
}

TEST_CASE("dispatch: an undisturbed day equals the plan", "[dispatch][simulation]") {
    // On the crossing line and on random valid layouts (tests/layout_generator.hpp), as the
    // timetable order does (test_plan_equals_sim_property.cpp).
    SimOptions options;
    options.route_order = RouteOrder::dispatch;
    {
        const Loaded f(kCrossings);
        const SimResult day = simulate_day(*f.model, simtest::no_delays(f.plan), options);
        CHECK_FALSE(day.deadlock.deadlocked);
        CHECK(day.holds.empty());
        for (const TimingRecord& r : day.timing) CHECK(r.knock_on == 0.0);
    }
    std::size_t checked = 0;
    for (std::uint64_t seed = 1; seed <= 120; ++seed) {
        const layoutgen::Layout layout = layoutgen::random_layout(seed);
        INFO("seed " << seed << ": " << layout.summary);
        const Scenario sc = parse_scenario(layout.yaml, "random-" + std::to_string(seed) + ".yaml");
        const PlanResult plan = make_plan(sc);
        if (!plan.spacing_warnings.empty() || !plan.conflicts.empty()) continue;
        ++checked;
        const SimModel model(sc, plan.trains);
        const SimResult day = simulate_day(model, simtest::no_delays(plan.trains), options);
        CHECK_FALSE(day.deadlock.deadlocked);
        CHECK(day.holds.empty());
        for (const TimingRecord& r : day.timing) CHECK(r.knock_on == 0.0);
    }
    CHECK(checked >= 100);
}

TEST_CASE("dispatch: the crossing rule weighs the delay each choice costs", "[dispatch]") {
    // Worked by hand from the rule in sim/dispatch.hpp (our own rule; no outside source).
    // The opposing train P was planned over the stretch from 900 s to 1000 s, the asking train A
    // from 1050 s to 1300 s.
    const StretchUse p{0, 0, 1, 900.0, 1000.0};
    const StretchUse a{0, 0, 1, 1050.0, 1300.0};
    // On time: keeping the order costs A nothing (the plan has no conflict), so it waits.
    CrossingChoice c = choose_crossing(a, 0.0, 1.0, p, 0.0, 1.0);
    CHECK(c.keep_cost == 0.0);
    CHECK(c.swap_cost == 400.0);   // A released at 1300, P due at 900
    CHECK_FALSE(c.asking_goes_first);
    // P 10 min late: waiting costs A 1000 + 600 - 1050 = 550 s; going first costs P nothing
    // (A clears at 1300, P is due at 1500): A goes.
    c = choose_crossing(a, 0.0, 1.0, p, 600.0, 1.0);
    CHECK(c.keep_cost == 550.0);
    CHECK(c.swap_cost == 0.0);
    CHECK(c.asking_goes_first);
    // P 5 min late: waiting costs A 250 s, going first costs P 1300 - 1200 = 100 s.
    c = choose_crossing(a, 0.0, 1.0, p, 300.0, 1.0);
    CHECK(c.keep_cost == 250.0);
    CHECK(c.swap_cost == 100.0);
    CHECK(c.asking_goes_first);
    // ... unless a minute of P's delay weighs three times A's: 250 < 3 x 100, A waits.
    CHECK_FALSE(choose_crossing(a, 0.0, 1.0, p, 300.0, 3.0).asking_goes_first);
    // Equal weighted costs keep the planned order.
    CHECK_FALSE(choose_crossing(a, 0.0, 1.0, p, 300.0, 2.5).asking_goes_first);
    // A late itself: its own forecast moves with it (A 200 s late: waiting costs 50 s, going
    // first costs P 1500 - 1200 = 300 s).
    c = choose_crossing(a, 200.0, 1.0, p, 300.0, 1.0);
    CHECK(c.keep_cost == 50.0);
    CHECK(c.swap_cost == 300.0);
    CHECK_FALSE(c.asking_goes_first);
}

namespace {

const std::string kThreeTrains = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/dispatch/three_trains.yaml";

}  // namespace

TEST_CASE("dispatch: a late train's crossing moves to the other loop when that costs less", "[dispatch][simulation]") {
    // tests/data/dispatch/three_trains.yaml: PU (up) is planned to cross the freight FD at
    // Brindlecote, FD waiting in loop L2.  PU leaves Quillmoor 20 min late.  When FD asks for the
    // stretch towards Hethwick, keeping the planned order would hold FD some 15 min in L2 for PU;
    // letting FD go first costs PU nothing or little, since PU is not yet due on that stretch when
    // FD will have cleared it.  So FD runs on, and the two cross at Hethwick (FD through loop L1).
    const Loaded f(kThreeTrains);
    REQUIRE(f.plan.size() == 3);
    const auto pu = static_cast<std::uint32_t>(f.train_index("PU")), fd = static_cast<std::uint32_t>(f.train_index("FD")),
               pu2 = static_cast<std::uint32_t>(f.train_index("PU2"));
    InjectedDelays delays = simtest::no_delays(f.plan);
    delays.entry[pu] = 20.0 * 60.0;
    SimOptions options;
    options.route_order = RouteOrder::dispatch;

    // The undisturbed day runs as planned and records no change.
    const SimResult plain = simulate_day(*f.model, simtest::no_delays(f.plan), options);
    CHECK(plain.crossing_changes.empty());
    for (const TimingRecord& r : plain.timing) CHECK(r.knock_on == 0.0);

    const SimResult day = simulate_day(*f.model, delays, options);
    REQUIRE_FALSE(day.deadlock.deadlocked);
    REQUIRE(day.crossing_changes.size() == 1);
    const CrossingChange& c = day.crossing_changes.front();
    CHECK(c.kind == CrossingChange::Kind::moved_crossing);
    CHECK(((c.first == pu && c.second == fd) || (c.first == fd && c.second == pu)));
    CHECK(c.planned_place == "BRC");
    CHECK(c.actual_place == "HTW");
    // FD keeps its timetable (it lost nothing between the places); PU waited at Hethwick for it.
    const double fd_change = c.first == fd ? c.first_change : c.second_change;
    const double pu_change = c.first == pu ? c.first_change : c.second_change;
    CHECK(std::fabs(fd_change) < 1.0);
    CHECK(pu_change > 60.0);
    CHECK(c.when > 6.0 * 3600.0 + 30.0 * 60.0);   // after PU's late start at 06:20 reached Hethwick
    // PU2 an hour later is untouched.
    for (const TimingRecord& r : day.timing)
        if (r.train == pu2) CHECK(r.knock_on == 0.0);

    // The timetable order keeps the crossing at Brindlecote: FD waits there for PU.
    SimOptions rigid;
    rigid.route_order = RouteOrder::timetable;
    const SimResult kept = simulate_day(*f.model, delays, rigid);
    CHECK(kept.crossing_changes.empty());
    double fd_knock_on_rigid = 0.0, fd_knock_on = 0.0;
    for (const TimingRecord& r : kept.timing)
        if (r.train == fd) fd_knock_on_rigid += r.knock_on;
    for (const TimingRecord& r : day.timing)
        if (r.train == fd) fd_knock_on += r.knock_on;
    CHECK(fd_knock_on_rigid > 10.0 * 60.0);
    CHECK(fd_knock_on < fd_knock_on_rigid);

    // Weighting a minute of the stopping trains' delay twenty times a freight's (the scenario's
    // dispatching weights, variant passenger_first) makes any cost to PU decide: FD waits.
    const Loaded w(kThreeTrains, "passenger_first");
    REQUIRE(w.plan[pu].run.service->dispatch_weight == 20.0);
    REQUIRE(w.plan[fd].run.service->dispatch_weight == 1.0);
    const SimResult weighted = simulate_day(*w.model, delays, options);
    REQUIRE_FALSE(weighted.deadlock.deadlocked);
    CHECK(weighted.crossing_changes.empty());
    double fd_knock_on_weighted = 0.0;
    for (const TimingRecord& r : weighted.timing)
        if (r.train == fd) fd_knock_on_weighted += r.knock_on;
    CHECK(fd_knock_on_weighted > 10.0 * 60.0);
}
