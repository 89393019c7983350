#pragma once
// Quantities with units, as written in scenario files ("120 km/h", "6 per mille", "06:15").
// This is the one place where units are understood; everything past it is SI:
// m, m/s, kg, N, W, m/s^2, s, and ratios for gradients and shares (6 per mille -> 0.006).
#include <stdexcept>
#include <string>
#include <string_view>

namespace knockon {

enum class Quantity {
    length,
    speed,
    mass,
    force,
    power,
    acceleration,
    duration,
    gradient,      // ratio, "6 per mille" -> 0.006, "0.5 %" -> 0.005
    share,         // ratio, "95 %" -> 0.95
    davis_b,       // N s/m
    davis_c,       // N s^2/m^2
    dimensionless  // a bare number, no unit
};

// "a speed", "a length", ... for messages.
const char* describe(Quantity q);
// The units accepted for q, e.g. "km/h or m/s".
std::string accepted_units(Quantity q);

struct UnitError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// A finite decimal number, the whole of `text` (surrounding blanks allowed).  std::from_chars:
// "010" is ten (no octal), "yes", "0x10", "nan" and "inf" are refused.
double parse_number(std::string_view text);

// "<number> <unit>" (blank between them optional) converted to SI; throws UnitError, also when
// the value is too large to be finite in SI ("1e308 t" is 1e311 kg).
double parse_quantity(std::string_view text, Quantity q);

// The SI value of one `unit` of q ("km" of a length: 1000); throws UnitError for a unit q does
// not accept.  A dimensionless quantity has the unit "" (factor 1).
double unit_factor(Quantity q, std::string_view unit);

// "HH:MM" or "HH:MM:SS" as seconds after midnight; hours may exceed 23 (after-midnight running).
double parse_time_of_day(std::string_view text);

// Seconds after midnight as "HH:MM:SS", rounded to the nearest second; hours go past 23.
std::string format_time_of_day(double seconds);

// A chainage or length in metres as input messages write it: km with at most three decimals and
// no trailing zeros ("14.1 km", "36 km").
std::string format_km(double metres);
// An offset or length in metres as a network's messages write it ("%g m": "450 m", "1200.5 m").
std::string format_metres(double metres);

}  // namespace knockon
