#include "models/train_type.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

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

double TrainType::power_limited_from() const {
    constexpr double kNever = std::numeric_limits<double>::infinity();
    if (!force_table.empty() || !(power > 0.0) || !(performance > 0.0)) return kNever;
    // Relative margin on each crossing: far above rounding, far below any effect on speed.
    constexpr double kMargin = 1e-6;
    double from = 0.0;
    // power / v <= max_force from v = power / max_force on.
    if (max_force > 0.0) from = power / max_force;
    if (adhesion_mass > 0.0) {
        // Adhesion times v, mu(v) v m_a g, grows with v; it equals the power where
        // (A v + B v / (k v + C)) m_a g = P, i.e. A k v^2 + (A C + B - k P') v - C P' = 0 with
        // P' = P / (m_a g) and V = k v (Curtius-Kniffler, as adhesion_limit).
        using namespace curtius_kniffler;
        const double p = power / (adhesion_mass * kGravity);
        const double a = kA * kKmh, b = kA * kC + kB - kKmh * p, c = -kC * p;
        const double root = (-b + std::sqrt(b * b - 4.0 * a * c)) / (2.0 * a);
        if (!std::isfinite(root)) return kNever;
        from = std::max(from, root);
    }
    return from * (1.0 + kMargin) + 1e-9;
}

double TrainType::table_force(double v) const { return interpolate(force_table, v); }

double TrainType::service_deceleration(double v) const {
    return braking_table.empty() ? braking : interpolate(braking_table, std::max(v, 0.0));
}

}  // namespace knockon
