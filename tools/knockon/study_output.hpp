#pragma once
// What `knockon simulate --replications N` prints: a readable study summary or one JSON document.
// Days that ended in deadlock are stated first and enter no figure (tools/results/deadlock_output).
#include <string>

#include <nlohmann/json.hpp>

#include "models/scenario.hpp"
#include "sim/study.hpp"

namespace knockon::cli {

struct StudyRunInfo {
    std::uint64_t seed = 0;
    unsigned threads = 1;          // per process
    std::string command_line;
    bool allow_deadlock = false;   // --allow-deadlock: deadlocked days accepted (said in the output)
    unsigned processes = 1;        // MPI ranks the days were spread over (1: one process)
};

std::string study_text(const Scenario& sc, const SimModel& model, const StudyResult& study, const StudySummary& s,
                       const StudyRunInfo& info);
// "deadlock" comes first: how many days deadlocked, the first one's replication and cause.
nlohmann::ordered_json study_json(const Scenario& sc, const SimModel& model, const StudyResult& study, const StudySummary& s,
                          const StudyRunInfo& info);

}  // namespace knockon::cli
