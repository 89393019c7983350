#pragma once
// A deadlocked day's report in words: a line per waiting train (where it stands, what it waits
// for and who keeps that from it), and the cause in one line: the trains that wait for each
// other, or, when no train waits in a circle, the chain of waits from the first waiting train
// down to the one that holds them up.  One wording for every output (terminal, JSON, files, the
// report page), made once when the day stops.
#include <optional>
#include <string>
#include <vector>

#include "sim/sim_result.hpp"

namespace knockon {

// The names of the kinds of wait and block in files and JSON ("route", "held", ...), and back
// (nullopt for a name that is none of them).
const char* wait_name(DeadlockWait::For kind);
std::optional<DeadlockWait::For> wait_from_name(const std::string& name);
const char* block_name(DeadlockBlock::By by);
std::optional<DeadlockBlock::By> block_from_name(const std::string& name);

// Where a waiting train stands: "at QLM (0.5 km)", "at signal U05 (15.3 km)", "at 12.4 km" or
// "outside the line".
std::string where_it_stands(const DeadlockWait& wait);
// What it waits for, short: "for the route from U05", "to appear at QLM", ...; a link wait
// names the earlier train, so it needs the train ids: "for its crew from UP1 (crew link)".
std::string what_it_waits_for(const DeadlockWait& wait, const std::vector<std::string>& train_ids);

// One line (no newline) for one waiting train.
std::string describe_wait(const DeadlockWait& wait, const std::vector<std::string>& train_ids,
                          const std::vector<std::string>& section_names);

// The cause in one line (no time, no newline); empty when nothing waits.
std::string deadlock_cause(const std::vector<DeadlockWait>& waiting, const std::vector<std::string>& train_ids,
                           const std::vector<std::string>& section_names);

// Fills report.cause and report.description (a line per waiting train, each ending in a newline)
// from report.waiting.
void put_deadlock_into_words(DeadlockReport& report, const std::vector<std::string>& train_ids,
                             const std::vector<std::string>& section_names);

}  // namespace knockon
