#include "models/train_type.hpp"

#include <algorithm>

namespace knockon {
namespace {

// Piecewise-linear interpolation in a (speed, value) table sorted by speed, held constant
// beyond either end: a table describes the vehicle only over the speeds it was measured at,
// and extrapolating a falling force curve could make it negative.
double interpolate(const std::vector<std::pair<double, double>>& table, double v) {
    if (v <= table.front().first) return table.front().second;
    if (v >= table.back().first) return table.back().second;
    auto hi = std::upper_bound(table.begin(), table.end(), v,
                               [](double x, const std::pair<double, double>& p) { return x < p.first; });
    auto lo = hi - 1;
    const double span = hi->first - lo->first;
    if (span <= 0.0) return hi->second;  // duplicate speeds: take the later point
    const double f = (v - lo->first) / span;
    return lo->second + f * (hi->second - lo->second);
}

}  // namespace

double TrainType::table_force(double v) const { return interpolate(force_table, v); }

double TrainType::service_deceleration(double v) const {
    return braking_table.empty() ? braking : interpolate(braking_table, std::max(v, 0.0));
}

}  // namespace knockon
