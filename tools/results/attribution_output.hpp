#pragma once
// "Where knock-on comes from" (sim/attribution) as text and JSON: for one day, the primary delays
// and other sources by the knock-on they caused, the direct causes, and the delay trees; for a
// study, the same figures as means per day with their 95 % intervals, and the places, sections,
// links and buffers the knock-on passed through.
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "sim/attribution.hpp"
#include "sim/attribution_figures.hpp"
#include "sim/sim_model.hpp"

namespace knockon {

// What the rule is, in one sentence (README "Where knock-on comes from" has it in full).
extern const char* const kAttributionRule;

// "S-0700 at A (entry)", "disruption of section T3", "the timetable itself (holder on time)", ...
std::string describe_source(const DelaySource& s, const std::vector<std::string>& train_ids,
                            const std::vector<TimingRecord>& timing, const std::vector<std::string>& section_names);
// The same from a source's kind ("entry", "dwell", ...), train, place and section as the JSON and
// the HDF5 results name them (empty where they do not apply).
std::string describe_source(const std::string& kind, const std::string& train, const std::string& place,
                            const std::string& section);
// "other trains' occupation or routes", ...: a direct cause (HoldCause::Kind) in words.
const char* cause_label(std::size_t kind);

std::string day_attribution_text(const SimResult& day, const DayAttribution& a, std::size_t top = 10);
nlohmann::ordered_json day_attribution_json(const SimResult& day, const DayAttribution& a);

std::string study_attribution_text(const SimModel& model, const AttributionSummary& s,
                                   const std::vector<std::string>& train_ids, const std::vector<TimingRecord>& timing,
                                   const std::vector<std::string>& section_names, std::size_t top = 10);
nlohmann::ordered_json study_attribution_json(const SimModel& model, const AttributionSummary& s,
                                              const std::vector<std::string>& train_ids,
                                              const std::vector<TimingRecord>& timing,
                                              const std::vector<std::string>& section_names);

}  // namespace knockon
