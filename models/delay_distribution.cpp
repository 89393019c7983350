#include "models/delay_distribution.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <stdexcept>

#include <boost/math/distributions/exponential.hpp>
#include <boost/math/distributions/gamma.hpp>
#include <boost/math/distributions/lognormal.hpp>
#include <boost/math/distributions/weibull.hpp>

#include "models/input_ranges.hpp"

namespace knockon {

const char* to_string(DistributionKind k) {
    switch (k) {
        case DistributionKind::exponential: return "exponential";
        case DistributionKind::weibull: return "weibull";
        case DistributionKind::lognormal: return "lognormal";
        case DistributionKind::gamma: return "gamma";
        case DistributionKind::empirical: return "empirical";
    }
    return "?";
}

namespace {

// Linear interpolation in the (p, seconds) table; callers have checked it.
double empirical_quantile(const std::vector<std::pair<double, double>>& q, double u) {
    if (q.empty()) throw std::domain_error("empirical delay distribution without quantiles");
    if (u <= q.front().first) return q.front().second;
    if (u >= q.back().first) return q.back().second;
    // First row with p > u; the one before it has p <= u.
    auto hi = std::upper_bound(q.begin(), q.end(), u,
                               [](double x, const std::pair<double, double>& r) { return x < r.first; });
    auto lo = hi - 1;
    const double w = (u - lo->first) / (hi->first - lo->first);
    return lo->second + w * (hi->second - lo->second);
}

}  // namespace

double DelayDistribution::quantile(double u) const {
    // Boost.Math throws std::domain_error on parameters out of range (see check()).
    switch (kind) {
        case DistributionKind::exponential:
            return boost::math::quantile(boost::math::exponential_distribution<double>(1.0 / mean), u);
        case DistributionKind::weibull:
            return boost::math::quantile(boost::math::weibull_distribution<double>(shape, scale), u);
        case DistributionKind::lognormal:
            return boost::math::quantile(
                boost::math::lognormal_distribution<double>(std::log(median), sigma), u);
        case DistributionKind::gamma:
            return boost::math::quantile(boost::math::gamma_distribution<double>(shape, scale), u);
        case DistributionKind::empirical:
            return empirical_quantile(quantiles, u);
    }
    return 0.0;
}

double DelayDistribution::sample(double u_occurs, double u_value) const {
    return u_occurs < probability ? quantile(u_value) : 0.0;
}

double DelayDistribution::conditional_mean() const {
    switch (kind) {
        case DistributionKind::exponential: return mean;
        case DistributionKind::weibull:
            return boost::math::mean(boost::math::weibull_distribution<double>(shape, scale));
        case DistributionKind::lognormal:
            return boost::math::mean(boost::math::lognormal_distribution<double>(std::log(median), sigma));
        case DistributionKind::gamma:
            return boost::math::mean(boost::math::gamma_distribution<double>(shape, scale));
        case DistributionKind::empirical: {
            // The mean is the integral of the quantile function over (0, 1): trapezoids.
            double m = 0.0;
            for (std::size_t i = 1; i < quantiles.size(); ++i)
                m += (quantiles[i].first - quantiles[i - 1].first) *
                     (quantiles[i].second + quantiles[i - 1].second) / 2.0;
            return m;
        }
    }
    return 0.0;
}

double DelayDistribution::expected() const {
    return probability == 0.0 ? 0.0 : probability * conditional_mean();
}

std::string DelayDistribution::check() const {
    auto positive = [](double v) { return std::isfinite(v) && v > 0.0; };
    if (!(probability >= 0.0 && probability <= 1.0)) return "probability must lie in [0, 1]";
    switch (kind) {
        case DistributionKind::exponential:
            if (!positive(mean)) return "exponential: mean must be greater than 0";
            break;
        case DistributionKind::weibull:
        case DistributionKind::gamma:
            if (!positive(shape)) return std::string(to_string(kind)) + ": shape must be greater than 0";
            if (!positive(scale)) return std::string(to_string(kind)) + ": scale must be greater than 0";
            break;
        case DistributionKind::lognormal:
            if (!positive(median)) return "lognormal: median must be greater than 0";
            if (!positive(sigma)) return "lognormal: sigma must be greater than 0";
            break;
        case DistributionKind::empirical: {
            const auto& q = quantiles;
            if (q.size() < 2) return "empirical: at least two rows are needed, at 0 % and at 100 %";
            if (q.front().first != 0.0 || q.back().first != 1.0)
                return "empirical: the table must run from p = 0 to p = 1";
            for (std::size_t i = 0; i < q.size(); ++i) {
                if (!std::isfinite(q[i].second) || q[i].second < 0.0)
                    return "empirical: delays must not be negative";
                if (i > 0 && !(q[i].first > q[i - 1].first))
                    return "empirical: p must be strictly increasing";
                if (i > 0 && q[i].second < q[i - 1].second)
                    return "empirical: delays must not decrease as p grows";
            }
            break;
        }
    }
    return "";
}

std::string DelayDistribution::size_problem() const {
    auto hours = [](double seconds) {
        char buf[64];
        std::snprintf(buf, sizeof buf, "%.4g h", seconds / 3600.0);
        return std::string(buf);
    };
    double mean_s = 0.0, high = 0.0;
    try {
        mean_s = conditional_mean();
        high = quantile(kDelayQuantileChecked);
    } catch (const std::exception&) {   // Boost.Math overflow: far beyond any day
        return "these parameters give delays too long to compute with";
    }
    const std::string limit = hours(kLongestDelay);
    if (!(mean_s <= kLongestDelay))
        return "these parameters give a mean delay of " + hours(mean_s) + ", more than " + limit +
               " (a delay must stay within a day)";
    if (!(high <= kLongestDelay))
        return "these parameters put the 99.9 % quantile of the delay at " + hours(high) + ", more than " +
               limit + " (a delay must stay within a day)";
    return "";
}

}  // namespace knockon
