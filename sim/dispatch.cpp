#include "sim/dispatch.hpp"

#include <algorithm>

namespace knockon {

CrossingChoice choose_crossing(const StretchUse& asking, double asking_delay, double asking_weight,
                               const StretchUse& planned_first, double first_delay, double first_weight) {
    CrossingChoice c;
    c.keep_cost = std::max(0.0, planned_first.release + first_delay - (asking.start + asking_delay));
    c.swap_cost = std::max(0.0, asking.release + asking_delay - (planned_first.start + first_delay));
    c.asking_goes_first = asking_weight * c.keep_cost > first_weight * c.swap_cost;
    return c;
}

bool DispatchCheck::leaves_a_way(const Interlocking& interlocking, std::uint32_t train,
                                 const std::vector<std::uint32_t>& sections) const {
    const auto& trains = model_.trains();
    const std::size_t n_sections = model_.section_names().size();
    holder_.resize(n_sections);
    for (std::uint32_t g = 0; g < n_sections; ++g) {
        const std::uint32_t h = interlocking.holder(g);
        holder_[g] = h < trains.size() ? h : kNoTrain;   // a disruption ends by itself
    }
    for (std::uint32_t g : sections) holder_[g] = train;
    // The trains on the line, each with the end of what it holds along its path.
    trains_.clear();
    frontier_.clear();
    for (std::uint32_t t = 0; t < trains.size(); ++t) {
        const auto& idx = trains[t].section_index;
        std::uint32_t end = 0;
        for (std::uint32_t k = 0; k < idx.size(); ++k)
            if (holder_[idx[k]] == t) end = k + 1;
        if (end == 0) continue;
        trains_.push_back(t);
        frontier_.push_back(end);
    }
    std::size_t left = trains_.size();
    for (bool moved = true; moved && left > 0;) {
        moved = false;
        for (std::size_t i = 0; i < trains_.size(); ++i) {
            const std::uint32_t t = trains_[i];
            if (t == kNoTrain) continue;
            const SimModel::Train& tr = trains[t];
            const auto [from, to] = tr.advance[frontier_[i]];
            bool clear = true;
            for (std::uint32_t k = frontier_[i]; k < to && clear; ++k) {
                const std::uint32_t h = holder_[tr.section_index[k]];
                clear = h == kNoTrain || h == t;
            }
            if (!clear) continue;
            for (std::uint32_t g : tr.section_index)
                if (holder_[g] == t) holder_[g] = kNoTrain;
            moved = true;
            if (to >= tr.section_index.size()) {
                trains_[i] = kNoTrain;   // off the line
                --left;
                continue;
            }
            for (std::uint32_t k = from; k < to; ++k) holder_[tr.section_index[k]] = t;
            frontier_[i] = to;
        }
    }
    return left == 0;
}

}  // namespace knockon
