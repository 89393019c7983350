#pragma once
// The size of one kind of primary delay: the chance that a delay occurs at all, and the
// distribution of its length when it does.  Parametric shapes are inverted through Boost.Math's
// quantile functions, so a draw depends only on the uniform numbers given (no standard-library
// distribution, whose algorithms differ between libraries).  All parameters in seconds.
#include <string>
#include <utility>
#include <vector>

namespace knockon {

enum class DistributionKind { exponential, weibull, lognormal, gamma, empirical };
const char* to_string(DistributionKind k);

struct DelayDistribution {
    DistributionKind kind = DistributionKind::exponential;
    double probability = 1.0;   // that any delay occurs, in [0, 1]
    double mean = 0.0;          // exponential [s]
    double shape = 0.0;         // weibull, gamma (no unit)
    double scale = 0.0;         // weibull, gamma [s]
    double median = 0.0;        // lognormal: ln(delay) ~ N(ln median, sigma^2) [s]
    double sigma = 0.0;         // lognormal (no unit)
    // empirical: (p, seconds), p strictly increasing from 0 to 1, seconds non-decreasing and not
    // negative; the quantile function is interpolated linearly between the rows.
    std::vector<std::pair<double, double>> quantiles;

    // Inverse CDF of the delay given that one occurs [s]; u in (0, 1).
    double quantile(double u) const;
    // One draw [s]: 0 unless u_occurs < probability, else quantile(u_value).
    double sample(double u_occurs, double u_value) const;
    // Mean delay given that one occurs [s].
    double conditional_mean() const;
    // Mean delay per occasion, probability * conditional mean [s].
    double expected() const;
    // What is wrong with the parameters for this kind ("" when they are fine).  Readers give
    // located messages of their own; this guards models built in code.
    std::string check() const;
    // What makes the delays too long to simulate ("" when nothing does): the mean or the 99.9 %
    // quantile beyond a day (README, "Input ranges"); parameters each in range may still combine
    // to that, e.g. a Weibull shape of 0.1 multiplies the scale by Gamma(11) = 3 628 800.
    std::string size_problem() const;
};

}  // namespace knockon
