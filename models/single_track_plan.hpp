#pragma once
// Timetable analysis of single-track stretches (blocking time theory, UIC Code 406 compression):
// each train's run over a stretch, the crossings of opposing trains at the crossing places with
// their buffers, the capacity consumption of both directions together, and trains too long for
// the crossing place they stand at.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "models/capacity.hpp"
#include "models/single_track.hpp"
#include "models/train_plan.hpp"

namespace knockon {

// A train's blocking of one stretch: its section blockings there, from the first start to the
// last end.
struct StretchRun {
    std::size_t train = 0;   // index into the trains
    Direction direction = Direction::up;
    double start = 0.0, end = 0.0;   // [s]
};

// The way a path runs over stretch `stretch` of the layout (its first StretchPass there), or
// nothing where it does not run over it.
std::optional<Direction> stretch_direction(const SingleTrackLayout& layout, std::size_t stretch, const TrainPath& path);

// All trains' runs over stretch `stretch` of the layout, by blocking start (then train index); a
// train's direction there is its StretchPass's (models/single_track).
std::vector<StretchRun> stretch_runs(const SingleTrackLayout& layout, std::size_t stretch,
                                     const std::vector<TrainPlan>& trains);

// Two opposing trains whose runs over a stretch follow each other at a crossing place: the
// opposing train releases the stretch, then the waiting train blocks it.  Where each train comes
// over the stretch the other leaves by (a crossing proper), the waiting train is the one that
// arrives first (releases its stretch earlier) and `other_*` holds the second stretch's figures.
struct Crossing {
    std::size_t place = 0;      // index into SingleTrackLayout::places
    std::size_t stretch = 0;    // index into SingleTrackLayout::stretches: the one the waiting train enters
    std::size_t waiting = 0, opposing = 0;   // indices into the trains
    std::string waiting_track;  // the track the waiting train uses at the place (empty at an end)
    bool waiting_stops = false; // the waiting train has a planned stop there
    double opposing_release = 0.0;  // the opposing train's blocking end of the stretch [s]
    double waiting_blocks = 0.0;    // the waiting train's blocking start of the stretch [s]
    double buffer = 0.0;            // waiting_blocks - opposing_release; negative: a conflict
    bool proper = false;            // both trains come and go over the place's two stretches
    std::size_t other_stretch = 0;  // the stretch the opposing train enters (proper only)
    double other_buffer = 0.0;      // the opposing train's start there minus the waiting train's release
};

// Consecutive opposing runs over every stretch, paired into crossings; by place, then time.
std::vector<Crossing> find_crossings(const SingleTrackLayout& layout, const std::vector<TrainPlan>& trains);

// Capacity consumption of one stretch in one window: each direction alone and both together,
// all compressed in timetable order (blocking start on the stretch) as the minimum headways
// (same direction) and minimum opposing separations (no overlap of blocking on the stretch's
// sections) allow.  The peak hour is the clock hour of highest consumption of both together.
struct StretchCapacity {
    std::size_t stretch = 0;
    std::string window;              // "peak hour" or "day"
    double from = 0.0, to = 0.0;     // [s]
    std::size_t trains_up = 0, trains_down = 0;
    double consumption_up = 0.0, consumption_down = 0.0;   // each direction alone
    double occupation = 0.0;         // both directions together, compressed [s]
    double consumption = 0.0;        // both directions together
    double limit = 0.0;              // UIC 406 recommended limit for the line type and window
};
std::vector<StretchCapacity> stretch_capacity(const SingleTrackLayout& layout, const std::vector<TrainPlan>& trains,
                                              LineType type);

// A train standing at a crossing place (on its main track, so that the opposing train can use the
// loop, or in a loop) whose body reaches beyond the place's turnouts: the crossing cannot work.
// (On a line a train standing in a loop it does not fit is refused by the input checks before
// planning; a network's stopping points leave it to this check.)
struct CrossingTooShort {
    std::size_t crossing = 0;   // index into the crossings
    std::size_t train = 0;      // the train that does not fit
    std::string track;
    // Where it stands and the room on its track between the place's turnouts [m]: chainages on a
    // line, distances along the track from the place's first node on a network.
    double head = 0.0, tail = 0.0;
    double lo = 0.0, hi = 0.0;
};
std::vector<CrossingTooShort> crossings_too_short(const SingleTrackLayout& layout,
                                                  const std::vector<TrainPlan>& trains,
                                                  const std::vector<Crossing>& crossings);

}  // namespace knockon
