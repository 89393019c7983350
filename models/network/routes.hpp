#pragma once
// Routes found over the graph: from each main signal, every way a train can run in the signal's
// heading to the next signal facing it (or to a buffer stop or boundary where none comes first),
// with the detection sections it locks and the overlap beyond its exit signal.  Where the overlap
// could run over either leg of a switch, each leg is one alternative.
#include <cstddef>
#include <string>
#include <vector>

#include "models/network/sections.hpp"
#include "models/network/stretch.hpp"

namespace knockon::net {

struct Overlap {
    std::vector<Stretch> run;
    double length = 0.0;                 // shorter than the signal's where a buffer stop or boundary comes first [m]
    std::vector<std::size_t> sections;   // detection sections it crosses, in running order
};

struct Route {
    // The name the network gives it (Network::route_names), else "<entry>-<exit>", with "/2",
    // "/3" on further ways between the same two signals.
    std::string name;
    std::size_t entry_signal = kNone;
    std::size_t exit_signal = kNone;     // kNone where the route ends at a buffer stop or boundary
    std::size_t end_node = kNone;        // that buffer stop or boundary
    std::vector<Stretch> run;            // from the entry signal to the exit signal or end node
    double length = 0.0;                 // [m]
    std::vector<std::size_t> sections;   // detection sections from entry to exit, in running order
    std::vector<Overlap> overlaps;       // alternatives beyond the exit signal; none for a zero overlap
};

// Routes of every signal, by signal index, then in the order of the switch legs taken, named as
// Network::route_names says.  Throws NetworkError where a route name matches no route or several,
// or two routes end up with one name; where the track ahead of a signal runs round in a loop that
// no signal faces; or where it branches so often before the next signal that the search would not
// end in reasonable time.
std::vector<Route> find_routes(const NetworkGraph& graph, const DetectionSections& sections);

// Runs from `start` in `heading` for `distance` metres along every way the graph allows, as far
// as a buffer stop or boundary where one comes first: one run per way.  Shared by overlaps and
// by anything else that looks a distance ahead.  Throws NetworkError on a layout that branches too
// often within the distance.
std::vector<std::vector<Stretch>> runs_ahead(const NetworkGraph& graph, const Location& start, Heading heading,
                                             double distance);

}  // namespace knockon::net
