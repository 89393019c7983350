#pragma once
// The plausible range of every number a scenario gives, in one table (README, "Input ranges").
//
// A value outside its range is almost surely a typing mistake (a unit slip, a stray exponent),
// and past the range the models would compute infinities, negative times or runs that never end.
// The bounds are wide: they refuse the absurd, not the unusual.  Readers check each field against
// its entry here and say which range it broke; nothing else in the program re-states a bound.
#include <optional>
#include <string>
#include <vector>

#include "models/units.hpp"

namespace knockon {

enum class Input {
    line_length,
    gradient,
    speed_limit,
    sighting_distance,
    overlap,
    distant_distance,
    route_setup,
    release,
    sight_reaction,
    train_length,
    mass,
    rotating_mass_factor,
    max_speed,
    max_force,
    power,
    adhesion_mass,
    table_speed,
    table_force,
    davis_a,
    davis_b,
    davis_c,
    braking,
    brake_delay,
    performance,
    min_dwell,
    supplement_share,
    supplement_per_100km,
    supplement_threshold,
    rounding,
    time_of_day,
    repeat_every,
    entry_speed,
    link_time,
    link_wait,
    probability,
    delay_duration,
    delay_shape,
    delay_sigma,
    empirical_delay,
    dispatch_weight,
};

struct InputRange {
    Input input;
    const char* fields;    // where the scenario gives it, as README names them
    Quantity quantity;     // duration for times of day
    double min, max;       // SI
    bool min_open;         // min itself is refused (a value must be more than min)
    const char* unit;      // unit the range is shown in ("" for plain numbers, "HH:MM" for times of day)
    const char* basis;     // why these bounds
};

// The whole table, in README order.
const std::vector<InputRange>& input_ranges();
const InputRange& input_range(Input which);

// "between 0 s and 600 s", "more than 0 m and at most 5000 m", "between 00:00 and 30:00".
std::string range_text(const InputRange& r);
// A value in the range's unit: "1e+308 s", "120 km/h", "47:00".
std::string value_text(const InputRange& r, double si);
// Nothing when `si` lies in the range, else "must be between ... (input ranges), not ...".
std::optional<std::string> range_problem(Input which, double si);

// Primary delays and disruption durations: the mean and the 99.9 % quantile of a delay must stay
// within a day, else one draw may outlast the simulated day (README, "Input ranges").
inline constexpr double kDelayQuantileChecked = 0.999;
inline constexpr double kLongestDelay = 86400.0;   // [s]

}  // namespace knockon
