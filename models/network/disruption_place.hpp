#pragma once
// Where a disruption lies on a network: a segment and a range of offsets from its start
// (DisruptionRule::segment, from, to).  The one check of that place, used by the network reader
// (which locates the field) and by NetworkPaths for a scenario built in code.
#include <string>
#include <vector>

#include "models/network/network.hpp"
#include "models/primary_delay_model.hpp"

namespace knockon::net {

struct DisruptionPlaceProblem {
    std::string field;     // "segment", "from" or "to"
    std::string message;   // a sentence
};

// What is wrong with the rule's place on `network`, in field order: no segment or one it does not
// have (nothing more is checked then), `from` or `to` off the segment, a range that does not end
// beyond its start.  Empty: the place is on the network.
std::vector<DisruptionPlaceProblem> disruption_place_problems(const Network& network, const DisruptionRule& rule);

}  // namespace knockon::net
