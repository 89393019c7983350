#pragma once
// The path of one service over the network, found from its calls: between two calls (and from an
// entry boundary, to an exit boundary) the shortest way the graph allows in the headings its
// segments allow, over any via tracks given; a stop may reverse the train, which is a step of the
// path of its own.  The whole path is the shortest that meets every call in order (one search
// per leg, carrying every place and heading a call can be met at into the next).
#include <cstddef>
#include <vector>

#include "models/network/routes.hpp"

namespace knockon::net {

struct PathCall {
    std::size_t station = kNone;
    std::size_t track = kNone;       // the segment it must use; kNone: any track of the station
    bool stops = true;
    bool reverses = false;           // the train changes direction at this stop
    std::vector<std::size_t> via;    // segments run over, end to end, on the way to the next call
};

struct PathRequest {
    std::size_t enters_at = kNone;   // a boundary node; kNone: the train starts at its first call
    std::vector<std::size_t> entry_via;   // segments run over, end to end, from the entry to the first call
    std::size_t leaves_at = kNone;   // a boundary node; kNone: it ends at its last call
    std::vector<PathCall> calls;     // at least one
    double train_length = 0.0;       // picks the stopping points [m]
};

struct PathStep {
    enum class Kind { run, reversal };
    Kind kind = Kind::run;
    Stretch run;                     // a run
    std::size_t call = kNone;        // a reversal: the call it stops at
};

// Where the path meets a call.
struct CallPlace {
    Location at;
    Heading heading = Heading::forward;   // arriving
    double s = 0.0;                       // distance run from the path's start [m]
};

struct NetworkPath {
    std::vector<PathStep> steps;
    std::vector<CallPlace> calls;    // one per call
    double length = 0.0;             // [m], the sum of the runs
};

// Throws NetworkError saying which call (or boundary) cannot be reached from the one before.
NetworkPath find_path(const NetworkGraph& graph, const PathRequest& request);

// Where a train of `length` running in `heading` stops at timing point `timing_point` (index into
// Network::timing_points): the stopping point of that station, track and heading for the
// shortest trains it fits with, else the timing point.  The one rule for where a train stops.
Location stop_place(const Network& network, std::size_t timing_point, Heading heading, double length);

}  // namespace knockon::net
