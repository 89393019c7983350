#include "models/network/single_track.hpp"

#include <algorithm>
#include <map>
#include <optional>

namespace knockon::net {
namespace {

struct Step {
    std::size_t segment;
    Heading heading;
};

bool both_ways(const Segment& s) { return s.forward && s.backward; }

// Where a run leaving `seg` in `h` goes on through a link or a diamond (one way only), else
// nothing: the node ends it.
std::optional<Step> through(const NetworkGraph& g, Step at) {
    const EndRef out = exit_end(at.segment, at.heading);
    const NodeSlot slot = g.node_at(out);
    const NodeKind kind = g.network().nodes[slot.node].kind;
    if (kind != NodeKind::link && kind != NodeKind::diamond) return std::nullopt;
    const std::vector<EndRef> next = g.onward(out);
    if (next.size() != 1) return std::nullopt;
    return Step{next[0].segment, heading_from(next[0])};
}

// Segments strung over links and diamonds from a node's end, as long as `keep` holds for them.
template <class Keep>
std::vector<Step> chain_from(const NetworkGraph& g, Step first, Keep keep) {
    std::vector<Step> out{first};
    std::vector<bool> seen(g.network().segments.size(), false);
    seen[first.segment] = true;
    while (auto next = through(g, out.back())) {
        if (seen[next->segment] || !keep(g.segment(next->segment))) break;
        seen[next->segment] = true;
        out.push_back(*next);
    }
    return out;
}

double length_of(const NetworkGraph& g, const std::vector<Step>& chain) {
    double l = 0.0;
    for (const Step& s : chain) l += g.segment(s.segment).length;
    return l;
}

// The chain as the axis positions along it are measured on (position_on).
std::vector<AxisSegment> axis_of(const NetworkGraph& g, const std::vector<Step>& chain) {
    std::vector<AxisSegment> axis;
    double start = 0.0;
    for (const Step& s : chain) {
        const double length = g.segment(s.segment).length;
        axis.push_back({s.segment, s.heading, start, length});
        start += length;
    }
    return axis;
}

// A crossing track along `chain` (from the place's first node): its room for a train entering at
// either end, up to the first signal facing it on the track.
CrossingTrack crossing_track(const NetworkGraph& g, const std::vector<Step>& chain, bool loop) {
    const Network& net = g.network();
    const double length = length_of(g, chain);
    CrossingTrack ct;
    ct.track = net.segments[chain.front().segment].name;
    for (std::size_t k = 1; k < chain.size(); ++k) ct.track += "+" + net.segments[chain[k].segment].name;
    ct.loop = loop;
    ct.x_lo = 0.0;
    ct.x_hi = length;
    ct.usable_up = ct.usable_down = length;
    ct.axis = axis_of(g, chain);
    bool up_ok = true, down_ok = true;
    double before = 0.0;   // length of the chain before this step
    for (const Step& st : chain) {
        const Segment& seg = g.segment(st.segment);
        up_ok = up_ok && seg.allows(st.heading);
        down_ok = down_ok && seg.allows(opposite(st.heading));
        for (std::size_t si : g.signals_on(st.segment)) {
            const Signal& sig = net.signals[si];
            const double along = before + (st.heading == Heading::forward ? sig.at.offset : seg.length - sig.at.offset);
            if (sig.heading == st.heading) ct.usable_up = std::min(ct.usable_up, along);
            else ct.usable_down = std::min(ct.usable_down, length - along);
        }
        before += seg.length;
    }
    if (!up_ok) ct.usable_up = 0.0;
    if (!down_ok) ct.usable_down = 0.0;
    return ct;
}

// Stations with a timing point on any of the segments, by index.
std::vector<std::string> stations_on(const Network& net, const std::vector<std::size_t>& segments) {
    std::vector<std::size_t> found;
    for (const TimingPoint& tp : net.timing_points)
        if (std::find(segments.begin(), segments.end(), tp.at.segment) != segments.end()) found.push_back(tp.station);
    std::sort(found.begin(), found.end());
    found.erase(std::unique(found.begin(), found.end()), found.end());
    std::vector<std::string> ids;
    for (std::size_t s : found) ids.push_back(net.stations[s].id);
    return ids;
}

class Finder {
public:
    Finder(const NetworkGraph& g, const DetectionSections& sections) : g_(g), sections_(sections) {}

    SingleTrackLayout run() {
        const Network& net = g_.network();
        std::vector<bool> done(net.segments.size(), false);
        for (std::size_t s = 0; s < net.segments.size(); ++s) {
            if (done[s] || !both_ways(net.segments[s])) continue;
            // Back to where the run of both-way track begins, then along it to its other end.
            const std::vector<Step> back = chain_from(g_, {s, Heading::backward}, both_ways);
            const Step last = back.back();
            const std::vector<Step> chain = chain_from(g_, {last.segment, opposite(last.heading)}, both_ways);
            for (const Step& st : chain) done[st.segment] = true;
            // A track between two switch legs is a track of a loop, between a leg and a buffer
            // stop a platform or siding: part of a place, no stretch.
            if (inside_place(entry_end(chain.front().segment, chain.front().heading)) &&
                inside_place(exit_end(chain.back().segment, chain.back().heading)))
                continue;
            add_stretch(chain);
        }
        return std::move(out_);
    }

private:
    // Whether a run of track ending at `e` ends at a switch's leg or a buffer stop.
    bool inside_place(const EndRef& e) const {
        const NodeSlot at = g_.node_at(e);
        const NodeKind kind = g_.network().nodes[at.node].kind;
        return (kind == NodeKind::switch_ && at.slot > 0) || kind == NodeKind::buffer_stop;
    }

    // The place at the node a stretch reaches over segment end `e`.
    std::size_t place_at(const EndRef& e) {
        const Network& net = g_.network();
        const NodeSlot at = g_.node_at(e);
        const Node& node = net.nodes[at.node];
        CrossingPlace p;
        std::vector<std::size_t> nodes{at.node};
        if (node.kind == NodeKind::boundary || node.kind == NodeKind::buffer_stop) {
            p.kind = CrossingPlaceKind::line_end;
            p.name = node.name;
        } else {
            p.kind = CrossingPlaceKind::track_end;
            p.name = node.name;
            if (node.kind == NodeKind::switch_ && at.slot == 0) {
                // The tracks beyond the toe: a loop where every leg meets the others again at one
                // switch, reached at one of its legs; else the end of the single track, named after
                // a station on them (a terminus).
                std::vector<std::vector<Step>> legs;
                std::size_t meets = kNone;
                bool loop = true;
                std::vector<std::size_t> segments;
                for (std::size_t k = 1; k < node.ends.size(); ++k) {
                    const EndRef& le = node.ends[k].at;
                    legs.push_back(chain_from(g_, {le.segment, heading_from(le)}, [](const Segment&) { return true; }));
                    const Step end = legs.back().back();
                    const NodeSlot far = g_.node_at(exit_end(end.segment, end.heading));
                    const bool trailing = net.nodes[far.node].kind == NodeKind::switch_ && far.slot > 0;
                    if (!trailing || (meets != kNone && meets != far.node) || far.node == at.node) loop = false;
                    meets = far.node;
                    for (const Step& st : legs.back()) segments.push_back(st.segment);
                }
                p.stations = stations_on(net, segments);
                if (!p.stations.empty()) p.name = p.stations.front();
                if (loop) {
                    p.kind = CrossingPlaceKind::loop;
                    nodes = {std::min(at.node, meets), std::max(at.node, meets)};
                    // Oriented from the place's first node.
                    const bool from_here = nodes.front() == at.node;
                    for (std::size_t k = 0; k < legs.size(); ++k) {
                        std::vector<Step> leg = legs[k];
                        if (!from_here) {
                            std::reverse(leg.begin(), leg.end());
                            for (Step& st : leg) st.heading = opposite(st.heading);
                        }
                        p.tracks.push_back(crossing_track(g_, leg, k > 0));
                    }
                }
            }
        }
        auto [it, fresh] = place_index_.emplace(nodes, out_.places.size());
        if (fresh) out_.places.push_back(std::move(p));
        return it->second;
    }

    void add_stretch(const std::vector<Step>& chain) {
        const Network& net = g_.network();
        SingleTrackStretch st;
        st.lower = place_at(entry_end(chain.front().segment, chain.front().heading));
        st.upper = place_at(exit_end(chain.back().segment, chain.back().heading));
        st.name = out_.places[st.lower].name + "-" + out_.places[st.upper].name;
        st.track = net.segments[chain.front().segment].name;
        st.x_lo = 0.0;
        st.x_hi = length_of(g_, chain);
        st.axis = axis_of(g_, chain);
        auto add_section = [&](std::size_t sec) {
            const std::string& name = sections_[sec].name;
            if (std::find(st.sections.begin(), st.sections.end(), name) == st.sections.end()) st.sections.push_back(name);
        };
        // The sections of the switches at its ends belong to the stretch too: every track of the
        // place meets there, so no train stands clear of opposing traffic on them, and a train
        // has left the stretch only when it has cleared them (as on a line, where the stretch
        // ends at the loop's turnout).
        auto add_switch_at = [&](const EndRef& e) {
            const std::size_t node = g_.node_at(e).node;
            for (std::size_t sec = 0; sec < sections_.size(); ++sec)
                if (sections_[sec].node == node) add_section(sec);
        };
        add_switch_at(entry_end(chain.front().segment, chain.front().heading));
        for (const Step& s : chain) {
            st.segments.push_back(net.segments[s.segment].name);
            const double len = g_.segment(s.segment).length;
            const double a = s.heading == Heading::forward ? 0.0 : len, b = len - a;
            for (std::size_t sec : sections_.crossed(s.segment, a, b)) add_section(sec);
        }
        add_switch_at(exit_end(chain.back().segment, chain.back().heading));
        out_.stretches.push_back(std::move(st));
    }

    const NetworkGraph& g_;
    const DetectionSections& sections_;
    SingleTrackLayout out_;
    std::map<std::vector<std::size_t>, std::size_t> place_index_;   // nodes -> place
};

}  // namespace

SingleTrackLayout single_track_layout(const NetworkGraph& graph, const DetectionSections& sections) {
    return Finder(graph, sections).run();
}

}  // namespace knockon::net
