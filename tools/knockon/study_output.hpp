#pragma once
// What `knockon simulate --replications N` prints: a readable study summary or one JSON document.
#include <string>

#include <nlohmann/json.hpp>

#include "models/scenario.hpp"
#include "sim/study.hpp"

namespace knockon::cli {

struct StudyRunInfo {
    std::uint64_t seed = 0;
    unsigned threads = 1;
    std::string command_line;
};

std::string study_text(const Scenario& sc, const SimModel& model, const StudyResult& study, const StudySummary& s,
                       const StudyRunInfo& info);
nlohmann::json study_json(const Scenario& sc, const SimModel& model, const StudyResult& study, const StudySummary& s,
                          const StudyRunInfo& info);

}  // namespace knockon::cli
