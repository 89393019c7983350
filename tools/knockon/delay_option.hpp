#pragma once
// `--delay TRAIN:WHERE:MINUTES` for a hand-made what-if: WHERE is `entry` (late start or late
// entry), `dwell@STATION` (longer dwell there) or `run@STATION` (slower run from that station to
// the next timing point).
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "sim/injected_delays.hpp"

namespace knockon::cli {

// Throws UsageError naming the option text and what is wrong.
InjectedDelays parse_delays(const std::vector<std::string>& specs, const std::vector<TrainPlan>& trains);

}  // namespace knockon::cli
