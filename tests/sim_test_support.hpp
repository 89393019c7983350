#pragma once
// Shared by the simulation tests: a simulated day kept with its scenario and plan, look-ups of
// records by train id and station, and the train type the inline fixtures use.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "models/plan.hpp"
#include "sim/simulation.hpp"
#include "tools/io/scenario_reader.hpp"

namespace knockon::simtest {

const std::string kSource = KNOCKON_SOURCE_DIR;

// The plan points into the scenario, so a day stays where it was made (held by pointer).
struct Day {
    Scenario scenario;
    std::vector<TrainPlan> plan;
    SimResult result;
    explicit Day(Scenario sc) : scenario(std::move(sc)) {}
    Day(const Day&) = delete;
    Day& operator=(const Day&) = delete;
};
using DayPtr = std::unique_ptr<const Day>;

inline InjectedDelays no_delays(const std::vector<TrainPlan>& plan) {
    InjectedDelays d;
    d.entry.assign(plan.size(), 0.0);
    for (const TrainPlan& tp : plan) {
        d.dwell.emplace_back(tp.run.service->calls.size(), 0.0);
        d.running.emplace_back(tp.run.service->calls.size(), 0.0);
    }
    return d;
}

inline std::size_t index_of(const std::vector<TrainPlan>& plan, const std::string& id) {
    for (std::size_t t = 0; t < plan.size(); ++t)
        if (plan[t].run.service->id == id) return t;
    FAIL("no train " << id);
    return 0;
}

// Simulates `scenario` with an entry (late start) delay for some trains, by id.
inline DayPtr simulate(Scenario scenario, const std::vector<std::pair<std::string, double>>& entry_delays = {},
                SimOptions options = {}) {
    auto d = std::make_unique<Day>(std::move(scenario));
    d->plan = plan_trains(d->scenario, options.run);
    InjectedDelays delays = no_delays(d->plan);
    for (const auto& [id, seconds] : entry_delays) delays.entry[index_of(d->plan, id)] = seconds;
    SimModel model(d->scenario.infrastructure, d->plan);
    d->result = simulate_day(model, delays, options);
    return d;
}

inline const TimingRecord& timing_of(const Day& d, const std::string& train, const std::string& station) {
    const std::size_t t = index_of(d.plan, train);
    for (const TimingRecord& r : d.result.timing)
        if (r.train == t && r.station == station) return r;
    FAIL("no timing record of " << train << " at " << station);
    return d.result.timing.front();
}

inline const HeadwayPair& headway_pair(const PlanResult& p, const std::string& line_section, const std::string& leader,
                                const std::string& follower) {
    for (const HeadwayPair& h : p.headways)
        if (h.line_section == line_section && p.trains[h.leader].run.service->id == leader &&
            p.trains[h.follower].run.service->id == follower)
            return h;
    FAIL("no headway pair " << leader << " -> " << follower << " in " << line_section);
    return p.headways.front();
}

inline std::string clock(double seconds) {
    const long s = std::lround(seconds);
    char buf[48];
    std::snprintf(buf, sizeof buf, "%02ld:%02ld:%02ld", s / 3600, s / 60 % 60, s % 60);
    return buf;
}

// --- Inline fixtures ---------------------------------------------------------------------------

const char* const kEmu = R"(
train_types:
  - id: EMU10
    length: 100 m
    mass: 200 t
    rotating_mass_factor: 1.08
    max_speed: 120 km/h
    traction: {max_force: 200 kN, power: 2 MW}
    resistance: {a: 2 kN, b: 20 N/(m/s), c: 5 N/(m/s)2}
    braking: {deceleration: 0.8 m/s2, delay: 2 s}
    min_dwell: 30 s
    supplement: {percent: 5 %, per_100km: 1 min, threshold: 30 km}
)";

}  // namespace knockon::simtest
