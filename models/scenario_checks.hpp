#pragma once
// The model's checks of a line scenario (models/infrastructure_checks,
// models/line_timetable_checks) run where a scenario enters planning, so that a scenario built in
// code is refused with the same sentences a scenario file is (the reader has already located them
// at the file's fields; its scenarios pass).  A network scenario's layout and timetable are
// checked by its reader (models/network/checks, models/network/timetable).
#include "models/scenario.hpp"

namespace knockon {

// Throws ScenarioError, one message per problem ("<file or scenario>: track L1, parent: ..."),
// when the line's infrastructure or timetable has problems; nothing for a network scenario.
void check_scenario(const Scenario& scenario);

}  // namespace knockon
