// Train type forces: Davis resistance, adhesion, tractive-effort envelope, tables, braking.
#include <catch2/catch.hpp>

#include <cmath>

#include "models/running_time.hpp"
#include "models/train_type.hpp"

using namespace knockon;

namespace {

constexpr double kmh = 1.0 / 3.6;  // km/h -> m/s
constexpr double g = 9.81;         // the value the models use

}  // namespace

TEST_CASE("Davis resistance from French daN / km/h coefficients", "[dynamics]") {
    // tests/REFERENCES.md D1 (Bosquet 2015, high-speed trainset exercise): a=254 daN, b=3.34 daN/(km/h),
    // c=0.0572 daN/(km/h)^2 -> A = 10a N, B = 36b N s/m, C = 129.6c N s^2/m^2.
    TrainType t;
    t.davis_a = 254 * 10.0;
    t.davis_b = 3.34 * 10.0 * 3.6;
    t.davis_c = 0.0572 * 10.0 * 3.6 * 3.6;
    CHECK(t.resistance(300 * kmh) == Approx(64040).margin(5));  // tests/REFERENCES.md D1: 64.04 kN
    CHECK(t.resistance(100 * kmh) == Approx(11600).margin(5));  // tests/REFERENCES.md D1: 11.60 kN
    CHECK(t.resistance(0.0) == Approx(2540));                   // tests/REFERENCES.md D1: A alone at rest
}

TEST_CASE("Davis resistance per tonne", "[dynamics]") {
    // tests/REFERENCES.md D2 (Bosquet 2015, fig. 1.12): per-tonne daN coefficients times 430 t.
    TrainType t;
    const double tonnes = 430;
    t.davis_a = 0.6325 * 10.0 * tonnes;
    t.davis_b = 0.00755 * 36.0 * tonnes;
    t.davis_c = 0.0001244 * 129.6 * tonnes;
    CHECK(t.resistance(300 * kmh) == Approx(60600).margin(10));  // tests/REFERENCES.md D2: 60.60 kN
    CHECK(t.resistance(320 * kmh) == Approx(67880).margin(10));  // tests/REFERENCES.md D2: 67.88 kN
}

TEST_CASE("Curtius-Kniffler adhesion caps the tractive effort", "[dynamics]") {
    TrainType t;
    t.max_force = 1e9;  // far above adhesion, so the adhesion cap is what we read
    t.adhesion_mass = 100000;
    const double weight = t.adhesion_mass * g;
    CHECK(t.tractive_force(0.0) / weight == Approx(0.33145).margin(1e-5));          // tests/REFERENCES.md D6
    CHECK(t.tractive_force(100 * kmh) / weight == Approx(0.21308).margin(1e-5));    // tests/REFERENCES.md D6
    CHECK(t.tractive_force(200 * kmh) / weight == Approx(0.19174).margin(1e-5));    // tests/REFERENCES.md D6
}

TEST_CASE("Tractive-effort envelope min(F_max, adhesion, P/v)", "[dynamics]") {
    // tests/REFERENCES.md D7: published data of a 5.6 MW electric locomotive.
    TrainType t;
    t.max_force = 300e3;
    t.power = 5600e3;
    t.adhesion_mass = 84000;
    CHECK(t.tractive_force(0.0) == Approx(273.1e3).margin(60));         // tests/REFERENCES.md D7: adhesion-limited
    CHECK(t.tractive_force(100 * kmh) == Approx(175.6e3).margin(60));   // tests/REFERENCES.md D7: adhesion-limited
    CHECK(t.tractive_force(140 * kmh) == Approx(144.0e3).margin(60));   // tests/REFERENCES.md D7: power-limited

    // Without adhesion mass the same type is force- then power-limited (closed form [D]).
    t.adhesion_mass = 0;
    CHECK(t.tractive_force(0.0) == Approx(300e3));
    CHECK(t.tractive_force(100 * kmh) == Approx(5600e3 / (100 * kmh)));
    // Performance scales the whole curve (header contract, no outside source).
    t.performance = 0.8;
    CHECK(t.tractive_force(100 * kmh) == Approx(0.8 * 5600e3 / (100 * kmh)));
}

TEST_CASE("From power_limited_from on the effort is the power curve alone, to the bit", "[dynamics]") {
    // The integrator's shortcut (header contract, no outside source): the crossing of the power
    // curve with adhesion and the force cap, found in closed form, must be tight and safe.
    TrainType t;
    t.max_force = 300e3;
    t.power = 5600e3;
    t.adhesion_mass = 84000;
    for (double performance : {1.0, 0.7}) {
        t.performance = performance;
        const double from = t.power_limited_from();
        REQUIRE(std::isfinite(from));
        // The crossing lies where the two curves meet: the tests/REFERENCES.md D7 locomotive is
        // adhesion-limited at 100 km/h and power-limited at 140 km/h.
        CHECK(from > 100 * kmh);
        CHECK(from < 140 * kmh);
        for (double v = from; v < 250 * kmh; v += 0.37)
            CHECK(t.tractive_force(v) == t.power / v * t.performance);
        // Just below it adhesion binds (the margin is small).
        const double below = from * (1.0 - 1e-4);
        CHECK(t.tractive_force(below) < t.power / below * t.performance);
    }
    // Without adhesion the crossing is the force cap's, P / F_max.
    t.adhesion_mass = 0;
    CHECK(t.power_limited_from() == Approx(5600e3 / 300e3).epsilon(1e-5));
    // No power curve or a force table: no shortcut.
    t.power = 0;
    CHECK(std::isinf(t.power_limited_from()));
    t.power = 5600e3;
    t.force_table = {{0.0, 300e3}, {50.0, 100e3}};
    CHECK(std::isinf(t.power_limited_from()));
}

TEST_CASE("Force cap and power curve may each be absent", "[dynamics]") {
    // Header contract (no outside source): max_force 0 = no cap, power 0 = no power curve,
    // both 0 with no table = no traction at all.
    TrainType t;
    t.power = 4e6;
    CHECK(t.tractive_force(20.0) == Approx(2e5));
    CHECK(std::isinf(t.tractive_force(0.0)));
    t.power = 0;
    t.max_force = 150e3;
    CHECK(t.tractive_force(80.0) == Approx(150e3));  // the speed cap is not a force cut-off
    t.max_force = 0;
    CHECK(t.tractive_force(10.0) == 0.0);
}

TEST_CASE("Force and braking tables interpolate linearly and hold at their ends", "[dynamics]") {
    // Common practice, no source: piecewise-linear curves, no extrapolation.
    TrainType t;
    t.force_table = {{0.0, 200e3}, {20.0, 150e3}, {40.0, 80e3}};
    t.max_force = 1.0;  // a table overrides the (max_force, power) envelope
    CHECK(t.tractive_force(10.0) == Approx(175e3));
    CHECK(t.tractive_force(30.0) == Approx(115e3));
    CHECK(t.tractive_force(60.0) == Approx(80e3));
    CHECK(t.tractive_force(0.0) == Approx(200e3));
    t.braking = 0.3;
    CHECK(t.service_deceleration(25.0) == Approx(0.3));
    t.braking_table = {{0.0, 1.0}, {50.0, 0.5}};
    CHECK(t.service_deceleration(25.0) == Approx(0.75));
    CHECK(t.service_deceleration(70.0) == Approx(0.5));
}

TEST_CASE("Gradient force on the brakes is m g i", "[dynamics]") {
    // tests/REFERENCES.md D5: 500 t on +10 per mille: 49 050 N by m*g*i (49 047.5 N by the sine form);
    // this project uses m*g*i.  Read through the braking deceleration, which adds g*i.
    TrainType t;
    t.mass = 500000;
    t.braking = 0.6;
    const double extra = t.mass * (braking_deceleration(t, 20.0, 0.010) - braking_deceleration(t, 20.0, 0.0));
    CHECK(extra == Approx(49050).margin(0.5));
    // Falling gradient hinders the brakes, but never below the 0.05 m/s^2 floor (own rule).
    CHECK(braking_deceleration(t, 20.0, -0.010) == Approx(0.6 - 0.0981));
    CHECK(braking_deceleration(t, 20.0, -0.100) == Approx(0.05));
}
