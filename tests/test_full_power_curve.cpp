// Full-power curves: a cell read off the curve against the integrated cell, against the closed
// form of a constant-power run, and as a function of its start speed alone.
#include <catch2/catch.hpp>

#include <cmath>
#include <thread>
#include <vector>

#include "models/full_power_curve.hpp"
#include "models/running_time.hpp"

using namespace knockon;

namespace {

constexpr double kmh = 1.0 / 3.6;  // km/h -> m/s

// Invented types spanning the cases: power with a force cap and adhesion, heavy freight that
// cannot hold its top speed on a climb, and a force table.
std::vector<TrainType> test_types() {
    TrainType emu;
    emu.id = "emu";
    emu.mass = 200e3;
    emu.rotating_mass_factor = 1.08;
    emu.max_speed = 160 * kmh;
    emu.power = 2.4e6;
    emu.max_force = 160e3;
    emu.adhesion_mass = 200e3;
    emu.davis_a = 2500;
    emu.davis_b = 40;
    emu.davis_c = 5;
    TrainType freight = emu;
    freight.id = "freight";
    freight.mass = 1600e3;
    freight.rotating_mass_factor = 1.05;
    freight.max_speed = 100 * kmh;
    freight.power = 5e6;
    freight.max_force = 300e3;
    freight.adhesion_mass = 120e3;
    freight.davis_a = 16000;
    freight.davis_b = 100;
    freight.davis_c = 10;
    freight.performance = 0.9;
    TrainType table = emu;
    table.id = "table";
    table.power = 0.0;
    table.max_force = 0.0;
    table.adhesion_mass = 0.0;
    table.force_table = {{0.0, 150e3}, {10.0, 140e3}, {25.0, 80e3}, {45.0, 45e3}};
    return {emu, freight, table};
}

}  // namespace

TEST_CASE("A cell read off the full-power curve agrees with the integrated cell", "[running_time]") {
    // The curve is integrated by the same midpoint rule on a quarter of the step and
    // interpolated in v^2: the two differ by the integration error of a cell (up to
    // 0.15 mm/s here, at the kinks of a force table), far below what moves a timing point (bound: common
    // practice, no source).
    const double ds = 2.0;
    for (const TrainType& type : test_types()) {
        const Motion motion(type);
        for (double gradient : {-0.010, 0.0, 0.004, 0.010, 0.025}) {
            FullPowerCurve curve(motion, gradient, ds);
            FullPowerCurve::Cursor cursor;
            std::size_t covered = 0, cells = 0;
            double worst = 0.0;
            for (double v0 = 0.0; v0 <= type.max_speed; v0 += 0.0731) {
                ++cells;
                const double w = curve.step_w(v0, cursor);
                if (std::isnan(w)) continue;
                ++covered;
                const double integrated = motion.step_w(v0, gradient, ds);
                worst = std::max(worst, std::fabs(std::sqrt(w) - std::sqrt(integrated)));
            }
            INFO(type.id << " on " << gradient * 1000 << " per mille: worst " << worst << " m/s over " << covered
                         << " of " << cells << " cells");
            CHECK(worst < 5e-4);
            // Uncovered: below 1 m/s, and where the speed settles at the balancing speed.
            CHECK(covered > cells * 9 / 10);
        }
    }
}

TEST_CASE("Constant power read off the curve matches the closed form", "[running_time]") {
    // tests/REFERENCES.md D9 (closed form): 400 t, rho 1, 4 MW, no resistance, 50 -> 100 km/h:
    // t = m (v2^2 - v1^2) / (2P) = 28.935 s, s = m (v2^3 - v1^3) / (3P) = 625.14 m.
    TrainType type;
    type.id = "d9";
    type.mass = 400e3;
    type.max_speed = 300 * kmh;
    type.power = 4e6;
    const Motion motion(type);
    FullPowerCurve curve(motion, 0.0, 1.0);
    FullPowerCurve::Cursor cursor;
    double v = 50 * kmh, s = 0.0, t = 0.0;
    const double target = 100 * kmh;
    for (int i = 0; i < 2000; ++i) {
        const double w1 = curve.step_w(v, cursor);
        REQUIRE_FALSE(std::isnan(w1));
        const double v1 = std::sqrt(w1);
        if (v1 >= target) {   // the crossing inside the cell, v^2 linear in s as integrated
            const double f = (target * target - v * v) / (w1 - v * v);
            t += 2.0 * f / (v + target);
            s += f;
            break;
        }
        t += 2.0 / (v + v1);
        s += 1.0;
        v = v1;
    }
    CHECK(t == Approx(28.935).margin(1e-3));  // tests/REFERENCES.md D9
    CHECK(s == Approx(625.14).margin(6e-3));  // tests/REFERENCES.md D9
}

TEST_CASE("A cell read off the curve depends on its start speed alone", "[running_time]") {
    // The engine relies on this: a motion that meets its planned leg's speed at a grid point
    // runs exactly as the leg from there on.  Neither the cursor, nor the order in which the
    // curve's bands were built, nor the thread may change a bit of the result.  Freight on a
    // 10 per mille climb: rising and falling stretches both in use.
    const TrainType type = test_types()[1];
    const Motion motion(type);
    std::vector<double> speeds;
    for (double v = 0.5; v < type.max_speed; v += 0.377) speeds.push_back(v);
    FullPowerCurve other_gradient(motion, 0.0, 2.0);
    enum class Order { forward, backwards, fresh_cursor, foreign_cursor };
    auto read = [&](Order order) {
        FullPowerCurve curve(motion, 0.010, 2.0);
        FullPowerCurve::Cursor cursor;
        std::vector<double> out(speeds.size());
        for (std::size_t k = 0; k < speeds.size(); ++k) {
            const std::size_t i = order == Order::backwards ? speeds.size() - 1 - k : k;
            if (order == Order::fresh_cursor) cursor = {};
            if (order == Order::foreign_cursor) other_gradient.step_w(speeds[i], cursor);
            out[i] = curve.step_w(speeds[i], cursor);
        }
        return out;
    };
    const std::vector<double> forward = read(Order::forward);
    std::vector<double> other_thread;
    std::thread worker([&] { other_thread = read(Order::backwards); });
    worker.join();
    std::size_t covered = 0;
    for (double w : forward) covered += std::isnan(w) ? 0 : 1;
    CHECK(covered > speeds.size() * 9 / 10);
    for (const auto& other : {read(Order::backwards), read(Order::fresh_cursor), read(Order::foreign_cursor), other_thread}) {
        bool same = true;
        for (std::size_t i = 0; i < speeds.size(); ++i)
            same = same && (forward[i] == other[i] || (std::isnan(forward[i]) && std::isnan(other[i])));
        CHECK(same);
    }
}
