#include "models/network/network.hpp"

namespace knockon::net {

const char* to_string(Heading h) { return h == Heading::forward ? "forward" : "backward"; }

const char* to_string(NodeKind k) {
    switch (k) {
        case NodeKind::link: return "link";
        case NodeKind::switch_: return "switch";
        case NodeKind::diamond: return "diamond";
        case NodeKind::buffer_stop: return "buffer_stop";
        case NodeKind::boundary: return "boundary";
    }
    return "?";
}

namespace {

// The band holding `offset`: the last whose `from` is at or before it (before the first: the
// first).  Bands are sorted by `from` (check_network says so where they are not).
const OffsetBand* band_at(const std::vector<OffsetBand>& bands, double offset) {
    const OffsetBand* found = bands.empty() ? nullptr : &bands.front();
    for (const OffsetBand& b : bands) {
        if (b.from > offset) break;
        found = &b;
    }
    return found;
}

template <class T>
std::size_t index_by(const std::vector<T>& items, const std::string& key, std::string T::*field) {
    for (std::size_t i = 0; i < items.size(); ++i)
        if (items[i].*field == key) return i;
    return kNone;
}

}  // namespace

double Segment::gradient_at(double offset) const {
    const OffsetBand* b = band_at(gradient, offset);
    return b ? b->value : 0.0;
}

double Segment::speed_at(double offset) const {
    const OffsetBand* b = band_at(speed, offset);
    return b ? b->value : kNoLimit;
}

double Segment::shown_at(double offset) const {
    if (posts.empty()) return offset;
    if (posts.size() == 1) return posts.front().position + (offset - posts.front().offset);
    std::size_t k = 0;   // the pair (k, k+1) used: the one holding offset, else the nearest
    while (k + 2 < posts.size() && posts[k + 1].offset <= offset) ++k;
    const KmPost& a = posts[k];
    const KmPost& b = posts[k + 1];
    return a.position + (offset - a.offset) * (b.position - a.position) / (b.offset - a.offset);
}

double Node::reach(std::size_t slot) const {
    if (kind == NodeKind::diamond) return fouling;
    if (kind == NodeKind::switch_ && slot > 0) return fouling;
    return 0.0;
}

std::size_t Network::find_segment(const std::string& name) const { return index_by(segments, name, &Segment::name); }
std::size_t Network::find_node(const std::string& name) const { return index_by(nodes, name, &Node::name); }
std::size_t Network::find_signal(const std::string& name) const { return index_by(signals, name, &Signal::name); }
std::size_t Network::find_station(const std::string& id) const { return index_by(stations, id, &Station::id); }

}  // namespace knockon::net
