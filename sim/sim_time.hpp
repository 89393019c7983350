#pragma once
// Simulation time as whole ticks of 1 ms. Integer ticks keep event ordering exact and
// reproducible: two events computed along different arithmetic paths either share a tick or
// they do not, with no floating-point near-ties deciding the order. Seconds (double) appear only
// at the edges, through from_seconds()/to_seconds().
#include <compare>
#include <cstdint>
#include <stdexcept>
#include <string>

namespace knockon {

inline constexpr std::int64_t ticks_per_second = 1000;

namespace detail {

// Seconds to ticks, rounded to the nearest tick, halves away from zero (like std::round, which
// is not constexpr in C++20). Truncate first and look at the exact remainder, instead of adding
// 0.5, so that values just below a half (0.49999999999999994) are not rounded up.
constexpr std::int64_t seconds_to_ticks(double seconds) {
    const double x = seconds * static_cast<double>(ticks_per_second);
    // Also rejects NaN (every comparison false). 9e18 stays inside int64_t with margin.
    if (!(x > -9.0e18 && x < 9.0e18))
        throw std::out_of_range("simulation time out of range or not finite: " +
                                std::to_string(seconds) + " s");
    const auto whole = static_cast<std::int64_t>(x);   // truncates toward zero
    const double rest = x - static_cast<double>(whole);  // exact for |x| < 2^52
    if (rest >= 0.5) return whole + 1;
    if (rest <= -0.5) return whole - 1;
    return whole;
}

}  // namespace detail

// A span of simulation time (may be negative).
struct SimDuration {
    std::int64_t ticks = 0;

    static constexpr SimDuration from_seconds(double s) { return {detail::seconds_to_ticks(s)}; }
    constexpr double to_seconds() const {
        return static_cast<double>(ticks) / static_cast<double>(ticks_per_second);
    }
    friend constexpr auto operator<=>(SimDuration, SimDuration) = default;
    friend constexpr SimDuration operator+(SimDuration a, SimDuration b) { return {a.ticks + b.ticks}; }
    friend constexpr SimDuration operator-(SimDuration a, SimDuration b) { return {a.ticks - b.ticks}; }
};

// A point in simulation time: ticks since the scenario's time origin.
struct SimTime {
    std::int64_t ticks = 0;

    static constexpr SimTime from_seconds(double s) { return {detail::seconds_to_ticks(s)}; }
    // "Never": later than any time a scenario can reach.
    static constexpr SimTime max() { return {INT64_MAX}; }
    constexpr double to_seconds() const {
        return static_cast<double>(ticks) / static_cast<double>(ticks_per_second);
    }
    friend constexpr auto operator<=>(SimTime, SimTime) = default;
    friend constexpr SimTime operator+(SimTime t, SimDuration d) { return {t.ticks + d.ticks}; }
    friend constexpr SimTime operator-(SimTime t, SimDuration d) { return {t.ticks - d.ticks}; }
    friend constexpr SimDuration operator-(SimTime a, SimTime b) { return {a.ticks - b.ticks}; }
};

// "12.345 s", exact (no double round trip); for messages.
inline std::string to_string(SimTime t) {
    const bool negative = t.ticks < 0;
    // Work in unsigned so that INT64_MIN does not overflow on negation.
    const std::uint64_t mag = negative ? 0 - static_cast<std::uint64_t>(t.ticks)
                                       : static_cast<std::uint64_t>(t.ticks);
    const std::uint64_t tps = static_cast<std::uint64_t>(ticks_per_second);
    static_assert(ticks_per_second == 1000, "three decimals below assume 1 ms ticks");
    const std::string frac = std::to_string(mag % tps);
    // Built by appending: GCC 12 warns falsely (-Wrestrict) on `"literal" + std::string&&`.
    std::string out = negative ? "-" : "";
    out += std::to_string(mag / tps);
    out += '.';
    out.append(3 - frac.size(), '0');
    out += frac;
    out += " s";
    return out;
}

}  // namespace knockon
