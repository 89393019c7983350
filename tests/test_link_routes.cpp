// A train kept at a stop by a link asks for its route out for when the link lets it go, not for
// its own readiness: while it waits it must not hold that route, and with it other trains.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "sim_test_support.hpp"

using namespace knockon;
using namespace knockon::simtest;

namespace {

// F comes in, passes A at 08:10 and ends at B; its crew works P2 from A's loop at 08:30 after a
// 10 min crew change; P3 leaves A's main platform at 08:34 over the same block out of A.
const std::string kExitRoute = kSource + "/tests/data/links/crew_link_exit_route.yaml";

const RouteRecord& first_route(const Day& d, const std::string& train) {
    const std::size_t t = index_of(d.plan, train);
    for (const RouteRecord& r : d.result.routes)
        if (r.train == t) return r;
    FAIL("no route of " << train);
    return d.result.routes.front();
}

}  // namespace

TEST_CASE("A train waiting for its crew asks for its route out only for when the crew can be there",
          "[sim][links]") {
    // Worked by hand from the plan (knockon plan on the fixture): F arrives at B at 08:14:36
    // (29676 s after midnight, to the plan's rounding) and P2 may leave A at 08:30:00, a crew
    // buffer of 324 s.  F 17 min late at entry arrives at B 17 min late less nothing (no stop
    // between to recover), 08:31:36; P2 then leaves at that arrival plus the 10 min crew change,
    // 08:41:36, late by D - b = 1020 - 324 = 696 s (the max-plus recursion of a link: Goverde,
    // max-plus timetable analysis; common practice).  P2 asks for its route from U02L at that
    // time less route setting and sight and reaction (6 s + 12 s), so the block out of A is free
    // when P3 is due at 08:34:00: P3 leaves on time, with no knock-on.  Before, P2 asked at
    // 08:29:42 for its own readiness and held the block until 08:41:36, and P3 left 10 min late.
    SimOptions first_come;   // whoever asks first: the order of the asking is what is tested
    first_come.route_order = RouteOrder::first_come;
    const DayPtr day = simulate(read_scenario(kExitRoute), {{"F", 17 * 60.0}}, first_come);
    const Day& d = *day;
    REQUIRE_FALSE(d.result.deadlock.deadlocked);
    const std::size_t p2 = index_of(d.plan, "P2");
    REQUIRE(d.plan[p2].incoming.size() == 1);
    const LinkPlan& link = d.plan[p2].incoming.front();
    CHECK(link.buffer() == Approx(324.2).margin(0.5));

    const TimingRecord& f_at_b = timing_of(d, "F", "B");
    CHECK(f_at_b.arrival - link.arrival == Approx(1020.0).margin(0.01));
    const TimingRecord& p2_at_a = timing_of(d, "P2", "A");
    CHECK(p2_at_a.departure == Approx(f_at_b.arrival + 600.0).margin(1e-3));
    CHECK(p2_at_a.departure - link.departure == Approx(1020.0 - link.buffer()).margin(0.01));
    CHECK(p2_at_a.knock_on == Approx(1020.0 - link.buffer()).margin(0.01));

    // P2's route out of A: asked for route setting plus reaction before the crew is there.
    const RouteRecord& out = first_route(d, "P2");
    CHECK(out.entry_signal == "U02L");
    CHECK(out.requested == Approx(f_at_b.arrival + 600.0 - 18.0).margin(1e-3));
    CHECK(out.requested > f_at_b.arrival);

    // P3 on time at A and with no knock-on anywhere.
    const TimingRecord& p3_at_a = timing_of(d, "P3", "A");
    CHECK(p3_at_a.departure == Approx(8 * 3600.0 + 34 * 60.0).margin(1e-3));
    for (const TimingRecord& r : d.result.timing)
        if (r.train == index_of(d.plan, "P3")) CHECK(r.knock_on == 0.0);
    // The wait is the crew link's, all of it.
    REQUIRE(d.result.waits.size() == 1);
    CHECK(d.result.waits[0].cause.kind == HoldCause::Kind::link);
}

TEST_CASE("A train whose crew is known to be late asks for its route for the crew's time",
          "[sim][links]") {
    // F 14 min late reaches B at 08:28:36, before P2 appears at A (08:29:30): the hold (08:38:36)
    // is known when P2 stands ready, and its route is asked for 18 s before it (as above), while
    // P3 leaves on time.  Worked by hand as above: P2 late by 840 - 324 = 516 s.
    SimOptions first_come;
    first_come.route_order = RouteOrder::first_come;
    const DayPtr day = simulate(read_scenario(kExitRoute), {{"F", 14 * 60.0}}, first_come);
    const Day& d = *day;
    const TimingRecord& f_at_b = timing_of(d, "F", "B");
    const TimingRecord& p2_at_a = timing_of(d, "P2", "A");
    CHECK(p2_at_a.departure == Approx(f_at_b.arrival + 600.0).margin(1e-3));
    CHECK(p2_at_a.knock_on == Approx(840.0 - 324.2).margin(0.5));
    CHECK(first_route(d, "P2").requested == Approx(f_at_b.arrival + 600.0 - 18.0).margin(1e-3));
    CHECK(timing_of(d, "P3", "A").departure == Approx(8 * 3600.0 + 34 * 60.0).margin(1e-3));
}

TEST_CASE("A crew change shorter than route setting and reaction: the route is asked for on the crew's arrival",
          "[sim][links]") {
    // With a 10 s crew change (less than the 6 s route setting plus 12 s sight and reaction) and F
    // later than planned, P2's route out cannot be timed before F arrives at B: it is asked for
    // then, set 6 s later and known to the driver 12 s after that, so P2 leaves 18 s after F's
    // arrival (worked by hand from the interlocking times of the fixture).  All of its wait is
    // the crew link's.
    Scenario sc = read_scenario(kExitRoute);
    sc.timetable.links[0].min_time = 10.0;
    SimOptions first_come;
    first_come.route_order = RouteOrder::first_come;
    const DayPtr day = simulate(std::move(sc), {{"F", 17 * 60.0}}, first_come);
    const Day& d = *day;
    const TimingRecord& f_at_b = timing_of(d, "F", "B");
    CHECK(first_route(d, "P2").requested == Approx(f_at_b.arrival).margin(1e-3));
    CHECK(timing_of(d, "P2", "A").departure == Approx(f_at_b.arrival + 18.0).margin(1e-3));
    // (P3 then follows P2 out of A at the headway: a wait of its own, caused by P2's train.)
    const std::size_t p2 = index_of(d.plan, "P2");
    std::size_t waits = 0;
    for (const HoldRecord& w : d.result.waits)
        if (w.train == p2) {
            ++waits;
            CHECK(w.cause.kind == HoldCause::Kind::link);
            CHECK(w.to - w.from == Approx(f_at_b.arrival + 18.0 - (8 * 3600.0 + 30 * 60.0)).margin(1e-3));
        }
    CHECK(waits == 1);
}
