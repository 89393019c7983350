#pragma once
// The runs of a clock-face repeat pattern, the one rule for line and network timetables: the
// first at the time of the pattern's first call, then every `every` up to `until`, each named by
// its pattern's id and the time of its first call.
#include <string>

namespace knockon {

// A pattern giving more runs than this is surely a typing mistake (e.g. every: 1 s).
inline constexpr long kMaxRunsPerPattern = 5000;

// How many runs a pattern gives from `first` every `every` up to `until` [s]; 0 when `until` lies
// before `first`.  May exceed kMaxRunsPerPattern (the readers refuse that).
double repeat_count(double first, double every, double until);

// "S1-0630": the id of the run whose first call is at `first_time` [s after midnight]; hours go
// past 23 for runs after midnight.
std::string run_id(const std::string& pattern_id, double first_time);

}  // namespace knockon
