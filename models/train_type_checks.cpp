#include "models/train_type_checks.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

#include "models/running_time.hpp"

namespace knockon {

namespace {

std::string format(const char* fmt, double a, double b = 0.0, double c = 0.0, double d = 0.0) {
    char buf[160];
    std::snprintf(buf, sizeof buf, fmt, a, b, c, d);
    return buf;
}

// The least service deceleration at any speed from standstill to v_max: a table is linear
// between its rows and constant beyond them, so the least lies at a row or at an end.
double least_deceleration(const TrainType& type) {
    std::vector<double> speeds = {0.0, type.max_speed};
    for (const auto& row : type.braking_table)
        if (row.first < type.max_speed) speeds.push_back(row.first);
    double least = type.service_deceleration(0.0);
    for (double v : speeds) least = std::min(least, type.service_deceleration(v));
    return least;
}

}  // namespace

std::string level_track_problem(const TrainType& type) {
    const double inertia = type.rotating_mass_factor * type.mass;
    const double start = type.tractive_force(0.0) - type.resistance(0.0);
    if (!(start >= kMinStartAcceleration * inertia))
        return format("cannot get going on level track: at standstill its tractive effort (%.4g kN) exceeds its "
                      "resistance (%.4g kN) by %.4g kN, an acceleration of %.3g m/s2",
                      type.tractive_force(0.0) / 1000.0, type.resistance(0.0) / 1000.0, start / 1000.0,
                      start / inertia) +
               format(" where at least %g m/s2 is needed; check the traction (units?)", kMinStartAcceleration);
    const double need = std::min(kMinLevelSpeed, type.max_speed);
    const double reach = balancing_speed(type, 0.0);
    if (reach < need * (1.0 - 1e-9))
        return format("reaches only %.3g km/h on level track, where its tractive effort (%.4g kN) falls to its "
                      "resistance",
                      reach * 3.6, type.tractive_force(reach) / 1000.0) +
               format("; at least %.3g km/h is needed: check traction.power and the traction (units?)", need * 3.6);
    return "";
}

std::string brake_hold_problem(const TrainType& type, const TrainPath& path, double from, double to) {
    const ProfileStretch fall = path.steepest_fall(from, to);
    const double braking = least_deceleration(type);
    const double left = braking + kGravity * fall.value;
    if (left >= kMinNetBraking) return "";
    if (fall.value >= 0.0)
        return format("its service braking (%.3g m/s2) is less than the %g m/s2 it needs to stop at all", braking,
                      kMinNetBraking);
    return format("its service braking (%.3g m/s2) cannot hold it on the %.3g per mille fall from km %.3f to km %.3f",
                  braking, -fall.value * 1000.0, path.chainage_at(fall.s_from) / 1000.0,
                  path.chainage_at(fall.s_to) / 1000.0) +
           format(": the fall takes %.3g m/s2 of it, leaving %.3g m/s2 where at least %g m/s2 is needed to stop",
                  -kGravity * fall.value, left, kMinNetBraking);
}

}  // namespace knockon
