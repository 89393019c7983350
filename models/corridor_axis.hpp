#pragma once
// A network corridor as a distance axis for the planner's views (time-distance diagrams, the
// corridor table): its stations in order, each at the distance the trains run from the
// corridor's first station, and each train's part along it.
//
// The distance between two consecutive corridor stations is the shortest distance any train's
// path runs between their timing points (on a loop the tracks differ a little in length; the
// shortest is the through track's).  A train lies along the corridor over the longest run of
// consecutive corridor stations its path passes one after the other, in either direction (the
// first such run on a tie); it is placed by linear interpolation between those stations, so a
// train on a slightly longer track reaches each station at the station's distance.
#include <cstddef>
#include <string>
#include <vector>

#include "models/network/timetable.hpp"
#include "models/train_plan.hpp"

namespace knockon {

struct CorridorStation {
    std::string id;
    double at = 0.0;   // distance from the corridor's first station [m]
};

// One train's part along the corridor: knots from its path (s, increasing) to the axis.
struct CorridorRun {
    std::size_t train = 0;      // index into the trains the axis was made from
    bool along = true;          // runs in the corridor's order (distance growing)
    std::vector<double> s;      // along the train's path, increasing, at corridor stations
    std::vector<double> at;     // distance along the corridor at each s
    double s_from() const { return s.front(); }
    double s_to() const { return s.back(); }
    // Distance along the corridor at path position p; NaN outside [s_from, s_to].
    double position(double p) const;
};

struct CorridorAxis {
    std::string name;
    std::vector<CorridorStation> stations;   // in the corridor's order
    std::vector<CorridorRun> runs;           // in train order; trains along no part left out
    double length() const { return stations.empty() ? 0.0 : stations.back().at; }
    const CorridorRun* run_of(std::size_t train) const;
};

// The axis of `corridor` from the trains' laid paths.  A pair of consecutive stations no train
// runs between (a corridor the timetable checks would refuse) is placed 1 km apart.
CorridorAxis corridor_axis(const net::Corridor& corridor, const std::vector<TrainPlan>& trains);

}  // namespace knockon
