#include "sim/estimates.hpp"

#include <algorithm>
#include <cmath>

#include <boost/math/distributions/students_t.hpp>

namespace knockon {
namespace {

// The Student t interval from n values, their mean and their sum of squared deviations: one
// rule for estimate_mean and RunningMean.
Estimate student_t(std::size_t n, double mean, double squared_deviations) {
    Estimate e;
    e.n = n;
    if (n == 0) return e;
    e.mean = mean;
    e.lower = e.upper = e.mean;
    if (n < 2) return e;
    const double sd = std::sqrt(squared_deviations / static_cast<double>(n - 1));
    boost::math::students_t t(static_cast<double>(n - 1));
    e.half_width = boost::math::quantile(t, 0.975) * sd / std::sqrt(static_cast<double>(n));
    e.lower = e.mean - e.half_width;
    e.upper = e.mean + e.half_width;
    return e;
}

}  // namespace

Estimate estimate_mean(const std::vector<double>& values) {
    if (values.empty()) return {};
    double sum = 0.0;
    for (double v : values) sum += v;
    const double mean = sum / static_cast<double>(values.size());
    double ss = 0.0;
    for (double v : values) ss += (v - mean) * (v - mean);
    return student_t(values.size(), mean, ss);
}

RunningMean RunningMean::zeros(std::size_t count) {
    RunningMean r;
    r.n_ = count;   // sum and M2 of any number of zeros are 0
    return r;
}

void RunningMean::add(double x) {
    // A 0 while the sum is 0 (most figures of a day's attribution row): the mean stays 0 and M2
    // gains (0 - 0) * (0 - 0), which leaves it as it is (M2 is never -0), so skip the divisions.
    if (x == 0.0 && sum_ == 0.0) {
        ++n_;
        sum_ += x;   // keeps the sign of zero the long way would leave
        return;
    }
    const double before = n_ ? sum_ / static_cast<double>(n_) : 0.0;
    ++n_;
    sum_ += x;
    const double after = sum_ / static_cast<double>(n_);
    m2_ += (x - before) * (x - after);
}

Estimate RunningMean::estimate() const {
    if (n_ == 0) return {};
    // (x - before) and (x - after) have the same sign in exact arithmetic; rounding may leave a
    // constant series a hair below 0.
    return student_t(n_, sum_ / static_cast<double>(n_), std::max(0.0, m2_));
}

Estimate estimate_share(std::size_t successes, std::size_t n) {
    Estimate e;
    e.n = n;
    if (n == 0) return e;
    // Wilson score interval (z = 1.96): stays inside [0, 1] and is sound near 0 and 1.
    const double z = 1.959963984540054, nn = static_cast<double>(n);
    const double p = static_cast<double>(successes) / nn;
    const double denom = 1.0 + z * z / nn;
    const double centre = (p + z * z / (2.0 * nn)) / denom;
    const double half = z * std::sqrt(p * (1.0 - p) / nn + z * z / (4.0 * nn * nn)) / denom;
    e.mean = p;
    e.half_width = half;
    // In exact arithmetic the bounds lie in [0, 1]; rounding can put one a hair outside (at p = 1
    // the upper bound came out as 1 + 2^-52), which a results reader rightly refuses.
    e.lower = std::clamp(centre - half, 0.0, 1.0);
    e.upper = std::clamp(centre + half, 0.0, 1.0);
    return e;
}

Quantiles quantiles(std::vector<double> v) {
    Quantiles q;
    if (v.empty()) return q;
    std::sort(v.begin(), v.end());
    auto at = [&](double p) {
        const double pos = p * static_cast<double>(v.size() - 1);
        const std::size_t lo = static_cast<std::size_t>(std::floor(pos));
        const std::size_t hi = std::min(lo + 1, v.size() - 1);
        return v[lo] + (pos - static_cast<double>(lo)) * (v[hi] - v[lo]);
    };
    q.p50 = at(0.5);
    q.p90 = at(0.9);
    q.p95 = at(0.95);
    q.max = v.back();
    return q;
}

}  // namespace knockon
