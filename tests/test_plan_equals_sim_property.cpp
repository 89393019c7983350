// Property: on every valid layout, a day with no primary delays runs exactly as planned.  The
// plan's blocking times and the engine read one rule for when each route is asked for, when a
// standing train may leave and where the driver must know an aspect, so an undisturbed train is
// never held, books no knock-on and passes every timing point at its planned time.  Checked on
// random lines (tests/layout_generator.hpp) and on random small networks with a flat junction
// and a terminus where trains turn back (tests/network_layout_generator.hpp); a failure prints
// the seed and the scenario.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <functional>
#include <fstream>
#include <sstream>

#include "layout_generator.hpp"
#include "models/plan.hpp"
#include "network_layout_generator.hpp"
#include "sim/simulation.hpp"
#include "sim_test_support.hpp"
#include "tools/read/network_reader.hpp"
#include "tools/read/scenario_reader.hpp"

namespace knockon {
namespace {

// What went wrong with one case, or "" when the day ran as planned.
std::string undisturbed_day_mismatch(const Scenario& scenario, const PlanResult& plan) {
    const SimModel model(scenario, plan.trains);
    const SimResult day = simulate_day(model, simtest::no_delays(plan.trains), SimOptions{});
    std::ostringstream why;
    if (day.deadlock.deadlocked) why << "deadlock: " << day.deadlock.description << "\n";
    for (const auto& h : day.holds)
        why << "train " << day.train_ids[h.train] << " held at " << h.signal << " from " << h.from << " to " << h.to << "\n";
    for (const TimingRecord& r : day.timing) {
        if (r.knock_on != 0.0)
            why << "train " << day.train_ids[r.train] << " books " << r.knock_on << " s knock-on at " << r.station << "\n";
    }
    // Timing points against the plan, train by train in call order.
    std::vector<std::size_t> next(plan.trains.size(), 0);
    for (const TimingRecord& r : day.timing) {
        const auto& calls = plan.trains[r.train].run.calls;
        const PlannedCall& c = calls.at(next[r.train]++);
        auto off = [&](double as_run, double planned, const char* what) {
            if (std::isnan(planned)) return;
            if (std::isnan(as_run) || std::fabs(as_run - planned) > 0.5)
                why << "train " << day.train_ids[r.train] << " " << what << " " << r.station << " at " << as_run
                    << ", planned " << planned << "\n";
        };
        off(r.arrival, c.planned_arrival, "arrives at");
        if (!(next[r.train] == calls.size() && c.stops)) off(r.departure, c.planned_departure, "leaves");
    }
    return why.str();
}

// A set that turns back hands its platform to its return part (models/blocking_time): in the
// day's records the incoming part's release of each section it hands over is the return part's
// lock of it, and no section is ever held by two trains at once.
std::string turnback_mismatch(const Scenario& scenario, const PlanResult& plan) {
    const SimModel model(scenario, plan.trains);
    const SimResult day = simulate_day(model, simtest::no_delays(plan.trains), SimOptions{});
    std::ostringstream why;
    std::size_t handed = 0;
    for (std::size_t t = 0; t < model.trains().size(); ++t) {
        const SimModel::Train& tr = model.trains()[t];
        for (const PlatformHandover& h : tr.hands_over) {
            const std::uint32_t g = tr.section_index[h.incoming];
            double released = NAN, locked = NAN;
            for (const SectionRecord& r : day.sections) {
                if (r.section == g && r.train == t) released = r.released;
                if (r.section == g && r.train == tr.turns_into) locked = r.locked;
            }
            ++handed;
            if (!(released == locked))
                why << day.train_ids[t] << " releases " << day.section_names[g] << " at " << released << ", "
                    << day.train_ids[tr.turns_into] << " locks it at " << locked << "\n";
        }
    }
    if (handed == 0) why << "no platform handed over\n";
    for (const SectionRecord& x : day.sections)
        for (const SectionRecord& y : day.sections)
            if (&x < &y && x.section == y.section && x.released > y.locked + 1e-9 && y.released > x.locked + 1e-9)
                why << day.train_ids[x.train] << " and " << day.train_ids[y.train] << " both hold "
                    << day.section_names[x.section] << "\n";
    return why.str();
}

// One kind of generated scenario: how a seed becomes a scenario, the extra check it needs, and
// how many cases a run takes by default and must check at least.
struct Generated {
    std::string name;   // "random" or "network": the name of a scenario dumped for a failing seed
    std::function<layoutgen::Layout(std::uint64_t)> make;
    std::function<Scenario(const layoutgen::Layout&, const std::string& file)> parse;
    std::function<std::string(const Scenario&, const PlanResult&)> extra_check;
    std::uint64_t cases = 0, least_checked = 0;
};

// Plans and runs each generated case; a case whose plan has a spacing warning or a conflict is set
// aside (the property speaks of conflict-free timetables only).
//   KNOCKON_PROPERTY_SEED=<n>   reruns one case; KNOCKON_PROPERTY_CASES sets how many
//   KNOCKON_PROPERTY_BRIEF=1    one line per failing or set-aside case on stderr, to survey many
//   KNOCKON_PROPERTY_DUMP=DIR   each failing case's scenario written there, to run the CLI on
void check_generated(const Generated& g) {
    std::uint64_t first = 1, cases = g.cases;
    if (const char* s = std::getenv("KNOCKON_PROPERTY_SEED")) first = std::strtoull(s, nullptr, 10), cases = 1;
    if (const char* n = std::getenv("KNOCKON_PROPERTY_CASES")) cases = std::strtoull(n, nullptr, 10);
    const bool brief = std::getenv("KNOCKON_PROPERTY_BRIEF") != nullptr;
    std::size_t checked = 0, set_aside = 0;
    for (std::uint64_t seed = first; seed < first + cases; ++seed) {
        const layoutgen::Layout layout = g.make(seed);
        INFO("seed " << seed << " (rerun: KNOCKON_PROPERTY_SEED=" << seed << "): " << layout.summary << "\n"
                     << layout.yaml);
        const std::string file = g.name + "-" + std::to_string(seed) + ".yaml";
        Scenario scenario;
        REQUIRE_NOTHROW(scenario = g.parse(layout, file));
        PlanResult plan;
        try {
            plan = make_plan(scenario);
        } catch (const std::exception& e) {
            FAIL("plan failed: " << e.what());
        }
        if (!plan.spacing_warnings.empty() || !plan.conflicts.empty()) {
            if (brief)
                std::fprintf(stderr, "seed %llu set aside: %zu spacing warnings, %zu conflicts\n",
                             static_cast<unsigned long long>(seed), plan.spacing_warnings.size(), plan.conflicts.size());
            ++set_aside;
            continue;
        }
        ++checked;
        std::string mismatch = undisturbed_day_mismatch(scenario, plan);
        if (g.extra_check) mismatch += g.extra_check(scenario, plan);
        if (!mismatch.empty() && brief)
            std::fprintf(stderr, "seed %llu | %s | %s\n", static_cast<unsigned long long>(seed),
                         layout.summary.substr(0, layout.summary.find(',', layout.summary.find(',') + 1)).c_str(),
                         mismatch.substr(0, mismatch.find('\n')).c_str());
        if (const char* dir = std::getenv("KNOCKON_PROPERTY_DUMP"); dir && !mismatch.empty())
            std::ofstream(std::string(dir) + "/" + file) << layout.yaml;
        CHECK(mismatch == "");
    }
    INFO(checked << " " << g.name << " cases checked, " << set_aside << " set aside");
    CHECK(checked >= (cases == 1 ? 0 : std::min(g.least_checked, cases)));
}

TEST_CASE("An undisturbed day equals the plan on random valid layouts", "[property][simulation]") {
    check_generated({"random", layoutgen::random_layout,
                     [](const layoutgen::Layout& l, const std::string& file) { return parse_scenario(l.yaml, file); },
                     nullptr, 240, 200});
}

TEST_CASE("An undisturbed day equals the plan on random networks with a junction and a turnback", "[property][simulation][network]") {
    check_generated({"network", netgen::random_network,
                     [](const layoutgen::Layout& l, const std::string& file) {
                         return network_scenario(parse_network(l.yaml, file));
                     },
                     turnback_mismatch, 60, 30});
}

}  // namespace
}  // namespace knockon
