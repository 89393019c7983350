#pragma once
// The rule on the times a timetable gives along a service's calls, shared by every reader and by
// scenarios built in code: given times never run backwards (arr before dep within a call, each
// call's times before the next's).
#include <cstddef>
#include <string>
#include <vector>

#include "models/timetable.hpp"

namespace knockon {

struct CallTimeProblem {
    std::size_t call = 0;   // index into the calls
    std::string key;        // "arr", "dep" or "pass": the field as a scenario file names it
    std::string message;
};

// Every time earlier than the last time given before it; empty when none.
std::vector<CallTimeProblem> call_time_problems(const std::vector<Call>& calls);

}  // namespace knockon
