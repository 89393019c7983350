// Running-time integrator: closed-form runs, braking curves, the tail rule, stopping distances,
// balancing speed.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <optional>
#include <stdexcept>
#include <vector>

#include "models/running_time.hpp"

using namespace knockon;

namespace {

constexpr double kmh = 1.0 / 3.6;  // km/h -> m/s
constexpr double g = 9.81;

// A straight single-track line laid by hand, with one path running up its whole length.
struct TestLine {
    Infrastructure infra;
    TrainPath path;

    TestLine(double length, std::vector<ChainageBand> speeds, std::vector<ChainageBand> gradients = {}) {
        infra.length = length;
        infra.speed_limits = std::move(speeds);
        infra.gradients = std::move(gradients);
        Track track;
        track.id = "T";
        track.from = 0.0;
        track.to = length;
        infra.tracks.push_back(track);
        path.direction = Direction::up;
        path.length = length;
        path.s_min = 0.0;
        path.s_max = length;
        path.pieces.push_back({"T", 0, 0.0, length, 0.0, length});
        // Gradient and speed profiles as a path built from a scenario carries them: a piece per
        // stretch between any two band edges.
        std::vector<double> breaks{0.0};
        for (const auto* bands : {&infra.gradients, &infra.speed_limits})
            for (const ChainageBand& b : *bands)
                for (double x : {b.from, b.to})
                    if (x > 0.0 && x < length) breaks.push_back(x);
        std::sort(breaks.begin(), breaks.end());
        breaks.erase(std::unique(breaks.begin(), breaks.end()), breaks.end());
        for (std::size_t k = 0; k < breaks.size(); ++k) {
            const double mid = 0.5 * (breaks[k] + (k + 1 < breaks.size() ? breaks[k + 1] : length));
            path.gradient.s.push_back(breaks[k]);
            path.gradient.value.push_back(infra.gradient_at(mid));
            path.speed_limit.s.push_back(breaks[k]);
            path.speed_limit.value.push_back(infra.line_speed_at(mid));
        }
    }
    TestLine(const TestLine&) = delete;
    TestLine& operator=(const TestLine&) = delete;
};

double grid_s(const Trajectory& tr, std::size_t i) {
    return i + 1 == tr.v.size() ? tr.s_end : tr.s0 + static_cast<double>(i) * tr.step;
}

// Where the speed first passes `target` (rising or falling), interpolated in v^2 within the
// cell, which is exact for the integrator's constant acceleration per cell.
struct Crossing {
    double s, t;
};
std::optional<Crossing> first_crossing(const Trajectory& tr, double target) {
    for (std::size_t k = 0; k + 1 < tr.v.size(); ++k) {
        const double a = tr.v[k] - target, b = tr.v[k + 1] - target;
        if (a == 0.0) return Crossing{grid_s(tr, k), tr.t[k]};
        if ((a < 0.0) != (b < 0.0) || b == 0.0) {
            const double w0 = tr.v[k] * tr.v[k], w1 = tr.v[k + 1] * tr.v[k + 1];
            const double f = (target * target - w0) / (w1 - w0);
            const double s = grid_s(tr, k) + f * (grid_s(tr, k + 1) - grid_s(tr, k));
            return Crossing{s, tr.time_at(s)};
        }
    }
    return std::nullopt;
}

TrainType level_train(double mass) {
    TrainType t;
    t.id = "test";
    t.mass = mass;
    t.length = 0.0;
    t.max_speed = 300 * kmh;
    t.braking = 0.5;
    return t;
}

}  // namespace

TEST_CASE("Constant force from rest matches the closed form", "[running_time]") {
    // tests/REFERENCES.md D8 (closed form): 400 t, 200 kN, no resistance, 0 -> 100 km/h.
    TestLine line(3000, {{0, 3000, 160 * kmh}});
    TrainType t = level_train(400000);
    t.max_force = 200e3;
    for (double rho : {1.00, 1.08}) {
        t.rotating_mass_factor = rho;
        const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 3000.0, false, {1.0});
        auto c = first_crossing(tr, 100 * kmh);
        REQUIRE(c);
        const double a = 200e3 / (rho * 400000);
        CHECK(c->t == Approx(100 * kmh / a).margin(1e-6));
        CHECK(c->s == Approx(std::pow(100 * kmh, 2) / (2 * a)).margin(1e-6));
        if (rho == 1.00) {
            CHECK(c->t == Approx(55.556).margin(5e-4));  // tests/REFERENCES.md D8
            CHECK(c->s == Approx(771.60).margin(5e-3));  // tests/REFERENCES.md D8
        } else {
            CHECK(c->t == Approx(60.000).margin(5e-4));  // tests/REFERENCES.md D8, rho 1.08
            CHECK(c->s == Approx(833.33).margin(5e-3));  // tests/REFERENCES.md D8, rho 1.08
        }
    }
}

TEST_CASE("Constant force up to a 100 km/h limit, then holding it", "[running_time]") {
    // tests/REFERENCES.md D8: the limit is reached at 771.60 m, 55.556 s; on a 0.1 m grid the first
    // grid point at the limit lies within one step beyond.
    TestLine line(2000, {{0, 2000, 100 * kmh}});
    TrainType t = level_train(400000);
    t.max_force = 200e3;
    const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 2000.0, false, {0.1});
    std::size_t k = 0;
    while (k < tr.v.size() && tr.v[k] < 100 * kmh - 1e-12) ++k;
    REQUIRE(k < tr.v.size());
    CHECK(grid_s(tr, k) >= 771.60 - 0.01);
    CHECK(grid_s(tr, k) <= 771.60 + 0.11);
    CHECK(tr.t[k] == Approx(55.556 + (grid_s(tr, k) - 771.605) / (100 * kmh)).margin(0.01));
    // Then it runs at the limit: the rest at constant speed.
    CHECK(tr.v.back() == Approx(100 * kmh));
    CHECK(tr.duration() - tr.t[k] == Approx((2000 - grid_s(tr, k)) / (100 * kmh)).margin(1e-6));
}

TEST_CASE("Constant power from 50 to 100 km/h matches the closed form", "[running_time]") {
    // tests/REFERENCES.md D9 (closed form): 400 t, rho 1, 4 MW, no resistance, 50 -> 100 km/h:
    // t = m (v2^2 - v1^2) / (2P), s = m (v2^3 - v1^3) / (3P).
    TestLine line(2000, {{0, 2000, 160 * kmh}});
    TrainType t = level_train(400000);
    t.power = 4e6;
    const Trajectory tr = run_leg(t, line.path, 0.0, 50 * kmh, 2000.0, false, {1.0});
    auto c = first_crossing(tr, 100 * kmh);
    REQUIRE(c);
    const double v1 = 50 * kmh, v2 = 100 * kmh;
    CHECK(c->t == Approx(400000 * (v2 * v2 - v1 * v1) / (2 * 4e6)).margin(1e-4));
    CHECK(c->s == Approx(400000 * (v2 * v2 * v2 - v1 * v1 * v1) / (3 * 4e6)).margin(2e-3));
    CHECK(c->t == Approx(28.935).margin(1e-3));  // tests/REFERENCES.md D9
    CHECK(c->s == Approx(625.14).margin(6e-3));  // tests/REFERENCES.md D9
}

TEST_CASE("Uncapped constant power from standstill", "[running_time]") {
    // Closed form [D] from the same law as tests/REFERENCES.md D9: P = m v^2 dv/ds, so from rest
    // v^3 = 3 P s / m.  Checks the start of a train whose force is infinite at v = 0.
    TestLine line(2000, {{0, 2000, 300 * kmh}});
    TrainType t = level_train(400000);
    t.power = 4e6;
    const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 2000.0, false, {1.0});
    CHECK(tr.speed_at(1000.0) == Approx(std::cbrt(3 * 4e6 * 1000 / 400000)).epsilon(1e-4));
    CHECK(tr.speed_at(2000.0) == Approx(std::cbrt(3 * 4e6 * 2000 / 400000)).epsilon(1e-4));
}

TEST_CASE("Coasting against A + C v^2 matches the closed form", "[running_time]") {
    // tests/REFERENCES.md D10 (closed form): 400 t, A 5000 N, C 8 N s^2/m^2, no tractive effort,
    // 200 -> 100 km/h: t = m/sqrt(AC) (atan(v1/k) - atan(v2/k)), k = sqrt(A/C);
    // s = m/(2C) ln((A + C v1^2) / (A + C v2^2)).
    TestLine line(30000, {{0, 30000, 200 * kmh}});
    TrainType t = level_train(400000);  // power 0, max_force 0, no table: no traction
    t.davis_a = 5000;
    t.davis_c = 8;
    const Trajectory tr = run_leg(t, line.path, 0.0, 200 * kmh, 30000.0, false, {1.0});
    auto c = first_crossing(tr, 100 * kmh);
    REQUIRE(c);
    const double v1 = 200 * kmh, v2 = 100 * kmh, k = std::sqrt(5000.0 / 8.0);
    const double t_exact = 400000 / std::sqrt(5000.0 * 8.0) * (std::atan(v1 / k) - std::atan(v2 / k));
    const double s_exact = 400000 / (2 * 8.0) * std::log((5000 + 8 * v1 * v1) / (5000 + 8 * v2 * v2));
    CHECK(c->t == Approx(t_exact).margin(1e-3));
    CHECK(c->s == Approx(s_exact).margin(0.05));
    CHECK(c->t == Approx(619.92).margin(6e-3));  // tests/REFERENCES.md D10
    CHECK(c->s == Approx(24434).margin(0.6));    // tests/REFERENCES.md D10
}

TEST_CASE("Gradient force enters the motion as m g i", "[running_time]") {
    // tests/REFERENCES.md D5 convention (m g i, not m g sin): 500 t, 100 kN, +10 per mille:
    // a = (100 kN - 49.05 kN) / 500 t; 0 -> 10 m/s over 100 / (2a) m.  The sine form would
    // land 0.012 m shorter.
    TestLine line(2000, {{0, 2000, 160 * kmh}}, {{0, 2000, 0.010}});
    TrainType t = level_train(500000);
    t.max_force = 100e3;
    const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 2000.0, false, {1.0});
    auto c = first_crossing(tr, 10.0);
    REQUIRE(c);
    const double a = (100e3 - 500000 * g * 0.010) / 500000;
    CHECK(c->s == Approx(100 / (2 * a)).margin(1e-3));
    CHECK(c->t == Approx(10 / a).margin(1e-4));
}

TEST_CASE("A stop at the end follows v^2 = 2 b (s_end - s) and ends at rest", "[running_time]") {
    // Closed form [D] of constant deceleration (the law behind tests/REFERENCES.md D11).
    TestLine line(5000, {{0, 5000, 160 * kmh}});
    TrainType t = level_train(400000);
    t.max_force = 300e3;
    t.braking = 0.5;
    const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 5000.0, true, {1.0});
    REQUIRE(tr.v.size() == 5001);
    CHECK(tr.v.back() == 0.0);
    CHECK(tr.s_end == 5000.0);
    CHECK(tr.position_at(tr.duration()) == 5000.0);
    // The braking phase: where the train is below the limit and slowing down.
    std::size_t braking_points = 0;
    for (std::size_t i = 1; i < tr.v.size(); ++i) {
        if (tr.v[i] < tr.v[i - 1]) {
            ++braking_points;
            CHECK(tr.v[i] * tr.v[i] == Approx(2 * 0.5 * (5000 - grid_s(tr, i))).margin(1e-9));
        }
    }
    // From 160 km/h the braking distance is 1975.3 m (tests/REFERENCES.md D11): about that many points.
    CHECK(braking_points >= 1975);
    CHECK(braking_points <= 1977);
    // Time of the braking phase from 160 km/h to rest: v / b.
    const double s_brake = 5000 - std::pow(160 * kmh, 2) / (2 * 0.5);
    CHECK(tr.duration() - tr.time_at(s_brake) == Approx(160 * kmh / 0.5).margin(1e-3));
}

TEST_CASE("A stop on a falling gradient brakes with b - g i", "[running_time]") {
    // tests/REFERENCES.md D11 convention: 10 per mille down takes g*i off the service deceleration.
    TestLine line(4000, {{0, 4000, 120 * kmh}}, {{0, 4000, -0.010}});
    TrainType t = level_train(400000);
    t.max_force = 300e3;
    t.braking = 0.7;
    const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 4000.0, true, {1.0});
    const double b = 0.7 - g * 0.010;
    CHECK(tr.speed_at(3500.0) == Approx(std::sqrt(2 * b * 500.0)).epsilon(1e-9));
    // Full speed 923.0 m before the stop (tests/REFERENCES.md D11), below it after.
    CHECK(tr.speed_at(4000 - 923.0 - 1.0) == Approx(120 * kmh));
    CHECK(tr.speed_at(4000 - 923.0 + 1.0) < 120 * kmh - 0.01);
}

TEST_CASE("Braking to a lower limit reaches it at the limit's start", "[running_time]") {
    // Common practice, no source: the head meets a lower limit at or below it, braking at b.
    TestLine line(6000, {{0, 3000, 160 * kmh}, {3000, 6000, 60 * kmh}});
    TrainType t = level_train(400000);
    t.max_force = 300e3;
    t.braking = 0.5;
    const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 6000.0, false, {1.0});
    CHECK(tr.speed_at(3000.0) == Approx(60 * kmh));
    CHECK(tr.speed_at(2990.0) > 60 * kmh + 0.1);
    CHECK(tr.speed_at(2900.0) == Approx(std::sqrt(std::pow(60 * kmh, 2) + 2 * 0.5 * 100)).epsilon(1e-9));
    // On a grid that does not meet 3000 m the change falls inside a cell: still no overspeed
    // there, at the price of braking up to one step early.
    for (double step : {1.0, 0.7}) {
        const Trajectory tr2 = run_leg(t, line.path, 0.0, 0.0, 6000.0, false, {step});
        CHECK(tr2.speed_at(3000.0) <= 60 * kmh + 1e-9);
        CHECK(tr2.speed_at(3000.0 - 2 * step) > 60 * kmh);
        bool over = false;
        for (std::size_t i = 0; i < tr2.v.size(); ++i)
            if (grid_s(tr2, i) >= 3000.0 && tr2.v[i] > 60 * kmh + 1e-12) over = true;
        CHECK_FALSE(over);
    }
}

TEST_CASE("Tail rule: no acceleration until the tail has left the lower limit", "[running_time]") {
    // models/DOMAIN.md section 3 (common practice): a 400 m train leaving a 60 km/h zone that ends at
    // 2000 m does not exceed 60 km/h before its head is at 2400 m.
    TestLine line(6000, {{0, 2000, 60 * kmh}, {2000, 6000, 160 * kmh}});
    TrainType t = level_train(400000);
    t.length = 400;
    t.max_force = 300e3;
    for (double step : {1.0, 0.7}) {
        const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 6000.0, false, {step});
        CHECK(tr.speed_at(1990.0) == Approx(60 * kmh));  // it does run at the limit before
        bool over = false;
        for (std::size_t i = 0; i < tr.v.size(); ++i)
            if (grid_s(tr, i) <= 2400.0 && tr.v[i] > 60 * kmh + 1e-12) over = true;
        CHECK_FALSE(over);
        // ... and accelerates as soon as the tail is clear (within two steps on an unaligned grid).
        CHECK(tr.speed_at(2400.0 + 2 * step + 0.5) > 60 * kmh + 0.01);
    }
}

TEST_CASE("A train too weak for the gradient stalls with a clear error", "[running_time]") {
    // Own contract, no outside source: 20 kN cannot lift 500 t up 10 per mille (49 kN).
    TestLine line(2000, {{0, 2000, 100 * kmh}}, {{0, 2000, 0.010}});
    TrainType t = level_train(500000);
    t.max_force = 20e3;
    CHECK_THROWS_WITH(run_leg(t, line.path, 0.0, 10.0, 2000.0, false), Catch::Contains("stalls"));
    TrainType bad = level_train(0.0);
    CHECK_THROWS_AS(run_leg(bad, line.path, 0.0, 0.0, 2000.0, false), std::invalid_argument);
    t.max_force = 200e3;
    CHECK_THROWS_AS(run_leg(t, line.path, 1500.0, 0.0, 1000.0, false), std::invalid_argument);
}

TEST_CASE("Start speed above the envelope is clamped; legs start mid-path", "[running_time]") {
    // Own contract (running_time.hpp), no outside source.
    TestLine line(3000, {{0, 3000, 80 * kmh}});
    TrainType t = level_train(400000);
    t.max_force = 200e3;
    const Trajectory tr = run_leg(t, line.path, 1000.0, 120 * kmh, 2500.0, false, {1.0});
    CHECK(tr.v.front() == Approx(80 * kmh));
    CHECK(tr.duration() == Approx(1500 / (80 * kmh)).margin(1e-9));
    CHECK(tr.time_at(1750.0) == Approx(750 / (80 * kmh)).margin(1e-9));
    CHECK(tr.position_at(tr.time_at(1750.0)) == Approx(1750.0).margin(1e-9));
}

TEST_CASE("Short last cell and time/position inversion", "[running_time]") {
    // Own contract (running_time.hpp): the last grid point is the leg end exactly, and
    // position_at inverts time_at within a cell.
    TestLine line(1000, {{0, 1000, 100 * kmh}});
    TrainType t = level_train(400000);
    t.max_force = 200e3;
    const Trajectory tr = run_leg(t, line.path, 0.0, 0.0, 987.3, true, {2.0});
    REQUIRE(tr.v.size() == 495);
    CHECK(tr.v.back() == 0.0);
    for (double s : {0.0, 0.4, 13.7, 500.0, 771.6, 986.0, 987.3}) {
        CHECK(tr.position_at(tr.time_at(s)) == Approx(s).margin(1e-6));
    }
    // Constant acceleration from rest: s = a t^2 / 2 on the first cells.
    CHECK(tr.time_at(100.0) == Approx(std::sqrt(2 * 100.0 / 0.5)).margin(1e-9));
}

TEST_CASE("Stopping distances with reaction time and gradient", "[running_time]") {
    TrainType t = level_train(400000);
    t.braking = 0.5;
    CHECK(stopping_distance(t, 160 * kmh, 0.0) == Approx(1975.3).margin(0.05));  // tests/REFERENCES.md D11
    t.braking = 0.7;
    CHECK(stopping_distance(t, 120 * kmh, 0.0) == Approx(793.7).margin(0.05));     // tests/REFERENCES.md D11
    CHECK(stopping_distance(t, 120 * kmh, -0.010) == Approx(923.0).margin(0.05));  // tests/REFERENCES.md D11
    t.brake_delay = 3.0;
    CHECK(stopping_distance(t, 100 * kmh, 0.0) == Approx(634.5).margin(0.05));  // tests/REFERENCES.md D11

    // A braking table takes the numerical path.  A constant table must give the closed form
    // (tests/REFERENCES.md D11 again), a linear one b = b0 + k v the integral of v / (b0 + k v)
    // (closed form [D]): v/k - b0/k^2 ln((b0 + k v) / b0).
    t.brake_delay = 0.0;
    t.braking_table = {{0.0, 0.5}, {100.0, 0.5}};
    CHECK(stopping_distance(t, 160 * kmh, 0.0) == Approx(1975.3).margin(0.05));
    t.braking_table = {{0.0, 0.4}, {50.0, 0.9}};
    const double b0 = 0.4, k = 0.01, v = 40.0;
    CHECK(stopping_distance(t, v, 0.0) == Approx(v / k - b0 / (k * k) * std::log((b0 + k * v) / b0)).margin(1e-3));
}

TEST_CASE("Balancing speed", "[running_time]") {
    // Closed form [D]: constant power P against pure C v^2 balances at v = (P / C)^(1/3).
    TrainType t = level_train(400000);
    t.power = 4e6;
    t.davis_c = 8.0;
    t.max_speed = 120.0;
    CHECK(balancing_speed(t) == Approx(std::cbrt(4e6 / 8.0)).margin(1e-6));
    // On a climb the gradient force m g i joins the resistance: P / v = C v^2 + m g i (closed
    // form [D], checked by substitution).
    const double vb = balancing_speed(t, 0.005);
    CHECK(4e6 / vb == Approx(8.0 * vb * vb + 400000 * g * 0.005).epsilon(1e-9));
    // Force to spare at max speed: max speed.  No way to move: zero (own contract).
    t.max_speed = 50.0;
    CHECK(balancing_speed(t) == 50.0);
    t.power = 0.0;
    t.max_force = 10e3;
    t.davis_a = 20e3;
    CHECK(balancing_speed(t) == 0.0);
}

TEST_CASE("A run's settled points are the same for any further stop", "[running_time]") {
    // The engine keeps an integrated motion up to its settled point when the authority grows,
    // and integrates again only from there: that is exact only if a further stop changes none
    // of those points, to the last bit.
    TestLine line(8000.0, {{0.0, 8000.0, 120 * kmh}, {3600.0, 4200.0, 60 * kmh}});
    TrainType type = level_train(300e3);
    type.length = 120.0;
    type.max_force = 200e3;
    type.power = 3e6;
    type.davis_a = 3000.0;
    type.davis_c = 6.0;
    SECTION("constant braking") {}
    SECTION("braking table") { type.braking_table = {{0.0, 0.7}, {20.0, 0.6}, {40.0, 0.45}}; }
    const LegGrid grid = make_leg_grid(type, line.path, 0.0, 8000.0);
    const double start = 501.0, v_start = 12.0;   // off the grid, as a hindered train restarts
    Trajectory near;
    run_on_grid_into(near, type, grid, start, v_start, 2500.0, true);
    REQUIRE(near.settled > 100);
    REQUIRE(near.settled + 1 < near.v.size());
    CHECK(near.v[near.settled + 1] < near.v[near.settled] + 1.0);   // braking begins just after
    for (double end : {2500.0 + 0.7, 3100.0, 3999.0, 5200.0, 8000.0}) {
        Trajectory far;
        run_on_grid_into(far, type, grid, start, v_start, end, true);
        INFO("end " << end);
        REQUIRE(far.v.size() > near.settled);
        CHECK(far.settled >= near.settled);
        bool same = true;
        for (std::size_t i = 0; i <= near.settled; ++i)
            same = same && far.v[i] == near.v[i] && far.t[i] == near.t[i];
        CHECK(same);
    }
    // Without a stop at the end nothing is braked for: every point but the end's is settled.
    Trajectory free;
    run_on_grid_into(free, type, grid, start, v_start, 3000.0, false);
    CHECK(free.settled + 2 == free.v.size());
}

TEST_CASE("A motion started on a leg's point at the leg's speed runs as the leg", "[running_time]") {
    // The engine hands a hindered train back to its planned leg where their speeds meet at a
    // grid point: exact only if each cell is a function of its start speed, place and gradient
    // alone, whether it is integrated or read off a full-power curve.
    TestLine line(9000.0, {{0.0, 9000.0, 140 * kmh}, {4000.0, 4600.0, 80 * kmh}},
                  {{0.0, 3000.0, 0.0}, {3000.0, 6000.0, 0.008}, {6000.0, 9000.0, -0.005}});
    TrainType type = level_train(450e3);
    type.length = 150.0;
    type.rotating_mass_factor = 1.06;
    type.max_force = 220e3;
    type.power = 3.2e6;
    type.davis_a = 4000.0;
    type.davis_b = 60.0;
    type.davis_c = 7.0;
    const LegGrid grid = make_leg_grid(type, line.path, 0.0, 9000.0);
    Trajectory leg;
    run_on_grid_into(leg, type, grid, 0.0, 0.0, 9000.0, true);
    for (std::size_t k : {40u, 400u, 1300u, 1700u, 2400u, 3200u}) {   // accelerating, cruising, braking
        Trajectory again;
        run_on_grid_into(again, type, grid, grid.at(k), leg.v[k], 9000.0, true);
        INFO("from grid point " << k << " at " << leg.v[k] << " m/s");
        REQUIRE(again.v.size() + k == leg.v.size());
        bool same = true;
        for (std::size_t i = 0; i < again.v.size(); ++i) same = same && again.v[i] == leg.v[k + i];
        CHECK(same);
    }
}

TEST_CASE("Full-power curves are read only on long stretches of one gradient", "[running_time]") {
    // Sampling a curve costs hundreds of cells' worth of integration; on a profile of short
    // gradient stretches (survey data, say) it would never pay back.  The rule is a property of
    // the place, the same on any grid over it, so that a cell's map does not depend on where
    // its leg began.
    TestLine line(6000.0, {{0.0, 6000.0, 120 * kmh}, {1000.0, 1400.0, 80 * kmh}},
                  {{0.0, 300.0, 0.004},          // 300 m: short
                   {300.0, 2000.0, 0.0},         // 1700 m, split by the speed limit's breaks: long
                   {2000.0, 2200.0, 0.010},      // 200 m: short
                   {2200.0, 2500.0, 0.010},      // ... and 300 m more at the same value: 500 m, long
                   {2500.0, 6000.0, -0.002}});   // long
    TrainType type = level_train(300e3);
    type.power = 3e6;
    auto flag_at = [](const LegGrid& g, double s) {
        std::vector<double> v(1);
        g.on_curve.expand(static_cast<std::size_t>((s - g.s0) / g.step), 1, v.data());
        return v[0];
    };
    const LegGrid whole = make_leg_grid(type, line.path, 0.0, 6000.0);
    CHECK(flag_at(whole, 100.0) == 0.0);
    CHECK(flag_at(whole, 1200.0) == 1.0);
    CHECK(flag_at(whole, 2100.0) == 1.0);
    CHECK(flag_at(whole, 2400.0) == 1.0);
    CHECK(flag_at(whole, 5000.0) == 1.0);
    // A grid starting inside the long stretch (a leg from a station there) sees the same.
    const LegGrid part = make_leg_grid(type, line.path, 1800.0, 6000.0);
    for (double s : {1900.0, 2100.0, 2400.0, 5000.0}) CHECK(flag_at(part, s) == flag_at(whole, s));
    TestLine bumpy(3000.0, {{0.0, 3000.0, 120 * kmh}},
                   {{0.0, 400.0, 0.0}, {400.0, 800.0, 0.006}, {800.0, 1200.0, 0.0}, {1200.0, 3000.0, 0.003}});
    const LegGrid b = make_leg_grid(type, bumpy.path, 0.0, 3000.0);
    CHECK(flag_at(b, 200.0) == 0.0);
    CHECK(flag_at(b, 600.0) == 0.0);
    CHECK(flag_at(b, 1000.0) == 0.0);
    CHECK(flag_at(b, 2000.0) == 1.0);
}
