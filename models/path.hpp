#pragma once
// The path of one service through the network, as a one-dimensional coordinate s (metres from
// the path's start, increasing in the direction of travel), with everything that lies along it:
// the track pieces used, train-detection sections, main signals and the timing points.  Running
// times, blocking times and the simulation all work on this view.  It is laid from a network path
// (models/network/train_path.hpp); a version-1 line's services through models/line_paths.hpp.
#include <cstddef>
#include <stdexcept>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/network/network.hpp"

namespace knockon {

// A run over one track: segments of one track joined end to end are one piece.
struct PathPiece {
    std::string track;                 // the track's name (a line's track id, else the segment's name)
    std::size_t segment = net::kNone;  // the network segment it starts on
    double s_from = 0.0, s_to = 0.0;   // along the path [m]
    double x_from = 0.0, x_to = 0.0;   // position shown (chainage, kilometre posts) at s_from and s_to [m]
};

// A run over part of one network segment, as the path is laid over it: the network's own view of
// the path (a piece may join several), from which places on the network's layout (a single-track
// stretch, a crossing track) are found along the path.
struct PathRun {
    std::size_t segment = net::kNone;
    double from = 0.0, to = 0.0;       // offsets on the segment, in running order [m]
    net::Heading heading = net::Heading::forward;
    double s_from = 0.0, s_to = 0.0;   // along the path [m]
    // The offset on the segment where the head stands at s (within [s_from, s_to]).
    double offset_at(double s) const {
        return heading == net::Heading::forward ? from + (s - s_from) : from - (s - s_from);
    }
};

// A train-detection section as this path crosses it.  `id` is the same for every path that uses
// the section, so two paths conflict exactly where they share ids.
struct PathSection {
    std::string id;
    double s_from = 0.0, s_to = 0.0;   // along the path [m]
    double x_lo = 0.0, x_hi = 0.0;     // position shown at the ends of the section's first piece [m]
    std::size_t index = net::kNone;    // the network's detection section
};

struct PathSignal {
    std::size_t index = net::kNone;    // the network's signal
    net::Signal signal;                // its name, overlap, sighting and distant distances
    double s = 0.0;
    AspectSystem system = AspectSystem::three_aspect;
};

// A call of the service located on the path.
struct TimingPoint {
    std::size_t call = 0;   // index into Service::calls
    double s = 0.0;
    bool stops = true;
};

// A station whose timing point (on whichever of its tracks the path takes) lies on the path.
struct StationPass {
    std::string station;   // station id
    double s = 0.0;        // within [0, length]
};

// A stretch of a path over which a profile holds one value.
struct ProfileStretch {
    double value = 0.0;
    double s_from = 0.0, s_to = 0.0;
};

// A piecewise-constant quantity along a path: value[k] holds from s[k] to s[k+1].
struct PathProfile {
    std::vector<double> s, value;
    double at(double pos) const;   // before the first break: the first value
    // The lowest value anywhere in [from, to], with the part of [from, to] it holds over (the
    // first such stretch on ties).  Needs at least one value.
    ProfileStretch lowest(double from, double to) const;
};

struct TrainPath {
    Direction direction = Direction::up;
    double length = 0.0;                   // [m]
    bool starts_at_edge = false;
    bool ends_at_edge = false;
    // Pieces and sections are contiguous and in order.  They cover [s_min, s_max], which reaches
    // behind the start (where an originating train's body stands) and past the end (overlaps),
    // as far as the track goes.
    double s_min = 0.0, s_max = 0.0;
    std::vector<PathPiece> pieces;
    std::vector<PathRun> runs;             // the same ground as the pieces, segment by segment
    std::vector<PathSection> sections;
    std::vector<PathSignal> signals;       // main signals facing the train, in order
    std::vector<TimingPoint> timing_points;
    // Every station the path passes between its start and end, called at or not, in running
    // order: what the planner's line sections are measured by (models/headway).
    std::vector<StationPass> stations;
    PathProfile gradient;      // met by the train (positive climbing)
    PathProfile speed_limit;   // line speed capped by the track's limit and switch legs' speeds [m/s]

    double chainage_at(double s) const;
    // Where along the path the station's timing point lies; NaN if the path does not pass it.
    double station_s(const std::string& station) const;
    // Where along the path (within [0, length]) the head passes chainage x; NaN if it does not.
    double s_at_chainage(double x) const;
    // Gradient met by the train at s: positive when it climbs.
    double gradient_at(double s) const;
    // The steepest fall met anywhere in [from, to] (the lowest gradient: a climb where nothing
    // falls), with where it lies.  The one rule for "the gradient a braking train meets".
    ProfileStretch steepest_fall(double from, double to) const;
    // Static speed limit at s for the head (line speed capped by the track's limit) [m/s].
    double speed_limit_at(double s) const;
};

// How two paths run over one detection section (by id): over a segment of it both use, in one
// heading (`same`) or in opposite ones (`opposing`); `apart` where they share no segment of it (a
// switch's section taken from different legs, a diamond crossed both ways) or either misses it.
// The headings are each path's own over that segment (PathRun), not the heading it starts in: on a
// network a path may run over a segment either way whatever heading it started in.  On a line
// every path's heading is its direction, so this is the two directions compared.
enum class SectionMeeting { same, opposing, apart };
SectionMeeting section_meeting(const TrainPath& a, const TrainPath& b, const std::string& section);

// Chainages on `track` where one detection section ends and the next begins (signals, overlap
// ends, turnouts, extra joints), sorted, the track's ends included: the one rule for sections.
std::vector<double> section_boundaries(const Infrastructure& infra, const Track& track);

// Section ids follow "<track>:<from km>-<to km>", e.g. "U:12.400-14.000".
std::string section_id(const std::string& track, double x_from, double x_to);

struct PathError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

}  // namespace knockon
