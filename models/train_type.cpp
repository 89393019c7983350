#include "models/train_type.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace knockon {
namespace {

// Standard gravity [m/s^2].  The same value is used for the adhesion weight here and for the
// gradient force m*g*i in running_time.cpp (small-angle form, REFERENCES.md D5).
constexpr double kGravity = 9.81;

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

// Curtius–Kniffler adhesion coefficient, V in km/h (REFERENCES.md D6).
double curtius_kniffler(double v) {
    const double kmh = v * 3.6;
    return 0.161 + 7.5 / (kmh + 44.0);
}

}  // namespace

double TrainType::tractive_force(double v) const {
    if (!(performance > 0.0)) return 0.0;  // no effort used (also keeps 0 * infinity out)
    v = std::max(v, 0.0);
    double f;
    if (!force_table.empty()) {
        f = interpolate(force_table, v);
    } else if (max_force <= 0.0 && power <= 0.0) {
        f = 0.0;  // neither a force cap nor a power curve: the type has no traction (coasts)
    } else {
        // max_force 0 = no force cap, power 0 = no power curve.  An uncapped power curve gives
        // an infinite force at standstill; the integrator starts such a train by the
        // constant-power closed form, and an adhesion mass caps it below.
        const double cap = max_force > 0.0 ? max_force : std::numeric_limits<double>::infinity();
        const double by_power = power > 0.0 ? (v > 0.0 ? power / v : std::numeric_limits<double>::infinity())
                                            : std::numeric_limits<double>::infinity();
        f = std::min(cap, by_power);
    }
    if (adhesion_mass > 0.0) f = std::min(f, curtius_kniffler(v) * adhesion_mass * kGravity);
    // The driver's share of the available effort.  The speed cap (max_speed) is a limit the
    // running-time calculation enforces, not a force that vanishes here.
    return f * performance;
}

double TrainType::resistance(double v) const { return davis_a + davis_b * v + davis_c * v * v; }

double TrainType::service_deceleration(double v) const {
    return braking_table.empty() ? braking : interpolate(braking_table, std::max(v, 0.0));
}

}  // namespace knockon
