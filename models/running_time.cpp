#include "models/running_time.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <stdexcept>
#include <string>

namespace knockon {
namespace {

// Standard gravity [m/s^2].  Gradient force is m*g*i with i the gradient as a ratio: the
// small-angle form of m*g*sin(atan i), 0.005 % high at 10 per mille (REFERENCES.md D5).
constexpr double kGravity = 9.81;

// Floor on the effective braking deceleration.  On a falling gradient steeper than the brakes
// can hold, b(v) + g*i would reach zero or below and the braking distance would be infinite;
// the floor keeps the envelope finite (such a line needs a lower speed limit anyway, which the
// infrastructure data must supply).
constexpr double kMinBraking = 0.05;

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

// Net acceleration at speed v on gradient i (positive climbing): (F - R - m g i) / (rho m).
// Infinite only at standstill for an uncapped power curve.
struct Motion {
    const TrainType& type;
    double inv_effective_mass;  // 1 / (rho m)

    explicit Motion(const TrainType& t) : type(t), inv_effective_mass(1.0 / (t.rotating_mass_factor * t.mass)) {}

    double accel(double v, double gradient) const {
        return (type.tractive_force(v) - type.resistance(v) - type.mass * kGravity * gradient) * inv_effective_mass;
    }

    // v^2 after a cell of length ds started at v0, by a two-stage midpoint rule in w = v^2
    // (dw/ds = 2a): exact for constant acceleration, second order otherwise, which is what
    // keeps constant-power runs accurate (REFERENCES.md D9).  May return <= 0: the train stalls.
    double step_w(double v0, double gradient, double ds) const {
        const double w0 = v0 * v0;
        const double a0 = accel(v0, gradient);
        double w_mid;
        if (std::isfinite(a0)) {
            w_mid = w0 + a0 * ds;
        } else {
            // Uncapped power from rest: v^3 = 3 P s / (rho m) over the first half cell, then the
            // midpoint slope accounts for resistance and gradient.
            const double p = type.power * type.performance;
            w_mid = std::pow(3.0 * p * 0.5 * ds * inv_effective_mass, 2.0 / 3.0);
        }
        if (w_mid <= 0.0) return w_mid;
        return w0 + 2.0 * accel(std::sqrt(w_mid), gradient) * ds;
    }
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
        const double lo = path.speed_limit_at(std::max(a + delta, s_floor));
        const double hi = path.speed_limit_at(std::max(b - delta, s_floor));
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

}  // namespace

double braking_deceleration(const TrainType& type, double v, double gradient) {
    // Climbing (gradient > 0) helps the brakes, falling hinders them.  Davis resistance is left
    // out: service-braking rates are quoted as the deceleration achieved, and ignoring the
    // small resistance share errs on the side of longer braking.
    return std::max(kMinBraking, type.service_deceleration(v) + kGravity * gradient);
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
    check_type(type);
    if (!path.infrastructure || path.pieces.empty())
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
    if (!(v_start >= 0.0) || !std::isfinite(v_start))
        throw std::invalid_argument("running time for " + describe(type) + ": start speed must not be negative");

    tr.s0 = s_start;
    tr.step = options.step;
    tr.s_end = s_end;
    // Cells of the full step, the last one shortened to end at s_end; a remainder below a
    // millionth of a step is folded into the previous cell rather than left as a sliver.
    const double span = s_end - s_start;
    std::size_t cells = span > 0.0 ? static_cast<std::size_t>(std::ceil(span / options.step - 1e-6)) : 0;
    if (span > 0.0 && cells == 0) cells = 1;
    const Grid grid{s_start, options.step, s_end, cells};
    tr.v.assign(cells + 1, 0.0);
    tr.t.assign(cells + 1, 0.0);
    if (cells == 0) {
        tr.v[0] = stop_at_end ? 0.0 : std::min(v_start, std::min(path.speed_limit_at(s_start), type.max_speed));
        return;
    }

    // Static limits (tail rule) into v, gradients per cell at the cell's middle (the train is
    // treated as a point mass at its head for the gradient force).
    static_limits(type, path, grid, tr.v);
    if (options.slow_factor < 1.0 && options.slow_to > options.slow_from)
        for (std::size_t i = 0; i <= cells; ++i)
            if (grid.at(i) >= options.slow_from && grid.at(i) < options.slow_to) tr.v[i] *= options.slow_factor;
    thread_local std::vector<double> gradient;
    gradient.resize(cells);
    for (std::size_t i = 0; i < cells; ++i) gradient[i] = path.gradient_at(0.5 * (grid.at(i) + grid.at(i + 1)));

    // Backward pass: braking envelope from the target and from every drop of the limit, in place
    // in v.  Same midpoint rule in v^2 as the forward pass (exact for constant braking).  Where
    // the limit does not fall, the envelope is the limit itself and no braking is evaluated.
    std::vector<double>& v = tr.v;
    if (stop_at_end) v[cells] = 0.0;
    for (std::size_t i = cells; i-- > 0;) {
        const double v1 = v[i + 1];
        if (v[i] <= v1) continue;
        const double ds = grid.length(i);
        const double w1 = v1 * v1;
        const double w_mid = w1 + braking_deceleration(type, v1, gradient[i]) * ds;
        const double w0 = w1 + 2.0 * braking_deceleration(type, std::sqrt(w_mid), gradient[i]) * ds;
        v[i] = std::min(v[i], std::sqrt(w0));
    }

    // Forward pass: flat out under the envelope.  v[i+1] still holds the envelope when cell i
    // is integrated, so the pass overwrites v in place.  The brake delay stays out of the
    // trajectory: drivers anticipate a braking point they know; it enters stopping_distance.
    const Motion motion(type);
    v[0] = std::min(v_start, v[0]);
    for (std::size_t i = 0; i < cells; ++i) {
        const double ds = grid.length(i);
        const double v0 = v[i];
        const double envelope = v[i + 1];
        const double w1 = motion.step_w(v0, gradient[i], ds);
        double v1;
        if (w1 > 0.0)
            v1 = std::min(std::sqrt(w1), envelope);
        else if (envelope == 0.0)
            v1 = 0.0;  // stops at the target anyway
        else
            throw std::runtime_error(describe(type) + " stalls at " + metres(grid.at(i)) +
                                     ": tractive effort does not overcome resistance and gradient " +
                                     std::to_string(gradient[i] * 1000.0) + " per mille");
        if (!(v0 + v1 > 0.0))
            throw std::runtime_error(describe(type) + " cannot pass " + metres(grid.at(i)) +
                                     ": speed limit zero there or no tractive effort from standstill");
        v[i + 1] = v1;
        tr.t[i + 1] = tr.t[i] + 2.0 * ds / (v0 + v1);
    }
}

// --- Trajectory look-ups -------------------------------------------------------------------
// Within a cell acceleration is constant (v^2 linear in s), so position, speed and time are
// inverted exactly there, consistent with how the run was integrated.
namespace {

struct Cell {
    std::size_t k;
    double s_from, length;
};

Cell cell_of(const Trajectory& tr, double s) {
    const std::size_t cells = tr.v.size() - 1;
    const double x = std::floor((s - tr.s0) / tr.step);
    std::size_t k = x <= 0.0 ? 0 : static_cast<std::size_t>(x);
    k = std::min(k, cells - 1);
    const double from = tr.s0 + static_cast<double>(k) * tr.step;
    const double to = k + 1 == cells ? tr.s_end : from + tr.step;
    return {k, from, to - from};
}

}  // namespace

double Trajectory::speed_at(double s) const {
    if (v.empty()) return 0.0;
    if (v.size() == 1) return v[0];
    s = std::clamp(s, s0, s_end);
    const Cell c = cell_of(*this, s);
    const double f = c.length > 0.0 ? std::clamp((s - c.s_from) / c.length, 0.0, 1.0) : 0.0;
    const double w0 = v[c.k] * v[c.k], w1 = v[c.k + 1] * v[c.k + 1];
    return std::sqrt(std::max(0.0, w0 + f * (w1 - w0)));
}

double Trajectory::time_at(double s) const {
    if (v.size() < 2) return 0.0;
    s = std::clamp(s, s0, s_end);
    const Cell c = cell_of(*this, s);
    const double ds = std::clamp(s - c.s_from, 0.0, c.length);
    const double vs = speed_at(s);
    const double v0 = v[c.k];
    if (ds <= 0.0 || !(v0 + vs > 0.0)) return t[c.k];
    return std::min(t[c.k + 1], t[c.k] + 2.0 * ds / (v0 + vs));
}

double Trajectory::position_at(double time) const {
    if (v.size() < 2) return s0;
    if (time <= 0.0) return s0;
    if (time >= t.back()) return s_end;
    std::size_t k = static_cast<std::size_t>(std::upper_bound(t.begin(), t.end(), time) - t.begin());
    k = std::min(k == 0 ? 0 : k - 1, v.size() - 2);
    const double from = s0 + static_cast<double>(k) * step;
    const double to = k + 2 == v.size() ? s_end : from + step;
    const double len = to - from;
    const double v0 = v[k], v1 = v[k + 1];
    const double a = (v1 * v1 - v0 * v0) / (2.0 * len);
    const double tau = time - t[k];
    return from + std::clamp(v0 * tau + 0.5 * a * tau * tau, 0.0, len);
}

}  // namespace knockon
