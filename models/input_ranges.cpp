#include "models/input_ranges.hpp"

#include <cmath>
#include <cstdio>
#include <stdexcept>

namespace knockon {

namespace {

constexpr double kKmh = 1.0 / 3.6;   // m/s
constexpr double kMin = 60.0, kHour = 3600.0, kDay = 86400.0;
constexpr double kT = 1000.0;        // kg

const std::vector<InputRange> kRanges = {
    // Infrastructure
    {Input::line_length, "infrastructure.length, network.segments[].length", Quantity::length, 0.0, 1.0e6, true, "km",
     "one line per scenario; a plan's memory grows with its train-km (see Memory)"},
    {Input::gradient, "gradients[].value", Quantity::gradient, -0.1, 0.1, false, "per mille",
     "adhesion-worked main lines stay below about 40 per mille, a few lines reach about 90 (from memory)"},
    {Input::speed_limit, "speed_limits[].value, tracks[].speed_limit", Quantity::speed, 0.0, 500.0 * kKmh, true,
     "km/h", "above the fastest wheel-on-rail services, about 350 km/h (from memory)"},
    {Input::sighting_distance, "sighting_distance", Quantity::length, 0.0, 2000.0, false, "m",
     "a few hundred metres (from memory)"},
    {Input::overlap, "overlap", Quantity::length, 0.0, 1000.0, false, "m",
     "typically 50-200 m, up to 300 m on falling gradients (from memory)"},
    {Input::distant_distance, "distant_distance", Quantity::length, 0.0, 5000.0, true, "m",
     "a braking distance in rear of the signal, about 1-2 km (from memory)"},
    {Input::route_setup, "interlocking.route_setup", Quantity::duration, 0.0, 10.0 * kMin, false, "s",
     "mechanical interlockings take up to 120 s (Pachl, Systemtechnik des Schienenverkehrs, 2018)"},
    {Input::release, "interlocking.release", Quantity::duration, 0.0, 5.0 * kMin, false, "s",
     "a few seconds (common practice, no source)"},
    {Input::sight_reaction, "interlocking.sight_reaction", Quantity::duration, 0.0, 1.0 * kMin, false, "s",
     "usually 12 s (Pachl, as above)"},
    // Rolling stock
    {Input::train_length, "train_types[].length", Quantity::length, 0.0, 5000.0, true, "m",
     "the longest regular freight trains run 3-4 km (from memory); also no longer than the line"},
    {Input::mass, "train_types[].mass", Quantity::mass, 1.0 * kT, 50000.0 * kT, false, "t",
     "heavy-haul trains reach about 40 000 t (from memory)"},
    {Input::rotating_mass_factor, "rotating_mass_factor", Quantity::dimensionless, 1.0, 1.5, false, "",
     "1.04-1.12 for trainsets, loco-hauled trains and multiple units (Bosquet, PhD thesis, 2015)"},
    {Input::max_speed, "train_types[].max_speed", Quantity::speed, 0.0, 500.0 * kKmh, true, "km/h",
     "as speed limits"},
    {Input::max_force, "traction.max_force", Quantity::force, 0.0, 10.0e6, true, "kN",
     "several locomotives of 300-600 kN each (from memory)"},
    {Input::power, "traction.power", Quantity::power, 0.0, 100.0e6, true, "MW",
     "a high-speed trainset about 9 MW, several locomotives a few tens of MW (from memory)"},
    {Input::adhesion_mass, "traction.adhesion_mass", Quantity::mass, 0.0, 50000.0 * kT, true, "t",
     "as mass; also no more than the train's mass"},
    {Input::table_speed, "traction.table[][0], braking.deceleration[][0]", Quantity::speed, 0.0,
     500.0 * kKmh, false, "km/h", "as speed limits"},
    {Input::table_force, "traction.table[][1]", Quantity::force, 0.0, 10.0e6, false, "kN", "as max_force"},
    {Input::davis_a, "resistance.a", Quantity::force, 0.0, 1.0e6, false, "kN",
     "far above a heavy freight train's (16 kN for 1600 t; common practice, no source)"},
    {Input::davis_b, "resistance.b", Quantity::davis_b, 0.0, 1.0e4, false, "N/(m/s)",
     "as resistance.a"},
    {Input::davis_c, "resistance.c", Quantity::davis_c, 0.0, 1.0e3, false, "N/(m/s)2",
     "as resistance.a"},
    {Input::braking, "braking.deceleration", Quantity::acceleration, 0.0, 3.0, true, "m/s2",
     "wheel-rail adhesion gives at most about 0.33 g = 3.25 m/s2 at standstill (Curtius-Kniffler)"},
    {Input::brake_delay, "braking.delay", Quantity::duration, 0.0, 2.0 * kMin, false, "s",
     "a long air-braked freight train takes up to about a minute (from memory)"},
    {Input::performance, "performance", Quantity::share, 0.0, 1.0, true, "%", "a share of the tractive effort"},
    {Input::min_dwell, "min_dwell", Quantity::duration, 0.0, 2.0 * kHour, false, "min",
     "of a train type or a call: dwells last seconds to minutes, a longer wait belongs in the timetable's times (common practice, no source)"},
    {Input::supplement_share, "supplement.percent", Quantity::share, 0.0, 1.0, false, "%",
     "3-7 % by UIC Code 451-1"},
    {Input::supplement_per_100km, "supplement.per_100km", Quantity::duration, 0.0, 10.0 * kMin, false, "min",
     "1-1.5 min per 100 km by UIC Code 451-1"},
    {Input::supplement_threshold, "supplement.threshold", Quantity::length, 0.0, 1.0e6, false, "km",
     "as the line length"},
    {Input::rounding, "timetable.rounding", Quantity::duration, 0.0, 1.0 * kHour, true, "s",
     "timetables round to 6 s, 30 s or a minute (common practice, no source)"},
    {Input::time_of_day, "arr, dep, pass, repeat.until, window", Quantity::duration, 0.0, 30.0 * kHour,
     false, "HH:MM", "one operating day with after-midnight running up to 06:00 next morning (common practice, no source)"},
    {Input::repeat_every, "repeat.every", Quantity::duration, 1.0 * kMin, kDay, false, "min",
     "clock-face patterns run every few minutes to every few hours"},
    {Input::entry_speed, "enter.speed", Quantity::speed, 0.0, 500.0 * kKmh, true, "km/h", "as speed limits"},
    {Input::link_time, "links[].turnaround, transfer, crew_change", Quantity::duration, 0.0, 12.0 * kHour, false, "min",
     "turnarounds and transfers take minutes, a crew's break between two workings a few hours (common practice, no source)"},
    {Input::link_wait, "links[].max_wait", Quantity::duration, 0.0, 2.0 * kHour, false, "min",
     "a connecting train waits minutes for a late feeder, rarely more than half an hour (common practice, no source)"},
    {Input::probability, "probability, daily_probability", Quantity::share, 0.0, 1.0, false, "%", "a share"},
    {Input::delay_duration, "mean, scale, median", Quantity::duration, 0.0, kDay, true,
     "min", "of delays and disruptions: within a day; their mean and 99.9 % quantile must stay within a day as well"},
    {Input::delay_shape, "shape", Quantity::dimensionless, 0.1, 100.0, false, "",
     "Weibull and gamma: fitted shapes lie between about 0.5 and 5 (Yuan, Goverde & Hansen 2006)"},
    {Input::delay_sigma, "sigma", Quantity::dimensionless, 0.0, 5.0, true, "",
     "log-normal: as shape"},
    {Input::empirical_delay, "quantiles[][1]", Quantity::duration, 0.0, kDay, false, "min",
     "empirical delays: within a day"},
    {Input::dispatch_weight, "dispatching.weights", Quantity::dimensionless, 0.0, 100.0, true, "",
     "what a minute of delay to a category counts for against others; 1 where not given (common practice, no source)"},
};

std::string number(double v) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%g", v);
    return buf;
}

}  // namespace

const std::vector<InputRange>& input_ranges() { return kRanges; }

const InputRange& input_range(Input which) {
    for (const InputRange& r : kRanges)
        if (r.input == which) return r;
    throw std::logic_error("input_range: no entry for this input");
}

std::string value_text(const InputRange& r, double si) {
    if (std::string(r.unit) == "HH:MM") {
        if (!std::isfinite(si)) return number(si);
        std::string t = format_time_of_day(si);   // HH:MM:SS
        if (t.size() >= 3 && t.compare(t.size() - 3, 3, ":00") == 0) t.resize(t.size() - 3);
        return t;
    }
    const double v = si / unit_factor(r.quantity, r.unit);
    const std::string unit = r.unit;
    if (unit.empty()) return number(v);
    return number(v) + " " + unit;
}

std::string range_text(const InputRange& r) {
    if (r.min_open) return "more than " + value_text(r, r.min) + " and at most " + value_text(r, r.max);
    return "between " + value_text(r, r.min) + " and " + value_text(r, r.max);
}

std::optional<std::string> range_problem(Input which, double si) {
    const InputRange& r = input_range(which);
    const bool low = r.min_open ? !(si > r.min) : !(si >= r.min);
    if (!low && si <= r.max) return std::nullopt;
    return "must be " + range_text(r) + " (README, input ranges), not " + value_text(r, si);
}

}  // namespace knockon
