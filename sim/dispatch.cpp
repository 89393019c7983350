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
                                 const std::vector<std::uint32_t>& sections,
                                 const std::vector<std::uint8_t>& outside) const {
    if (memo_.size() <= train) memo_.resize(model_.trains().size());
    Memo& m = memo_[train];
    if (m.version != interlocking.version() || m.sections != sections.data()) {
        m.result = check(interlocking, train, sections, outside);
        m.version = interlocking.version();
        m.sections = sections.data();
    }
    return m.result;
}

bool DispatchCheck::check(const Interlocking& interlocking, std::uint32_t train,
                          const std::vector<std::uint32_t>& sections,
                          const std::vector<std::uint8_t>& outside) const {
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
    outside_.clear();
    for (std::uint32_t t = 0; t < trains.size(); ++t) {
        const auto& idx = trains[t].section_index;
        std::uint32_t end = 0;
        for (std::uint32_t k = 0; k < idx.size(); ++k)
            if (holder_[idx[k]] == t) end = k + 1;
        if (end == 0) continue;
        trains_.push_back(t);
        frontier_.push_back(end);
        outside_.push_back(t < outside.size() ? outside[t] : 0);
    }
    std::size_t left = trains_.size();
    for (bool moved = true; moved && left > 0;) {
        moved = false;
        for (std::size_t i = 0; i < trains_.size(); ++i) {
            const std::uint32_t t = trains_[i];
            if (t == kNoTrain) continue;
            const SimModel::Train& tr = trains[t];
            if (outside_[i]) {
                // It appears first, once what it appears on is free.
                bool free = true;
                for (std::uint32_t g : tr.origin_sections) free = free && (holder_[g] == kNoTrain || holder_[g] == t);
                if (!free) continue;
                for (std::uint32_t g : tr.origin_sections) holder_[g] = t;
                outside_[i] = 0;
                moved = true;
            }
            // Its authority ends at the far end of a place where it stands clear (a loop track,
            // up to the section before the switch, as routes on a network end at section
            // boundaries): it can come to a stand there, freeing what it holds behind.
            const std::uint32_t f = frontier_[i];
            if (f > 0 && tr.stretch_of[f - 1] < 0 && (f >= tr.stretch_of.size() || tr.stretch_of[f] >= 0)) {
                std::uint32_t run = f - 1;
                while (run > 0 && tr.stretch_of[run - 1] < 0 && holder_[tr.section_index[run - 1]] == t) --run;
                bool held = holder_[tr.section_index[run]] == t;
                for (std::uint32_t k = run; k < f && held; ++k) held = holder_[tr.section_index[k]] == t;
                bool freed = false;
                for (std::uint32_t k = 0; k < tr.section_index.size() && held; ++k)
                    if ((k < run || k >= f) && holder_[tr.section_index[k]] == t) {
                        // (a section a path crosses twice keeps its holder while the train stands on it)
                        bool in_run = false;
                        for (std::uint32_t j = run; j < f && !in_run; ++j) in_run = tr.section_index[j] == tr.section_index[k];
                        if (in_run) continue;
                        holder_[tr.section_index[k]] = kNoTrain;
                        freed = true;
                    }
                moved = moved || freed;
            }
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
