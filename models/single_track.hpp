#pragma once
// Single-track stretches of a line and the crossing places between them, found from the
// infrastructure alone: a stretch is a piece of a main track that carries both directions, between
// two places where opposing trains can pass each other (a loop beside that track, or the end of
// the line or of the single track).  Planning (crossings, capacity of both directions together)
// and dispatching read this one structure.
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/network/network.hpp"

namespace knockon {

struct TrainPath;

// On a network, a segment a stretch or a crossing track runs over, in order: `up` is the heading
// that runs from the stretch's lower place towards its upper one (a crossing track: away from the
// place's first node), `start` the distance along the stretch (track) where the segment begins.
// Empty on a line, whose chainage is the one axis of every stretch and track.
struct AxisSegment {
    std::size_t segment = net::kNone;
    net::Heading up = net::Heading::forward;
    double start = 0.0, length = 0.0;   // [m]
};

// A track a train can stand on at a crossing place, with the room it offers.
struct CrossingTrack {
    std::string track;           // track id (the main track or a loop)
    bool loop = false;
    double x_lo = 0.0, x_hi = 0.0;   // between the crossing place's turnouts [m]
    // Usable length for a train of each direction: from the turnout it enters by to the first
    // signal facing it on this track (the whole track piece when none stands there) [m].
    double usable_up = 0.0, usable_down = 0.0;
    double usable(Direction d) const { return d == Direction::up ? usable_up : usable_down; }
    std::vector<AxisSegment> axis;   // a network: the segments it runs over (x from 0)
};

enum class CrossingPlaceKind {
    loop,          // one or more loops beside the single track: trains pass each other here
    line_end,      // the end of the modelled line: trains turn or run on beyond it
    track_end,     // the single track ends where other main tracks (double track) begin
};
const char* to_string(CrossingPlaceKind k);

struct CrossingPlace {
    std::string name;            // a station within it, else "line start"/"line end"/"km 12.400"
    CrossingPlaceKind kind = CrossingPlaceKind::loop;
    double x_lo = 0.0, x_hi = 0.0;   // chainage extent (the outermost turnouts; a point at an end)
    std::vector<std::string> stations;   // station ids within the extent, by chainage
    std::vector<CrossingTrack> tracks;   // main track first, then the loops; empty at an end
    bool contains(double x) const;
};

// On a network (models/network/single_track) the same structures hold: chainages are then
// distances along the stretch from its lower place (along a crossing track from the place's first
// node), a crossing place's `tracks` are segments, `segments` names what a stretch runs over and
// `axis` lays it out for position_on; a place has no extent of its own there (x_lo = x_hi = 0).
struct SingleTrackStretch {
    std::string name;            // "<lower place>-<upper place>", e.g. "HTW-BRC"
    std::string track;           // the main track it lies on (a network: its first segment)
    std::vector<std::string> segments;   // a network: the segments it runs over, from the lower place
    double x_lo = 0.0, x_hi = 0.0;   // chainage extent: between the places' turnouts [m]
    std::size_t lower = 0, upper = 0;   // indices into SingleTrackLayout::places (lower chainage first)
    std::vector<std::string> sections;  // detection section ids lying in it, by chainage
    std::vector<AxisSegment> axis;      // a network: the segments it runs over (x from 0)
    bool has_section(const std::string& id) const;
    // The place a train of direction d enters the stretch from, and the one it leaves it at.
    std::size_t entry_place(Direction d) const { return d == Direction::up ? lower : upper; }
    std::size_t exit_place(Direction d) const { return d == Direction::up ? upper : lower; }
};

struct SingleTrackLayout {
    std::vector<CrossingPlace> places;         // by chainage
    std::vector<SingleTrackStretch> stretches; // by chainage
    bool empty() const { return stretches.empty(); }
    // The stretch holding detection section `id`, or nullptr.
    const SingleTrackStretch* stretch_of_section(const std::string& id) const;
    // The crossing place whose extent holds chainage x, or nullptr.
    const CrossingPlace* place_at(double x) const;
};

SingleTrackLayout single_track_layout(const Infrastructure& infra);

// Where the head of a train at s on `path` stands along a stretch or crossing track (its `axis`),
// and which way the train runs there: up from the stretch's lower place to its upper one (a
// crossing track: away from the place's first node).  The one rule for positions and directions
// on single track, for a line and a network alike: on a line (empty axis) the chainage and the
// path's own direction; on a network the axis's distance through the segment the path runs over at
// s, and the heading there against the axis's, since a path may meet a stretch drawn either way
// round whatever heading it started in.  Nothing where the path is not on the axis at s.
struct AxisPosition {
    double x = 0.0;   // [m]
    Direction direction = Direction::up;
};
std::optional<AxisPosition> position_on(const std::vector<AxisSegment>& axis, const TrainPath& path, double s);

// A path's passage over one single-track stretch: its sections lying in the stretch, in a row,
// and the way it runs there (found by position_on).  Planning (crossings, capacity) and the
// dispatcher read a train's direction on a stretch from here, never from the direction the path
// starts in.
struct StretchPass {
    std::size_t stretch = 0;          // index into SingleTrackLayout::stretches
    std::size_t first = 0, end = 0;   // path sections [first, end)
    Direction direction = Direction::up;
};
std::vector<StretchPass> stretch_passes(const SingleTrackLayout& layout, const TrainPath& path);

// Where the tail of a train of `length` standing with its head at `head_x` lies, and whether the
// train stands wholly within [lo, hi] (clear of the turnouts at both ends).  The one rule for "the
// train fits where it stands", used by the input checks (a loop) and the crossing checks.
struct StandingFit {
    double tail = 0.0;
    bool fits = false;
};
StandingFit standing_fit(double lo, double hi, double head_x, Direction d, double length);

}  // namespace knockon
