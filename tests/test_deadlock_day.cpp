// A day that ends in deadlock: the report names every train left waiting, what it waits for and
// who keeps that from it (checked against the day's own occupancy records and the planned order),
// the cause is the circle of trains waiting for each other, and the day's summary gives no
// punctuality or delay figure as if the day were whole.  The wording of the report for every kind
// of wait.
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <string>
#include <vector>

#include "sim/day_summary.hpp"
#include "sim/deadlock_text.hpp"
#include "sim_test_support.hpp"

using namespace knockon;
using namespace knockon::simtest;
using Catch::Matchers::Contains;
using Catch::Matchers::StartsWith;

namespace {

const std::string kNoLoop = kSource + "/tests/data/sim/single_line_deadlock.yaml";
const std::string kHeadOn = kSource + "/tests/data/sim/head_on.yaml";

// Every block of every waiting train agrees with the records of the day and the plan: a section
// "held" by a train is one that train locked and never released; one "promised" to a train is
// held by nobody, and that train comes before the waiting one in the section's planned order.
void check_blocks_against_records(const Day& d, const SimModel& model) {
    const SimResult& r = d.result;
    auto still_held_by = [&](std::uint32_t train, std::uint32_t section) {
        for (const SectionRecord& s : r.sections)
            if (s.train == train && s.section == section && std::isnan(s.released)) return true;
        return false;
    };
    auto held_by_anyone = [&](std::uint32_t section) {
        for (const SectionRecord& s : r.sections)
            if (s.section == section && std::isnan(s.released)) return true;
        return false;
    };
    for (const DeadlockWait& w : r.deadlock.waiting)
        for (const DeadlockBlock& b : w.blocks) {
            INFO(r.train_ids[w.train] << " kept from " << r.section_names[b.section]);
            REQUIRE(b.section < r.section_names.size());
            if (b.by == DeadlockBlock::By::disruption) continue;
            CHECK(b.train != w.train);
            if (b.by == DeadlockBlock::By::held) {
                CHECK(still_held_by(b.train, b.section));
            } else {
                CHECK_FALSE(held_by_anyone(b.section));
                const std::vector<std::uint32_t>& order = model.planned_order()[b.section];
                const auto first = std::find(order.begin(), order.end(), b.train);
                const auto waiting = std::find(order.begin(), order.end(), w.train);
                CHECK(first != order.end());
                CHECK(first < waiting);
            }
        }
}

}  // namespace

TEST_CASE("A deadlocked day reports each waiting train and who keeps its route", "[sim][deadlock]") {
    // Two trains on a single line without a loop, entering from each end: each holds the sections
    // the other needs.  A deadlock is a circular wait (one of the four conditions of Coffman,
    // Elphick and Shoshani, 1971; from memory): the report must show the circle.
    for (RouteOrder order : {RouteOrder::timetable, RouteOrder::first_come}) {
        INFO((order == RouteOrder::timetable ? "timetable order" : "first come"));
        SimOptions opt;
        opt.route_order = order;
        const DayPtr day = simulate(read_scenario(kNoLoop), {}, opt);
        const Day& d = *day;
        const DeadlockReport& rep = d.result.deadlock;
        REQUIRE(rep.deadlocked);
        REQUIRE(rep.waiting.size() == 2);
        const std::size_t up = index_of(d.plan, "UP1"), down = index_of(d.plan, "DN1");
        CHECK(rep.waiting[0].train == std::min(up, down));   // in train order
        std::map<std::string, const Signal*> signals;
        for (const Signal& s : d.scenario.infrastructure.signals) signals[s.id] = &s;
        for (const DeadlockWait& w : rep.waiting) {
            const std::uint32_t other = w.train == up ? down : up;
            INFO(d.result.train_ids[w.train]);
            CHECK(w.waits_for == DeadlockWait::For::route);
            // It stands at the signal whose route it waits for (its authority ends there).
            REQUIRE(signals.count(w.signal));
            CHECK(w.chainage == Approx(signals[w.signal]->at).margin(1.0));
            CHECK(w.since <= rep.time);
            CHECK(w.station.empty());
            // The circle: it waits for the other train, and the other train only.
            REQUIRE_FALSE(w.blocks.empty());
            for (const DeadlockBlock& b : w.blocks) CHECK(b.train == other);
            // First come, first served promises nothing: every block is a section held.
            if (order == RouteOrder::first_come)
                for (const DeadlockBlock& b : w.blocks) CHECK(b.by == DeadlockBlock::By::held);
        }
        check_blocks_against_records(d, SimModel(d.scenario, d.plan));
        CHECK_THAT(rep.cause, Contains("wait for each other") && Contains("UP1") && Contains("DN1"));
        // One line per waiting train, in words.
        CHECK_THAT(rep.description, StartsWith(d.result.train_ids[rep.waiting[0].train] + " stands at signal "));
        CHECK(std::count(rep.description.begin(), rep.description.end(), '\n') == 2);
    }
}

TEST_CASE("A train promised a section it never took keeps a deadlock's waiting train", "[sim][deadlock]") {
    // head_on.yaml: one train each way, both at 06:00, no loop assigned; under the timetable order
    // a section the other train is planned to use first is promised to it even while free.
    const DayPtr day = simulate(read_scenario(kHeadOn));
    const Day& d = *day;
    const DeadlockReport& rep = d.result.deadlock;
    REQUIRE(rep.deadlocked);
    REQUIRE(rep.waiting.size() == 2);
    std::size_t promised = 0;
    for (const DeadlockWait& w : rep.waiting)
        for (const DeadlockBlock& b : w.blocks) promised += b.by == DeadlockBlock::By::promised;
    CHECK(promised > 0);
    check_blocks_against_records(d, SimModel(d.scenario, d.plan));
    // A train ready to leave a stop names the stop and when it was ready.
    bool at_stop = false;
    for (const DeadlockWait& w : rep.waiting)
        if (!w.station.empty()) {
            at_stop = true;
            const TimingRecord& t = timing_of(d, d.result.train_ids[w.train], w.station);
            CHECK(std::isnan(t.departure));
            CHECK(w.since >= t.arrival);
            CHECK_THAT(describe_wait(w, d.result.train_ids, d.result.section_names),
                       Contains("stands at " + w.station) && Contains("ready to leave since"));
        }
    CHECK(at_stop);
}

TEST_CASE("A deadlocked day's summary gives no punctuality or delay as if it were whole", "[sim][deadlock]") {
    const DayPtr day = simulate(read_scenario(kNoLoop));
    const DaySummary s = summarize_day(day->result, {180.0, 300.0});
    CHECK_FALSE(s.complete);
    CHECK(s.trains == 2);
    CHECK(s.finished == 0);
    REQUIRE(s.punctuality.size() == 2);
    for (double p : s.punctuality) CHECK(std::isnan(p));
    CHECK(std::isnan(s.mean_arrival_delay));
    CHECK(std::isnan(s.total_final_delay));
    for (const TrainDelay& td : s.trains_by_delay) {
        CHECK_FALSE(td.finished);
        // Both left their origin: the last timing point reached is the first one, left on time.
        REQUIRE(td.last_reached >= 0);
        const TimingRecord& t = day->result.timing[static_cast<std::size_t>(td.last_reached)];
        CHECK(t.train == td.train);
        CHECK(t.call == 0);
        CHECK_FALSE(std::isnan(t.departure));
    }

    // The same line with the second train an hour late, first come first served, runs to the end:
    // a whole day, with figures.
    SimOptions first_come;
    first_come.route_order = RouteOrder::first_come;
    const DayPtr late = simulate(read_scenario(kNoLoop), {{"DN1", 3600.0}}, first_come);
    REQUIRE_FALSE(late->result.deadlock.deadlocked);
    const DaySummary whole = summarize_day(late->result, {180.0, 300.0});
    CHECK(whole.complete);
    CHECK(whole.finished == 2);
    CHECK(late->result.deadlock.waiting.empty());
    CHECK(late->result.deadlock.cause.empty());
    for (double p : whole.punctuality) CHECK(std::isfinite(p));
    CHECK(std::isfinite(whole.mean_arrival_delay));
}

TEST_CASE("Deadlock report wording for every kind of wait", "[sim][deadlock]") {
    // Our own wording (sim/deadlock_text.hpp); the records are made up.
    const std::vector<std::string> trains = {"A1", "B2", "C3", "D4"};
    const std::vector<std::string> sections = {"S:0-1", "S:1-2", "S:2-3"};
    DeadlockWait appear;
    appear.train = 0;
    appear.waits_for = DeadlockWait::For::appear;
    appear.station = "QLM";
    appear.since = 6 * 3600.0;
    appear.blocks = {{0, DeadlockBlock::By::held, 1}};
    CHECK(describe_wait(appear, trains, sections) == "A1 cannot appear at QLM (due 06:00:00): section S:0-1 held by B2");

    DeadlockWait entry;
    entry.train = 1;
    entry.waits_for = DeadlockWait::For::entry_view;
    entry.signal = "E01";
    entry.since = 6 * 3600.0 + 30.0;
    entry.route_set = 6 * 3600.0 + 5.0;
    entry.read_from = 200.0;
    CHECK(describe_wait(entry, trains, sections) ==
          "B2 cannot enter the line (due 06:00:30): the route from E01 was set at 06:00:05, but signal E01 comes "
          "into view only at 0.2 km, inside the line");

    DeadlockWait route;
    route.train = 2;
    route.waits_for = DeadlockWait::For::route;
    route.signal = "U05";
    route.chainage = 15300.0;
    route.since = 6 * 3600.0 + 600.0;
    route.blocks = {{1, DeadlockBlock::By::promised, 3}, {2, DeadlockBlock::By::disruption, 0}};
    CHECK(describe_wait(route, trains, sections) ==
          "C3 stands at signal U05 (15.3 km) since 06:10:00, waiting for the route from U05: section S:1-2 free but "
          "promised to D4, planned to use it first; section S:2-3 out of use (disruption)");
    CHECK(where_it_stands(entry) == "outside the line");
    CHECK(what_it_waits_for(route, trains) == "for the route from U05");

    // No circle: the chain from the first waiting train down to the one that keeps the rest.
    // (A1 waits for B2; B2 waits for nothing a train holds: it cannot see its signal.)
    CHECK(deadlock_cause({appear, entry}, trains, sections) ==
          "A1 waits to appear at QLM (section S:0-1 held by B2); " + describe_wait(entry, trains, sections));

    // A circle of three, closed when the last of them began to wait; a fourth waits behind.
    DeadlockWait a = route, b = route, c = route, d = appear;
    a.train = 0, a.since = 100.0, a.blocks = {{0, DeadlockBlock::By::held, 1}};
    b.train = 1, b.since = 300.0, b.blocks = {{1, DeadlockBlock::By::held, 2}};
    c.train = 2, c.since = 200.0, c.blocks = {{2, DeadlockBlock::By::promised, 0}};
    d.train = 3, d.blocks = {{0, DeadlockBlock::By::held, 0}};
    const std::string cause = deadlock_cause({d, a, b, c}, trains, sections);
    CHECK_THAT(cause, StartsWith("A1, B2 and C3 wait for each other in a circle (since 00:05:00): A1 for the route "
                                 "from U05 (section S:0-1 held by B2), B2 for"));
    CHECK_THAT(cause, Contains("C3 for the route from U05 (section S:2-3 free but promised to A1, planned to use it "
                               "first); 1 other train waits behind"));

    // The names in files and JSON, both ways.
    for (DeadlockWait::For k : {DeadlockWait::For::appear, DeadlockWait::For::enter, DeadlockWait::For::entry_view,
                                DeadlockWait::For::route, DeadlockWait::For::view, DeadlockWait::For::request,
                                DeadlockWait::For::link, DeadlockWait::For::other})
        CHECK(wait_from_name(wait_name(k)) == k);
    for (DeadlockBlock::By k : {DeadlockBlock::By::held, DeadlockBlock::By::promised, DeadlockBlock::By::disruption})
        CHECK(block_from_name(block_name(k)) == k);
    CHECK_FALSE(wait_from_name("elsewhere"));
    CHECK_FALSE(block_from_name(""));
}
