// Minimum headway of trains whose paths share only some sections: a branch train merging behind a
// main-line train at a flat junction, and two trains crossing on a diamond.  Blocking time theory
// for converging and crossing routes (the parts of a blocking time: tests/REFERENCES.md B1; the
// minimum headway as the smallest shift at which two stairways touch, over the sections both
// trains block: Pachl, Railway Operation and Control): models/headway compares the stairways
// section by section, so the sections two paths share are all that counts.  The stairways here
// are worked out by hand from the blocking-time parts, not by the program.
#include <catch2/catch.hpp>

#include "models/headway.hpp"

using namespace knockon;

namespace {

// Interlocking times of the hand computation: route setup 8 s, sight and reaction 12 s, release
// 4 s; three-aspect signals, so a block's approach time is the running time over the block before
// it; trains 100 m long, no overlap, each at a constant speed.
constexpr double kSetup = 8.0, kSight = 12.0, kRelease = 4.0, kLength = 100.0;

// The blocking of a block ending at the signal at `exit` (metres along the train's own path) for a
// train at `speed` whose head is at 0 at time 0, the warning point being the signal at `warning`
// (the entry signal of the block before).
SectionBlocking block(const char* id, double warning, double exit, double speed) {
    SectionBlocking b;
    b.section = id;
    b.start = warning / speed - kSight - kSetup;
    b.end = (exit + kLength) / speed + kRelease;
    return b;
}

}  // namespace

TEST_CASE("junction headway: a branch train merging behind a main-line train") {
    // Main line: block M1 from 0 to 1000 m, the junction's switch section J from 1000 to 1100 m,
    // M2 from 1100 to 2000 m; the main-line train runs at 20 m/s.  The branch train comes over its
    // own block B1 (0 to 1000 m on its path) to J and M2 at 10 m/s (the diverging leg).
    SectionStairway main_train{0, 0.0, {block("M1", -1000.0, 1000.0, 20.0), block("J", 0.0, 1100.0, 20.0),
                                        block("M2", 1000.0, 2000.0, 20.0)}};
    SectionStairway branch_train{1, 0.0, {block("B1", -1000.0, 1000.0, 10.0), block("J", 0.0, 1100.0, 10.0),
                                          block("M2", 1000.0, 2000.0, 10.0)}};
    // By hand, main-line train: J blocked from 0/20 - 12 - 8 = -20 s to (1100 + 100)/20 + 4 =
    // 64 s; M2 from 1000/20 - 20 = 30 s to 2100/20 + 4 = 109 s.  Branch train: J from 0 - 20 =
    // -20 s, M2 from 1000/10 - 20 = 80 s (ends 2100/10 + 4 = 214 s); J ends 1200/10 + 4 = 124 s.
    // Branch behind main: J needs 64 - (-20) = 84 s, M2 109 - 80 = 29 s: 84 s, critical at J.
    // B1 and M1 are not shared and count for nothing.
    auto behind = minimum_headway(main_train, branch_train);
    REQUIRE(behind);
    CHECK(behind->headway == Approx(84.0));
    CHECK(behind->critical_section == "J");
    // Main behind branch: J 124 - (-20) = 144 s, M2 214 - 30 = 184 s: 184 s, critical at M2 (the
    // slow branch train is still in M2 when the fast one would need it).
    auto ahead = minimum_headway(branch_train, main_train);
    REQUIRE(ahead);
    CHECK(ahead->headway == Approx(184.0));
    CHECK(ahead->critical_section == "M2");
}

TEST_CASE("junction headway: two trains crossing on a diamond share its section alone") {
    // The diamond's section X lies 1000 to 1050 m along each train's path, behind a signal at
    // 1000 m whose warning point is the signal at 0 m.  Train A at 20 m/s, train B at 15 m/s.
    SectionStairway a{0, 0.0, {block("A1", -1000.0, 1000.0, 20.0), block("X", 0.0, 1050.0, 20.0),
                               block("A2", 1000.0, 2000.0, 20.0)}};
    SectionStairway b{1, 0.0, {block("B1", -1000.0, 1000.0, 15.0), block("X", 0.0, 1050.0, 15.0),
                               block("B2", 1000.0, 2000.0, 15.0)}};
    // By hand: A blocks X from -20 s to (1050 + 100)/20 + 4 = 61.5 s; B from -20 s to
    // 1150/15 + 4 = 80.667 s.  B after A: 61.5 + 20 = 81.5 s; A after B: 80.667 + 20 = 100.667 s.
    auto b_after_a = minimum_headway(a, b);
    REQUIRE(b_after_a);
    CHECK(b_after_a->headway == Approx(81.5));
    CHECK(b_after_a->critical_section == "X");
    auto a_after_b = minimum_headway(b, a);
    REQUIRE(a_after_b);
    CHECK(a_after_b->headway == Approx(1150.0 / 15.0 + 4.0 + 20.0));
    // Paths that share no section have no headway between them.
    SectionStairway c{2, 0.0, {block("C1", -1000.0, 1000.0, 20.0)}};
    CHECK_FALSE(minimum_headway(a, c));
}
