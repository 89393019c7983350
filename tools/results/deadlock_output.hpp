#pragma once
// What every output says about deadlock, before any figure: the terminal, the JSON documents,
// the results files, the report page and the charts.  A day that ended in deadlock is
// incomplete, and its figures are only of what it did before it stopped; a study's or a
// comparison's deadlocked days enter none of its figures, which are of the complete days.  One
// wording, here.
#include <cstddef>
#include <string>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

#include "sim/sim_result.hpp"
#include "sim/study.hpp"

namespace knockon {

// Of one day: "DEADLOCK at 06:13:44: the day stopped before its end; 2 of 2 trains never reached
// their last timing point. Cause: ..."; empty when the day ran to the end.
std::string day_deadlock_notice(const DeadlockReport& deadlock, std::size_t trains, std::size_t unfinished);

// Of a study: "DEADLOCK on 71 of 200 simulated days; the first, replication 3, at 06:13:44: <cause>.
// Every figure is of the 129 complete days; ..."; empty when no day deadlocked.
std::string study_deadlock_notice(const StudySummary& summary);

// Of a comparison, the variants in order with their summaries: one notice naming each variant
// with deadlocked days; empty when none has any.
using NamedSummary = std::pair<std::string, const StudySummary*>;
std::string comparison_deadlock_notice(const std::vector<NamedSummary>& variants);

// Days that ended in deadlock over all the variants.
std::size_t deadlocked_days(const std::vector<NamedSummary>& variants);

// The JSON of a day's deadlock report (deadlocked, time, cause, description, trains_not_finished,
// waiting[] with each waiting train's place, what it waits for and its blocks).
nlohmann::json day_deadlock_json(const DeadlockReport& deadlock, const std::vector<std::string>& train_ids,
                                 const std::vector<std::string>& section_names, std::size_t unfinished);
// The JSON of a study's deadlocked days (deadlocked_days, complete_days, notice, first: the first
// deadlocked day's replication, time, cause and description, or null).
nlohmann::json study_deadlock_json(const StudySummary& summary);

// A JSON document with "deadlock" as its first member, then the members of `rest` (in their order).
nlohmann::ordered_json deadlock_first(const nlohmann::json& deadlock, const nlohmann::json& rest);

}  // namespace knockon
