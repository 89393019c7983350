#include "models/network/disruption_place.hpp"

#include "models/units.hpp"

namespace knockon::net {

std::vector<DisruptionPlaceProblem> disruption_place_problems(const Network& network, const DisruptionRule& rule) {
    if (rule.segment.empty())
        return {{"segment", "a disruption on a network is placed by `segment`, with `from` and `to` as offsets from "
                            "the segment's start"}};
    const std::size_t k = network.find_segment(rule.segment);
    if (k == kNone) return {{"segment", "no segment has the id \"" + rule.segment + "\""}};
    std::vector<DisruptionPlaceProblem> out;
    const double length = network.segments[k].length;
    // Offsets are measured from the segment's start, so they lie within [0, length].
    for (const char* key : {"from", "to"}) {
        const double x = std::string(key) == "from" ? rule.from : rule.to;
        if (x < -kSamePlace || x > length + kSamePlace)
            out.push_back({key, std::string(key) + " " + format_metres(x) + " lies off segment " + rule.segment +
                                    ", whose offsets run from 0 m to " + format_metres(length)});
    }
    if (rule.to <= rule.from)
        out.push_back({"to", "the range must end beyond its start: to " + format_metres(rule.to) + " is not beyond from " +
                                 format_metres(rule.from)});
    return out;
}

}  // namespace knockon::net
