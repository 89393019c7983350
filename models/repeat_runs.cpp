#include "models/repeat_runs.hpp"

#include <cmath>
#include <cstdio>

namespace knockon {

double repeat_count(double first, double every, double until) {
    if (until < first || every <= 0.0) return 0.0;
    return std::floor((until - first) / every + 1e-9) + 1.0;
}

std::string run_id(const std::string& pattern_id, double first_time) {
    const long long s = std::llround(std::floor(first_time));
    char buf[32];
    std::snprintf(buf, sizeof buf, "%02lld%02lld", s / 3600, (s / 60) % 60);
    return pattern_id + "-" + buf;
}

}  // namespace knockon
