#pragma once
// A TrainPath (models/path.hpp), the one-dimensional view running times, blocking times and the
// engine work on, laid from a path over the network: the s coordinate runs along the path's
// steps; gradient and speed profiles come from the segments, with the speed of a switch's leg
// over the switch's own section; detection sections from DetectionSections, with ids shared by
// every path over them (so two paths conflict exactly where they share ids); main signals
// facing the train from the runs; timing points from the calls; positions shown from the
// segments' kilometre posts.
#include <string>
#include <vector>

#include "models/network/paths.hpp"
#include "models/path.hpp"

namespace knockon::net {

// The names a laid path gives what it runs over: by detection section index (the ids results
// and disruptions use), and by segment index (the track a piece runs over; segments of one name
// joined end to end are one piece).  Empty: the sections' and segments' own names.
struct PathNames {
    std::vector<std::string> sections;
    std::vector<std::string> tracks;
};

// How far the laid path reaches beyond the network path, where the track goes on: `rear` behind
// its start (where an originating train's body stands) and `ahead` beyond its end (overlaps, the
// engine's look-ahead) [m].  Beyond its ends a path runs on over the first way the graph gives
// (a switch's first leg: a line's straight track), in the train's heading.
struct PathReach {
    double rear = 0.0;
    double ahead = 0.0;
};

// Lays `path`, found by find_path for `request` (which says where the train stops and whether it
// enters or leaves at a boundary), as a TrainPath.  Throws NetworkError where the path reverses (a
// TrainPath runs in one heading: a reversing service is not laid yet) or has no length at all.
TrainPath train_path(const NetworkGraph& graph, const DetectionSections& sections, const PathNames& names,
                     const PathRequest& request, const NetworkPath& path, const PathReach& reach);

}  // namespace knockon::net
