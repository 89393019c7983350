#include "models/units.hpp"

#include <charconv>
#include <cmath>
#include <cstdio>
#include <string>
#include <utility>
#include <vector>

namespace knockon {

namespace {

constexpr double kmh = 1.0 / 3.6;  // 1 km/h in m/s

struct UnitFactor {
    const char* name;
    double factor;  // SI value of one unit
};

// Accepted spellings per quantity, after normalisation (see normalise_unit).  The first few
// entries of each list are the ones named in messages; later ones are accepted variants.
std::vector<UnitFactor> units_of(Quantity q) {
    switch (q) {
        case Quantity::length: return {{"m", 1.0}, {"km", 1000.0}};
        case Quantity::speed: return {{"km/h", kmh}, {"m/s", 1.0}};
        case Quantity::mass: return {{"kg", 1.0}, {"t", 1000.0}};
        case Quantity::force: return {{"N", 1.0}, {"daN", 10.0}, {"kN", 1000.0}};
        case Quantity::power: return {{"W", 1.0}, {"kW", 1e3}, {"MW", 1e6}};
        case Quantity::acceleration: return {{"m/s2", 1.0}};
        case Quantity::duration: return {{"s", 1.0}, {"min", 60.0}, {"h", 3600.0}};
        case Quantity::gradient: return {{"per mille", 1e-3}, {"%", 1e-2}};
        case Quantity::share: return {{"%", 1e-2}};
        // Davis B: force per speed.  1 daN/(km/h) = 10 N / (1/3.6 m/s) = 36 N s/m.
        case Quantity::davis_b:
            return {{"N/(m/s)", 1.0},        {"N s/m", 1.0},         {"daN/(km/h)", 10.0 / kmh},
                    {"kN/(km/h)", 1e3 / kmh}, {"N/(km/h)", 1.0 / kmh}};
        // Davis C: force per speed squared.  1 daN/(km/h)^2 = 10 * 3.6^2 = 129.6 N s^2/m^2.
        case Quantity::davis_c:
            return {{"N/(m/s)2", 1.0},
                    {"N s2/m2", 1.0},
                    {"daN/(km/h)2", 10.0 / (kmh * kmh)},
                    {"kN/(km/h)2", 1e3 / (kmh * kmh)},
                    {"N/(km/h)2", 1.0 / (kmh * kmh)}};
        case Quantity::dimensionless: return {};
    }
    return {};
}

std::string_view trim(std::string_view s) {
    while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
    return s;
}

// One spelling per unit: runs of blanks become one blank, "^2" and the superscript "²" become
// "2", the per-mille sign becomes "per mille".  So "m/s^2", "m/s²" and "m/s2" are one unit.
std::string normalise_unit(std::string_view u) {
    std::string out;
    std::string_view rest = u;
    while (!rest.empty()) {
        if (rest.substr(0, 2) == "^2") {
            out += '2';
            rest.remove_prefix(2);
        } else if (rest.substr(0, 2) == "\xC2\xB2") {  // U+00B2 superscript two
            out += '2';
            rest.remove_prefix(2);
        } else if (rest.substr(0, 3) == "\xE2\x80\xB0") {  // U+2030 per mille sign
            out += "per mille";
            rest.remove_prefix(3);
        } else if (rest.front() == ' ' || rest.front() == '\t') {
            if (!out.empty() && out.back() != ' ') out += ' ';
            rest.remove_prefix(1);
        } else {
            out += rest.front();
            rest.remove_prefix(1);
        }
    }
    while (!out.empty() && out.back() == ' ') out.pop_back();
    return out;
}

// Longest leading part of s that from_chars reads as a number; returns (value, characters used),
// characters used 0 when there is no number.  A leading '+' is allowed for symmetry with '-'.
std::pair<double, std::size_t> leading_number(std::string_view s) {
    std::size_t skip = 0;
    if (!s.empty() && s.front() == '+') {
        skip = 1;
        // "+-5" is not a number.
        if (s.size() > 1 && s[1] == '-') return {0.0, 0};
    }
    double v = 0.0;
    const char* first = s.data() + skip;
    const char* last = s.data() + s.size();
    auto [ptr, ec] = std::from_chars(first, last, v, std::chars_format::general);
    if (ec == std::errc::result_out_of_range) return {HUGE_VAL, static_cast<std::size_t>(ptr - s.data())};
    if (ec != std::errc() || ptr == first) return {0.0, 0};
    return {v, static_cast<std::size_t>(ptr - s.data())};
}

}  // namespace

const char* describe(Quantity q) {
    switch (q) {
        case Quantity::length: return "a length";
        case Quantity::speed: return "a speed";
        case Quantity::mass: return "a mass";
        case Quantity::force: return "a force";
        case Quantity::power: return "a power";
        case Quantity::acceleration: return "an acceleration";
        case Quantity::duration: return "a duration";
        case Quantity::gradient: return "a gradient";
        case Quantity::share: return "a share";
        case Quantity::davis_b: return "a Davis B coefficient";
        case Quantity::davis_c: return "a Davis C coefficient";
        case Quantity::dimensionless: return "a plain number";
    }
    return "a quantity";
}

std::string accepted_units(Quantity q) {
    if (q == Quantity::dimensionless) return "no unit";
    if (q == Quantity::acceleration) return "m/s2 or m/s^2";
    const auto units = units_of(q);
    std::string out;
    for (std::size_t i = 0; i < units.size(); ++i) {
        if (i > 0) out += (i + 1 == units.size()) ? " or " : ", ";
        out += units[i].name;
    }
    return out;
}

double parse_number(std::string_view text) {
    const std::string_view t = trim(text);
    auto [value, used] = leading_number(t);
    if (used == 0 || used != t.size())
        throw UnitError("\"" + std::string(text) + "\" is not a number");
    if (!std::isfinite(value))
        throw UnitError("\"" + std::string(text) + "\" is not a finite number");
    return value;
}

double parse_quantity(std::string_view text, Quantity q) {
    const std::string_view t = trim(text);
    auto [value, used] = leading_number(t);
    if (used == 0)
        throw UnitError("\"" + std::string(text) + "\" does not start with a number; " +
                        describe(q) + " is written like \"12.5 " +
                        (q == Quantity::dimensionless ? std::string() : units_of(q).front().name) +
                        "\"");
    if (!std::isfinite(value))
        throw UnitError("\"" + std::string(text) + "\" is not a finite number");
    const std::string unit = normalise_unit(t.substr(used));
    if (q == Quantity::dimensionless) {
        if (!unit.empty())
            throw UnitError("\"" + std::string(text) + "\" should be a plain number without a unit");
        return value;
    }
    if (unit.empty())
        throw UnitError("\"" + std::string(text) + "\" has no unit; " + describe(q) +
                        " needs one of " + accepted_units(q));
    for (const auto& u : units_of(q)) {
        if (unit != u.name) continue;
        double si = value * u.factor;
        // Lengths snap to a micrometre grid so that "14.1 km" and "14100 m" give the same
        // double: track ends and junctions are compared for equality downstream.
        if (q == Quantity::length) si = std::round(si * 1e6) / 1e6;
        // "1e308 t" is a finite number but 1e311 kg is not, nor 1e303 m on the micrometre grid:
        // every value past this point is a finite SI number (models/input_ranges then bounds
        // each field to its plausible range).
        if (!std::isfinite(si))
            throw UnitError("\"" + std::string(text) + "\" is too large to compute with (" + describe(q) +
                            " of that size is not a finite number in SI units)");
        return si;
    }
    throw UnitError("unknown unit \"" + unit + "\" for " + describe(q) + "; use " +
                    accepted_units(q));
}

double unit_factor(Quantity q, std::string_view unit) {
    if (q == Quantity::dimensionless && unit.empty()) return 1.0;
    const std::string u = normalise_unit(unit);
    for (const auto& f : units_of(q))
        if (u == f.name) return f.factor;
    throw UnitError("unknown unit \"" + u + "\" for " + describe(q));
}

double parse_time_of_day(std::string_view text) {
    const std::string_view t = trim(text);
    auto bad = [&]() {
        return UnitError("\"" + std::string(text) +
                         "\" is not a time of day; write HH:MM or HH:MM:SS, e.g. \"06:15\"");
    };
    // Split into 2 or 3 fields of digits only.
    std::vector<std::string_view> fields;
    std::size_t start = 0;
    for (std::size_t i = 0; i <= t.size(); ++i) {
        if (i == t.size() || t[i] == ':') {
            fields.push_back(t.substr(start, i - start));
            start = i + 1;
        }
    }
    if (fields.size() < 2 || fields.size() > 3) throw bad();
    long values[3] = {0, 0, 0};
    for (std::size_t i = 0; i < fields.size(); ++i) {
        const auto f = fields[i];
        if (f.empty() || f.size() > 2 || (i > 0 && f.size() != 2)) throw bad();
        for (char c : f)
            if (c < '0' || c > '9') throw bad();
        std::from_chars(f.data(), f.data() + f.size(), values[i]);  // digits only: cannot fail
    }
    if (values[1] > 59 || values[2] > 59)
        throw UnitError("\"" + std::string(text) + "\": minutes and seconds must be below 60");
    return static_cast<double>(values[0] * 3600 + values[1] * 60 + values[2]);
}

std::string format_time_of_day(double seconds) {
    if (!std::isfinite(seconds)) return "--:--:--";
    long long s = std::llround(seconds);
    const bool negative = s < 0;
    if (negative) s = -s;
    char buf[48];
    std::snprintf(buf, sizeof buf, "%s%02lld:%02lld:%02lld", negative ? "-" : "", s / 3600,
                  (s / 60) % 60, s % 60);
    return buf;
}

std::string format_km(double metres) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.3f", metres / 1000.0);
    std::string s = buf;
    // "14.100" -> "14.1", "36.000" -> "36"
    while (!s.empty() && s.back() == '0') s.pop_back();
    if (!s.empty() && s.back() == '.') s.pop_back();
    if (s == "-0") s = "0";
    return s + " km";
}

std::string format_metres(double metres) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%g m", metres);
    return buf;
}

}  // namespace knockon
