#pragma once
// Full-power curves: a train type's speed over distance running flat out on a constant gradient,
// sampled finely, so that the running-time integration can read an accelerating cell off the
// curve instead of evaluating the forces.
//
// Why: a cell integrated by Motion::step_w is a chain of two force evaluations (each with a
// division) and two square roots, every one waiting for the last; accelerating cells were about
// a tenth of a simulated day.  Read off the curve, a cell is a bracket look-up, two products and
// one square root.
//
// The map stays a function of the start speed alone (where the curve passes v0, what it reaches
// one cell further on), so a motion that meets its planned leg's speed at a grid point still runs
// as the leg from there on.  The curve is integrated by the same midpoint rule on a step a
// quarter of the cell's and interpolated linearly in v^2 (exact for constant acceleration); a
// cell read off it differs from a step_w cell by far less than a millimetre per second.
//
// The curve is kept in bands of speed, each integrated from the band's own edge and only as far
// as cells need it: the work and memory follow the speeds trains actually run at on that
// gradient.  The integration reads curves only on long stretches of one gradient
// (LegGrid::on_curve), where they pay for their sampling.
#include <cstddef>
#include <deque>
#include <vector>

#include "models/motion.hpp"

namespace knockon {

class FullPowerCurve {
    struct Branch;   // (below)

public:
    // Samples per cell: the curve's step is ds / kSamplesPerCell.
    static constexpr std::size_t kSamplesPerCell = 4;
    // Below this speed [m/s] cells are integrated: from rest the curve bends too sharply for
    // linear interpolation in v^2 (an uncapped power curve rises as s^(2/3)).
    static constexpr double kFromSpeed = 1.0;
    // Width of a band of speed [m/s] (a power of two: the band of a speed is found exactly by a
    // product, not a division).
    static constexpr double kBand = 2.0;

    // Where the last cell was read: the next one usually lies in the same band, one cell on.
    struct Cursor {
        const FullPowerCurve* curve = nullptr;
        std::size_t band = 0;
        const Branch* branch = nullptr;
        std::size_t j = 0;
    };

    FullPowerCurve(const Motion& motion, double gradient, double ds);

    // v^2 at the end of a cell of length ds (this curve's) started at v0, or NaN where the curve
    // does not cover v0 (below kFromSpeed or above the type's top speed; close to the balancing
    // speed, where speed hardly changes): the caller integrates that cell itself.  The cursor
    // only saves the search (any cursor of this curve gives the same result).
    double step_w(double v0, Cursor& cursor);

    double gradient() const { return gradient_; }
    double cell() const { return ds_; }

private:
    // Samples of one stretch of the curve, ascending in u: u = v^2 rising from the band's lower
    // edge, u = -v^2 falling from its upper edge (full power cannot hold that speed).  Sampled
    // on demand, a stretch is the same however far it has been taken.
    struct Branch {
        double sign = 1.0;           // u = sign * v^2
        std::vector<double> u;       // at each sample
        std::vector<double> slope;   // 1 / (u[j+1] - u[j])
        // Where sampling goes on: v^2 at the last sample, the band's far edge, samples beyond it.
        double w = 0.0, w_to = 0.0;
        std::size_t beyond = 0;
        bool complete = true;        // nothing more to sample (also: never started)
        // Brackets [u[j], u[j+1]) a cell can start in: those with the sample one cell on and the
        // next one sampled.
        std::size_t brackets() const { return u.size() > kSamplesPerCell + 1 ? u.size() - kSamplesPerCell - 1 : 0; }
        bool holds(std::size_t j, double u0) const { return j < brackets() && u[j] <= u0 && u0 < u[j + 1]; }
        bool covers(double u0) const { return brackets() > 0 && u0 >= u.front() && u0 < u[brackets()]; }
        double read(std::size_t j, double u0) const {   // u one cell on from u0 in bracket j
            constexpr std::size_t k = kSamplesPerCell;
            const double f = (u0 - u[j]) * slope[j];
            return u[j + k] + f * (u[j + k + 1] - u[j + k]);
        }
    };
    struct Band {
        bool started = false;
        Branch rising, falling;
    };
    void start(Branch& b, double v_from, double v_to, double sign) const;
    void extend(Branch& b) const;
    double search(double v0, std::size_t band, Cursor& cursor);

    const Motion& motion_;
    double gradient_, ds_;
    std::vector<Band> bands_;
};

inline double FullPowerCurve::step_w(double v0, Cursor& cursor) {
    // The cell after the last one read: same band and stretch, the next bracket (or the one after,
    // where rounding the end speed to v and squaring it again lands just beyond).
    if (cursor.curve == this && v0 >= kFromSpeed && static_cast<std::size_t>(v0 * (1.0 / kBand)) == cursor.band) {
        const Branch& b = *cursor.branch;
        const double u0 = b.sign * (v0 * v0);
        for (std::size_t j = cursor.j; j <= cursor.j + 1; ++j)
            if (b.holds(j, u0)) {
                cursor.j = j + kSamplesPerCell;
                return b.sign * b.read(j, u0);
            }
    }
    return search(v0, static_cast<std::size_t>(v0 * (1.0 / kBand)), cursor);
}

// The curves of one train type, each built on first use.
class FullPowerCurves {
public:
    explicit FullPowerCurves(const TrainType& type) : type_(type), motion_(type_) {}
    FullPowerCurves(const FullPowerCurves&) = delete;             // motion_ refers to type_
    FullPowerCurves& operator=(const FullPowerCurves&) = delete;
    const TrainType& type() const { return type_; }
    FullPowerCurve& at(double gradient, double ds);

private:
    TrainType type_;   // a copy: the key, and what motion_ reads
    Motion motion_;
    std::deque<FullPowerCurve> curves_;   // (a deque: references stay valid as it grows)
};

// The curves of `type` (compared by everything its motion depends on), kept per thread: no
// locking, and results do not depend on which thread built what, as a curve is a function of
// its key alone.  Valid until the thread's next call, which may drop the cache when it has
// grown large.
FullPowerCurves& full_power_curves(const TrainType& type);

}  // namespace knockon
