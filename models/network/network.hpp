#pragma once
// Infrastructure as a network: track segments joined at nodes, and the objects placed on the
// segments at (segment, offset).  Everything refers to everything else by integer index; names
// are kept only to be shown and to be looked up at the edges (readers, messages).  All values SI.
//
// This is plain data, filled by a reader or by code.  `check_network` (network/checks.hpp) says
// what is wrong with it; `NetworkGraph` (network/graph.hpp) is the checked, indexed view that
// detection sections, routes and paths are found on.
#include <cstddef>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"

namespace knockon::net {

inline constexpr std::size_t kNone = std::numeric_limits<std::size_t>::max();
inline constexpr double kNoLimit = std::numeric_limits<double>::infinity();
// Offsets closer than this are one place (a micrometre: far below any survey, far above rounding).
inline constexpr double kSamePlace = 1e-6;

// Which way a train runs along a segment: forward = towards increasing offset.
enum class Heading : std::uint8_t { forward, backward };
inline Heading opposite(Heading h) { return h == Heading::forward ? Heading::backward : Heading::forward; }
const char* to_string(Heading h);

// One end of a segment: offset 0 (start) or offset `length` (end).
enum class End : std::uint8_t { start, end };
struct EndRef {
    std::size_t segment = kNone;
    End end = End::start;
    bool operator==(const EndRef& o) const { return segment == o.segment && end == o.end; }
};

// A point on the network.
struct Location {
    std::size_t segment = kNone;
    double offset = 0.0;   // [m] from the segment's start
};

// A value that holds from `from` up to the next band's `from` (the last to the segment's end).
struct OffsetBand {
    double from = 0.0;   // [m] offset
    double value = 0.0;
};

// A kilometre post: the position shown to users at an offset (the line's own kilometres, which
// may jump or run against the offset).  Display only: nothing is worked out from it.
struct KmPost {
    double offset = 0.0;   // [m]
    double position = 0.0; // [m] as shown (12 400 m shows as "12.400")
};

struct Segment {
    std::string name;
    double length = 0.0;                // [m]
    bool forward = true;                // trains may run towards increasing offset
    bool backward = true;               // and towards decreasing offset
    std::vector<OffsetBand> gradient;   // ratio, rising towards increasing offset; none = level
    std::vector<OffsetBand> speed;      // line speed [m/s], both headings; none = no limit
    std::vector<KmPost> posts;          // sorted by offset; none = the offset itself

    bool allows(Heading h) const { return h == Heading::forward ? forward : backward; }
    double gradient_at(double offset) const;   // ratio rising towards increasing offset
    double speed_at(double offset) const;      // [m/s]; kNoLimit where none is set
    // Position shown at `offset`: between two posts linear, beyond the outermost ones running on
    // from the nearest pair (one post: one metre per metre of offset).
    double shown_at(double offset) const;
};

enum class NodeKind : std::uint8_t {
    link,          // two segment ends joined, nothing more (a change of segment)
    switch_,       // a toe (the common end) and two or more legs
    diamond,       // four ends; a train runs from ends[0] to ends[1] or from ends[2] to ends[3]
    buffer_stop,   // one end; nothing lies beyond
    boundary,      // one end; trains enter and leave the modelled area here
};
const char* to_string(NodeKind k);

struct NodeEnd {
    EndRef at;
    // Highest speed over the node from or to this end [m/s]: a switch's diverging leg.
    double speed = kNoLimit;
};

struct Node {
    std::string name;
    NodeKind kind = NodeKind::link;
    // link: 2 ends; switch: ends[0] the toe, then the legs; diamond: 4; buffer stop, boundary: 1.
    std::vector<NodeEnd> ends;
    // Switch and diamond: distance from the node along each leg (a diamond: each of its four
    // ends) to the fouling point, beyond which a train stands clear of the other way over the
    // node [m].  The node's detection section reaches from the node out to these points; a
    // switch's toe side is bounded at the node itself.  Zero: no section of the node's own.
    double fouling = 0.0;

    // How far the node's own detection section reaches from the node along ends[slot] [m]: the
    // fouling distance on a switch's legs and on a diamond's four ends, else zero.
    double reach(std::size_t slot) const;
};

// A main signal, read by trains running in `heading`.
struct Signal {
    std::string name;
    Location at;
    Heading heading = Heading::forward;
    AspectSystem system = AspectSystem::three_aspect;
    double sighting_distance = 0.0;          // [m]
    double overlap = 0.0;                    // beyond the signal [m]
    std::optional<double> distant_distance;  // two aspects: where its distant signal stands in rear [m]
};

// A train-detection boundary that is not a signal (an insulated joint, an axle-counter head).
struct Joint {
    std::string name;   // may be empty
    Location at;
};

struct Station {
    std::string id;     // the short name timetables use
    std::string name;   // shown
};

// Where times at a station are taken on one of its tracks (one per track the station has).
struct TimingPoint {
    std::size_t station = kNone;
    Location at;
};

// Where a stopping train's head comes to rest on one track of a station, in one heading, for
// trains of up to `max_train_length` (a stop board for long trains has a larger one).  Where none
// is given for a train, it stops at the timing point.
struct StoppingPoint {
    std::size_t station = kNone;
    Location at;
    Heading heading = Heading::forward;
    double max_train_length = kNoLimit;   // [m]
};

struct Platform {
    std::string name;   // may be empty
    std::size_t station = kNone;
    std::size_t segment = kNone;
    double from = 0.0, to = 0.0;   // offsets, from < to [m]
    double length() const { return to - from; }
};

// A name for a route the program finds (routes need none): the one from `entry_signal` to
// `exit_signal` (kNone: to the buffer stop or boundary it ends at) over every segment in `via`.
struct RouteName {
    std::string name;
    std::size_t entry_signal = kNone;
    std::size_t exit_signal = kNone;
    std::vector<std::size_t> via;
};

struct Network {
    std::vector<Segment> segments;
    std::vector<Node> nodes;
    std::vector<Signal> signals;
    std::vector<Joint> joints;
    std::vector<Station> stations;
    std::vector<TimingPoint> timing_points;
    std::vector<StoppingPoint> stopping_points;
    std::vector<Platform> platforms;
    std::vector<RouteName> route_names;
    InterlockingTimes interlocking;

    // By name (id for stations); kNone when there is none.
    std::size_t find_segment(const std::string& name) const;
    std::size_t find_node(const std::string& name) const;
    std::size_t find_signal(const std::string& name) const;
    std::size_t find_station(const std::string& id) const;
};

}  // namespace knockon::net
