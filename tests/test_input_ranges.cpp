// The plausible ranges of scenario numbers (models/input_ranges) and the checks below them: a
// value must be finite after unit conversion, lie in its range, and delay distributions must
// keep their mean and 99.9 % quantile within a day.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <set>
#include <sstream>
#include <string>

#include <boost/math/distributions/normal.hpp>
#include <boost/math/special_functions/gamma.hpp>

#include "models/delay_distribution.hpp"
#include "models/input_ranges.hpp"
#include "models/train_type.hpp"
#include "models/units.hpp"

using namespace knockon;
using Catch::Matchers::Contains;

TEST_CASE("units: a number finite as written but not in SI units is refused", "[units][ranges]") {
    // 1e308 t is 1e311 kg and 1e308 min is 6e309 s: beyond the largest double (about 1.8e308).
    CHECK_THROWS_WITH(parse_quantity("1e308 t", Quantity::mass), Contains("too large to compute with"));
    CHECK_THROWS_WITH(parse_quantity("1e308 min", Quantity::duration), Contains("too large to compute with"));
    // Lengths are snapped to micrometres: 1e303 m is 1e309 micrometres.
    CHECK_THROWS_WITH(parse_quantity("1e303 m", Quantity::length), Contains("too large to compute with"));
    // 1e308 km/h is 2.8e307 m/s, finite: its range refuses it (below), not the conversion.
    CHECK(std::isfinite(parse_quantity("1e308 km/h", Quantity::speed)));
    CHECK(parse_quantity("1e300 m", Quantity::length) == 1e300);
}

TEST_CASE("input ranges: one entry per input with sensible bounds", "[ranges]") {
    std::set<Input> seen;
    for (const InputRange& r : input_ranges()) {
        INFO(r.fields);
        CHECK(seen.insert(r.input).second);
        CHECK(std::isfinite(r.min));
        CHECK(std::isfinite(r.max));
        CHECK(r.min < r.max);
        CHECK(&input_range(r.input) == &r);
        // Each bound is itself accepted or refused as the table says.
        CHECK_FALSE(range_problem(r.input, r.max).has_value());
        CHECK(range_problem(r.input, r.min).has_value() == r.min_open);
        CHECK(range_problem(r.input, r.max * (1.0 + 1e-9) + 1e-12).has_value());
        CHECK(range_problem(r.input, std::nan("")).has_value());
    }
    CHECK(seen.size() == static_cast<std::size_t>(Input::dispatch_weight) + 1);
}

TEST_CASE("input ranges: a message names the range and the value in the range's unit", "[ranges]") {
    CHECK(range_problem(Input::braking, 50.0).value() ==
          "must be more than 0 m/s2 and at most 3 m/s2 (README, input ranges), not 50 m/s2");
    CHECK(range_problem(Input::min_dwell, 7500.0).value() ==
          "must be between 0 min and 120 min (README, input ranges), not 125 min");
    CHECK(range_problem(Input::time_of_day, 47 * 3600.0).value() ==
          "must be between 00:00 and 30:00 (README, input ranges), not 47:00");
    CHECK(range_problem(Input::supplement_share, 0.25) == std::nullopt);
    CHECK(range_problem(Input::gradient, -0.035) == std::nullopt);
    CHECK(range_problem(Input::gradient, -0.2).value() ==
          "must be between -100 per mille and 100 per mille (README, input ranges), not -200 per mille");
}

TEST_CASE("input ranges: service braking stays below the adhesion limit at standstill", "[ranges]") {
    // Curtius-Kniffler adhesion mu = 0.161 + 7.5 / (V + 44), V in km/h (as quoted in Bosquet,
    // PhD thesis 2015): at standstill mu = 0.33145, so wheel-rail adhesion gives at most
    // mu g = 3.2515 m/s2 of braking without track brakes.
    const double mu0 = 0.161 + 7.5 / 44.0;
    CHECK(mu0 == Approx(0.33145).margin(1e-5));
    CHECK(input_range(Input::braking).max <= mu0 * kGravity);
    CHECK(input_range(Input::braking).max > 0.9 * mu0 * kGravity);   // and not far below it
}

TEST_CASE("README: the input ranges table holds every entry of the code's table", "[ranges][readme]") {
    std::ifstream in(std::string(KNOCKON_SOURCE_DIR) + "/README.md");
    REQUIRE(in);
    std::ostringstream s;
    s << in.rdbuf();
    const std::string readme = s.str();
    for (const InputRange& r : input_ranges()) {
        // A row "| `fields` | range | basis |".
        const std::string head = std::string("| `") + r.fields + "` | " + range_text(r) + " |";
        INFO(head);
        CHECK(readme.find(head) != std::string::npos);
    }
}

TEST_CASE("delay distributions: the mean and the 99.9 % quantile must stay within a day", "[ranges][delays]") {
    DelayDistribution w;
    w.kind = DistributionKind::weibull;
    w.shape = 0.1;
    w.scale = 60.0;
    // Weibull mean = scale * Gamma(1 + 1/shape) = 60 s * Gamma(11) = 60 s * 10! (Boost.Math).
    CHECK(boost::math::tgamma(11.0) == Approx(3628800.0));
    CHECK(w.conditional_mean() == Approx(60.0 * 3628800.0));
    CHECK_THAT(w.size_problem(), Contains("mean delay of 6.048e+04 h"));

    DelayDistribution ln;
    ln.kind = DistributionKind::lognormal;
    ln.median = 20.0;
    ln.sigma = 3.0;
    // Mean median * exp(sigma^2 / 2) = 1800 s is fine; the 99.9 % quantile median * exp(sigma z)
    // with z = 3.0902 (standard normal, Boost.Math) is 2.12e5 s = 59.01 h, beyond a day.
    const double z = boost::math::quantile(boost::math::normal_distribution<double>(), 0.999);
    CHECK(z == Approx(3.0902).margin(1e-4));
    CHECK(ln.conditional_mean() == Approx(20.0 * std::exp(4.5)));
    CHECK(ln.quantile(0.999) == Approx(20.0 * std::exp(3.0 * z)));
    CHECK_THAT(ln.size_problem(), Contains("99.9 % quantile of the delay at 59.01 h"));

    // Exponential: the 99.9 % quantile is mean * ln(1000) = 6.9 mean.
    DelayDistribution e;
    e.kind = DistributionKind::exponential;
    e.mean = 86400.0 / std::log(1000.0);
    CHECK(e.size_problem().empty());
    e.mean *= 1.001;
    CHECK_THAT(e.size_problem(), Contains("99.9 % quantile"));

    // Demo-grade parameters pass (freight entry delays: mean 20 min).
    e.mean = 20 * 60.0;
    CHECK(e.size_problem().empty());
    DelayDistribution g;
    g.kind = DistributionKind::gamma;
    g.shape = 2.0;
    g.scale = 30.0;
    CHECK(g.size_problem().empty());
}
