#include "models/headway.hpp"

#include <algorithm>
#include <cmath>

namespace knockon {

std::vector<LineSection> line_sections(const Infrastructure& infra) {
    std::vector<const Station*> st;
    for (const Station& s : infra.stations) st.push_back(&s);
    std::sort(st.begin(), st.end(), [](const Station* a, const Station* b) { return a->at < b->at; });
    std::vector<LineSection> out;
    for (std::size_t i = 0; i + 1 < st.size(); ++i)
        out.push_back({st[i]->id, st[i + 1]->id, Direction::up, {}});
    for (std::size_t i = st.size(); i-- > 1;)
        out.push_back({st[i]->id, st[i - 1]->id, Direction::down, {}});
    return out;
}

std::optional<SectionStairway> stairway_in(const LineSection& ls, std::size_t train, const ServiceRun& run,
                                           const Stairway& stairway) {
    // A train belongs to the line section when its path runs from one station to the other,
    // whether or not it has calls there; its reference is when its head leaves the first.
    const double s_from = run.path.station_s(ls.from_station);
    const double s_to = run.path.station_s(ls.to_station);
    if (std::isnan(s_from) || std::isnan(s_to) || s_to <= s_from) return std::nullopt;
    SectionStairway out;
    out.train = train;
    out.reference = run.head_leave(s_from);
    for (const SectionBlocking& b : stairway.sections)
        if (std::min(b.s_to, s_to) - std::max(b.s_from, s_from) > 1e-6) out.sections.push_back(b);
    return out;
}

std::string headway_place(const HeadwayPair& h) {
    return h.junction.empty() ? h.line_section : "junction " + h.junction;
}

std::optional<MinimumHeadway> minimum_headway(const SectionStairway& leader, const SectionStairway& follower) {
    std::optional<MinimumHeadway> best;
    for (const SectionBlocking& f : follower.sections) {
        for (const SectionBlocking& l : leader.sections) {
            if (l.section != f.section) continue;
            // The follower's blocking must start no earlier than the leader's ends.
            double h = (l.end - leader.reference) - (f.start - follower.reference);
            if (!best || h > best->headway) best = MinimumHeadway{h, f.section, f.index};
        }
    }
    return best;
}

}  // namespace knockon
