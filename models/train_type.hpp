#pragma once
// Rolling stock: what a train type can do.  SI units: m, kg, N, W, m/s, m/s^2, s.
#include <string>
#include <utility>
#include <vector>

namespace knockon {

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

    // Forces and decelerations, all at speed v [m/s].
    double tractive_force(double v) const;      // available at the wheel, times performance
    double resistance(double v) const;          // Davis
    double service_deceleration(double v) const;
};

}  // namespace knockon
