#pragma once
// Single-track stretches and crossing places found on a network, into the structure planning and
// dispatching read for a line (models/single_track.hpp).  A stretch is a run of track worked in
// both directions, segment to segment over links and diamonds, between two places where it ends:
// a switch whose toe it reaches (beyond, two or more tracks), a switch it joins at a leg (another
// track takes over), a boundary or a buffer stop.  Where the legs of a switch at a stretch's end
// meet again at one switch, the two switches and the tracks between them are one crossing place
// of kind loop; any other switch is the end of the single track; a boundary or buffer stop the
// end of the line.
#include "models/network/sections.hpp"
#include "models/single_track.hpp"

namespace knockon::net {

// Places in the order the stretches first meet them, stretches by their first segment.  On a
// network "up" is the way from a place's first node to its other one (a loop), and along a
// stretch from its lower place (the end of its first segment it is entered by) to its upper.
SingleTrackLayout single_track_layout(const NetworkGraph& graph, const DetectionSections& sections);

}  // namespace knockon::net
