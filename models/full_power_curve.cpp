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
// At most this many samples in one stretch (thousands of kilometres would be far more).
constexpr std::size_t kMaxSamples = std::size_t{1} << 16;
// Each thread drops its curves when they hold more samples than this (about 64 MB).
constexpr std::size_t kMaxCachedSamples = std::size_t{4} << 20;

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

void FullPowerCurve::build(std::size_t band) {
    Band& b = bands_[band];
    b.built = true;
    const double lo = static_cast<double>(band) * kBand, hi = lo + kBand;
    // Full power gains speed at the band's lower edge: the rising stretch from there.  It loses
    // speed at the upper edge: the falling stretch from there (a train entering a climb faster
    // than it can climb it).  Between them lies the balancing speed, if anywhere; the two never
    // cover the same speed.
    b.rising.sign = 1.0;
    sample(lo, hi, b.rising);
    b.falling.sign = -1.0;
    if (motion_.accel(hi, gradient_) < 0.0) sample(hi, lo, b.falling);
    samples_ += b.rising.u.size() + b.falling.u.size();
}

void FullPowerCurve::sample(double v_from, double v_to, Branch& out) const {
    const double h = ds_ / static_cast<double>(kSamplesPerCell);
    const double sign = out.sign;
    const double w_to = v_to * v_to;
    double w = v_from * v_from;
    out.u.push_back(sign * w);
    // A cell started anywhere short of v_to reads one cell on, and the sample after that.
    std::size_t beyond = 0;
    while (out.u.size() < kMaxSamples) {
        const double next = motion_.step_w(std::sqrt(w), gradient_, h);
        if (!(next > 0.0)) break;                                   // stalls
        if (!(sign * (next - w) > kSettled * w)) break;             // settled (or turned)
        out.u.push_back(sign * next);
        w = next;
        if (sign * (w - w_to) >= 0.0 && ++beyond > kSamplesPerCell + 1) break;
    }
    out.slope.resize(out.u.size() - 1);
    for (std::size_t j = 0; j + 1 < out.u.size(); ++j) out.slope[j] = 1.0 / (out.u[j + 1] - out.u[j]);
    // Usable brackets j need samples j + kSamplesPerCell + 1; fewer samples: none usable.
    out.usable = out.u.size() >= kSamplesPerCell + 2;
    out.last = out.usable ? out.u.size() - kSamplesPerCell - 2 : 0;
}

double FullPowerCurve::search(double v0, std::size_t band, Cursor& cursor) {
    if (!(v0 >= kFromSpeed) || band >= bands_.size()) return kNaN;
    if (!bands_[band].built) build(band);
    const Band& b = bands_[band];
    for (const Branch* br : {&b.rising, &b.falling}) {
        const double u0 = br->sign * (v0 * v0);
        if (!br->usable || !(u0 >= br->u.front() && u0 < br->u[br->last + 1])) continue;
        const auto end = br->u.begin() + static_cast<std::ptrdiff_t>(br->last + 2);
        const std::size_t j = static_cast<std::size_t>(std::upper_bound(br->u.begin(), end, u0) - br->u.begin()) - 1;
        cursor = {this, band, br, j + kSamplesPerCell};
        return br->sign * br->read(j, u0);
    }
    return kNaN;
}

FullPowerCurve& FullPowerCurves::at(double gradient, double ds) {
    for (FullPowerCurve& c : curves_)
        if (c.gradient() == gradient && c.cell() == ds) return c;
    return curves_.emplace_back(motion_, gradient, ds);
}

std::size_t FullPowerCurves::samples() const {
    std::size_t n = 0;
    for (const FullPowerCurve& c : curves_) n += c.samples();
    return n;
}

FullPowerCurves& full_power_curves(const TrainType& type) {
    thread_local std::vector<std::unique_ptr<FullPowerCurves>> cache;
    thread_local FullPowerCurves* last = nullptr;
    if (last && same_motion(last->type(), type)) return *last;
    for (auto& c : cache)
        if (same_motion(c->type(), type)) return *(last = c.get());
    std::size_t held = 0;
    for (const auto& c : cache) held += c->samples();
    if (held > kMaxCachedSamples) cache.clear();
    cache.push_back(std::make_unique<FullPowerCurves>(type));
    return *(last = cache.back().get());
}

}  // namespace knockon
