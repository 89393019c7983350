// Primary-delay model: the distribution samplers against Boost.Math's distributions (moments and a
// Kolmogorov-Smirnov test), published check values (tests/REFERENCES.md P4, P5, P7), the counter-based
// random numbers (known answers, determinism, common random numbers), the per-day draws, and the
// scenario reader's `delays:` section with its located errors.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <functional>
#include <set>
#include <string>
#include <vector>

#include <boost/math/distributions/exponential.hpp>
#include <boost/math/distributions/gamma.hpp>
#include <boost/math/distributions/lognormal.hpp>
#include <boost/math/distributions/weibull.hpp>

#include "models/delay_distribution.hpp"
#include "models/plan.hpp"
#include "sim/delay_draws.hpp"
#include "sim/random_stream.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;
using Catch::Matchers::Contains;

namespace {

constexpr std::size_t kDraws = 20000;

// n draws through DelayDistribution::sample, uniforms from the counter-based stream.
std::vector<double> draws(const DelayDistribution& d, std::size_t n = kDraws, std::uint64_t seed = 20240611,
                          std::uint32_t replication = 0) {
    const RandomStream rng(seed, replication);
    const std::uint32_t key = stable_key("sampler test");
    std::vector<double> out;
    out.reserve(n);
    for (std::size_t i = 0; i < n; ++i) {
        const UniformPair u = rng.uniforms(StreamKind::dwell, key, 0, static_cast<std::uint32_t>(i));
        out.push_back(d.sample(u.first, u.second));
    }
    return out;
}

double mean_of(const std::vector<double>& x) {
    double s = 0.0;
    for (double v : x) s += v;
    return s / static_cast<double>(x.size());
}

// Unbiased sample variance.
double variance_of(const std::vector<double>& x) {
    const double m = mean_of(x);
    double s = 0.0;
    for (double v : x) s += (v - m) * (v - m);
    return s / static_cast<double>(x.size() - 1);
}

// Kolmogorov-Smirnov statistic D = sup |F_n(x) - F(x)|.
double ks_statistic(std::vector<double> x, const std::function<double(double)>& cdf) {
    std::sort(x.begin(), x.end());
    const double n = static_cast<double>(x.size());
    double d = 0.0;
    for (std::size_t i = 0; i < x.size(); ++i) {
        const double f = cdf(x[i]);
        d = std::max({d, f - static_cast<double>(i) / n, static_cast<double>(i + 1) / n - f});
    }
    return d;
}

// Standard KS table, asymptotic critical value at the 5 % level (Smirnov): 1.36 / sqrt(n).
double ks_critical_5pc(std::size_t n) { return 1.36 / std::sqrt(static_cast<double>(n)); }

// Checks sample mean and variance against the reference distribution's within 5 standard errors,
// and the sample against its CDF by KS at 5 %.  The standard error of the sample variance is
// sigma^2 sqrt((kurtosis - 1) / n) (large-sample form; common practice, no source).
template <class Dist>
void check_against(const DelayDistribution& d, const Dist& ref) {
    const auto x = draws(d);
    const double n = static_cast<double>(x.size());
    const double mu = boost::math::mean(ref), var = boost::math::variance(ref);
    const double se_mean = std::sqrt(var / n);
    const double se_var = var * std::sqrt((boost::math::kurtosis(ref) - 1.0) / n);
    INFO(to_string(d.kind) << ": mean " << mean_of(x) << " vs " << mu << ", variance " << variance_of(x)
                           << " vs " << var);
    CHECK(std::abs(mean_of(x) - mu) < 5.0 * se_mean);
    CHECK(std::abs(variance_of(x) - var) < 5.0 * se_var);
    // Our own conditional mean agrees with Boost.Math's.
    CHECK(d.conditional_mean() == Approx(mu).epsilon(1e-12));
    const double ks = ks_statistic(x, [&](double v) { return boost::math::cdf(ref, v); });
    INFO("KS D = " << ks << ", critical " << ks_critical_5pc(x.size()));
    CHECK(ks < ks_critical_5pc(x.size()));  // standard KS table, asymptotic, 5 %
}

DelayDistribution exponential(double mean, double p = 1.0) {
    DelayDistribution d;
    d.kind = DistributionKind::exponential;
    d.mean = mean;
    d.probability = p;
    return d;
}

DelayDistribution empirical_table() {
    DelayDistribution d;
    d.kind = DistributionKind::empirical;
    d.quantiles = {{0.0, 0.0}, {0.5, 60.0}, {0.9, 240.0}, {1.0, 600.0}};
    return d;
}

}  // namespace

// ------------------------------------------------------------------ distributions

TEST_CASE("parametric samplers agree with Boost.Math: mean, variance and KS at 5 %", "[delays]") {
    SECTION("exponential, mean 1.3 min (tests/REFERENCES.md P5 suburban entry-delay mean)") {
        check_against(exponential(78.0), boost::math::exponential_distribution<double>(1.0 / 78.0));
    }
    SECTION("weibull, shape 0.8 (tests/REFERENCES.md P6: delays have shape < 1), scale 2 min") {
        DelayDistribution d;
        d.kind = DistributionKind::weibull;
        d.shape = 0.8;
        d.scale = 120.0;
        check_against(d, boost::math::weibull_distribution<double>(0.8, 120.0));
    }
    SECTION("weibull, shape 1.5 (tests/REFERENCES.md P6: dwell times have shape > 1), scale 40 s") {
        DelayDistribution d;
        d.kind = DistributionKind::weibull;
        d.shape = 1.5;
        d.scale = 40.0;
        check_against(d, boost::math::weibull_distribution<double>(1.5, 40.0));
    }
    SECTION("lognormal, median 20 s, sigma 0.8 (tests/REFERENCES.md P6: process times log-normal)") {
        DelayDistribution d;
        d.kind = DistributionKind::lognormal;
        d.median = 20.0;
        d.sigma = 0.8;
        check_against(d, boost::math::lognormal_distribution<double>(std::log(20.0), 0.8));
        // The median is the median: exp(location) (closed form).
        CHECK(d.quantile(0.5) == Approx(20.0).epsilon(1e-12));
    }
    SECTION("gamma, shape 2, scale 30 s") {
        DelayDistribution d;
        d.kind = DistributionKind::gamma;
        d.shape = 2.0;
        d.scale = 30.0;
        check_against(d, boost::math::gamma_distribution<double>(2.0, 30.0));
        CHECK(d.conditional_mean() == Approx(60.0));   // k * theta (closed form)
    }
}

TEST_CASE("the KS check rejects a sample from another distribution", "[delays]") {
    // Exponential draws with mean 78 s tested against mean 90 s must fail: shows the check has
    // power at this n (common practice, no source).
    const auto x = draws(exponential(78.0));
    const boost::math::exponential_distribution<double> wrong(1.0 / 90.0);
    CHECK(ks_statistic(x, [&](double v) { return boost::math::cdf(wrong, v); }) > ks_critical_5pc(x.size()));
}

TEST_CASE("Weibull mean, shape 0.8, scale 2 min", "[delays]") {
    // tests/REFERENCES.md P7: Gamma function, 2 min * Gamma(1 + 1/0.8) = 2.266 min; check against Boost.Math.
    DelayDistribution d;
    d.kind = DistributionKind::weibull;
    d.shape = 0.8;
    d.scale = 120.0;
    CHECK(d.conditional_mean() / 60.0 == Approx(2.266).margin(0.0005));
    CHECK(d.conditional_mean() == Approx(boost::math::mean(boost::math::weibull_distribution<double>(0.8, 120.0))));
    CHECK(d.conditional_mean() == Approx(120.0 * std::tgamma(1.0 + 1.0 / 0.8)));
}

TEST_CASE("exponential delay model: expected delay p*m and knock-on p*m*exp(-b/m)", "[delays]") {
    // tests/REFERENCES.md P4 (closed form) with the P5 suburban values p = 0.20, m = 1.3 min.
    const double p = 0.20, m = 78.0;
    const DelayDistribution d = exponential(m, p);
    CHECK(d.expected() == Approx(p * m));
    CHECK(d.conditional_mean() == Approx(m));

    const auto x = draws(d);
    const double n = static_cast<double>(x.size());
    // Mixture: E[X^2] = 2 p m^2, so Var X = 2 p m^2 - (p m)^2.
    const double se = std::sqrt((2.0 * p * m * m - p * p * m * m) / n);
    CHECK(std::abs(mean_of(x) - p * m) < 5.0 * se);

    // Expected delay passed on behind a buffer b = 2 min: E[max(0, X - b)] = p m exp(-b/m).
    const double b = 120.0;
    std::vector<double> passed;
    for (double v : x) passed.push_back(std::max(0.0, v - b));
    const double expect = p * m * std::exp(-b / m);
    const double se_passed = std::sqrt(variance_of(passed) / n);
    INFO("knock-on " << mean_of(passed) << " vs " << expect);
    CHECK(std::abs(mean_of(passed) - expect) < 5.0 * se_passed);
}

TEST_CASE("empirical table: linear interpolation of the quantile function", "[delays]") {
    // Hand arithmetic on the table (common practice, no source).
    const DelayDistribution d = empirical_table();
    CHECK(d.check().empty());
    CHECK(d.quantile(0.25) == Approx(30.0));
    CHECK(d.quantile(0.5) == Approx(60.0));
    CHECK(d.quantile(0.7) == Approx(150.0));
    CHECK(d.quantile(0.95) == Approx(420.0));
    CHECK(d.quantile(1e-12) == Approx(0.0).margin(1e-6));
    CHECK(d.quantile(1.0 - 1e-12) == Approx(600.0).margin(1e-6));
    // Mean = integral of the quantile function: 0.5*30 + 0.4*150 + 0.1*420 = 117 s.
    CHECK(d.conditional_mean() == Approx(117.0));
    const auto x = draws(d);
    CHECK(std::abs(mean_of(x) - 117.0) < 5.0 * std::sqrt(variance_of(x) / static_cast<double>(x.size())));
    // KS against the table's own piecewise-linear CDF.
    auto cdf = [&](double v) {
        const auto& q = d.quantiles;
        for (std::size_t i = 1; i < q.size(); ++i)
            if (v <= q[i].second)
                return q[i - 1].first + (q[i].first - q[i - 1].first) * (v - q[i - 1].second) /
                                            (q[i].second - q[i - 1].second);
        return 1.0;
    };
    CHECK(ks_statistic(x, cdf) < ks_critical_5pc(x.size()));  // standard KS table, asymptotic, 5 %
}

TEST_CASE("probability: the share of zero draws is 1 - p", "[delays]") {
    // Binomial share within 5 standard errors (common practice, no source).
    for (double p : {0.0, 0.3, 0.5, 1.0}) {
        DelayDistribution d;
        d.kind = DistributionKind::lognormal;
        d.median = 20.0;
        d.sigma = 0.8;
        d.probability = p;
        const auto x = draws(d);
        const double zeros =
            static_cast<double>(std::count(x.begin(), x.end(), 0.0)) / static_cast<double>(x.size());
        const double se = std::sqrt(std::max(p * (1 - p), 1e-12) / static_cast<double>(x.size()));
        INFO("p = " << p << ", zeros " << zeros);
        CHECK(std::abs(zeros - (1.0 - p)) <= 5.0 * se);
        CHECK(d.expected() == Approx(p * d.conditional_mean()));
    }
    // sample() itself: a delay exactly when u_occurs < probability.
    const DelayDistribution d = exponential(60.0, 0.25);
    CHECK(d.sample(0.2499, 0.5) == Approx(60.0 * std::log(2.0)));   // exponential median m ln 2
    CHECK(d.sample(0.25, 0.5) == 0.0);
}

TEST_CASE("check() names wrong parameters", "[delays]") {
    CHECK(exponential(60.0).check().empty());
    CHECK_THAT(exponential(0.0).check(), Contains("mean"));
    CHECK_THAT(exponential(60.0, 1.2).check(), Contains("probability"));
    DelayDistribution g;
    g.kind = DistributionKind::gamma;
    g.scale = 10.0;
    CHECK_THAT(g.check(), Contains("shape"));
    DelayDistribution e = empirical_table();
    std::swap(e.quantiles[1], e.quantiles[2]);
    CHECK_FALSE(e.check().empty());
}

// ------------------------------------------------------------------ random numbers

TEST_CASE("Philox4x32-10 behind RandomStream gives the published known answers", "[delays][random]") {
    // Random123 known-answer vectors for philox4x32, 10 rounds (kat_vectors; from memory, and
    // they agree with the installed library).  RandomStream's key is (seed_lo ^ seed_hi,
    // replication) and its counter (kind, train, place, draw).
    const UniformPair zero = RandomStream(0, 0).uniforms(static_cast<StreamKind>(0), 0, 0, 0);
    CHECK(zero.first == open_unit(0x6627e8d5u, 0xe169c58du));
    CHECK(zero.second == open_unit(0xbc57ac4cu, 0x9b00dbd8u));
    const UniformPair pi = RandomStream(0xa4093822u, 0x299f31d0u)
                               .uniforms(static_cast<StreamKind>(0x243f6a88u), 0x85a308d3u, 0x13198a2eu, 0x03707344u);
    CHECK(pi.first == open_unit(0xd16cfe09u, 0x94fdccebu));
    CHECK(pi.second == open_unit(0x5001e420u, 0x24126ea1u));
    // The seed's high word enters the key by xor.
    const UniformPair hi = RandomStream(0xa4093822ull << 32, 0x299f31d0u)
                               .uniforms(static_cast<StreamKind>(0x243f6a88u), 0x85a308d3u, 0x13198a2eu, 0x03707344u);
    CHECK(hi.first == pi.first);
}

TEST_CASE("uniforms lie strictly inside (0, 1)", "[delays][random]") {
    // Midpoints of 2^52 cells (common practice, no source).
    CHECK(open_unit(0, 0) == 0x1p-53);
    CHECK(open_unit(0xffffffffu, 0xffffffffu) == 1.0 - 0x1p-53);
    CHECK(open_unit(0xffffffffu, 0xffffffffu) < 1.0);
    CHECK(open_unit(0, 0) + open_unit(0xffffffffu, 0xffffffffu) == 1.0);
    // Why not m / 2^53 + 2^-54: its top value rounds to 1.0, where quantiles are infinite.
    CHECK(static_cast<double>((std::uint64_t{1} << 53) - 1) * 0x1p-53 + 0x1p-54 == 1.0);
    // Every parametric quantile stays finite at the extreme uniforms.
    for (double u : {open_unit(0, 0), open_unit(0xffffffffu, 0xffffffffu)}) {
        CHECK(std::isfinite(exponential(60.0).quantile(u)));
        DelayDistribution l;
        l.kind = DistributionKind::lognormal;
        l.median = 20.0;
        l.sigma = 2.0;
        CHECK(std::isfinite(l.quantile(u)));
    }
}

TEST_CASE("the two uniforms of a block are uniform and uncorrelated", "[delays][random]") {
    const RandomStream rng(7, 3);
    std::vector<double> a, b;
    for (std::uint32_t i = 0; i < kDraws; ++i) {
        const UniformPair u = rng.uniforms(StreamKind::running, stable_key("T1"), i, 0);
        a.push_back(u.first);
        b.push_back(u.second);
    }
    auto uniform_cdf = [](double v) { return v; };
    CHECK(ks_statistic(a, uniform_cdf) < ks_critical_5pc(a.size()));  // standard KS table, asymptotic, 5 %
    CHECK(ks_statistic(b, uniform_cdf) < ks_critical_5pc(b.size()));
    // Sample correlation of independent variables: standard error 1/sqrt(n) (common practice, no source).
    const double ma = mean_of(a), mb = mean_of(b);
    double sab = 0.0;
    for (std::size_t i = 0; i < a.size(); ++i) sab += (a[i] - ma) * (b[i] - mb);
    const double r = sab / static_cast<double>(a.size() - 1) / std::sqrt(variance_of(a) * variance_of(b));
    CHECK(std::abs(r) < 5.0 / std::sqrt(static_cast<double>(a.size())));
}

TEST_CASE("stable_key is FNV-1a 32", "[delays][random]") {
    // FNV reference test vectors (from memory; confirmed by an independent computation).
    CHECK(stable_key("") == 0x811c9dc5u);
    CHECK(stable_key("a") == 0xe40c292cu);
    CHECK(stable_key("foobar") == 0xbf9cf968u);
    static_assert(stable_key("a") == 0xe40c292cu, "usable at compile time");
}

TEST_CASE("draws are a function of seed, replication and keys only", "[delays][random]") {
    const RandomStream a(42, 5), b(42, 5), other_rep(42, 6), other_seed(43, 5);
    const auto k = stable_key("S1-0600"), s = stable_key("FRX");
    CHECK(a.uniform(StreamKind::dwell, k, s) == b.uniform(StreamKind::dwell, k, s));
    CHECK(a.uniforms(StreamKind::dwell, k, s).second == b.uniforms(StreamKind::dwell, k, s).second);
    CHECK(a.uniform(StreamKind::dwell, k, s) != other_rep.uniform(StreamKind::dwell, k, s));
    CHECK(a.uniform(StreamKind::dwell, k, s) != other_seed.uniform(StreamKind::dwell, k, s));
    CHECK(a.uniform(StreamKind::dwell, k, s) != a.uniform(StreamKind::running, k, s));
    CHECK(a.uniform(StreamKind::dwell, k, s) != a.uniform(StreamKind::dwell, k, s, 1));
}

// ------------------------------------------------------------------ draws for one day

namespace {

// An invented 10 km line worked up, three stations; two stopping trains and a fast one that
// comes in over the line end and runs on beyond the far end.
const std::string kLine = R"(knockon: 1
name: Delay draws (test)
line_type: suburban
infrastructure:
  length: 10 km
  speed_limits:
    - {from: 0 km, value: 120 km/h}
  tracks:
    - {id: U, from: 0 km, to: 10 km, directions: up}
  stations:
    - {id: A, at: 0.5 km}
    - {id: B, at: 5 km}
    - {id: C, at: 9.5 km}
  signalling:
    areas:
      - {from: 0 km, to: 10 km, system: three_aspect}
    defaults: {sighting_distance: 300 m, overlap: 200 m}
  signals:
    - {id: U01, track: U, at: 0 km, direction: up}
    - {id: U02, track: U, at: 0.8 km, direction: up}
    - {id: U03, track: U, at: 2.6 km, direction: up}
    - {id: U04, track: U, at: 4.5 km, direction: up}
    - {id: U05, track: U, at: 5.3 km, direction: up}
    - {id: U06, track: U, at: 7.2 km, direction: up}
    - {id: U07, track: U, at: 9 km, direction: up}
train_types:
  - id: EMU
    length: 100 m
    mass: 200 t
    max_speed: 120 km/h
    traction: {max_force: 200 kN, power: 2 MW}
    resistance: {a: 2 kN, b: 20 N/(m/s), c: 5 N/(m/s)2}
    braking: {deceleration: 0.8 m/s2, delay: 2 s}
    min_dwell: 30 s
timetable:
  services:
    - id: T1
      type: EMU
      category: stopping
      direction: up
      calls:
        - {station: A, dep: "08:00"}
        - {station: B}
        - {station: C}
    - id: T2
      type: EMU
      category: stopping
      direction: up
      calls:
        - {station: A, dep: "08:20"}
        - {station: B}
        - {station: C}
    - id: F1
      type: EMU
      category: fast
      direction: up
      enter: {}
      leave: true
      calls:
        - {station: A, pass: "08:40"}
        - {station: B, pass: auto}
        - {station: C, pass: auto}
)";

const std::string kDelays = R"(delays:
  entry:
    - {category: stopping, probability: 100 %, distribution: exponential, mean: 1.3 min}
  dwell:
    - {station: B, distribution: lognormal, median: 20 s, sigma: 0.8}
  running:
    - {category: fast, probability: 0 %, distribution: exponential, mean: 1 min}
    - {distribution: gamma, shape: 2, scale: 30 s}
)";

// The text with `from` (which must be there) replaced by `to`.
std::string replaced(std::string text, const std::string& from, const std::string& to) {
    const auto pos = text.find(from);
    REQUIRE(pos != std::string::npos);
    text.replace(pos, from.size(), to);
    return text;
}

std::size_t index_of(const std::vector<TrainPlan>& trains, const std::string& id) {
    for (std::size_t t = 0; t < trains.size(); ++t)
        if (trains[t].run.service->id == id) return t;
    FAIL("no train " << id);
    return 0;
}

}  // namespace

TEST_CASE("draw_delays fills entry, dwell and running by rule", "[delays][draws]") {
    const Scenario sc = parse_scenario(kLine + kDelays, "t.yaml");
    const auto trains = plan_trains(sc);
    const InjectedDelays d = draw_delays(sc, trains, 1, 0);
    REQUIRE(d.entry.size() == trains.size());
    REQUIRE(d.dwell.size() == trains.size());
    REQUIRE(d.running.size() == trains.size());
    const std::size_t t1 = index_of(trains, "T1"), f1 = index_of(trains, "F1");
    for (std::size_t t = 0; t < trains.size(); ++t) {
        REQUIRE(d.dwell[t].size() == 3);
        REQUIRE(d.running[t].size() == 3);
    }
    // Entry: stopping trains always (100 %), the fast one matches no rule.
    CHECK(d.entry[t1] > 0.0);
    CHECK(d.entry[f1] == 0.0);
    // Dwell: only at B (the rule's station), never at the terminus C; F1 passes everywhere.
    CHECK(d.dwell[t1][0] == 0.0);
    CHECK(d.dwell[t1][1] > 0.0);
    CHECK(d.dwell[t1][2] == 0.0);
    CHECK(d.dwell[f1] == std::vector<double>{0.0, 0.0, 0.0});
    // Running: the first matching rule wins, so F1 gets the 0 % rule; T1 runs A-B and B-C, not
    // beyond its terminus.
    CHECK(d.running[f1] == std::vector<double>{0.0, 0.0, 0.0});
    CHECK(d.running[t1][0] > 0.0);
    CHECK(d.running[t1][1] > 0.0);
    CHECK(d.running[t1][2] == 0.0);
    CHECK(d.blocked.empty());

    // A train that runs on beyond the line end gets a running delay from its last call too.
    const Scenario sc2 = parse_scenario(
        kLine + replaced(kDelays, "{category: fast, probability: 0 %, distribution: exponential, mean: 1 min}",
                         "{category: fast, distribution: exponential, mean: 1 min}"),
        "t.yaml");
    const auto trains2 = plan_trains(sc2);
    const InjectedDelays d2 = draw_delays(sc2, trains2, 1, 0);
    for (double v : d2.running[index_of(trains2, "F1")]) CHECK(v > 0.0);
}

TEST_CASE("draw_delays is deterministic and differs between replications", "[delays][draws]") {
    const Scenario sc = parse_scenario(kLine + kDelays, "t.yaml");
    const auto trains = plan_trains(sc);
    const InjectedDelays a = draw_delays(sc, trains, 99, 4);
    const InjectedDelays b = draw_delays(sc, trains, 99, 4);
    const InjectedDelays c = draw_delays(sc, trains, 99, 5);
    CHECK(a.entry == b.entry);
    CHECK(a.dwell == b.dwell);
    CHECK(a.running == b.running);
    CHECK(a.entry != c.entry);
    CHECK(a.running != c.running);
}

TEST_CASE("common random numbers: a train's draws depend on ids, not on positions", "[delays][draws]") {
    const Scenario base = parse_scenario(kLine + kDelays, "t.yaml");
    const auto trains = plan_trains(base);
    const InjectedDelays d = draw_delays(base, trains, 7, 2);
    const std::size_t t2 = index_of(trains, "T2");

    // Reordered and thinned: T2 alone, and the list reversed.
    std::vector<TrainPlan> only{trains[t2]};
    std::vector<TrainPlan> reversed(trains.rbegin(), trains.rend());
    const InjectedDelays d_only = draw_delays(base, only, 7, 2);
    const InjectedDelays d_rev = draw_delays(base, reversed, 7, 2);
    CHECK(d_only.entry[0] == d.entry[t2]);
    CHECK(d_only.dwell[0] == d.dwell[t2]);
    CHECK(d_only.running[0] == d.running[t2]);
    const std::size_t r2 = index_of(reversed, "T2");
    CHECK(d_rev.entry[r2] == d.entry[t2]);
    CHECK(d_rev.running[r2] == d.running[t2]);

    // A variant scenario: one more signal and an extra train listed first.
    std::string variant = replaced(kLine, "    - {id: U07, track: U, at: 9 km, direction: up}\n",
                                   "    - {id: U07, track: U, at: 9 km, direction: up}\n"
                                   "    - {id: U99, track: U, at: 6.4 km, direction: up}\n");
    variant = replaced(variant, "  services:\n",
                       "  services:\n"
                       "    - id: X0\n      type: EMU\n      category: stopping\n      direction: up\n"
                       "      calls:\n        - {station: A, dep: \"07:40\"}\n        - {station: C}\n");
    const Scenario var = parse_scenario(variant + kDelays, "v.yaml");
    const auto vtrains = plan_trains(var);
    REQUIRE(vtrains.size() == trains.size() + 1);
    const InjectedDelays dv = draw_delays(var, vtrains, 7, 2);
    const std::size_t v2 = index_of(vtrains, "T2");
    CHECK(v2 != t2);
    CHECK(dv.entry[v2] == d.entry[t2]);
    CHECK(dv.dwell[v2] == d.dwell[t2]);
    CHECK(dv.running[v2] == d.running[t2]);
}

namespace {

// kLine with a stopping pattern every 30 min, 09:00 to 10:00 (runs R-0900, R-0930, R-1000) after
// F1, and kDelays: every stopping train has an entry delay (100 %) and a dwell delay at B.
const std::string kWithPattern = kLine + R"(    - id: R
      type: EMU
      category: stopping
      direction: up
      repeat: {every: 30 min, until: "10:00"}
      calls:
        - {station: A, dep: "09:00"}
        - {station: B}
        - {station: C}
)" + kDelays;

struct Drawn {
    Scenario scenario;
    std::vector<TrainPlan> trains;
    InjectedDelays delays;
};
Drawn drawn(const std::string& text, std::uint64_t seed = 7, std::uint32_t replication = 2) {
    Drawn d{parse_scenario(text, "t.yaml"), {}, {}};
    d.trains = plan_trains(d.scenario);
    d.delays = draw_delays(d.scenario, d.trains, seed, replication);
    return d;
}

// Train a of `x` and train b of `y` got the same primary delays, to the bit.
void check_same_draws(const Drawn& x, std::size_t a, const Drawn& y, std::size_t b) {
    INFO(x.trains[a].run.service->id << " and " << y.trains[b].run.service->id);
    CHECK(x.delays.entry[a] == y.delays.entry[b]);
    CHECK(x.delays.dwell[a] == y.delays.dwell[b]);
    CHECK(x.delays.running[a] == y.delays.running[b]);
}

// Every train got the same primary delays in both (train lists in the same order).
void check_all_same_draws(const Drawn& x, const Drawn& y) {
    REQUIRE(x.trains.size() == y.trains.size());
    for (std::size_t t = 0; t < x.trains.size(); ++t) check_same_draws(x, t, y, t);
}

// The departure from the first call of train `id`.
double first_departure(const Drawn& d, const std::string& id) {
    return d.trains[index_of(d.trains, id)].run.service->calls.front().departure.value();
}

}  // namespace

TEST_CASE("retiming a single service by a minute keeps every train's draws to the bit", "[delays][draws]") {
    const Drawn base = drawn(kWithPattern);
    const Drawn moved = drawn(replaced(kWithPattern, "{station: A, dep: \"08:20\"}", "{station: A, dep: \"08:21\"}"));
    REQUIRE(first_departure(moved, "T2") == first_departure(base, "T2") + 60.0);
    check_all_same_draws(base, moved);
    // The draws are not all zero (the check above would then prove nothing), and another seed
    // or replication gives others.
    const std::size_t t2 = index_of(base.trains, "T2");
    CHECK(base.delays.entry[t2] > 0.0);
    CHECK(base.delays.dwell[t2][1] > 0.0);
    CHECK(drawn(kWithPattern, 8, 2).delays.entry[t2] != base.delays.entry[t2]);
    CHECK(drawn(kWithPattern, 7, 3).delays.entry[t2] != base.delays.entry[t2]);
}

TEST_CASE("retiming a repeat pattern by a minute keeps each run's draws to the bit", "[delays][draws]") {
    const Drawn base = drawn(kWithPattern);
    const Drawn moved = drawn(replaced(replaced(kWithPattern, "{station: A, dep: \"09:00\"}", "{station: A, dep: \"09:01\"}"),
                                       "until: \"10:00\"", "until: \"10:01\""));
    // The runs' ids carry their times and change; their draws do not.
    REQUIRE(moved.trains.size() == base.trains.size());
    CHECK(index_of(moved.trains, "R-0931") == index_of(base.trains, "R-0930"));
    check_all_same_draws(base, moved);
    // The runs of one pattern draw apart from each other, and another seed draws anew.
    const std::size_t r0 = index_of(base.trains, "R-0900"), r1 = index_of(base.trains, "R-0930");
    CHECK(base.delays.entry[r0] > 0.0);
    CHECK(base.delays.entry[r0] != base.delays.entry[r1]);
    CHECK(base.delays.dwell[r0] != base.delays.dwell[r1]);
    const Drawn other_seed = drawn(kWithPattern, 8, 2);
    CHECK(other_seed.delays.entry[r1] != base.delays.entry[r1]);
    CHECK(other_seed.delays.dwell[r1] != base.delays.dwell[r1]);
}

TEST_CASE("a pattern's runs keep their draws by number when every or until change", "[delays][draws]") {
    const Drawn base = drawn(kWithPattern);
    // until 09:30: runs 0 and 1 remain.
    const Drawn shorter = drawn(replaced(kWithPattern, "until: \"10:00\"", "until: \"09:30\""));
    REQUIRE(shorter.trains.size() == base.trains.size() - 1);
    for (const char* id : {"T1", "T2", "F1", "R-0900", "R-0930"})
        check_same_draws(base, index_of(base.trains, id), shorter, index_of(shorter.trains, id));
    // every 20 min until 09:40: run 1 now leaves at 09:20 and run 2 at 09:40, with the draws of
    // runs 1 and 2 as they were.
    const Drawn denser = drawn(replaced(replaced(kWithPattern, "until: \"10:00\"", "until: \"09:40\""),
                                        "every: 30 min", "every: 20 min"));
    REQUIRE(denser.trains.size() == base.trains.size());
    check_same_draws(base, index_of(base.trains, "R-0930"), denser, index_of(denser.trains, "R-0920"));
    check_same_draws(base, index_of(base.trains, "R-1000"), denser, index_of(denser.trains, "R-0940"));
    // Starting the pattern half an hour earlier adds run 0 in front: every run's number, and so
    // its draws, move to the run before it (README, "Random numbers").
    const Drawn earlier = drawn(replaced(kWithPattern, "{station: A, dep: \"09:00\"}", "{station: A, dep: \"08:30\"}"));
    check_same_draws(base, index_of(base.trains, "R-0930"), earlier, index_of(earlier.trains, "R-0900"));
    CHECK(earlier.delays.entry[index_of(earlier.trains, "R-0930")] != base.delays.entry[index_of(base.trains, "R-0930")]);
}

TEST_CASE("a draw_key keeps a renamed train's draws and without one it draws anew", "[delays][draws]") {
    const Drawn base = drawn(kWithPattern);
    const std::size_t t2 = index_of(base.trains, "T2");
    // A single service renamed.
    const Drawn keyed = drawn(replaced(kWithPattern, "    - id: T2\n", "    - id: T2-late\n      draw_key: T2\n"));
    check_same_draws(base, t2, keyed, index_of(keyed.trains, "T2-late"));
    const Drawn renamed = drawn(replaced(kWithPattern, "    - id: T2\n", "    - id: T2-late\n"));
    CHECK(renamed.delays.entry[index_of(renamed.trains, "T2-late")] != base.delays.entry[t2]);
    // A pattern renamed: each run keeps its draws through the key and its number.
    const Drawn keyed_pattern = drawn(replaced(kWithPattern, "    - id: R\n", "    - id: Q\n      draw_key: R\n"));
    check_same_draws(base, index_of(base.trains, "R-0900"), keyed_pattern, index_of(keyed_pattern.trains, "Q-0900"));
    check_same_draws(base, index_of(base.trains, "R-1000"), keyed_pattern, index_of(keyed_pattern.trains, "Q-1000"));
    const Drawn renamed_pattern = drawn(replaced(kWithPattern, "    - id: R\n", "    - id: Q\n"));
    CHECK(renamed_pattern.delays.entry[index_of(renamed_pattern.trains, "Q-0900")] !=
          base.delays.entry[index_of(base.trains, "R-0900")]);
    // A key that differs from the id changes the draws of a train whose id stays.
    const Drawn borrowed = drawn(replaced(kWithPattern, "    - id: T1\n", "    - id: T1\n      draw_key: T0\n"));
    CHECK(borrowed.delays.entry[index_of(borrowed.trains, "T1")] != base.delays.entry[index_of(base.trains, "T1")]);
}

TEST_CASE("the draw key is kind and draw name and station and run with run 0 for a service of its own", "[delays][draws]") {
    // The counter documented in sim/delay_draws.hpp and the README, checked word by word: a single
    // service's draws are those it had when they were keyed by its id alone.
    const Drawn d = drawn(kWithPattern);
    const RandomStream rng(7, 2);
    const DelayRule& entry = d.scenario.delays.entry.at(0);
    const DelayRule& dwell = d.scenario.delays.dwell.at(0);
    auto sample = [](const DelayRule& rule, UniformPair u) { return rule.distribution.sample(u.first, u.second); };
    const std::size_t t1 = index_of(d.trains, "T1"), r1 = index_of(d.trains, "R-0930");
    CHECK(d.delays.entry[t1] == sample(entry, rng.uniforms(StreamKind::entry, stable_key("T1"), 0, 0)));
    CHECK(d.delays.dwell[t1][1] == sample(dwell, rng.uniforms(StreamKind::dwell, stable_key("T1"), stable_key("B"), 0)));
    CHECK(d.delays.entry[r1] == sample(entry, rng.uniforms(StreamKind::entry, stable_key("R"), 0, 2)));
    CHECK(d.delays.dwell[r1][1] == sample(dwell, rng.uniforms(StreamKind::dwell, stable_key("R"), stable_key("B"), 2)));
    CHECK(d.delays.entry[r1] != sample(entry, rng.uniforms(StreamKind::entry, stable_key("R-0930"), 0, 0)));
}

TEST_CASE("disruptions block the track's sections in the range for the drawn time", "[delays][draws]") {
    const std::string rule = "  disruptions:\n    - {track: U, from: 4 km, to: 6 km, daily_probability: 100 %, "
                             "distribution: exponential, mean: 20 min, window: [\"08:00\", \"09:00\"]}\n";
    const Scenario sc = parse_scenario(kLine + kDelays + rule, "t.yaml");
    REQUIRE(sc.delays.disruptions.size() == 1);
    const auto trains = plan_trains(sc);
    // The sections in range, as the paths know them.
    std::set<std::string> expected;
    for (const TrainPlan& tp : trains)
        for (const PathSection& s : tp.run.path.sections)
            if (s.x_lo < 6000.0 && s.x_hi > 4000.0) expected.insert(s.id);
    REQUIRE_FALSE(expected.empty());

    for (std::uint32_t rep = 0; rep < 5; ++rep) {
        const InjectedDelays d = draw_delays(sc, trains, 3, rep);
        std::set<std::string> got;
        for (const auto& b : d.blocked) {
            got.insert(b.section);
            CHECK(b.section.rfind("U:", 0) == 0);
            CHECK(b.from >= 8 * 3600.0);
            CHECK(b.from <= 9 * 3600.0);
            CHECK(b.to > b.from);
            CHECK(b.from == d.blocked.front().from);   // one disruption: one period for all
            CHECK(b.to == d.blocked.front().to);
        }
        CHECK(got == expected);
        CHECK(got.size() == d.blocked.size());
    }

    // Daily probability 30 %: the share of days with a disruption, within 5 standard errors,
    // and the start is uniform in the window: mean at its middle (common practice, no source).
    const Scenario sc30 = parse_scenario(kLine + kDelays + replaced(rule, "100 %", "30 %"), "t.yaml");
    const auto trains30 = plan_trains(sc30);
    const int days = 2000;
    int hit = 0;
    std::vector<double> starts, lengths;
    for (int rep = 0; rep < days; ++rep) {
        const InjectedDelays d = draw_delays(sc30, trains30, 3,
                                             static_cast<std::uint32_t>(rep));
        if (d.blocked.empty()) continue;
        ++hit;
        starts.push_back(d.blocked.front().from);
        lengths.push_back(d.blocked.front().to - d.blocked.front().from);
    }
    const double share = static_cast<double>(hit) / days;
    CHECK(std::abs(share - 0.3) < 5.0 * std::sqrt(0.3 * 0.7 / days));
    CHECK(std::abs(mean_of(starts) - 8.5 * 3600.0) < 5.0 * 3600.0 / std::sqrt(12.0 * starts.size()));
    // Exponential duration, mean 20 min: standard error m / sqrt(n).
    CHECK(std::abs(mean_of(lengths) - 1200.0) < 5.0 * 1200.0 / std::sqrt(static_cast<double>(lengths.size())));
}

// ------------------------------------------------------------------ reader

namespace {

std::vector<std::string> errors_of(const std::string& text) {
    try {
        parse_scenario(text, "t.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    FAIL("the scenario was accepted");
    return {};
}

// "line:col" (1-based) of the first `needle` at or after the first `anchor`.
std::string loc_in(const std::string& text, const std::string& anchor, const std::string& needle) {
    const std::size_t a = text.find(anchor);
    REQUIRE(a != std::string::npos);
    const std::size_t pos = text.find(needle, a);
    REQUIRE(pos != std::string::npos);
    const std::string upto = text.substr(0, pos);
    const auto line = 1 + std::count(upto.begin(), upto.end(), '\n');
    const auto nl = upto.rfind('\n');
    const auto col = nl == std::string::npos ? pos + 1 : pos - nl;
    return std::to_string(line) + ":" + std::to_string(col);
}

// The single error of kLine + `delays`, which must be at `where` and say `what`.
void expect_error(const std::string& delays, const std::string& where, const std::string& path,
                  const std::string& what) {
    const std::string text = kLine + delays;
    const auto errs = errors_of(text);
    INFO(delays);
    REQUIRE(errs.size() == 1);
    CHECK_THAT(errs[0], Contains("t.yaml:" + where + ": " + path + ": "));
    CHECK_THAT(errs[0], Contains(what));
}

}  // namespace

TEST_CASE("the delays section reads into SI values", "[delays][reader]") {
    const std::string text = kLine + R"(delays:
  entry:
    - {category: stopping, probability: 20 %, distribution: exponential, mean: 1.3 min}
  dwell:
    - {category: stopping, station: B, probability: 30 %, distribution: lognormal, median: 20 s, sigma: 0.8}
  running:
    - {category: fast, probability: 10 %, distribution: gamma, shape: 2, scale: 30 s}
    - {probability: 50 %, distribution: empirical, quantiles: [[0 %, 0 s], [50 %, 60 s], [90 %, 4 min], [100 %, 10 min]]}
    - {distribution: weibull, shape: 0.8, scale: 2 min}
  disruptions:
    - {track: U, from: 2 km, to: 4 km, daily_probability: 5 %, distribution: exponential, mean: 20 min, window: ["06:00", "22:00"]}
)";
    const Scenario sc = parse_scenario(text, "t.yaml");
    const PrimaryDelayModel& m = sc.delays;
    CHECK_FALSE(m.empty());
    REQUIRE(m.entry.size() == 1);
    CHECK(m.entry[0].category == "stopping");
    CHECK(m.entry[0].station.empty());
    CHECK(m.entry[0].distribution.kind == DistributionKind::exponential);
    CHECK(m.entry[0].distribution.probability == Approx(0.20));
    CHECK(m.entry[0].distribution.mean == Approx(78.0));
    REQUIRE(m.dwell.size() == 1);
    CHECK(m.dwell[0].station == "B");
    CHECK(m.dwell[0].distribution.kind == DistributionKind::lognormal);
    CHECK(m.dwell[0].distribution.median == Approx(20.0));
    CHECK(m.dwell[0].distribution.sigma == Approx(0.8));
    REQUIRE(m.running.size() == 3);
    CHECK(m.running[0].distribution.kind == DistributionKind::gamma);
    CHECK(m.running[0].distribution.shape == Approx(2.0));
    CHECK(m.running[0].distribution.scale == Approx(30.0));
    CHECK(m.running[1].distribution.kind == DistributionKind::empirical);
    CHECK(m.running[1].distribution.probability == Approx(0.5));
    REQUIRE(m.running[1].distribution.quantiles.size() == 4);
    CHECK(m.running[1].distribution.quantiles[2].first == Approx(0.9));
    CHECK(m.running[1].distribution.quantiles[2].second == Approx(240.0));
    CHECK(m.running[1].distribution.quantiles[3].first == 1.0);
    CHECK(m.running[1].distribution.check().empty());
    CHECK(m.running[2].distribution.probability == 1.0);   // default: always
    CHECK(m.running[2].distribution.scale == Approx(120.0));
    REQUIRE(m.disruptions.size() == 1);
    const DisruptionRule& r = m.disruptions[0];
    CHECK(r.track == "U");
    CHECK(r.from == Approx(2000.0));
    CHECK(r.to == Approx(4000.0));
    CHECK(r.daily_probability == Approx(0.05));
    CHECK(r.duration.mean == Approx(1200.0));
    CHECK(r.window_from == Approx(6 * 3600.0));
    CHECK(r.window_to == Approx(22 * 3600.0));

    // No section: an empty model.
    CHECK(parse_scenario(kLine, "t.yaml").delays.empty());
}

TEST_CASE("delays section: located errors", "[delays][reader]") {
    SECTION("negative mean") {
        const std::string d = "delays:\n  entry:\n    - {distribution: exponential, mean: -1 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "-1 min"), "delays.entry[0].mean", "must be more than 0 min");
    }
    SECTION("probability 120 %") {
        const std::string d = "delays:\n  dwell:\n    - {probability: 120 %, distribution: exponential, mean: 1 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "120 %"), "delays.dwell[0].probability",
                     "between 0 % and 100 %");
    }
    SECTION("unsorted empirical table") {
        const std::string d = "delays:\n  running:\n    - {distribution: empirical, quantiles: [[0 %, 0 s], "
                              "[60 %, 1 min], [50 %, 2 min], [100 %, 5 min]]}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "50 %"), "delays.running[0].quantiles[2][0]",
                     "strictly increasing");
    }
    SECTION("empirical delays that fall") {
        const std::string d = "delays:\n  running:\n    - {distribution: empirical, quantiles: [[0 %, 0 s], "
                              "[50 %, 2 min], [100 %, 1 min]]}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "1 min]]"), "delays.running[0].quantiles[2][1]",
                     "must not decrease");
    }
    SECTION("empirical table not reaching 100 %") {
        const std::string d =
            "delays:\n  running:\n    - {distribution: empirical, quantiles: [[0 %, 0 s], [90 %, 2 min]]}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "90 %"), "delays.running[0].quantiles[1][0]",
                     "must end at 100 %");
    }
    SECTION("unknown distribution") {
        const std::string d = "delays:\n  running:\n    - {distribution: pareto, mean: 1 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "pareto"), "delays.running[0].distribution",
                     "\"pareto\" is not one of: exponential, weibull, lognormal, gamma, empirical");
    }
    SECTION("missing shape: at the rule's map, naming the key") {
        const std::string d = "delays:\n  running:\n    - {distribution: weibull, scale: 1 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "{distribution"), "delays.running[0].shape",
                     "missing required key \"shape\"");
    }
    SECTION("a parameter of another distribution") {
        const std::string d = "delays:\n  entry:\n    - {distribution: exponential, mean: 1 min, sigma: 0.5}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "0.5"), "delays.entry[0].sigma",
                     "does not belong to the exponential distribution, which takes mean");
    }
    SECTION("unknown key") {
        const std::string d = "delays:\n  entry:\n    - {distribution: exponential, mean: 1 min, where: A}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "where"), "delays.entry[0].where", "unknown key");
    }
    SECTION("unknown station") {
        const std::string d = "delays:\n  dwell:\n    - {station: Q, distribution: exponential, mean: 1 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "Q,"), "delays.dwell[0].station", "unknown station \"Q\"");
    }
    SECTION("unknown track") {
        const std::string d = "delays:\n  disruptions:\n    - {track: Z, from: 1 km, to: 2 km, "
                              "daily_probability: 5 %, distribution: exponential, mean: 20 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "Z,"), "delays.disruptions[0].track", "unknown track \"Z\"");
    }
    SECTION("range outside the track") {
        const std::string d = "delays:\n  disruptions:\n    - {track: U, from: 9 km, to: 12 km, "
                              "daily_probability: 5 %, distribution: exponential, mean: 20 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "12 km"), "delays.disruptions[0].to", "lies off track U");
    }
    SECTION("a network's segment on a line file") {
        const std::string d = "delays:\n  disruptions:\n    - {segment: U, from: 1 km, to: 2 km, "
                              "daily_probability: 5 %, distribution: exponential, mean: 20 min}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "U,"), "delays.disruptions[0].segment",
                     "a line file places a disruption by `track` and chainage; `segment`");
    }
    SECTION("window that ends before it starts") {
        const std::string d = "delays:\n  disruptions:\n    - {track: U, from: 1 km, to: 2 km, daily_probability: "
                              "5 %, distribution: gamma, shape: 2, scale: 5 min, window: [\"22:00\", \"06:00\"]}\n";
        expect_error(d, loc_in(kLine + d, "delays:", "\"06:00\""), "delays.disruptions[0].window[1]",
                     "must end after it starts");
    }
    SECTION("zero sigma") {
        const std::string d = "delays:\n  dwell:\n    - {distribution: lognormal, median: 20 s, sigma: 0}\n";
        expect_error(d, loc_in(kLine + d, "sigma: ", "0}"),
                     "delays.dwell[0].sigma", "must be more than 0 and at most 5");
    }
    SECTION("several mistakes are all reported") {
        const std::string d = "delays:\n  entry:\n    - {probability: -5 %, distribution: gamma, shape: 0, "
                              "scale: 30 s}\n";
        const auto errs = errors_of(kLine + d);
        CHECK(errs.size() == 2);
    }
}
