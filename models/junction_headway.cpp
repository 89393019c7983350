#include "models/junction_headway.hpp"

#include <algorithm>
#include <map>
#include <set>
#include <string>
#include <utility>

namespace knockon {
namespace {

using Corridors = std::set<std::string>;

// One train's blocking of a junction section.
struct Use {
    double start = 0.0;      // its blocking starts [s]
    std::size_t train = 0;
    double s_from = 0.0;     // where the section starts along the train's path [m]
};

struct Meeting {
    std::size_t junction = 0;   // the network's index of the junction section
    Use leader, follower;
};

// Per node section (by network index): the corridors of the line sections each train blocks it
// in, by train.
std::map<std::size_t, std::map<std::size_t, Corridors>> corridors_at_nodes(const std::vector<LineSection>& line_sections,
                                                                           const std::vector<bool>& node_sections,
                                                                           const std::vector<TrainPlan>& trains) {
    std::map<std::size_t, std::map<std::size_t, Corridors>> out;
    for (const LineSection& ls : line_sections)
        for (std::size_t t = 0; t < trains.size(); ++t) {
            const auto st = stairway_in(ls, t, trains[t].run, trains[t].stairway);
            if (!st) continue;
            for (const SectionBlocking& b : st->sections)
                if (b.index < node_sections.size() && node_sections[b.index]) out[b.index][t].insert(ls.corridor);
        }
    return out;
}

bool share_one(const Corridors& a, const Corridors& b) {
    for (const std::string& c : a)
        if (b.count(c)) return true;
    return false;
}

// The leader's and follower's stairways over the sections both block, leader first, referred to
// when each head reaches the junction section.
std::pair<SectionStairway, SectionStairway> shared_stairways(const Meeting& m, const std::vector<TrainPlan>& trains) {
    const TrainPlan &a = trains[m.leader.train], &b = trains[m.follower.train];
    SectionStairway leader{m.leader.train, a.run.head_reach(m.leader.s_from), {}};
    SectionStairway follower{m.follower.train, b.run.head_reach(m.follower.s_from), {}};
    std::map<std::size_t, const SectionBlocking*> of_leader;
    for (const SectionBlocking& l : a.stairway.sections) of_leader.emplace(l.index, &l);
    for (const SectionBlocking& f : b.stairway.sections) {
        auto it = of_leader.find(f.index);
        if (it == of_leader.end() || it->second->start > f.start) continue;
        leader.sections.push_back(*it->second);
        follower.sections.push_back(f);
    }
    return {std::move(leader), std::move(follower)};
}

}  // namespace

std::vector<HeadwayPair> junction_headways(const std::vector<LineSection>& line_sections,
                                           const std::vector<bool>& node_sections,
                                           const std::vector<TrainPlan>& trains,
                                           const std::vector<HeadwayPair>& line_pairs) {
    const auto corridors = corridors_at_nodes(line_sections, node_sections, trains);
    // Junction sections: node sections that line sections of two or more corridors run over.
    std::set<std::size_t> junctions;
    for (const auto& [section, by_train] : corridors) {
        Corridors all;
        for (const auto& [train, cs] : by_train) all.insert(cs.begin(), cs.end());
        if (all.size() >= 2) junctions.insert(section);
    }
    if (junctions.empty()) return {};

    std::map<std::size_t, std::vector<Use>> users;
    for (std::size_t t = 0; t < trains.size(); ++t)
        for (const SectionBlocking& b : trains[t].stairway.sections)
            if (junctions.count(b.index)) users[b.index].push_back({b.start, t, b.s_from});
    std::set<std::pair<std::size_t, std::size_t>> paired;
    for (const HeadwayPair& h : line_pairs) paired.insert({h.leader, h.follower});

    static const Corridors kNoCorridor;
    auto corridors_of = [&](std::size_t section, std::size_t train) -> const Corridors& {
        const auto& by_train = corridors.at(section);
        auto it = by_train.find(train);
        return it == by_train.end() ? kNoCorridor : it->second;
    };
    std::map<std::pair<std::size_t, std::size_t>, Meeting> meetings;
    for (auto& [section, list] : users) {
        std::sort(list.begin(), list.end(), [](const Use& a, const Use& b) {
            return a.start < b.start || (a.start == b.start && a.train < b.train);
        });
        for (std::size_t k = 1; k < list.size(); ++k) {
            const Use &a = list[k - 1], &b = list[k];
            if (a.train == b.train || paired.count({a.train, b.train})) continue;
            if (share_one(corridors_of(section, a.train), corridors_of(section, b.train))) continue;
            auto [it, fresh] = meetings.try_emplace({a.train, b.train}, Meeting{section, a, b});
            if (!fresh && b.s_from < it->second.follower.s_from) it->second = Meeting{section, a, b};
        }
    }

    std::vector<std::pair<double, HeadwayPair>> out;
    for (const auto& [trains_of, m] : meetings) {
        const auto [leader, follower] = shared_stairways(m, trains);
        const auto h = minimum_headway(leader, follower);
        if (!h) continue;   // (the junction section itself is always shared)
        HeadwayPair p;
        p.leader = m.leader.train;
        p.follower = m.follower.train;
        p.scheduled_headway = follower.reference - leader.reference;
        p.minimum_headway = h->headway;
        p.buffer = p.scheduled_headway - p.minimum_headway;
        p.critical_section = h->critical_section;
        p.critical_index = h->critical_index;
        for (const SectionBlocking& b : trains[m.follower.train].stairway.sections)
            if (b.index == m.junction) {
                p.junction = b.section;
                break;
            }
        out.push_back({m.follower.start, std::move(p)});
    }
    std::stable_sort(out.begin(), out.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
    std::vector<HeadwayPair> pairs;
    for (auto& [start, p] : out) pairs.push_back(std::move(p));
    return pairs;
}

}  // namespace knockon
