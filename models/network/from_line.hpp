#pragma once
// A version-1 line (one chainage axis, main tracks with loops beside them: models/infrastructure)
// read into a network, so that the network's sections and routes are the ones the line's own
// model finds (path.hpp): every main track and loop is cut into segments at the turnouts of the
// loops beside it; a loop's ends are switches with no fouling distance (the line model's section
// boundary stands at the turnout); "up" runs forward, offsets count from the piece's start
// chainage, and the chainage is shown as the kilometre posts.  The line model's section
// boundaries that are neither signals nor turnouts (overlap ends, extra joints, the meeting of
// two main tracks) become joints.
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/network/network.hpp"

namespace knockon::net {

// Where a segment of the network lies on the line.
struct LinePiece {
    std::string track;               // the line's track id
    double x_from = 0.0, x_to = 0.0; // chainage of the segment's start and end [m]
};

struct LineNetwork {
    Network network;
    std::vector<LinePiece> pieces;   // one per segment
};

// Throws NetworkError where the line has a layout a network cannot take over as it is (two loops
// meeting at one point of their main track).
LineNetwork network_from_line(const Infrastructure& infra);

}  // namespace knockon::net
