#include "models/supplement.hpp"

namespace knockon {

double running_time_supplement(const SupplementRule& rule, double technical_time, double stretch_length,
                               double path_length) {
    double s = technical_time * rule.share;
    if (path_length > rule.distance_threshold) s += rule.per_100km * stretch_length / 100000.0;
    return s;
}

}  // namespace knockon
