// Links in a deadlocked day: a train kept by a link whose earlier train is itself stuck is
// reported as a link wait (the kind of link and the train it waits for), and a link can close the
// circle of trains waiting for each other.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "sim/deadlock_text.hpp"
#include "sim_test_support.hpp"
#include "tools/results/deadlock_output.hpp"

using namespace knockon;
using namespace knockon::simtest;
using Catch::Matchers::Contains;

namespace {

// UP1 runs W to E; its crew works DN2 back from M, its set DN3 back from E (no loop anywhere).
const std::string kCrewDeadlock = kSource + "/tests/data/links/crew_link_deadlock.yaml";

const DeadlockWait& wait_of(const Day& d, const std::string& train) {
    const std::size_t t = index_of(d.plan, train);
    for (const DeadlockWait& w : d.result.deadlock.waiting)
        if (w.train == t) return w;
    FAIL("no wait of " << train);
    return d.result.deadlock.waiting.front();
}

}  // namespace

TEST_CASE("A crew link closes a deadlock and the report names it as a link wait", "[sim][deadlock][links]") {
    // UP1 45 min late, first come first served: DN2 appears at M (08:39:30) before UP1 has come
    // by, and stands on the single line UP1 needs while it waits for UP1's crew.  A circular wait
    // (Coffman, Elphick and Shoshani, 1971; from memory): UP1 waits for DN2's sections, DN2 for
    // UP1's crew; DN3 waits behind for its set.
    SimOptions first_come;
    first_come.route_order = RouteOrder::first_come;
    const DayPtr day = simulate(read_scenario(kCrewDeadlock), {{"UP1", 2700.0}}, first_come);
    const Day& d = *day;
    const DeadlockReport& rep = d.result.deadlock;
    REQUIRE(rep.deadlocked);
    REQUIRE(rep.waiting.size() == 3);
    const std::uint32_t up1 = static_cast<std::uint32_t>(index_of(d.plan, "UP1"));
    const std::uint32_t dn2 = static_cast<std::uint32_t>(index_of(d.plan, "DN2"));

    const DeadlockWait& crew = wait_of(d, "DN2");
    CHECK(crew.waits_for == DeadlockWait::For::link);
    CHECK(crew.link_kind == LinkKind::crew);
    CHECK(crew.link_from == up1);
    CHECK(crew.station == "M");
    CHECK(crew.blocks.empty());
    // Ready at its planned departure (it appeared a minimum dwell before it).
    CHECK(crew.since == Approx(8 * 3600.0 + 40 * 60.0).margin(1e-6));

    const DeadlockWait& set = wait_of(d, "DN3");
    CHECK(set.waits_for == DeadlockWait::For::link);
    CHECK(set.link_kind == LinkKind::turnaround);
    CHECK(set.link_from == up1);
    CHECK(std::isnan(set.chainage));   // never appeared
    CHECK(set.station == "E");

    // UP1 is kept by sections DN2 holds: the other half of the circle.
    const DeadlockWait& late = wait_of(d, "UP1");
    CHECK(late.waits_for != DeadlockWait::For::link);
    REQUIRE_FALSE(late.blocks.empty());
    CHECK(late.blocks.front().train == dn2);
    CHECK(late.blocks.front().by == DeadlockBlock::By::held);

    CHECK_THAT(rep.cause, Contains("UP1 and DN2 wait for each other") &&
                              Contains("DN2 for its crew from UP1 (crew link)") &&
                              Contains("1 other train waits behind"));
    CHECK_THAT(rep.description,
               Contains("DN2 stands at M (5 km), ready to leave since 08:40:00, waiting for its crew from UP1 "
                        "(crew link), which has not arrived") &&
                   Contains("DN3 cannot appear at E (due ") &&
                   Contains("it waits for its set from UP1 (turnaround), which has not arrived"));

    // The JSON names the wait "link", with the kind of link and the earlier train.
    const nlohmann::json j = day_deadlock_json(rep, d.result.train_ids, d.result.section_names, 3);
    bool seen_crew = false, seen_set = false;
    for (const nlohmann::json& w : j["waiting"]) {
        if (w["train"] == "DN2") {
            seen_crew = true;
            CHECK(w["waits_for"] == "link");
            CHECK(w["link"]["kind"] == "crew");
            CHECK(w["link"]["from"] == "UP1");
        } else if (w["train"] == "DN3") {
            seen_set = true;
            CHECK(w["waits_for"] == "link");
            CHECK(w["link"]["kind"] == "turnaround");
            CHECK(w["link"]["from"] == "UP1");
        } else {
            CHECK(w["link"].is_null());
        }
    }
    CHECK(seen_crew);
    CHECK(seen_set);
}

TEST_CASE("Link waits in the deadlock wording", "[sim][deadlock][links]") {
    // Our own wording (sim/deadlock_text.hpp); the records are made up.
    const std::vector<std::string> trains = {"A1", "B2", "C3"};
    const std::vector<std::string> sections = {"S:0-1"};
    DeadlockWait feeder;
    feeder.train = 1;
    feeder.waits_for = DeadlockWait::For::link;
    feeder.link_kind = LinkKind::connection;
    feeder.link_from = 0;
    feeder.station = "QLM";
    feeder.chainage = 1500.0;
    feeder.since = 7 * 3600.0;
    CHECK(what_it_waits_for(feeder, trains) == "for passengers from A1 (connection)");
    CHECK(describe_wait(feeder, trains, sections) ==
          "B2 stands at QLM (1.5 km), ready to leave since 07:00:00, waiting for passengers from A1 (connection), "
          "which has not arrived");
    // A chain through a link: B2 waits for A1's passengers, A1 for a section C3 holds, C3 waits
    // for nothing a train keeps.
    DeadlockWait a;
    a.train = 0;
    a.waits_for = DeadlockWait::For::route;
    a.signal = "U05";
    a.chainage = 800.0;
    a.since = 7 * 3600.0;
    a.blocks = {{0, DeadlockBlock::By::held, 2}};
    DeadlockWait c;
    c.train = 2;
    c.waits_for = DeadlockWait::For::request;
    c.signal = "D02";
    c.chainage = 2000.0;
    c.since = 7 * 3600.0;
    CHECK(deadlock_cause({feeder, a, c}, trains, sections) ==
          "B2 waits for passengers from A1 (connection); A1 waits for the route from U05 (section S:0-1 held by "
          "C3); " + describe_wait(c, trains, sections));
    CHECK(wait_from_name("link") == DeadlockWait::For::link);
}
