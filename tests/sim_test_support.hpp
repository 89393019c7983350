#pragma once
// Shared by the simulation tests: a simulated day kept with its scenario and plan, look-ups of
// records by train id and station, and the inline fixtures (the train type, a plain line, the
// departure line).
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "models/plan.hpp"
#include "sim/simulation.hpp"
#include "tools/read/scenario_reader.hpp"
#include "scenario_text_support.hpp"

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
    SimModel model(d->scenario, d->plan);
    d->result = simulate_day(model, delays, options);
    return d;
}

// A scenario with its plan and simulation model.  SimModel keeps references into the scenario
// and the plan, so the three live together and never move.
struct Loaded {
    Scenario scenario;
    std::vector<TrainPlan> plan;
    std::unique_ptr<SimModel> model;

    explicit Loaded(const std::string& path, const std::string& variant = {})
        : scenario(read_scenario(path, variant)), plan(plan_trains(scenario)) {
        model = std::make_unique<SimModel>(scenario, plan);
    }
    Loaded(const Loaded&) = delete;
    Loaded& operator=(const Loaded&) = delete;

    std::size_t train_index(const std::string& id) const {
        for (std::size_t t = 0; t < plan.size(); ++t)
            if (plan[t].run.service->id == id) return t;
        FAIL("no train " << id);
        return 0;
    }
};

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

// The train type of the inline fixtures (after a blank line, to follow the signals).
inline const std::string kEmu = [] {
    std::string y = "\n";
    y += scenariotext::emu_train_types("EMU10", "{percent: 5 %, per_100km: 1 min, threshold: 30 km}");
    return y;
}();

// A plain line with signals every `spacing` km under one aspect system.  L starts at S at 08:00
// (stopping mark 4.75 km: its starter stands at most 250 m ahead, within the 300 m sighting
// distance); F comes in over the line end at line speed and runs through S at `follower_pass`
// and through Q (10.5 km) without stopping.
inline Scenario plain_line(const std::string& system, double spacing_km, double follower_pass) {
    std::string y = scenariotext::up_line_head({.name = "Plain line (" + system + ") (test)",
                                                .length = "12.5 km",
                                                .stations = {"{id: S, name: Sallowfield, at: 4.75 km}",
                                                             "{id: Q, name: Quenby Marsh, at: 10.5 km}"},
                                                .system = system,
                                                .overlap = "100 m"});
    int k = 1;
    for (double x = 0.0; x < 12.0 - 1e-9; x += spacing_km, ++k) {
        char buf[96];
        std::snprintf(buf, sizeof buf, "    - {id: U%02d, track: U, at: %.3f km, direction: up}\n", k, x);
        y += buf;
    }
    y += kEmu;
    y += R"(timetable:
  rounding: 30 s
  services:
    - {id: L, type: EMU10, category: stopping, direction: up, leave: true,
       calls: [{station: S, dep: "08:00"}, {station: Q, pass: auto}]}
    - {id: F, type: EMU10, category: fast, direction: up, enter: {}, leave: true,
       calls: [{station: S, pass: ")" + clock(follower_pass) + R"("}, {station: Q, pass: auto}]}
)";
    return parse_scenario(y, "plain-line-" + system + ".yaml");
}

// The 12 km line of the departure tests: stations S (stopping mark `station_km`) and X (8 km),
// three-aspect signalling with 200 m overlaps; the caller writes the signals.
inline std::string departure_line_head(const std::string& name, const std::string& station_km) {
    return scenariotext::up_line_head({.name = name,
                                       .stations = {"{id: S, name: Starling Quay, at: " + station_km + "}",
                                                    "{id: X, name: Oxhey Bottom, at: 8 km}"}});
}

// Trains start from the platform road at S (stopping mark 1.0 km, starter U02 300 m beyond,
// within sight), L at 08:00:00 and each follower (id, departure) after it; then a long first
// block (to 4.0 km) and 0.8 km blocks, so that the route out of S is the critical one for two
// trains starting there (blocking time theory: it holds the slow start).  All run through X and
// off the line end.
inline Scenario departure_scenario(const std::vector<std::pair<std::string, double>>& followers,
                                   const std::string& starter_km = "1.3") {
    std::string y = departure_line_head("Knock-on at a shared departure road (test)", "1 km");
    y += R"(    - {id: U01, track: U, at: 0 km, direction: up}
    - {id: U02, track: U, at: )" + starter_km + R"( km, direction: up}
    - {id: U03, track: U, at: 4 km, direction: up}
)";
    const char* ids[] = {"U04", "U05", "U06", "U07", "U08", "U09", "U10", "U11"};
    for (int k = 0; k < 8; ++k)
        y += "    - {id: " + std::string(ids[k]) + ", track: U, at: " + std::to_string(4.8 + 0.8 * k) +
             " km, direction: up}\n";
    y += kEmu;
    y += R"(timetable:
  rounding: 30 s
  services:
    - {id: L, type: EMU10, category: stopping, direction: up, leave: true,
       calls: [{station: S, dep: "08:00:00"}, {station: X, pass: auto}]}
)";
    for (const auto& [id, dep] : followers)
        y += "    - {id: " + id + ", type: EMU10, category: stopping, direction: up, leave: true,\n"
             "       calls: [{station: S, dep: \"" + clock(dep) + "\"}, {station: X, pass: auto}]}\n";
    return parse_scenario(y, "departure-knockon.yaml");
}

}  // namespace knockon::simtest
