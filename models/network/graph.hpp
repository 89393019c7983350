#pragma once
// The checked, indexed view of a network that sections, routes and paths are found on: which node
// each segment end is joined at, where a train can go on from a node, and the signals of each
// segment by offset.  Made only from a network that check_network passes.
#include <cstddef>
#include <vector>

#include "models/network/checks.hpp"
#include "models/network/network.hpp"

namespace knockon::net {

// The node a segment end is joined at, and which of the node's ends it is.
struct NodeSlot {
    std::size_t node = kNone;
    std::size_t slot = 0;
};

// The end of `segment` a train running in `h` leaves it by, and the one it enters by.
inline EndRef exit_end(std::size_t segment, Heading h) {
    return {segment, h == Heading::forward ? End::end : End::start};
}
inline EndRef entry_end(std::size_t segment, Heading h) {
    return {segment, h == Heading::forward ? End::start : End::end};
}
// The heading of a train that runs into a segment from its end `e`.
inline Heading heading_from(const EndRef& e) { return e.end == End::start ? Heading::forward : Heading::backward; }

class NetworkGraph {
public:
    // Throws NetworkError with every problem check_network finds.  Keeps a reference: the network
    // must outlive the graph.
    explicit NetworkGraph(const Network& network);

    const Network& network() const { return *network_; }
    const Segment& segment(std::size_t i) const { return network_->segments[i]; }
    NodeSlot node_at(const EndRef& e) const { return ends_[2 * e.segment + (e.end == End::end)]; }
    // Offset of a segment end.
    double offset_of(const EndRef& e) const { return e.end == End::start ? 0.0 : segment(e.segment).length; }

    // Where a train that reaches a node over segment end `arriving` can run on: the segment ends it
    // enters by (a switch: from the toe every leg, from a leg the toe; a diamond: the opposite end
    // of the same way; a link: the other end; a buffer stop or boundary: none).
    std::vector<EndRef> onward(const EndRef& arriving) const;

    // Signals standing on a segment, by increasing offset (indices into Network::signals).
    const std::vector<std::size_t>& signals_on(std::size_t segment) const { return signals_on_[segment]; }
    // Offsets on a segment where one detection section ends and the next begins: signals, joints,
    // and the fouling points and bounded ends of switches and diamonds; sorted, each once, the
    // segment's ends included only where a node bounds a section there.
    const std::vector<double>& section_cuts(std::size_t segment) const { return cuts_[segment]; }

private:
    const Network* network_;
    std::vector<NodeSlot> ends_;                       // 2 per segment: start, end
    std::vector<std::vector<std::size_t>> signals_on_;
    std::vector<std::vector<double>> cuts_;
};

}  // namespace knockon::net
