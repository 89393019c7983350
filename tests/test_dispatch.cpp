// The dispatcher (route order `dispatch`, sim/dispatch.hpp): first come, but a grant is made only
// when every train on the line keeps a way to run to the end of its path.  Checked on a single
// line with two crossing loops (tests/data/study/single_line_crossings.yaml) where first come
// deadlocks on many days, and for undisturbed days on random layouts.
#include <catch2/catch.hpp>

#include <memory>
#include <string>
#include <vector>

#include "layout_generator.hpp"
#include "models/plan.hpp"
#include "sim/delay_draws.hpp"
#include "sim/simulation.hpp"
#include "sim/study.hpp"
#include "sim_test_support.hpp"
#include "tools/io/scenario_reader.hpp"

using namespace knockon;

namespace {

const std::string kCrossings = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/study/single_line_crossings.yaml";

using simtest::Loaded;

StudyResult study_of(const Loaded& f, RouteOrder order, std::uint32_t days) {
    StudyOptions opt;
    opt.replications = days;
    opt.threads = 2;
    opt.sim.route_order = order;
    opt.draw = [&f](std::uint32_t k) { return draw_delays(f.scenario.delays, f.scenario.infrastructure, f.plan, 1, k); };
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
        const SimModel model(sc.infrastructure, plan.trains);
        const SimResult day = simulate_day(model, simtest::no_delays(plan.trains), options);
        CHECK_FALSE(day.deadlock.deadlocked);
        CHECK(day.holds.empty());
        for (const TimingRecord& r : day.timing) CHECK(r.knock_on == 0.0);
    }
    CHECK(checked >= 100);
}
