#pragma once
// What `knockon plan` prints and writes: the plan as tables (CSV, text) and as one JSON document.
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "models/corridor_axis.hpp"
#include "models/plan.hpp"
#include "models/scenario.hpp"
#include "tools/results/table.hpp"

namespace knockon {

// The caution every output carries where it could be mistaken for a safety design.
extern const char* const kSafetyCaution;
extern const char* const kUic406Note;

std::vector<Table> plan_tables(const Scenario& scenario, const PlanResult& plan);

// {"scenario": {...}, "caution": "...", "notes": [...], "<table>": [ {column: value, ...}, ... ], ...}
nlohmann::json plan_json(const Scenario& scenario, const PlanResult& plan);
// A table as an array of records (numbers in SI, NaN as null).
nlohmann::json table_json(const Table& t);

std::string plan_text(const Scenario& scenario, const PlanResult& plan);

// "service A1 from ALD to BEX: the timetable allows 240.0 s, less than running time plus
// supplement (...), 110.0 s short; ..." for validate, the report and the plan.
std::string tight_stretch_text(const PlanResult& plan, const TightStretch& w);
// "signal U04: its aspect system gives 1200 m of warning, less than the stopping distance of
// service G1 from 100 km/h (2378.7 m); ..." for validate.
std::string spacing_warning_text(const PlanResult& plan, const SpacingWarning& w);

// The head line's account of the layout: "Line 12.0 km, 5 stations, 9 signals" or "Network of 17
// segments, 6 stations, 32 signals; corridors Main (WRF OLV EMR), Branch (OLV PLC HTB QSB)".
std::string layout_summary(const Scenario& scenario);
// A station's name as shown (its id where it has none or is unknown), on a line or a network.
std::string station_name(const Scenario& scenario, const std::string& id);
// Where a signal stands, for tables: its track (a network: its segment), the direction or heading
// it faces and its chainage (a network: the position shown by its segment's kilometre posts).
// Nullopt for an unknown signal.
struct SignalPlace {
    std::string track, direction;
    double km_m = 0.0;
};
std::optional<SignalPlace> signal_place(const Scenario& scenario, const std::string& id);
// The axis of each of a network scenario's corridors from the plan's paths (none for a line).
std::vector<CorridorAxis> corridor_axes(const Scenario& scenario, const PlanResult& plan);

// Facts about the scenario shown at the head of every output.
nlohmann::json scenario_facts(const Scenario& scenario);

}  // namespace knockon
