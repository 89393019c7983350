#include "tools/read/delay_fields.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <utility>

#include "models/input_ranges.hpp"
#include "models/units.hpp"

namespace knockon::yamlio {
namespace {

// "20 %" for messages.
std::string percent(double share) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%g %%", share * 100.0);
    return buf;
}

std::string seconds(double s) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%g s", s);
    return buf;
}

// [[p, delay], ...]: p from 0 % to 100 %, strictly increasing; delays not negative, never
// decreasing (a quantile function).
bool read_quantiles(ErrorList& errors, const MapFields& f, std::vector<std::pair<double, double>>& out) {
    auto seq = f.sequence("quantiles", true);
    if (!seq) return false;
    const std::string path = f.path_of("quantiles");
    if (seq->size() < 2) {
        f.error("quantiles", "at least two rows are needed, the first at 0 % and the last at 100 %");
        return false;
    }
    bool ok = true;
    std::optional<double> prev_p, prev_v;
    for (std::size_t i = 0; i < seq->size(); ++i) {
        const YAML::Node row = std::as_const(*seq)[i];
        const std::string rp = item(path, i);
        if (!row.IsSequence() || row.size() != 2) {
            errors.add(row, rp, "each row is [share, delay], e.g. [50 %, 60 s]");
            ok = false;
            continue;
        }
        auto p = yamlio::quantity_of(errors, row[0], item(rp, 0), Quantity::share);
        auto v = ranged_cell(errors, row[1], item(rp, 1), Input::empirical_delay);
        if (!p || !v) {
            ok = false;
            continue;
        }
        // Snap rounding noise at the ends ("100 %" is exactly 1).
        if (std::abs(*p) < 1e-12) *p = 0.0;
        if (std::abs(*p - 1.0) < 1e-12) *p = 1.0;
        if (*p < 0.0 || *p > 1.0) {
            errors.add(row[0], item(rp, 0), "must lie between 0 % and 100 %, not " + percent(*p));
            ok = false;
        } else if (i == 0 && *p != 0.0) {
            errors.add(row[0], item(rp, 0), "the table must start at 0 %, not " + percent(*p));
            ok = false;
        } else if (i + 1 == seq->size() && *p != 1.0) {
            errors.add(row[0], item(rp, 0), "the table must end at 100 %, not " + percent(*p));
            ok = false;
        }
        if (prev_p && *p <= *prev_p) {
            errors.add(row[0], item(rp, 0),
                        "rows must be sorted by share, strictly increasing: " + percent(*p) +
                            " follows " + percent(*prev_p));
            ok = false;
        }
        if (*v < 0.0) {
            errors.add(row[1], item(rp, 1), "must not be negative");
            ok = false;
        } else if (prev_v && *v < *prev_v) {
            errors.add(row[1], item(rp, 1),
                        "delays must not decrease as the share grows: " + seconds(*v) + " follows " +
                            seconds(*prev_v));
            ok = false;
        }
        prev_p = p;
        prev_v = v;
        out.emplace_back(*p, *v);
    }
    if (!ok) out.clear();
    return ok;
}

// window: ["06:00", "22:00"]: the disruption starts at a time drawn uniformly in it.
bool read_window(ErrorList& errors, const MapFields& f, DisruptionRule& rule) {
    auto seq = f.sequence("window", true);
    if (!seq) return false;
    const std::string path = f.path_of("window");
    if (seq->size() != 2) {
        f.error("window", "expected two times of day, e.g. [\"06:00\", \"22:00\"]");
        return false;
    }
    std::optional<double> t[2];
    for (std::size_t k = 0; k < 2; ++k) {
        const YAML::Node n = std::as_const(*seq)[k];
        if (auto text = scalar_text(errors, n, item(path, k))) {
            try {
                t[k] = parse_time_of_day(*text);
                if (auto problem = range_problem(Input::time_of_day, *t[k])) {
                    errors.add(n, item(path, k), *problem);
                    t[k].reset();
                }
            } catch (const UnitError& e) {
                errors.add(n, item(path, k), e.what());
            }
        }
    }
    if (!t[0] || !t[1]) return false;
    if (*t[1] <= *t[0]) {
        errors.add(std::as_const(*seq)[1], item(path, 1),
                   "the window must end after it starts: " + format_time_of_day(*t[1]) + " is not after " +
                       format_time_of_day(*t[0]));
        return false;
    }
    rule.window_from = *t[0];
    rule.window_to = *t[1];
    return true;
}

}  // namespace

// `distribution` and the parameters of that kind, no others.
bool read_distribution(ErrorList& errors, const MapFields& f, DelayDistribution& d) {
    auto kind = f.choice("distribution", {"exponential", "weibull", "lognormal", "gamma", "empirical"},
                         true);
    if (!kind) return false;
    std::vector<std::string_view> params;
    if (*kind == "exponential") {
        d.kind = DistributionKind::exponential;
        params = {"mean"};
    } else if (*kind == "weibull" || *kind == "gamma") {
        d.kind = *kind == "weibull" ? DistributionKind::weibull : DistributionKind::gamma;
        params = {"shape", "scale"};
    } else if (*kind == "lognormal") {
        d.kind = DistributionKind::lognormal;
        params = {"median", "sigma"};
    } else {
        d.kind = DistributionKind::empirical;
        params = {"quantiles"};
    }
    bool ok = true;
    std::string takes;
    for (auto p : params) takes += (takes.empty() ? "" : " and ") + std::string(p);
    for (std::string_view p : {"mean", "shape", "scale", "median", "sigma", "quantiles"}) {
        if (f.has(p) && std::find(params.begin(), params.end(), p) == params.end()) {
            f.error(p, std::string(p) + " does not belong to the " + *kind + " distribution, which takes " +
                           takes);
            ok = false;
        }
    }
    auto need = [&](std::string_view key, Input which, double& into) {
        if (auto v = ranged(f, key, which, true))
            into = *v;
        else
            ok = false;
    };
    switch (d.kind) {
        case DistributionKind::exponential: need("mean", Input::delay_duration, d.mean); break;
        case DistributionKind::weibull:
        case DistributionKind::gamma:
            need("shape", Input::delay_shape, d.shape);
            need("scale", Input::delay_duration, d.scale);
            break;
        case DistributionKind::lognormal:
            need("median", Input::delay_duration, d.median);
            need("sigma", Input::delay_sigma, d.sigma);
            break;
        case DistributionKind::empirical:
            if (!read_quantiles(errors, f, d.quantiles)) ok = false;
            break;
    }
    if (ok) {
        const std::string problem = d.size_problem();
        if (!problem.empty()) {
            errors.add(f.node(), f.path(), problem);
            ok = false;
        }
    }
    return ok;
}

void read_delay_rules(ErrorList& errors, const MapFields& m, std::string_view key, std::vector<DelayRule>& out,
                          const StationCheck& station_problem) {
    auto seq = m.sequence(key, false);
    if (!seq) return;
    const std::string path = m.path_of(key);
    for (std::size_t i = 0; i < seq->size(); ++i) {
        MapFields f(errors, std::as_const(*seq)[i], item(path, i),
                    {"category", "station", "probability", "distribution", "mean", "shape",
                     "scale", "median", "sigma", "quantiles"});
        if (!f.ok()) continue;
        DelayRule rule;
        bool ok = true;
        if (f.has("category")) {
            if (auto c = f.text("category", true))
                rule.category = *c;   // free text, as on the services
            else
                ok = false;
        }
        if (f.has("station")) {
            if (auto s = f.text("station", true)) {
                rule.station = *s;
                if (auto problem = station_problem(*s)) {
                    f.error("station", *problem);
                    ok = false;
                }
            } else {
                ok = false;
            }
        }
        if (f.has("probability")) {
            if (auto p = ranged(f, "probability", Input::probability, true))
                rule.distribution.probability = *p;
            else
                ok = false;
        }
        if (!read_distribution(errors, f, rule.distribution)) ok = false;
        if (ok) out.push_back(std::move(rule));
    }
}

void read_disruptions(ErrorList& errors, const MapFields& m, DisruptionPlacing placing, std::vector<DisruptionRule>& out,
                      const DisruptionPlaceCheck& place_problem) {
    auto seq = m.sequence("disruptions", false);
    if (!seq) return;
    const std::string path = m.path_of("disruptions");
    const bool line = placing == DisruptionPlacing::line;
    const std::string_view place_key = line ? "track" : "segment";
    for (std::size_t i = 0; i < seq->size(); ++i) {
        // Both place keys are known here, so the other form's is not just an "unknown key".
        MapFields f(errors, std::as_const(*seq)[i], item(path, i),
                    {"track", "segment", "from", "to", "daily_probability", "distribution", "mean", "shape",
                     "scale", "median", "sigma", "quantiles", "window"});
        if (!f.ok()) continue;
        // The other form's key gets a sentence saying why, and stands in for the missing one.
        const std::string_view other_key = line ? "segment" : "track";
        const bool other = f.has(other_key);
        bool ok = !other;
        if (other && line)
            f.error(other_key, "a line file places a disruption by `track` and chainage; `segment` (with offsets "
                               "along it) belongs to a network file (knockon: 2)");
        if (other && !line)
            f.error(other_key, "a network file places a disruption by `segment`, with `from` and `to` as offsets "
                               "from the segment's start; `track` (with chainage) belongs to a line file");
        DisruptionRule rule;
        auto place = other && !f.has(place_key) ? std::nullopt : f.text(place_key, true);
        auto from = f.quantity("from", Quantity::length, true);
        auto to = f.quantity("to", Quantity::length, true);
        auto p = ranged(f, "daily_probability", Input::probability, true);
        if (!place || !from || !to || !p) ok = false;
        if (line && from && to && *from >= *to) {
            f.error("to", "the range must end beyond its start: to " + km(*to) + " is not beyond from " + km(*from));
            ok = false;
        }
        if (place && !place_problem(f, *place, from, to)) ok = false;
        if (!read_distribution(errors, f, rule.duration)) ok = false;
        if (f.has("window") && !read_window(errors, f, rule)) ok = false;
        if (!ok) continue;
        (line ? rule.track : rule.segment) = *place;
        rule.from = *from;
        rule.to = *to;
        rule.daily_probability = *p;
        out.push_back(std::move(rule));
    }
}

}  // namespace knockon::yamlio
