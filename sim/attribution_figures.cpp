#include "sim/attribution_figures.hpp"

#include <algorithm>
#include <array>
#include <utility>

namespace knockon {

std::vector<float> attribution_row(const SimModel& model, const SimResult& day, const DayAttribution& a,
                                   AttributionLayout& layout) {
    // The engine lays out every day's records as the model says, so their places are the
    // model's, worked out once; a day laid out otherwise (made by hand) gets its own.
    RecordPlaces own;
    const RecordPlaces* rp = &model.record_places();
    if (rp->of_record.size() != day.timing.size()) {
        own = record_places(day.timing);
        rp = &own;
    }
    const std::vector<std::uint32_t>& place = rp->of_record;
    const auto& pairs = model.buffer_pairs();
    layout.records = static_cast<std::uint32_t>(a.index.records);
    layout.trains = static_cast<std::uint32_t>(a.index.trains);
    layout.sections = static_cast<std::uint32_t>(a.index.sections);
    layout.links = static_cast<std::uint32_t>(a.through_link.size());
    layout.pairs = static_cast<std::uint32_t>(pairs.size());
    layout.places = static_cast<std::uint32_t>(rp->places.size());
    // Sums in double, in one order, then one rounding to float each.
    std::vector<double> row(layout.width(), 0.0);
    for (std::size_t i = 0; i < a.damage.size(); ++i) row[layout.damage(i)] = a.damage[i];
    for (std::size_t k = 0; k < a.through_section.size(); ++k) row[layout.through_section(k)] = a.through_section[k];
    for (std::size_t l = 0; l < a.through_link.size(); ++l) row[layout.through_link(l)] = a.through_link[l];
    for (std::size_t c = 0; c < AttributionLayout::kCauses && c < a.by_cause.size(); ++c)
        row[layout.by_cause(c)] = a.by_cause[c];
    // A buffer pair passes on what its leader held its follower by directly: on its own section
    // when the hold was there, else on the pair's first section.
    // The pairs by (leader, follower), in pair order within each: a sorted table, not a map.
    std::vector<std::array<std::uint32_t, 3>> pair_of;
    pair_of.reserve(pairs.size());
    for (std::size_t p = 0; p < pairs.size(); ++p)
        pair_of.push_back({pairs[p].leader, pairs[p].follower, static_cast<std::uint32_t>(p)});
    std::sort(pair_of.begin(), pair_of.end());
    for (const DelayEdge& e : a.edges) {
        if (e.cause.kind != HoldCause::Kind::train) continue;
        const std::uint32_t leader = e.cause.train, follower = day.timing[e.record].train;
        auto it = std::lower_bound(pair_of.begin(), pair_of.end(), std::array<std::uint32_t, 3>{leader, follower, 0});
        if (it == pair_of.end() || (*it)[0] != leader || (*it)[1] != follower) continue;
        std::size_t chosen = (*it)[2];
        for (; it != pair_of.end() && (*it)[0] == leader && (*it)[1] == follower; ++it)
            if (pairs[(*it)[2]].section == e.cause.section) chosen = (*it)[2];
        row[layout.through_buffer(chosen)] += e.seconds;
    }
    for (std::size_t r = 0; r < day.timing.size(); ++r) row[layout.received(place[r])] += day.timing[r].knock_on;
    const SourceIndex& ix = a.index;
    for (std::size_t r = 0; r < ix.records; ++r)
        row[layout.caused(place[r])] += a.damage[ix.dwell(r)] + a.damage[ix.running(r)];
    std::vector<std::uint8_t> seen(ix.trains, 0);
    for (std::size_t r = 0; r < day.timing.size(); ++r) {
        const std::uint32_t t = day.timing[r].train;
        if (seen[t]) continue;
        seen[t] = 1;
        row[layout.caused(place[r])] += a.damage[ix.entry(t)];
    }
    return std::vector<float>(row.begin(), row.end());
}

namespace {

template <class Index>
std::vector<ThroughStats> largest_first(std::size_t n, const std::vector<RunningMean>& row, Index at) {
    std::vector<ThroughStats> out;
    for (std::size_t k = 0; k < n; ++k) {
        const Estimate e = row[at(k)].estimate();
        if (e.mean > 0.0) out.push_back({k, e});
    }
    std::stable_sort(out.begin(), out.end(),
                     [](const ThroughStats& a, const ThroughStats& b) { return a.knock_on.mean > b.knock_on.mean; });
    return out;
}

}  // namespace

AttributionSummary summarize_attribution(const AttributionLayout& layout, const std::vector<RunningMean>& row,
                                         const std::vector<TimingRecord>& timing) {
    AttributionSummary s;
    s.layout = layout;
    if (row.size() != layout.width()) return s;
    const std::size_t n_sources = layout.sources().size();
    for (std::size_t i = 0; i < n_sources; ++i) {
        const Estimate e = row[layout.damage(i)].estimate();
        if (e.mean > 0.0) s.sources.push_back({i, e});
    }
    std::stable_sort(s.sources.begin(), s.sources.end(),
                     [](const SourceDamage& a, const SourceDamage& b) { return a.damage.mean > b.damage.mean; });
    const std::vector<std::string> places = record_places(timing).places;
    for (std::size_t p = 0; p < layout.places && p < places.size(); ++p)
        s.places.push_back({places[p], row[layout.received(p)].estimate(), row[layout.caused(p)].estimate()});
    s.sections = largest_first(layout.sections, row, [&](std::size_t k) { return layout.through_section(k); });
    s.links = largest_first(layout.links, row, [&](std::size_t k) { return layout.through_link(k); });
    s.buffers = largest_first(layout.pairs, row, [&](std::size_t k) { return layout.through_buffer(k); });
    for (std::size_t c = 0; c < AttributionLayout::kCauses; ++c) s.by_cause.push_back(row[layout.by_cause(c)].estimate());
    return s;
}

}  // namespace knockon
