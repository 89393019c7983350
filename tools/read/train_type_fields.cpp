#include "tools/read/train_type_fields.hpp"

#include <utility>

#include "models/input_ranges.hpp"
#include "models/train_type_checks.hpp"

namespace knockon::yamlio {
namespace {

// [[speed, value], ...] sorted by speed, strictly ascending.
std::optional<std::vector<std::pair<double, double>>> read_table(ErrorList& errors, const YAML::Node& n,
                                                                 const std::string& path, Input which) {
    if (!n.IsSequence()) {
        errors.add(n, path, "expected a table: a list of [speed, value] rows");
        return std::nullopt;
    }
    if (n.size() == 0) {
        errors.add(n, path, "the table has no rows");
        return std::nullopt;
    }
    std::vector<std::pair<double, double>> rows;
    bool ok = true;
    for (std::size_t i = 0; i < n.size(); ++i) {
        const YAML::Node row = n[i];
        const std::string rp = item(path, i);
        if (!row.IsSequence() || row.size() != 2) {
            errors.add(row, rp, "each row is [speed, value], e.g. [60 km/h, 120 kN]");
            ok = false;
            continue;
        }
        auto v = ranged_cell(errors, row[0], item(rp, 0), Input::table_speed);
        auto y = ranged_cell(errors, row[1], item(rp, 1), which);
        if (!v || !y) {
            ok = false;
            continue;
        }
        if (!rows.empty() && *v <= rows.back().first) {
            errors.add(row[0], item(rp, 0),
                       "rows must be sorted by speed, ascending: " + kmh(*v) + " follows " + kmh(rows.back().first));
            ok = false;
        }
        rows.emplace_back(*v, *y);
    }
    if (!ok) return std::nullopt;
    return rows;
}

void read_traction(ErrorList& errors, const MapFields& f, TrainType& tt) {
    MapFields t(errors, f.get("traction"), f.path_of("traction"), {"max_force", "power", "table", "adhesion_mass"});
    if (!t.ok()) return;
    if (auto v = ranged(t, "max_force", Input::max_force, false)) tt.max_force = *v;
    if (auto v = ranged(t, "power", Input::power, false)) tt.power = *v;
    if (auto v = ranged(t, "adhesion_mass", Input::adhesion_mass, false)) {
        // Only the weight on driven wheels gives adhesion: part of the train at most.
        if (tt.mass > 0.0 && *v > tt.mass)
            t.error("adhesion_mass", "the adhesion mass (" + value_text(input_range(Input::mass), *v) +
                                         ") is more than the train's mass (" +
                                         value_text(input_range(Input::mass), tt.mass) + ")");
        else
            tt.adhesion_mass = *v;
    }
    const bool envelope = t.has("max_force") || t.has("power");
    if (t.has("table")) {
        if (envelope) errors.add(t.node(), t.path(), "give either a table or max_force/power, not both");
        if (auto table = read_table(errors, t.get("table"), t.path_of("table"), Input::table_force))
            tt.force_table = *table;
    } else if (!envelope) {
        errors.add(t.node(), t.path(), "give max_force and/or power, or a table [[speed, force], ...]");
    }
}

void read_braking(ErrorList& errors, const MapFields& f, TrainType& tt) {
    MapFields b(errors, f.get("braking"), f.path_of("braking"), {"deceleration", "delay"});
    if (!b.ok()) return;
    if (b.require("deceleration")) {
        const YAML::Node d = b.get("deceleration");
        if (d.IsSequence()) {
            if (auto table = read_table(errors, d, b.path_of("deceleration"), Input::braking)) tt.braking_table = *table;
        } else if (auto v = ranged(b, "deceleration", Input::braking, true)) {
            tt.braking = *v;
        }
    }
    if (auto v = ranged(b, "delay", Input::brake_delay, false)) tt.brake_delay = *v;
}

}  // namespace

TrainTypeList read_train_types(ErrorList& errors, const MapFields& top, const YAML::Node& seq,
                               std::optional<double> longest) {
    TrainTypeList out;
    const std::string path = top.path_of("train_types");
    if (seq.size() == 0) top.error("train_types", "at least one train type is needed");
    for (std::size_t i = 0; i < seq.size(); ++i) {
        MapFields f(errors, seq[i], item(path, i),
                    {"id", "length", "mass", "rotating_mass_factor", "max_speed", "traction", "resistance",
                     "braking", "performance", "min_dwell", "supplement"});
        if (!f.ok()) continue;
        const std::size_t errors_before = errors.size();
        TrainType tt;
        auto id = f.text("id", true);
        if (auto v = ranged(f, "length", Input::train_length, true)) {
            tt.length = *v;
            if (longest && *v > *longest)
                f.error("length", "the train (" + km(*v) + ") is longer than the whole line (" + km(*longest) + ")");
        }
        if (auto v = ranged(f, "mass", Input::mass, true)) tt.mass = *v;
        // At least 1: rotating parts add to the mass to accelerate, never subtract.
        if (auto v = ranged(f, "rotating_mass_factor", Input::rotating_mass_factor, false))
            tt.rotating_mass_factor = *v;
        if (auto v = ranged(f, "max_speed", Input::max_speed, true)) tt.max_speed = *v;
        if (f.require("traction")) read_traction(errors, f, tt);
        if (f.require("resistance")) {
            MapFields r(errors, f.get("resistance"), f.path_of("resistance"), {"a", "b", "c"});
            if (auto v = ranged(r, "a", Input::davis_a, true)) tt.davis_a = *v;
            if (auto v = ranged(r, "b", Input::davis_b, false)) tt.davis_b = *v;
            if (auto v = ranged(r, "c", Input::davis_c, false)) tt.davis_c = *v;
        }
        if (f.require("braking")) read_braking(errors, f, tt);
        if (auto v = ranged(f, "performance", Input::performance, false)) tt.performance = *v;
        if (auto v = ranged(f, "min_dwell", Input::min_dwell, false)) tt.min_dwell = *v;
        if (f.has("supplement")) {
            MapFields s(errors, f.get("supplement"), f.path_of("supplement"), {"percent", "per_100km", "threshold"});
            if (auto v = ranged(s, "percent", Input::supplement_share, false)) tt.supplement.share = *v;
            if (auto v = ranged(s, "per_100km", Input::supplement_per_100km, false)) tt.supplement.per_100km = *v;
            if (auto v = ranged(s, "threshold", Input::supplement_threshold, false))
                tt.supplement.distance_threshold = *v;
        }
        // A type read without errors must also be able to run: start and get going on level
        // track (climbs are each service's own, checked when it is planned).
        if (errors.size() == errors_before) {
            const std::string problem = level_track_problem(tt);
            if (!problem.empty()) f.error("traction", "train type " + id.value_or("") + " " + problem);
        }
        if (!id) continue;
        if (auto it = out.lines.find(*id); it != out.lines.end()) {
            f.error("id", "train type id \"" + *id + "\" is used twice (first at line " + std::to_string(it->second) + ")");
            continue;
        }
        tt.id = *id;
        out.where[tt.id] = location(errors.file(), f.node().Mark(), f.path());
        out.lines[tt.id] = line_of(f.get("id"));
        out.ids.push_back(tt.id);
        out.types.push_back(tt);
    }
    return out;
}

}  // namespace knockon::yamlio
