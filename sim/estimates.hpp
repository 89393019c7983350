#pragma once
// Figures across simulated days: a mean with its 95 % confidence interval (Student t), a share
// with its Wilson interval, order-statistic quantiles, and a running mean that gathers a figure
// day by day without keeping the days.
#include <cstddef>
#include <vector>

namespace knockon {

struct Estimate {
    double mean = 0.0;
    double half_width = 0.0;         // of the 95 % confidence interval; 0 with one value
    double lower = 0.0, upper = 0.0; // the interval itself (not always symmetric: see shares)
    std::size_t n = 0;
};

// Mean and 95 % Student t interval of the values, in two passes: the mean (their sum in order
// over n), then the squared deviations from it.
Estimate estimate_mean(const std::vector<double>& values);
// Share of successes with the 95 % Wilson score interval (lower, upper); half_width is half its width.
Estimate estimate_share(std::size_t successes, std::size_t n);

struct Quantiles {
    double p50 = 0.0, p90 = 0.0, p95 = 0.0, max = 0.0;
};
Quantiles quantiles(std::vector<double> values);   // linear interpolation between order statistics

// The same Estimate as estimate_mean, gathered one value at a time so that a study of any number
// of days keeps one of these per figure instead of every day's value.
//
// The mean is the plain sum of the values in the order they came over n: for values added in
// replication order it is estimate_mean's mean to the last bit.  The spread is Welford's update of
// the sum of squared deviations, M2 += (x - mean before) * (x - mean after), not the sum of
// squares (M2 = sum x^2 - (sum x)^2 / n): that difference cancels catastrophically when the
// spread is small against the mean (a section blocked for much the same 20 000 s every day), its
// relative error growing with (mean / s)^2 and the result able to come out negative, where
// Welford's grows with mean / s only, as the two-pass value's does.  So the half-width agrees with
// the two-pass one to within a few units in the last place, and is exactly 0 for constant values
// whose sum is exact (0, whole seconds), as there.
class RunningMean {
public:
    RunningMean() = default;
    // A running mean that has already seen `zeros` values of 0 (the state add(0.0) would leave).
    static RunningMean zeros(std::size_t count);

    void add(double x);
    std::size_t count() const { return n_; }
    Estimate estimate() const;

private:
    std::size_t n_ = 0;
    double sum_ = 0.0;
    double m2_ = 0.0;   // sum of squared deviations from the mean
};

}  // namespace knockon
