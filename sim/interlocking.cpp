#include "sim/interlocking.hpp"

#include <algorithm>

namespace knockon {

Interlocking::Interlocking(std::size_t sections, RouteOrder order,
                           std::vector<std::vector<std::uint32_t>> planned_order)
    : order_(order), holder_(sections, kNoTrain), out_of_use_(sections, 0), planned_(std::move(planned_order)), next_(sections, 0) {
    planned_.resize(sections);
    done_.resize(sections);
    for (std::size_t k = 0; k < sections; ++k) done_[k].assign(planned_[k].size(), 0);
}

std::uint32_t Interlocking::blocker(std::uint32_t train, std::uint32_t section) const {
    const std::uint32_t h = holder_[section];
    if (h == train) return kNoTrain;
    if (out_of_use_[section]) return kDisruption;
    if (h != kNoTrain) return h;
    return order_ == RouteOrder::timetable ? planned_before(train, section) : kNoTrain;
}

std::uint32_t Interlocking::planned_before(std::uint32_t train, std::uint32_t section) const {
    const auto& plan = planned_[section];
    for (std::size_t i = next_[section]; i < plan.size(); ++i) {
        if (plan[i] == train) break;
        if (!done_[section][i]) return plan[i];
    }
    return kNoTrain;
}

void Interlocking::take(std::uint32_t train, const std::vector<std::uint32_t>& sections) {
    for (std::uint32_t s : sections) holder_[s] = train;
}

void Interlocking::release(std::uint32_t train, std::uint32_t section) {
    if (holder_[section] == train) holder_[section] = kNoTrain;
    auto& plan = planned_[section];
    for (std::size_t i = next_[section]; i < plan.size(); ++i)
        if (plan[i] == train && !done_[section][i]) {
            done_[section][i] = 1;
            break;
        }
    while (next_[section] < plan.size() && done_[section][next_[section]]) ++next_[section];
}

}  // namespace knockon
