#include "models/network/sections.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <numeric>

namespace knockon::net {
namespace {

std::string km(double shown) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3f", shown / 1000.0);
    return buf;
}

bool has_cut(const std::vector<double>& cuts, double at) {
    for (double c : cuts)
        if (std::fabs(c - at) < kSamePlace) return true;
    return false;
}

std::size_t find_root(std::vector<std::size_t>& parent, std::size_t i) {
    while (parent[i] != i) i = parent[i] = parent[parent[i]];
    return i;
}

}  // namespace

DetectionSections::DetectionSections(const NetworkGraph& graph) {
    const Network& net = graph.network();
    // Cut every segment into pieces.
    struct Raw {
        std::size_t segment;
        double from, to;
    };
    std::vector<Raw> raw;
    std::vector<std::size_t> first(net.segments.size()), last(net.segments.size());
    for (std::size_t s = 0; s < net.segments.size(); ++s) {
        std::vector<double> points{0.0};
        for (double c : graph.section_cuts(s))
            if (c > kSamePlace && c < net.segments[s].length - kSamePlace) points.push_back(c);
        points.push_back(net.segments[s].length);
        first[s] = raw.size();
        for (std::size_t k = 0; k + 1 < points.size(); ++k) raw.push_back({s, points[k], points[k + 1]});
        last[s] = raw.size() - 1;
    }
    // Join the pieces that meet at a node with no cut there.
    std::vector<std::size_t> parent(raw.size());
    std::iota(parent.begin(), parent.end(), 0);
    std::vector<std::size_t> node_of(raw.size(), kNone);
    for (std::size_t n = 0; n < net.nodes.size(); ++n) {
        std::size_t joined = kNone;
        for (const NodeEnd& e : net.nodes[n].ends) {
            if (has_cut(graph.section_cuts(e.at.segment), graph.offset_of(e.at))) continue;
            const std::size_t piece = e.at.end == End::start ? first[e.at.segment] : last[e.at.segment];
            if (net.nodes[n].fouling > 0.0) node_of[piece] = n;
            if (joined == kNone)
                joined = piece;
            else
                parent[find_root(parent, piece)] = find_root(parent, joined);
        }
    }
    // Number the sections in the order of their first piece.
    std::map<std::size_t, std::size_t> section_of_root;
    by_segment_.resize(net.segments.size());
    for (std::size_t p = 0; p < raw.size(); ++p) {
        const std::size_t root = find_root(parent, p);
        auto [it, fresh] = section_of_root.emplace(root, sections_.size());
        if (fresh) sections_.emplace_back();
        DetectionSection& sec = sections_[it->second];
        sec.pieces.push_back({raw[p].segment, raw[p].from, raw[p].to});
        if (node_of[p] != kNone) sec.node = node_of[p];
        by_segment_[raw[p].segment].push_back({raw[p].from, raw[p].to, it->second});
    }
    std::map<std::string, int> used;
    for (DetectionSection& sec : sections_) {
        const SectionPiece& p = sec.pieces.front();
        const Segment& seg = net.segments[p.segment];
        sec.name = sec.node != kNone ? net.nodes[sec.node].name
                                     : seg.name + ":" + km(seg.shown_at(p.from)) + "-" + km(seg.shown_at(p.to));
        if (const int n = ++used[sec.name]; n > 1) {
            sec.name += '#';
            sec.name += std::to_string(n);
        }
    }
}

std::vector<std::size_t> DetectionSections::crossed(std::size_t segment, double a, double b) const {
    const double lo = std::min(a, b), hi = std::max(a, b);
    std::vector<std::size_t> out;
    for (const Piece& p : by_segment_[segment])
        if (std::min(hi, p.to) - std::max(lo, p.from) > kSamePlace && (out.empty() || out.back() != p.section))
            out.push_back(p.section);
    if (a > b) std::reverse(out.begin(), out.end());
    return out;
}

std::vector<bool> node_sections(const DetectionSections& sections) {
    std::vector<bool> out(sections.size(), false);
    for (std::size_t i = 0; i < sections.size(); ++i) out[i] = sections[i].node != kNone;
    return out;
}

}  // namespace knockon::net
