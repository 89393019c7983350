// The dispatcher's promise (sim/dispatch.hpp, README "Interlocking"): under `--order dispatch` no
// day deadlocks, whatever the layout, the timetable and the delays.  Checked on random single lines
// (tests/single_line_generator.hpp) whose timetables were not made to work: trains each way at
// random times, some running through loops on the main track where nothing can pass them, drawn
// entry and dwell delays.  First come on the same days shows that the cases are hard ones.
#include <catch2/catch.hpp>

#include <cstdint>
#include <cstdlib>
#include <fstream>
#include <iostream>
#include <string>

#include "models/plan.hpp"
#include "sim/delay_draws.hpp"
#include "sim/simulation.hpp"
#include "single_line_generator.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

TEST_CASE("dispatch: no deadlock on random single lines with random traffic and delays", "[dispatch][property]") {
    // KNOCKON_PROPERTY_SEED=<n> reruns one line; KNOCKON_PROPERTY_CASES sets how many lines.
    std::uint64_t first = 1, cases = 40;
    if (const char* s = std::getenv("KNOCKON_PROPERTY_SEED")) first = std::strtoull(s, nullptr, 10), cases = 1;
    if (const char* n = std::getenv("KNOCKON_PROPERTY_CASES")) cases = std::strtoull(n, nullptr, 10);
    const std::uint32_t days_per_line = 5;
    std::size_t days = 0, first_come_deadlocks = 0, dispatch_deadlocks = 0, lines = 0;
    for (std::uint64_t seed = first; seed < first + cases; ++seed) {
        const layoutgen::Layout layout = layoutgen::random_single_line(seed);
        INFO("seed " << seed << " (rerun: KNOCKON_PROPERTY_SEED=" << seed << "): " << layout.summary);
        // (KNOCKON_PROPERTY_DUMP=DIR: every line's scenario written there, to run the CLI on)
        if (const char* dir = std::getenv("KNOCKON_PROPERTY_DUMP"))
            std::ofstream(std::string(dir) + "/single-" + std::to_string(seed) + ".yaml") << layout.yaml;
        Scenario sc;
        REQUIRE_NOTHROW(sc = parse_scenario(layout.yaml, "single-" + std::to_string(seed) + ".yaml"));
        std::vector<TrainPlan> plan;
        REQUIRE_NOTHROW(plan = plan_trains(sc));
        const SimModel model(sc, plan);
        REQUIRE_FALSE(model.single_track().empty());
        ++lines;
        for (std::uint32_t k = 0; k < days_per_line; ++k) {
            const InjectedDelays delays = draw_delays(sc, plan, seed, k);
            SimOptions options;
            options.route_order = RouteOrder::first_come;
            first_come_deadlocks += simulate_day(model, delays, options).deadlock.deadlocked ? 1 : 0;
            options.route_order = RouteOrder::dispatch;
            const SimResult day = simulate_day(model, delays, options);
            INFO("day " << k << ": " << day.deadlock.description);
            CHECK_FALSE(day.deadlock.deadlocked);
            dispatch_deadlocks += day.deadlock.deadlocked ? 1 : 0;
            ++days;
        }
    }
    std::cout << "dispatch property: " << lines << " random single lines, " << days << " days: first come deadlocked on "
              << first_come_deadlocks << ", dispatch on " << dispatch_deadlocks << "\n";
    CHECK(dispatch_deadlocks == 0);
    if (cases >= 40) {
        CHECK(days >= 200);
        CHECK(first_come_deadlocks >= 20);   // the cases are ones where first come locks the line
    }
}
