#include "models/network/graph.hpp"

#include <algorithm>
#include <cmath>

namespace knockon::net {
namespace {

void sort_unique(std::vector<double>& v) {
    std::sort(v.begin(), v.end());
    v.erase(std::unique(v.begin(), v.end(), [](double a, double b) { return std::fabs(a - b) < kSamePlace; }), v.end());
}

}  // namespace

NetworkGraph::NetworkGraph(const Network& network) : network_(&network) {
    if (auto problems = check_network(network); !problems.empty()) throw NetworkError(std::move(problems));
    const std::size_t n = network.segments.size();
    ends_.resize(2 * n);
    signals_on_.resize(n);
    cuts_.resize(n);
    for (std::size_t i = 0; i < network.nodes.size(); ++i) {
        const Node& nd = network.nodes[i];
        for (std::size_t k = 0; k < nd.ends.size(); ++k) {
            const EndRef& e = nd.ends[k].at;
            ends_[2 * e.segment + (e.end == End::end)] = {i, k};
            const double at_node = offset_of(e);
            const double reach = nd.reach(k);
            // A node bounds a section at its end unless trains run through it on one section (a
            // link), or its own section reaches out from it (a switch's legs, a diamond's ends):
            // then the bound lies at the fouling point.
            if (reach > 0.0)
                cuts_[e.segment].push_back(e.end == End::start ? reach : at_node - reach);
            else if (nd.kind != NodeKind::link)
                cuts_[e.segment].push_back(at_node);
        }
    }
    for (std::size_t i = 0; i < network.signals.size(); ++i) {
        const Signal& s = network.signals[i];
        signals_on_[s.at.segment].push_back(i);
        cuts_[s.at.segment].push_back(s.at.offset);
    }
    for (const Joint& j : network.joints) cuts_[j.at.segment].push_back(j.at.offset);
    for (auto& on : signals_on_)
        std::stable_sort(on.begin(), on.end(), [&](std::size_t a, std::size_t b) {
            return network.signals[a].at.offset < network.signals[b].at.offset;
        });
    for (auto& c : cuts_) sort_unique(c);
}

std::vector<EndRef> NetworkGraph::onward(const EndRef& arriving) const {
    const NodeSlot at = node_at(arriving);
    const Node& nd = network_->nodes[at.node];
    std::vector<EndRef> out;
    switch (nd.kind) {
        case NodeKind::link: out.push_back(nd.ends[1 - at.slot].at); break;
        case NodeKind::switch_:
            if (at.slot == 0)
                for (std::size_t k = 1; k < nd.ends.size(); ++k) out.push_back(nd.ends[k].at);
            else
                out.push_back(nd.ends[0].at);
            break;
        case NodeKind::diamond: out.push_back(nd.ends[at.slot ^ 1].at); break;
        case NodeKind::buffer_stop:
        case NodeKind::boundary: break;
    }
    return out;
}

}  // namespace knockon::net
