// SortedIndex answers as std::upper_bound on the full sequence (the reference), for sequences
// with repeated values, values at the sampled positions and probes outside the range.
#include <catch2/catch.hpp>

#include <algorithm>
#include <random>
#include <vector>

#include "models/sorted_index.hpp"

using knockon::SortedIndex;

namespace {

std::size_t reference(const std::vector<double>& v, double x) {
    return static_cast<std::size_t>(std::upper_bound(v.begin(), v.end(), x) - v.begin());
}

}  // namespace

TEST_CASE("SortedIndex agrees with std::upper_bound on sequences with repeats", "[sorted_index]") {
    std::mt19937 rng(12345);
    for (std::size_t n : {1u, 2u, 31u, 32u, 33u, 64u, 65u, 1000u, 4097u}) {
        std::vector<double> v(n);
        double x = -5.0;
        std::uniform_int_distribution<int> step(0, 3);   // 0: a repeat of the previous value
        for (double& y : v) y = x += step(rng);
        SortedIndex index;
        index.build(v);
        REQUIRE(index.indexes(v));
        std::vector<double> probes = {v.front() - 1.0, v.back() + 1.0};
        for (std::size_t i = 0; i < n; i += 7) probes.insert(probes.end(), {v[i], v[i] + 0.5, v[i] - 0.5});
        for (std::size_t i = 0; i < n; i += SortedIndex::kStride) probes.push_back(v[i]);
        for (double p : probes) CHECK(index.upper_bound(v, p) == reference(v, p));
    }
}

TEST_CASE("SortedIndex falls back to a plain search for a sequence it was not built from", "[sorted_index]") {
    std::vector<double> v = {0.0, 1.0, 2.0, 3.0};
    SortedIndex index;
    index.build(v);
    v.push_back(4.0);   // changed since: the index no longer applies
    CHECK_FALSE(index.indexes(v));
    CHECK(index.upper_bound(v, 3.5) == 4);
    index.clear();
    CHECK(index.upper_bound(v, -1.0) == 0);
    CHECK(index.upper_bound(v, 9.0) == 5);
}
