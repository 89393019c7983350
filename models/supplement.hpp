#pragma once
// Scheduled running time = technical minimum running time plus the running-time supplement.
#include "models/train_type.hpp"

namespace knockon {

// Supplement for one stretch of a path, by the rule of UIC Code 451-1: `share` of the
// technical running time plus `per_100km` for every 100 km of the stretch, the distance part
// dropped when the whole path is not longer than the rule's threshold.
double running_time_supplement(const SupplementRule& rule, double technical_time, double stretch_length,
                               double path_length);

}  // namespace knockon
