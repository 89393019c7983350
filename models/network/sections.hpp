#pragma once
// Train-detection sections found from the graph: every segment is cut at its signals, joints and
// the fouling points of switches and diamonds (a switch's toe side at the switch itself), and the
// pieces that touch across a node with no cut there are one section.  So the pieces from a
// switch out to its fouling points form one section, which every route over the switch shares,
// whichever leg it takes: a flat junction's or a crossover's conflict is two routes sharing a
// section, with no rule of its own.
#include <cstddef>
#include <string>
#include <vector>

#include "models/network/graph.hpp"

namespace knockon::net {

struct SectionPiece {
    std::size_t segment = kNone;
    double from = 0.0, to = 0.0;   // offsets, from < to [m]
};

struct DetectionSection {
    // The node's name for a switch's or diamond's section, else "<segment>:<from>-<to>" with the
    // positions shown at the ends of its first piece, in kilometres (made unique where needed).
    std::string name;
    std::vector<SectionPiece> pieces;   // by segment index, then offset
    std::size_t node = kNone;           // the switch or diamond whose section it is
};

class DetectionSections {
public:
    explicit DetectionSections(const NetworkGraph& graph);

    const std::vector<DetectionSection>& all() const { return sections_; }
    const DetectionSection& operator[](std::size_t i) const { return sections_[i]; }
    std::size_t size() const { return sections_.size(); }
    // The sections a run over [a, b] of `segment` (either order) crosses by more than a
    // micrometre, in the order a train running from a to b meets them.
    std::vector<std::size_t> crossed(std::size_t segment, double a, double b) const;

private:
    struct Piece {
        double from, to;
        std::size_t section;
    };
    std::vector<DetectionSection> sections_;
    std::vector<std::vector<Piece>> by_segment_;   // sorted by offset
};

// Per section (by index): whether it is a switch's or diamond's own section.
std::vector<bool> node_sections(const DetectionSections& sections);

}  // namespace knockon::net
