#pragma once
// Infrastructure of a modelled line: a chainage axis (metres from the line's origin), tracks laid
// along it, stations, main signals and the signalling areas.  All values SI (m, m/s, s).
//
// Direction "up" runs towards increasing chainage, "down" towards decreasing chainage.
// Detection sections and routes are not stored here: they follow from signals, overlaps and
// turnouts (see path.hpp), so there is one place that decides them.
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace knockon {

enum class Direction { up, down };

inline const char* to_string(Direction d) { return d == Direction::up ? "up" : "down"; }

// A value that holds over a chainage interval [from, to).
struct ChainageBand {
    double from = 0.0;
    double to = 0.0;
    double value = 0.0;
};

struct Track {
    std::string id;
    double from = 0.0;  // chainage of the end nearer the line origin [m]
    double to = 0.0;    // chainage of the far end [m]
    // Which directions may run on it; both set on single line worked in both directions.
    bool up = true;
    bool down = true;
    // A loop leaves its parent track at `from` and rejoins it at `to` (turnouts there).
    // Empty for a main track.
    std::string parent;
    double speed_limit = std::numeric_limits<double>::infinity();  // cap on this track [m/s]
    bool allows(Direction d) const { return d == Direction::up ? up : down; }
    bool is_loop() const { return !parent.empty(); }
};

struct Station {
    std::string id;
    std::string name;
    double at = 0.0;  // chainage of the stopping mark and timing point [m]
};

enum class AspectSystem { two_aspect, three_aspect, four_aspect, cab_fixed_block };

const char* to_string(AspectSystem a);

struct Signal {
    std::string id;
    std::string track;
    double at = 0.0;  // chainage [m]
    Direction direction = Direction::up;
    double sighting_distance = 0.0;  // [m]
    double overlap = 0.0;            // length of the overlap beyond this signal [m]
    // Two-aspect areas: distance in rear of this signal at which its distant signal stands [m].
    std::optional<double> distant_distance;
};

// An area of one aspect system: signals whose chainage lies in [from, to) belong to it.
struct SignallingArea {
    double from = 0.0;
    double to = 0.0;
    AspectSystem system = AspectSystem::three_aspect;
};

struct InterlockingTimes {
    double route_setup = 6.0;        // [s]
    double release = 3.0;            // [s]
    double sight_reaction = 12.0;    // [s]
};

struct Infrastructure {
    double length = 0.0;                     // chainage of the far end of the line [m]
    std::vector<ChainageBand> gradients;     // per mille converted to a ratio: +0.006 = rising 6 per mille towards increasing chainage
    std::vector<ChainageBand> speed_limits;  // [m/s], line speed by chainage (both directions)
    std::vector<Track> tracks;
    std::vector<Station> stations;
    std::vector<Signal> signals;
    std::vector<SignallingArea> areas;
    InterlockingTimes interlocking;
    // Extra train-detection boundaries (insulated joints, axle counters) beyond those at signals,
    // overlap ends and turnouts: (track id, chainage).
    std::vector<std::pair<std::string, double>> extra_joints;

    const Track* find_track(const std::string& id) const;
    const Station* find_station(const std::string& id) const;
    // The main (non-loop) track that carries direction d at chainage x, or nullptr.
    const Track* main_track_at(double x, Direction d) const;
    AspectSystem aspect_system_at(double x) const;
    double gradient_at(double x) const;     // ratio, rising towards increasing chainage
    double line_speed_at(double x) const;   // [m/s]
};

}  // namespace knockon
