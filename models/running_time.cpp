#include "models/running_time.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <stdexcept>
#include <string>

#include "models/full_power_curve.hpp"
#include "models/motion.hpp"

namespace knockon {
namespace {

std::string describe(const TrainType& type) { return "train type '" + type.id + "'"; }

std::string metres(double s) {
    std::ostringstream out;
    out.precision(1);
    out << std::fixed << s << " m";
    return out.str();
}

void check_type(const TrainType& type) {
    auto fail = [&](const std::string& what) { throw std::invalid_argument(describe(type) + ": " + what); };
    if (!(type.mass > 0.0) || !std::isfinite(type.mass)) fail("mass must be positive");
    if (!(type.rotating_mass_factor > 0.0) || !std::isfinite(type.rotating_mass_factor))
        fail("rotating mass factor must be positive");
    if (!(type.max_speed > 0.0) || !std::isfinite(type.max_speed)) fail("max speed must be positive");
    if (!(type.length >= 0.0) || !std::isfinite(type.length)) fail("length must not be negative");
}

// A lower bound on the acceleration step_w can use in a cell of at most `max_ds` started at a
// speed of at least kBoundFrom: least tractive effort, most resistance over every speed the
// midpoint can reach.  Where even this bound carries the train above the braking envelope, the
// cell ends on the envelope whatever step_w gives, so braking cells skip the force evaluation
// and the result is the same to the last bit.
struct AccelBound {
    static constexpr double kBoundFrom = 1.0;   // [m/s]; below it power curves are unbounded
    double base = -std::numeric_limits<double>::infinity();   // at level track [m/s^2]
    double per_gradient = 0.0;                                 // g / rho

    AccelBound(const TrainType& type, double max_ds) {
        const double mass = type.rotating_mass_factor * type.mass;
        // Most force at or above kBoundFrom (the midpoint speed is not below the start speed
        // when accelerating, and the bound matters only then), least force at any speed.
        double f_hi = 0.0, f_lo = 0.0;
        if (!type.force_table.empty()) {
            for (const auto& p : type.force_table) {
                f_hi = std::max(f_hi, p.second);
                f_lo = std::min(f_lo, p.second);
            }
        } else if (type.max_force > 0.0 || type.power > 0.0) {
            const double cap = type.max_force > 0.0 ? type.max_force : std::numeric_limits<double>::infinity();
            f_hi = std::min(cap, type.power > 0.0 ? type.power / kBoundFrom : cap);
        }
        const double perf = std::max(type.performance, 0.0);
        f_hi *= perf;
        f_lo *= perf;
        if (!std::isfinite(f_hi) || !(mass > 0.0)) return;   // no bound: never skip
        // The midpoint speed reaches at most sqrt(v_max^2 + a_hi ds) (v0 is under the limits).
        const double v_hi = std::sqrt(type.max_speed * type.max_speed + f_hi / mass * max_ds) + 1.0;
        double r_hi = std::max(type.resistance(0.0), type.resistance(v_hi));
        if (type.davis_c < 0.0) {
            const double vertex = -type.davis_b / (2.0 * type.davis_c);
            if (vertex > 0.0 && vertex < v_hi) r_hi = std::max(r_hi, type.resistance(vertex));
        }
        base = (f_lo - r_hi) / mass;
        per_gradient = type.mass * kGravity / mass;
    }

    // True when a cell of length ds from v0 on `gradient` surely ends at or above `envelope`.
    bool reaches(double v0, double gradient, double ds, double envelope) const {
        if (!(v0 >= kBoundFrom)) return false;
        const double a = base - per_gradient * gradient;
        const double w = v0 * v0 + 2.0 * a * ds;
        const double target = envelope * envelope;
        // A relative margin far above rounding keeps the test on the safe side.
        return w - 1e-9 * (v0 * v0 + target + 1.0) >= target;
    }
};

// Walks a path profile (gradient or speed limit) with ascending look-ups in amortised O(1), the
// same value as PathProfile::at.
class ProfileCursor {
public:
    explicit ProfileCursor(const PathProfile& profile) : profile_(profile) {}
    double at(double pos) {
        const auto& s = profile_.s;
        while (i_ + 1 < s.size() && s[i_ + 1] <= pos) ++i_;
        while (i_ > 0 && s[i_] > pos) --i_;
        return profile_.value[i_];
    }

private:
    const PathProfile& profile_;
    std::size_t i_ = 0;
};

// The distance grid: points s0 + i*step, the last one at s_end exactly (its cell may be short).
struct Grid {
    double s0, step, s_end;
    std::size_t cells;
    double at(std::size_t i) const { return i >= cells ? s_end : s0 + static_cast<double>(i) * step; }
    double length(std::size_t i) const { return at(i + 1) - at(i); }
};

// Static limit per point with the tail rule, written into `out` (size cells + 1).
//
// Each cell [s_k, s_k+1] gets the lowest limit sampled just inside both its ends, so a change
// that falls exactly on a grid point (the usual case with whole-metre data) is placed exactly
// and one inside a cell is taken at the conservative end.  The head over cell i with the tail
// rule needs the minimum over the cells the train touches, [s_i - length, s_i+1]: with a
// uniform step that is a fixed-width window of m + 1 cells, m = ceil(length / step).  The tail
// behind the start of the layout takes the limit at its first point.  A point's limit is the
// smaller of its two neighbouring cells', because speed is monotone within a cell.
void static_limits(const TrainType& type, const TrainPath& path, const Grid& grid, std::vector<double>& out) {
    const std::size_t m = static_cast<std::size_t>(std::ceil(type.length / grid.step - 1e-9));
    const std::size_t total = m + grid.cells;  // cells -m .. cells-1, stored from index 0
    // Scratch buffers reused across calls (per thread): the integration runs thousands of
    // times a day and fresh allocations cost more than the arithmetic.
    thread_local std::vector<double> cell;
    thread_local std::vector<std::size_t> queue;
    cell.resize(total);
    queue.resize(total);
    const double s_floor = std::min(path.s_min, 0.0);
    ProfileCursor limit(path.speed_limit);
    for (std::size_t j = 0; j < total; ++j) {
        const bool behind = j < m;
        double a, b;
        if (behind) {
            a = grid.s0 - static_cast<double>(m - j) * grid.step;
            b = a + grid.step;
        } else {
            a = grid.at(j - m);
            b = grid.at(j - m + 1);
        }
        const double delta = std::min(1e-6, 0.25 * (b - a));
        const double lo = limit.at(std::max(a + delta, s_floor));
        const double hi = limit.at(std::max(b - delta, s_floor));
        cell[j] = std::min({lo, hi, type.max_speed});
    }
    // Sliding-window minimum with a monotone queue of indices (one pass, no per-step allocation).
    std::size_t head = 0, tail = 0;
    double prev_window = 0.0;
    for (std::size_t j = 0; j < total; ++j) {
        while (tail > head && cell[queue[tail - 1]] >= cell[j]) --tail;
        queue[tail++] = j;
        if (j < m) continue;
        const std::size_t i = j - m;  // cell i of the leg, window j-m .. j
        while (queue[head] < j - m) ++head;
        const double window = cell[queue[head]];
        out[i] = i == 0 ? window : std::min(prev_window, window);
        prev_window = window;
    }
    out[grid.cells] = prev_window;
}

// Per cell (into `out`, size cells): 1 where the stretch of the path's gradient profile holding
// the cell's middle at one value is at least LegGrid::kCurveStretch long.  A property of the
// place alone, so that a cell's map is the same on any grid over it.  Without a profile: 0.
void long_gradient_stretches(const TrainPath& path, const Grid& grid, std::vector<double>& out) {
    const auto& s = path.gradient.s;
    const auto& value = path.gradient.value;
    std::size_t k = 0;            // the profile piece holding the cell's middle
    std::size_t from = 0, to = 0;  // the pieces [from, to) of its stretch of one value
    for (std::size_t i = 0; i < grid.cells; ++i) {
        if (s.empty()) {
            out[i] = 0.0;
            continue;
        }
        const double mid = 0.5 * (grid.at(i) + grid.at(i + 1));
        while (k + 1 < s.size() && s[k + 1] <= mid) ++k;
        if (i == 0 || k >= to) {
            for (from = k; from > 0 && value[from - 1] == value[k];) --from;
            for (to = k + 1; to < s.size() && value[to] == value[k];) ++to;
        }
        const double start = from == 0 ? std::min(path.s_min, s.front()) : s[from];
        const double end = to < s.size() ? s[to] : std::max(path.s_max, path.length);
        out[i] = end - start >= LegGrid::kCurveStretch ? 1.0 : 0.0;
    }
}

}  // namespace

StallError::StallError(double s_, double gradient_, double tractive_, double resistance_, double gradient_force_)
    : std::runtime_error("stalls at " + metres(s_) + " along its path: tractive effort does not overcome resistance and "
                         "gradient"),
      s(s_), gradient(gradient_), tractive(tractive_), resistance(resistance_), gradient_force(gradient_force_) {}

double braking_deceleration(const TrainType& type, double v, double gradient) {
    // Climbing (gradient > 0) helps the brakes, falling hinders them.  Davis resistance is left
    // out: service-braking rates are quoted as the deceleration achieved, and ignoring the
    // small resistance share errs on the side of longer braking.
    // The floor never binds where a train runs: planning refuses a train whose brakes leave less
    // on the steepest fall of its path (brake_hold_problem).  It keeps braking curves finite on
    // the stretches beyond a path's end that no train runs over.
    return std::max(kMinNetBraking, type.service_deceleration(v) + kGravity * gradient);
}

double stopping_distance(const TrainType& type, double v, double gradient) {
    if (v <= 0.0) return 0.0;
    // Speed holds during the brake build-up / reaction time (header contract).
    const double reaction = v * type.brake_delay;
    if (type.braking_table.empty()) return reaction + v * v / (2.0 * braking_deceleration(type, v, gradient));
    // Speed-dependent braking: integral of u du / b_eff(u) by composite Simpson; the integrand
    // is smooth between table points and the error is far below a metre at 512 intervals.
    const int n = 512;
    const double h = v / n;
    auto f = [&](double u) { return u / braking_deceleration(type, u, gradient); };
    double sum = f(0.0) + f(v);
    for (int k = 1; k < n; ++k) sum += (k % 2 ? 4.0 : 2.0) * f(k * h);
    return reaction + sum * h / 3.0;
}

double stopping_distance_before(const TrainType& type, double v, const TrainPath& path, double s_from,
                                double s_target) {
    // A steeper fall found further back lengthens the braking distance, which may reach steeper
    // still: searched again over the longer stretch (distances only grow, so a few rounds settle).
    double from = std::min(s_from, s_target), d = 0.0;
    for (int round = 0; round < 8; ++round) {
        const double fall = path.steepest_fall(std::max(from, path.s_min), s_target).value;
        d = stopping_distance(type, v, fall);
        if (s_target - d >= from - 1e-9 || from <= path.s_min) break;
        from = s_target - d;
    }
    return d;
}

double balancing_speed(const TrainType& type, double gradient) {
    auto net = [&](double v) { return type.tractive_force(v) - type.resistance(v) - type.mass * kGravity * gradient; };
    if (net(type.max_speed) >= 0.0) return type.max_speed;  // force still to spare at the cap
    if (!(net(0.0) > 0.0)) return 0.0;                     // cannot get going at all
    double lo = 0.0, hi = type.max_speed;
    for (int k = 0; k < 200 && hi - lo > 1e-9; ++k) {
        const double mid = 0.5 * (lo + hi);
        (net(mid) > 0.0 ? lo : hi) = mid;
    }
    return 0.5 * (lo + hi);
}

Trajectory run_leg(const TrainType& type, const TrainPath& path, double s_start, double v_start, double s_end,
                   bool stop_at_end, const RunOptions& options) {
    Trajectory tr;
    run_leg_into(tr, type, path, s_start, v_start, s_end, stop_at_end, options);
    return tr;
}

void run_leg_into(Trajectory& tr, const TrainType& type, const TrainPath& path, double s_start, double v_start,
                  double s_end, bool stop_at_end, const RunOptions& options) {
    const LegGrid grid = make_leg_grid(type, path, s_start, s_end, options);
    run_on_grid_into(tr, type, grid, s_start, v_start, s_end, stop_at_end, options);
}

void StepRuns::assign(const std::vector<double>& values, std::size_t n) {
    first.clear();
    value.clear();
    for (std::size_t i = 0; i < n; ++i)
        if (value.empty() || values[i] != value.back()) {
            first.push_back(static_cast<std::uint32_t>(i));
            value.push_back(values[i]);
        }
}

void StepRuns::expand(std::size_t from, std::size_t count, double* out) const {
    if (count == 0) return;
    std::size_t r = static_cast<std::size_t>(std::upper_bound(first.begin(), first.end(), from) - first.begin());
    r = r == 0 ? 0 : r - 1;
    std::size_t i = from;
    const std::size_t end = from + count;
    while (i < end) {
        const std::size_t stop = r + 1 < first.size() ? std::min<std::size_t>(first[r + 1], end) : end;
        std::fill(out + (i - from), out + (stop - from), value[r]);
        i = stop;
        ++r;
    }
}

LegGrid make_leg_grid(const TrainType& type, const TrainPath& path, double s_start, double s_end,
                      const RunOptions& options) {
    check_type(type);
    if (path.pieces.empty() || path.gradient.s.empty() || path.speed_limit.s.empty())
        throw std::invalid_argument("running time for " + describe(type) + ": the path has no track");
    if (!(options.step > 0.0) || !std::isfinite(options.step))
        throw std::invalid_argument("running time: the distance step must be positive");
    if (!std::isfinite(s_start) || !std::isfinite(s_end) || s_end < s_start)
        throw std::invalid_argument("running time for " + describe(type) + ": leg from " + metres(s_start) +
                                    " to " + metres(s_end) + " runs backwards");
    const double s_far = std::max(path.length, path.s_max);
    if (s_start < std::min(path.s_min, 0.0) - 1e-6 || s_end > s_far + 1e-6)
        throw std::invalid_argument("running time for " + describe(type) + ": leg " + metres(s_start) + " to " +
                                    metres(s_end) + " leaves the path (" + metres(s_far) + " long)");
    LegGrid g;
    g.s0 = s_start;
    g.step = options.step;
    g.s_end = s_end;
    // Cells of the full step, the last one shortened to end at s_end; a remainder below a
    // millionth of a step is folded into the previous cell rather than left as a sliver.
    const double span = s_end - s_start;
    g.cells = span > 0.0 ? static_cast<std::size_t>(std::ceil(span / options.step - 1e-6)) : 0;
    if (span > 0.0 && g.cells == 0) g.cells = 1;
    thread_local std::vector<double> buffer;
    buffer.resize(g.cells + 1);
    if (g.cells == 0) {
        buffer[0] = std::min(path.speed_limit_at(s_start), type.max_speed);
        g.limit.assign(buffer, 1);
        return g;
    }
    // Static limits (tail rule); gradients per cell at the cell's middle (the train is treated
    // as a point mass at its head for the gradient force).
    const Grid grid{g.s0, g.step, g.s_end, g.cells};
    static_limits(type, path, grid, buffer);
    g.limit.assign(buffer, g.cells + 1);
    ProfileCursor slope(path.gradient);
    for (std::size_t i = 0; i < g.cells; ++i) buffer[i] = slope.at(0.5 * (grid.at(i) + grid.at(i + 1)));
    g.gradient.assign(buffer, g.cells);
    long_gradient_stretches(path, grid, buffer);
    g.on_curve.assign(buffer, g.cells);
    return g;
}

namespace {

// run_on_grid_into without the time index.
long integrate_on_grid(Trajectory& tr, const TrainType& type, const LegGrid& g, double s_start, double v_start,
                       double s_end, bool stop_at_end, const RunOptions& options, const Rejoin* rejoin) {
    check_type(type);
    const double tol = 1e-6 * g.step;
    if (!std::isfinite(s_start) || !std::isfinite(s_end) || s_end < s_start || s_start < g.s0 - tol ||
        s_end > g.s_end + tol)
        throw std::invalid_argument("running time for " + describe(type) + ": run from " + metres(s_start) +
                                    " to " + metres(s_end) + " is not within its grid " + metres(g.s0) + " to " +
                                    metres(g.s_end));
    if (!(v_start >= 0.0) || !std::isfinite(v_start))
        throw std::invalid_argument("running time for " + describe(type) + ": start speed must not be negative");

    // The grid cell k0 holding s_start: the run's point i >= 1 is the grid's point k0 + i.
    std::size_t k0 = 0;
    if (g.cells > 0 && s_start > g.s0) {
        const double x = std::floor((s_start - g.s0) / g.step + 1e-6);
        k0 = std::min(static_cast<std::size_t>(std::max(x, 0.0)), g.cells - 1);
    }
    const bool start_on_point = std::fabs(s_start - g.at(k0)) <= tol;
    const double origin = g.s0;
    std::size_t cells = 0;
    if (s_end > s_start && g.cells > 0) {
        const double x = std::ceil((s_end - (g.s0 + static_cast<double>(k0) * g.step)) / g.step - 1e-6);
        cells = std::max<std::size_t>(1, static_cast<std::size_t>(std::max(x, 0.0)));
        cells = std::min(cells, g.cells - k0);
    }
    tr.s0 = s_start;
    tr.step = g.step;
    tr.s_end = s_end;
    tr.origin = origin;
    tr.base = k0;
    tr.v.resize(cells + 1);
    tr.t.resize(cells + 1);
    tr.t[0] = 0.0;
    std::vector<double>& v = tr.v;
    tr.settled = 0;
    if (cells == 0) {
        double lim;
        g.limit.expand(k0, 1, &lim);
        v[0] = stop_at_end ? 0.0 : std::min(v_start, lim);
        return -1;
    }

    // Limits at the run's points from the grid's; a shortened end cell takes the lower of the
    // limits at the grid points around it (each already the lower of its neighbouring cells).
    g.limit.expand(k0, cells + 1, v.data());
    if (!start_on_point) v[0] = std::min(v[0], v[1]);
    const bool end_on_point = std::fabs(s_end - g.at(k0 + cells)) <= tol;
    if (!end_on_point) v[cells] = std::min(v[cells], v[cells - 1]);
    auto at = [&](std::size_t i) { return i == 0 ? s_start : i >= cells ? s_end : tr.point(i); };
    // Cell lengths: the grid step exactly, except the (possibly shortened) first and last cells.
    // Exact steps keep the plan and a motion integrated again on its grid in step to the last
    // bit, and let the memo below recognise a cruise.
    const double first_length = at(1) - at(0), last_length = at(cells) - at(cells - 1);
    const double step = g.step;
    auto length = [first_length, last_length, step, cells](std::size_t i) {
        return i == 0 ? first_length : i + 1 == cells ? last_length : step;
    };
    if (options.slow_factor < 1.0 && options.slow_to > options.slow_from) {
        // Points are in ascending order: find the first inside the stretch, scale until past it.
        // A plain binary search (what std::ranges::partition_point over the indices does): clang 14,
        // which the sanitizer and fuzzing builds use, cannot compile libstdc++ 12's iota_view.
        std::size_t i = 0;
        for (std::size_t hi = cells + 1; i < hi;) {
            const std::size_t mid = i + (hi - i) / 2;
            if (at(mid) < options.slow_from) i = mid + 1;
            else hi = mid;
        }
        for (; i <= cells && at(i) < options.slow_to; ++i) v[i] *= options.slow_factor;
    }
    thread_local std::vector<double> gradient_buffer;
    gradient_buffer.resize(cells);
    g.gradient.expand(k0, cells, gradient_buffer.data());
    const double* gradient = gradient_buffer.data();
    // Where cells may be read off a full-power curve: the runs of g.on_curve, walked along.
    const std::vector<std::uint32_t>& curve_first = g.on_curve.first;
    std::size_t curve_run =
        static_cast<std::size_t>(std::upper_bound(curve_first.begin(), curve_first.end(), k0) - curve_first.begin());
    curve_run = curve_run == 0 ? 0 : curve_run - 1;
    double* const vp = v.data();
    double* const tp = tr.t.data();

    // Backward pass: braking envelope from the target and from every drop of the limit, in place
    // in v.  Same midpoint rule in v^2 as the forward pass (exact for constant braking).  Where
    // the limit does not fall, the envelope is the limit itself and no braking is evaluated.
    if (stop_at_end) vp[cells] = 0.0;
    // The braking for the stop reaches back as long as each point's envelope comes from the
    // next one's braking curve below its own limit; points before that are settled.
    bool stop_chain = stop_at_end;
    std::size_t chain_from = cells;
    // Without a braking table the deceleration depends on the gradient alone: the midpoint rule
    // is a single evaluation (the same value twice), kept from one cell to the next.
    const bool constant_braking = type.braking_table.empty();
    double braking_g = std::numeric_limits<double>::quiet_NaN(), braking_b = 0.0;
    // Along a braking curve v^2 is carried from cell to cell as it was summed, rather than taken
    // again from the rounded speed: the additions then form the chain from one cell to the
    // next, and the square roots stay off it.
    bool carried = false;
    double w_carried = 0.0;
    double v_next = vp[cells];   // vp[i + 1], kept in a register (as in the forward pass)
    for (std::size_t i = cells; i-- > 0;) {
        const double v1 = v_next;
        const double limit_here = vp[i];
        v_next = limit_here;
        if (limit_here <= v1) {
            stop_chain = false;
            carried = false;
            continue;
        }
        const double ds = length(i);
        const double w1 = carried ? w_carried : v1 * v1;
        double b;
        if (constant_braking) {
            if (!(gradient[i] == braking_g)) {
                braking_g = gradient[i];
                braking_b = braking_deceleration(type, v1, braking_g);
            }
            b = braking_b;
        } else {
            const double w_mid = w1 + braking_deceleration(type, v1, gradient[i]) * ds;
            b = braking_deceleration(type, std::sqrt(w_mid), gradient[i]);
        }
        const double w0 = w1 + 2.0 * b * ds;
        const double braked = std::sqrt(w0);
        if (braked < limit_here) {
            vp[i] = braked;
            v_next = braked;
            carried = true;
            w_carried = w0;
            if (stop_chain) chain_from = i;
        } else {
            stop_chain = false;
            carried = false;
        }
    }
    // chain_from <= cells, and the last cell's length (to point `cells`) depends on the end too.
    tr.settled = chain_from == 0 ? 0 : chain_from - 1;

    // Forward pass: flat out under the envelope.  v[i+1] still holds the envelope when cell i
    // is integrated, so the pass overwrites v in place.  The brake delay stays out of the
    // trajectory: drivers anticipate a braking point they know; it enters stopping_distance.
    const Motion motion(type);
    vp[0] = std::min(v_start, vp[0]);
    // The speed at the end of cell i from v^2 = w1 under the envelope.
    auto limited_speed = [&](double w1, double envelope, std::size_t i) {
        if (w1 > 0.0) return std::min(std::sqrt(w1), envelope);
        if (envelope == 0.0) return 0.0;   // stops at the target anyway
        throw StallError(at(i), gradient[i], type.tractive_force(0.0), type.resistance(0.0),
                         type.mass * kGravity * gradient[i]);
    };
    // Time over cell i between speeds v0 and v1 (constant acceleration).
    auto cell_time = [&](double v0, double v1, double ds, std::size_t i) {
        if (!(v0 + v1 > 0.0))
            throw std::runtime_error(describe(type) + " cannot pass " + metres(at(i)) +
                                     ": speed limit zero there or no tractive effort from standstill");
        return 2.0 * ds / (v0 + v1);
    };
    // One-entry memo of step_w: cruising at a limit repeats the same (speed, gradient, step)
    // cell after cell, and step_w is a pure function of them.  With the same envelope as well,
    // the cell's end speed and time are the same too (cruising: no square root, no division).
    double memo_v = -1.0, memo_g = 0.0, memo_ds = 0.0, memo_w = 0.0;
    double memo_envelope = -1.0, memo_v1 = 0.0, memo_dt = 0.0;
    const AccelBound bound(type, std::max({step, first_length, last_length}));
    FullPowerCurves& curves = full_power_curves(type);
    FullPowerCurve* curve = nullptr;
    double curve_g = std::numeric_limits<double>::quiet_NaN();
    FullPowerCurve::Cursor curve_cursor;
    // Rejoining: the leg's speeds at the run's points (grid point k0 + i).
    const double* leg_v = rejoin ? rejoin->leg->v.data() + k0 : nullptr;
    std::size_t leg_points =
        rejoin && rejoin->leg->v.size() > k0 ? std::min(rejoin->leg->v.size() - k0, cells) : 0;
    if (leg_points > 0 && std::isfinite(rejoin->before)) {
        // No point at or beyond `before` can hand over: stop comparing there (the bound has a
        // point of margin; the window test below stays exact).
        const double x = std::ceil((rejoin->before - origin) / step) - static_cast<double>(k0) + 2.0;
        leg_points = x <= 0.0 ? 0 : std::min(leg_points, static_cast<std::size_t>(x));
    }
    const std::size_t last = cells - 1;
    // The speed and time at the cell's start ride in registers from one cell to the next: read
    // back from v and t, each cell would wait for the last one's stores.
    double v0 = vp[0], t_now = tp[0];
    for (std::size_t i = 0; i < cells; ++i) {
        const double ds = i == 0 ? first_length : i == last ? last_length : step;
        const double envelope = vp[i + 1];
        const double grade = gradient[i];
        // Into the next run of on_curve: the memo below holds a cell of the other kind.
        while (curve_run + 1 < curve_first.size() && curve_first[curve_run + 1] <= k0 + i) {
            ++curve_run;
            memo_v = -1.0;
        }
        double v1, dt;
        if (envelope < v0 && bound.reaches(v0, grade, ds, envelope)) {
            v1 = envelope;   // braking: the envelope binds (see AccelBound)
            dt = cell_time(v0, v1, ds, i);
        } else if (v0 == memo_v && grade == memo_g && ds == memo_ds && envelope == memo_envelope) {
            v1 = memo_v1;
            dt = memo_dt;
        } else {
            if (v0 != memo_v || grade != memo_g || ds != memo_ds) {
                memo_v = v0;
                memo_g = grade;
                memo_ds = ds;
                memo_w = std::numeric_limits<double>::quiet_NaN();
                if (ds == step && curve_run < curve_first.size() && g.on_curve.value[curve_run] != 0.0) {
                    // Read off the full-power curve where it covers v0 (full cells only).
                    if (!(grade == curve_g)) {
                        curve = &curves.at(grade, step);
                        curve_g = grade;
                    }
                    memo_w = curve->step_w(v0, curve_cursor);
                }
                if (std::isnan(memo_w)) memo_w = motion.step_w(v0, grade, ds);
            }
            v1 = limited_speed(memo_w, envelope, i);
            dt = cell_time(v0, v1, ds, i);
            memo_envelope = envelope;
            memo_v1 = v1;
            memo_dt = dt;
        }
        vp[i + 1] = v1;
        t_now += dt;
        tp[i + 1] = t_now;
        v0 = v1;
        // Back on the leg's motion at an interior point in the rejoin window: hand over.
        if (i + 1 < leg_points && v1 == leg_v[i + 1]) {
            const double q = at(i + 1);
            if (q >= rejoin->after && q < rejoin->before) {
                v.resize(i + 2);
                tr.t.resize(i + 2);
                tr.s_end = q;
                tr.settled = std::min(tr.settled, i + 1);
                return static_cast<long>(k0 + i + 1);
            }
        }
    }
    return -1;
}

}  // namespace

long run_on_grid_into(Trajectory& tr, const TrainType& type, const LegGrid& g, double s_start, double v_start,
                      double s_end, bool stop_at_end, const RunOptions& options, const Rejoin* rejoin) {
    const long joined = integrate_on_grid(tr, type, g, s_start, v_start, s_end, stop_at_end, options, rejoin);
    tr.time_index.build(tr.t);
    return joined;
}

// --- Trajectory look-ups -------------------------------------------------------------------
// Within a cell acceleration is constant (v^2 linear in s), so position, speed and time are
// inverted exactly there, consistent with how the run was integrated.
double Trajectory::point(std::size_t i) const {
    if (i == 0) return s0;
    if (i + 1 >= v.size()) return s_end;
    return origin + static_cast<double>(base + i) * step;
}

namespace {

struct Cell {
    std::size_t k;
    double s_from, length;
};

Cell cell_of(const Trajectory& tr, double s) {
    const std::size_t cells = tr.v.size() - 1;
    const double x = std::floor((s - tr.origin) / tr.step) - static_cast<double>(tr.base);
    std::size_t k = x <= 0.0 ? 0 : static_cast<std::size_t>(x);
    k = std::min(k, cells - 1);
    const double from = tr.point(k);
    const double to = tr.point(k + 1);
    return {k, from, to - from};
}

}  // namespace

namespace {

// Speed at s within cell c (v^2 linear in s).
double speed_in(const Trajectory& tr, const Cell& c, double s) {
    const double f = c.length > 0.0 ? std::clamp((s - c.s_from) / c.length, 0.0, 1.0) : 0.0;
    const double w0 = tr.v[c.k] * tr.v[c.k], w1 = tr.v[c.k + 1] * tr.v[c.k + 1];
    return std::sqrt(std::max(0.0, w0 + f * (w1 - w0)));
}

}  // namespace

double Trajectory::speed_at(double s) const {
    if (v.empty()) return 0.0;
    if (v.size() == 1) return v[0];
    s = std::clamp(s, s0, s_end);
    return speed_in(*this, cell_of(*this, s), s);
}

double Trajectory::time_at(double s) const {
    if (v.size() < 2) return 0.0;
    s = std::clamp(s, s0, s_end);
    const Cell c = cell_of(*this, s);
    const double ds = std::clamp(s - c.s_from, 0.0, c.length);
    const double v0 = v[c.k];
    if (ds <= 0.0) return t[c.k];
    const double vs = speed_in(*this, c, s);
    if (!(v0 + vs > 0.0)) return t[c.k];
    return std::min(t[c.k + 1], t[c.k] + 2.0 * ds / (v0 + vs));
}

double Trajectory::position_at(double time) const {
    if (v.size() < 2) return s0;
    if (time <= 0.0) return s0;
    if (time >= t.back()) return s_end;
    std::size_t k = time_index.upper_bound(t, time);
    k = std::min(k == 0 ? 0 : k - 1, v.size() - 2);
    const double from = point(k);
    const double len = point(k + 1) - from;
    const double v0 = v[k], v1 = v[k + 1];
    const double a = (v1 * v1 - v0 * v0) / (2.0 * len);
    const double tau = time - t[k];
    return from + std::clamp(v0 * tau + 0.5 * a * tau * tau, 0.0, len);
}

}  // namespace knockon
