#pragma once
// The equation of motion of the running-time integration, one cell of the distance grid at a
// time: shared by the integration itself and the full-power curves it reads from.
#include <cmath>

#include "models/train_type.hpp"

namespace knockon {

// Net acceleration at speed v on gradient i (positive climbing): (F - R - m g i) / (rho m).
// Infinite only at standstill for an uncapped power curve.  What it reads of the train type is
// listed again in full_power_curve.cpp (same_motion), the key of the curves: keep the two alike.
struct Motion {
    const TrainType& type;
    double inv_effective_mass;  // 1 / (rho m)
    double power_limited_from;  // see TrainType::power_limited_from

    explicit Motion(const TrainType& t)
        : type(t),
          inv_effective_mass(1.0 / (t.rotating_mass_factor * t.mass)),
          power_limited_from(t.power_limited_from()) {}

    double accel(double v, double gradient) const {
        // (the power curve alone where it is the least of the limits: the same value, sooner)
        const double f = v >= power_limited_from ? type.power / v * type.performance : type.tractive_force(v);
        return (f - type.resistance(v) - type.mass * kGravity * gradient) * inv_effective_mass;
    }

    // v^2 after a cell of length ds started at v0, by a two-stage midpoint rule in w = v^2
    // (dw/ds = 2a): exact for constant acceleration, second order otherwise, which is what
    // keeps constant-power runs accurate (tests/REFERENCES.md D9).  May return <= 0: the train stalls.
    double step_w(double v0, double gradient, double ds) const {
        const double w0 = v0 * v0;
        const double a0 = accel(v0, gradient);
        double w_mid;
        if (std::isfinite(a0)) {
            w_mid = w0 + a0 * ds;
        } else {
            // Uncapped power from rest: v^3 = 3 P s / (rho m) over the first half cell, then the
            // midpoint slope accounts for resistance and gradient.
            const double p = type.power * type.performance;
            w_mid = std::pow(3.0 * p * 0.5 * ds * inv_effective_mass, 2.0 / 3.0);
        }
        if (w_mid <= 0.0) return w_mid;
        return w0 + 2.0 * accel(std::sqrt(w_mid), gradient) * ds;
    }
};

}  // namespace knockon
