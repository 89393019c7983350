#pragma once
// Whether a train type can run at all: start and get going on level track, and stop on the
// steepest fall its path meets.  Each returns "" when it can, else a sentence saying why not
// (which figures fall short, and by how much) for a located error at the edge.
#include <string>

#include "models/path.hpp"
#include "models/train_type.hpp"

namespace knockon {

// On level track a train must start with at least this acceleration [m/s^2] and reach at least
// this speed [m/s] (or its maximum speed, if lower).  Heavy freight starts at about 0.05-0.1
// m/s^2 (from memory); the bounds only refuse a type that hardly moves, a slip of units in its
// traction (common practice, no source).
inline constexpr double kMinStartAcceleration = 0.01;
inline constexpr double kMinLevelSpeed = 20.0 / 3.6;

std::string level_track_problem(const TrainType& type);

// The service braking left on the steepest fall of the path in [from, to] (where the head runs)
// must be at least kMinNetBraking at every speed up to the type's maximum.
std::string brake_hold_problem(const TrainType& type, const TrainPath& path, double from, double to);

}  // namespace knockon
