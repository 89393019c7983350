// Signals whose warning is shorter than a train's stopping distance: the plan names them, because
// its blocking times take the warning as given while a driver must brake earlier.
#include <catch2/catch.hpp>

#include <string>

#include "models/plan.hpp"
#include "sim_test_support.hpp"
#include "tools/results/plan_output.hpp"

using namespace knockon;
using knockon::simtest::plain_line;

namespace {

const double k0800 = 8 * 3600.0;

}  // namespace

TEST_CASE("plan: signals giving less warning than the stopping distance are named", "[plan][spacing]") {
    // EMU10 at 120 km/h, 0.8 m/s^2 and 2 s brake delay: stopping distance v^2/(2b) + v t =
    // 694.4 + 66.7 = 761.1 m (tests/REFERENCES.md D11, closed form).  tests/REFERENCES.md B6: three aspects
    // need each block to hold it, four aspects two blocks.
    const double v = 120.0 / 3.6, stopping = v * v / (2.0 * 0.8) + v * 2.0;
    REQUIRE(stopping == Approx(761.1).margin(0.1));

    SECTION("three aspects, 400 m blocks: short; the fast train at line speed is the worst") {
        const Scenario sc = plain_line("three_aspect", 0.4, k0800 + 180.0);
        const PlanResult p = make_plan(sc);
        REQUIRE(!p.spacing_warnings.empty());
        bool at_line_speed = false;
        for (const SpacingWarning& w : p.spacing_warnings) {
            CHECK(w.available == Approx(400.0).margin(0.01));
            CHECK(w.needed > w.available);
            if (w.speed == Approx(v).margin(0.01)) {
                at_line_speed = true;
                CHECK(w.needed == Approx(stopping).margin(0.5));
            }
        }
        CHECK(at_line_speed);
        const std::string text = plan_text(sc, p);
        CHECK(text.find("give less warning than a train needs to stop") != std::string::npos);
    }
    SECTION("four aspects, 400 m blocks: two blocks (800 m) hold it") {
        CHECK(make_plan(plain_line("four_aspect", 0.4, k0800 + 180.0)).spacing_warnings.empty());
    }
    SECTION("three aspects, 1 km blocks: each block holds it") {
        CHECK(make_plan(plain_line("three_aspect", 1.0, k0800 + 180.0)).spacing_warnings.empty());
    }
}
