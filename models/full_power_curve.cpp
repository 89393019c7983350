#include "models/full_power_curve.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>

namespace knockon {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// A stretch ends where v^2 changes by less than this share per sample: the speed has settled
// at the balancing speed (it approaches it ever more slowly), and the integration takes over.
constexpr double kSettled = 1e-7;
// At most this many samples in one stretch (512 KB).
constexpr std::size_t kMaxSamples = std::size_t{1} << 15;
// Each thread drops its curves when they hold more samples than this (about 32 MB); they are
// sampled again as cells need them.
constexpr std::size_t kMaxCachedSamples = std::size_t{2} << 20;
// Samples this thread's curves hold.
thread_local std::size_t held_samples = 0;

// Everything Motion::accel reads: types equal in these have the same curves.
bool same_motion(const TrainType& a, const TrainType& b) {
    return a.mass == b.mass && a.rotating_mass_factor == b.rotating_mass_factor && a.max_speed == b.max_speed &&
           a.max_force == b.max_force && a.power == b.power && a.adhesion_mass == b.adhesion_mass &&
           a.davis_a == b.davis_a && a.davis_b == b.davis_b && a.davis_c == b.davis_c &&
           a.performance == b.performance && a.force_table == b.force_table;
}

}  // namespace

FullPowerCurve::FullPowerCurve(const Motion& motion, double gradient, double ds)
    : motion_(motion), gradient_(gradient), ds_(ds) {
    // Bands up to the top speed: no cell starts above it (the static limits are capped there).
    bands_.resize(static_cast<std::size_t>(std::ceil(motion.type.max_speed / kBand)) + 1);
}

void FullPowerCurve::start(Branch& b, double v_from, double v_to, double sign) const {
    b.sign = sign;
    b.w = v_from * v_from;
    b.w_to = v_to * v_to;
    b.u.push_back(sign * b.w);
    b.complete = false;
}

void FullPowerCurve::extend(Branch& b) const {
    // Some samples at a time: a cell that needs the stretch further usually needs more soon.
    constexpr std::size_t kChunk = 64;
    const double h = ds_ / static_cast<double>(kSamplesPerCell);
    const std::size_t from = b.u.size();
    while (!b.complete && b.u.size() < from + kChunk) {
        const double next = motion_.step_w(std::sqrt(b.w), gradient_, h);
        // Stalls; settles at the balancing speed (or turns); as far as a stretch goes.
        if (!(next > 0.0) || !(b.sign * (next - b.w) > kSettled * b.w) || b.u.size() >= kMaxSamples) {
            b.complete = true;
            break;
        }
        b.u.push_back(b.sign * next);
        b.w = next;
        // A cell started anywhere short of the band's far edge reads one cell on, and the
        // sample after that.
        if (b.sign * (b.w - b.w_to) >= 0.0 && ++b.beyond > kSamplesPerCell + 1) b.complete = true;
    }
    b.slope.resize(b.u.size() - 1);
    for (std::size_t j = from == 0 ? 0 : from - 1; j + 1 < b.u.size(); ++j) b.slope[j] = 1.0 / (b.u[j + 1] - b.u[j]);
}

double FullPowerCurve::search(double v0, std::size_t band, Cursor& cursor) {
    if (!(v0 >= kFromSpeed) || band >= bands_.size()) return kNaN;
    Band& b = bands_[band];
    if (!b.started) {
        b.started = true;
        const double lo = static_cast<double>(band) * kBand, hi = lo + kBand;
        start(b.rising, lo, hi, 1.0);
        start(b.falling, hi, lo, -1.0);
    }
    auto read_at = [&](Branch& br, double u0) {
        // Usually a cell just crossed into the band, near the stretch's start.
        std::size_t j = 0;
        while (j + 1 < br.brackets() && j < 8 && !(u0 < br.u[j + 1])) ++j;
        if (!br.holds(j, u0)) {
            const auto end = br.u.begin() + static_cast<std::ptrdiff_t>(br.brackets() + 1);
            j = static_cast<std::size_t>(std::upper_bound(br.u.begin(), end, u0) - br.u.begin()) - 1;
        }
        cursor = {this, band, &br, j + kSamplesPerCell};
        return br.sign * br.read(j, u0);
    };
    const double w0 = v0 * v0;
    // Full power gains speed where the rising stretch from the band's lower edge runs, and loses
    // it where the falling one from its upper edge runs (a train entering a climb faster than
    // it can climb it); between them lies the balancing speed, if anywhere, and no speed lies on
    // both.  A stretch sampled far enough already is the one; else the sign of the acceleration
    // says which to sample further.
    if (b.rising.covers(w0)) return read_at(b.rising, w0);
    if (b.falling.covers(-w0)) return read_at(b.falling, -w0);
    const double a = motion_.accel(v0, gradient_);
    if (!(a != 0.0)) return kNaN;
    Branch& br = a > 0.0 ? b.rising : b.falling;
    const double u0 = br.sign * w0;
    if (!(u0 >= br.u.front())) return kNaN;
    const std::size_t before = br.u.size();
    while (!br.covers(u0) && !br.complete) extend(br);
    held_samples += br.u.size() - before;
    return br.covers(u0) ? read_at(br, u0) : kNaN;
}

FullPowerCurve& FullPowerCurves::at(double gradient, double ds) {
    for (FullPowerCurve& c : curves_)
        if (c.gradient() == gradient && c.cell() == ds) return c;
    return curves_.emplace_back(motion_, gradient, ds);
}

FullPowerCurves& full_power_curves(const TrainType& type) {
    thread_local std::vector<std::unique_ptr<FullPowerCurves>> cache;
    thread_local FullPowerCurves* last = nullptr;
    if (held_samples > kMaxCachedSamples) {   // (no reference from an earlier call is in use)
        cache.clear();
        last = nullptr;
        held_samples = 0;
    }
    if (last && same_motion(last->type(), type)) return *last;
    for (auto& c : cache)
        if (same_motion(c->type(), type)) return *(last = c.get());
    cache.push_back(std::make_unique<FullPowerCurves>(type));
    return *(last = cache.back().get());
}

}  // namespace knockon
