#pragma once
// Rolling stock: what a train type can do.  SI units: m, kg, N, W, m/s, m/s^2, s.
#include <algorithm>
#include <limits>
#include <string>
#include <utility>
#include <vector>

namespace knockon {

// Standard gravity [m/s^2]: the adhesion weight here and the gradient force m*g*i in the
// running-time calculation (small-angle form, tests/REFERENCES.md D5).
inline constexpr double kGravity = 9.81;

// The least deceleration service braking must leave on the steepest fall a train meets
// [m/s^2]: below it a train from 80 km/h needs more than 5 km to stop, and at 0 it cannot stop
// at all (common practice, no source).  Planning refuses such a train (brake_hold_problem).
inline constexpr double kMinNetBraking = 0.05;

// Running-time supplement by the rule of UIC Code 451-1: a percentage of the technical running
// time plus minutes per 100 km, the distance part dropped on paths not longer than a threshold.
struct SupplementRule {
    double share = 0.0;                   // of the technical running time, e.g. 0.05 for 5 %
    double per_100km = 0.0;               // [s] added per 100 km of path
    double distance_threshold = 30000.0;  // [m] paths up to this length get no distance part
};

struct TrainType {
    std::string id;
    double length = 0.0;                 // [m]
    double mass = 0.0;                   // [kg]
    double rotating_mass_factor = 1.0;   // rho, >= 1
    double max_speed = 0.0;              // [m/s]

    // Tractive effort: either a (speed, force) table, linearly interpolated, or the envelope
    // min(max_force, power / v) — further capped by adhesion when adhesion_mass > 0.
    double max_force = 0.0;              // [N]
    double power = 0.0;                  // [W] at the wheel
    std::vector<std::pair<double, double>> force_table;  // (m/s, N), sorted by speed
    double adhesion_mass = 0.0;          // [kg]; 0 = no adhesion cap

    // Davis resistance R(v) = A + B v + C v^2.
    double davis_a = 0.0;                // [N]
    double davis_b = 0.0;                // [N s/m]
    double davis_c = 0.0;                // [N s^2/m^2]

    double braking = 0.0;                // service deceleration on level track [m/s^2]
    std::vector<std::pair<double, double>> braking_table;  // (m/s, m/s^2); overrides `braking` when set
    double brake_delay = 0.0;            // brake build-up / reaction time during which speed holds [s]

    double performance = 1.0;            // share of the tractive effort the driver uses, (0, 1]
    double min_dwell = 30.0;             // default minimum dwell at a stop [s]
    SupplementRule supplement;

    // Forces and decelerations, all at speed v [m/s].  The first two are inline: the running-time
    // integration evaluates them millions of times a simulated day.
    double tractive_force(double v) const;      // available at the wheel, times performance
    // The speed from which tractive_force(v) is power / v * performance alone: the force cap and
    // the adhesion limit lie above the power curve there, with a margin far above rounding, so
    // that shortcut gives the same value to the last bit.  Infinity when there is no such speed
    // (a force table, no power curve, no effort used).
    double power_limited_from() const;
    double resistance(double v) const { return davis_a + davis_b * v + davis_c * v * v; }   // Davis
    double service_deceleration(double v) const;

private:
    double table_force(double v) const;      // force_table, interpolated
    double adhesion_limit(double v) const;   // Curtius-Kniffler adhesion times adhesion weight
};

// Curtius-Kniffler adhesion coefficient mu = A + B / (V + C), V in km/h (tests/REFERENCES.md D6).
namespace curtius_kniffler {
inline constexpr double kA = 0.161, kB = 7.5, kC = 44.0, kKmh = 3.6;
}

inline double TrainType::adhesion_limit(double v) const {
    using namespace curtius_kniffler;
    const double kmh = v * kKmh;
    const double mu = kA + kB / (kmh + kC);
    return mu * adhesion_mass * kGravity;
}

inline double TrainType::tractive_force(double v) const {
    if (!(performance > 0.0)) return 0.0;  // no effort used (also keeps 0 * infinity out)
    v = std::max(v, 0.0);
    double f;
    if (!force_table.empty()) {
        f = table_force(v);
    } else if (max_force <= 0.0 && power <= 0.0) {
        f = 0.0;  // neither a force cap nor a power curve: the type has no traction (coasts)
    } else {
        // max_force 0 = no force cap, power 0 = no power curve.  An uncapped power curve gives
        // an infinite force at standstill; the integrator starts such a train by the
        // constant-power closed form, and an adhesion mass caps it below.
        constexpr double kNone = std::numeric_limits<double>::infinity();
        const double cap = max_force > 0.0 ? max_force : kNone;
        const double by_power = power > 0.0 ? (v > 0.0 ? power / v : kNone) : kNone;
        f = std::min(cap, by_power);
    }
    if (adhesion_mass > 0.0) f = std::min(f, adhesion_limit(v));
    // The driver's share of the available effort.  The speed cap (max_speed) is a limit the
    // running-time calculation enforces, not a force that vanishes here.
    return f * performance;
}

}  // namespace knockon
