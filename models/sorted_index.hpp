#pragma once
// Upper-bound searches in long sorted sequences that are mostly out of cache (a planned leg's
// times, a leg's braking reach): every kStride-th value is kept in a small copy, so a search
// touches that copy and one short stretch of the full sequence instead of a cold cache line
// per halving step.  The answers are those of std::upper_bound on the full sequence.
#include <algorithm>
#include <cstddef>
#include <vector>

namespace knockon {

class SortedIndex {
public:
    static constexpr std::size_t kStride = 32;

    // Indexes `values` (non-decreasing); build again whenever they change.
    void build(const std::vector<double>& values) {
        every_.clear();
        for (std::size_t i = 0; i < values.size(); i += kStride) every_.push_back(values[i]);
        size_ = values.size();
    }
    void clear() {
        every_.clear();
        size_ = 0;
    }
    bool indexes(const std::vector<double>& values) const { return size_ == values.size() && !values.empty(); }

    // The first position in `values` holding more than x (values.size() when none), as
    // std::upper_bound; `values` must be the sequence last built from.
    std::size_t upper_bound(const std::vector<double>& values, double x) const {
        if (!indexes(values))
            return static_cast<std::size_t>(std::upper_bound(values.begin(), values.end(), x) - values.begin());
        // The first sampled value above x bounds the answer from above, the one before from below.
        const std::size_t j = static_cast<std::size_t>(std::upper_bound(every_.begin(), every_.end(), x) - every_.begin());
        if (j == 0) return 0;
        const std::size_t from = (j - 1) * kStride + 1;
        const std::size_t to = std::min(j * kStride, values.size());
        const auto first = values.begin() + static_cast<std::ptrdiff_t>(from);
        const auto last = values.begin() + static_cast<std::ptrdiff_t>(to);
        return static_cast<std::size_t>(std::upper_bound(first, last, x) - values.begin());
    }

private:
    std::vector<double> every_;
    std::size_t size_ = 0;
};

}  // namespace knockon
