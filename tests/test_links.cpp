// Links between services (models/links): turnarounds, connections and crew links as the reader
// takes them (located errors), as the plan shows them (buffers, conflicts) and as a simulated day
// keeps them (departures held, connections missed, the cause of every wait).
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <sstream>
#include <string>

#include "models/plan.hpp"
#include "models/scenario_error.hpp"
#include "sim/day_summary.hpp"
#include "sim_test_support.hpp"

using namespace knockon;
using namespace knockon::simtest;
using Catch::Matchers::Contains;

namespace {

const std::string kTurnaround = kSource + "/tests/data/links/single_line_turnaround.yaml";
const std::string kConnections = kSource + "/tests/data/links/double_line_connections.yaml";

std::string text_of(const std::string& path) {
    std::ifstream in(path);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

// The fixture with its `links:` block replaced (the block is the file's last).
std::string with_links(const std::string& path, const std::string& links) {
    std::string y = text_of(path);
    const std::size_t at = y.find("  links:\n");
    REQUIRE(at != std::string::npos);
    return y.substr(0, at) + "  links:\n" + links;
}

// The messages of the ScenarioError the text gives, joined.
std::string errors_of(const std::string& yaml) {
    try {
        Scenario sc = parse_scenario(yaml, "links.yaml");
        (void)plan_trains(sc);
    } catch (const ScenarioError& e) {
        return e.what();
    }
    FAIL("no error");
    return {};
}

const LinkPlan& link_of(const std::vector<TrainPlan>& plan, const std::string& to) {
    const std::size_t t = index_of(plan, to);
    REQUIRE(plan[t].incoming.size() == 1);
    return plan[t].incoming.front();
}

// A day with these entry (late start) delays, and the scenario changed first by `edit`.
template <class Edit>
DayPtr day_with(const std::string& path, const std::vector<std::pair<std::string, double>>& entry, Edit edit) {
    Scenario sc = read_scenario(path);
    edit(sc);
    return simulate(std::move(sc), entry);
}

double departure_delay(const Day& d, const std::string& train, const std::string& station) {
    const std::size_t t = index_of(d.plan, train);
    const TimingRecord& r = timing_of(d, train, station);
    for (const PlannedCall& c : d.plan[t].run.calls)
        if (c.station == station) return r.departure - c.planned_departure;
    FAIL("no call");
    return 0.0;
}

}  // namespace

TEST_CASE("links: the reader takes turnarounds connections and crew links", "[links][reader]") {
    const Scenario a = read_scenario(kTurnaround);
    REQUIRE(a.timetable.links.size() == 1);
    CHECK(a.timetable.links[0].kind == LinkKind::turnaround);
    CHECK(a.timetable.links[0].from == "U1");
    CHECK(a.timetable.links[0].to == "D1");
    CHECK(a.timetable.links[0].min_time == 480.0);   // 8 min, through models/units
    const Scenario b = read_scenario(kConnections);
    REQUIRE(b.timetable.links.size() == 2);
    CHECK(b.timetable.links[0].kind == LinkKind::connection);
    CHECK(b.timetable.links[0].station == "B");
    CHECK(b.timetable.links[0].min_time == 120.0);
    CHECK(b.timetable.links[0].max_wait == 180.0);
    CHECK(b.timetable.links[1].kind == LinkKind::crew);
    CHECK(b.timetable.links[1].min_time == 900.0);
}

TEST_CASE("links: bad link input gets located errors", "[links][reader]") {
    // Line numbers: the links block starts after the services; find it in the text.
    const std::string base = text_of(kConnections);
    const int links_line = [&] {
        int line = 1;
        for (std::size_t i = 0; i < base.find("  links:\n"); ++i) line += base[i] == '\n';
        return line + 1;   // the first entry
    }();
    const std::string first = "links.yaml:" + std::to_string(links_line) + ":";
    auto check = [&](const std::string& entry, const std::string& where, const std::string& what) {
        const std::string e = errors_of(with_links(kConnections, "    - " + entry + "\n"));
        INFO(e);
        CHECK_THAT(e, Contains(first) && Contains(where) && Contains(what));
    };
    check("{from: U9, feeds: D2, at: B, transfer: 2 min, max_wait: 3 min}", "timetable.links[0].from",
          "unknown service \"U9\"");
    check("{from: U1, feeds: D2, at: Q, transfer: 2 min, max_wait: 3 min}", "timetable.links[0].at",
          "unknown station \"Q\"");
    check("{from: U1, feeds: D2, at: B, transfer: 2 min}", "timetable.links[0]", "max_wait");
    check("{from: U1, feeds: D2, at: B, transfer: 2 min, max_wait: 3 h}", "timetable.links[0].max_wait",
          "must be between 0 min and 120 min");
    check("{from: U1, feeds: D2, at: B, transfer: 2 kg, max_wait: 3 min}", "timetable.links[0].transfer", "kg");
    check("{from: U1, forms: D3, turnaround: 5 min, max_wait: 3 min}", "timetable.links[0].max_wait",
          "a turnaround (forms) has no max_wait");
    check("{from: U1, forms: D3, feeds: D2, turnaround: 5 min}", "timetable.links[0]", "not several");
    check("{from: U1, turnaround: 5 min}", "timetable.links[0]", "needs one of forms");
    // U1 ends at C on the up track, D3 starts there on the down track: no reversal on this layout.
    check("{from: U1, forms: D3, turnaround: 5 min}", "timetable.links[0].forms",
          "ends at C on track U but D3 starts on track D");
    // A set forms a service only where it stands: D2 ends at A, D3 starts at C.
    check("{from: D2, forms: D3, turnaround: 5 min}", "timetable.links[0].forms", "D2 ends at A but D3 starts at C");
    check("{from: U1, feeds: D2, at: A, transfer: 2 min, max_wait: 3 min}", "timetable.links[0].at",
          "U1 does not arrive at A");
    check("{from: U1, crew_to: U1, crew_change: 5 min}", "timetable.links[0].crew_to", "cannot be linked to itself");
    // A set forms one service at a time.
    const std::string twice = errors_of(with_links(kTurnaround, "    - {from: U1, forms: D1, turnaround: 5 min}\n"
                                                                "    - {from: U1, forms: D1, turnaround: 6 min}\n"));
    CHECK_THAT(twice, Contains("timetable.links[1].from") && Contains("already the earlier service of a turnaround"));
}

TEST_CASE("links: the plan shows each link's buffer and names a link the timetable cannot keep", "[links][plan]") {
    const PlanResult plan = make_plan(read_scenario(kConnections));
    REQUIRE(plan.links.size() == 2);
    const LinkPlan& c = plan.links[0];
    const TrainPlan& u1 = plan.trains[c.from];
    const TrainPlan& d2 = plan.trains[c.to];
    // The buffer is the later train's planned departure minus the earlier one's planned arrival
    // and the minimum time (common practice, no source: the definition of a buffer time).
    CHECK(c.arrival == u1.run.calls[1].planned_arrival);
    CHECK(c.departure == d2.run.calls[1].planned_departure);
    CHECK(c.buffer() == Approx(c.departure - c.arrival - 120.0).margin(1e-9));
    CHECK(c.buffer() > 0.0);
    CHECK(plan.conflicts.empty());

    // A crew change longer than the timetable leaves: a conflict at C, named as such.
    Scenario sc = read_scenario(kConnections);
    sc.timetable.links[1].min_time = 1800.0;   // D3 leaves C 22 min after U1 arrives
    const PlanResult tight = make_plan(sc);
    REQUIRE(tight.conflicts.size() == 1);
    const Conflict& k = tight.conflicts[0];
    CHECK(k.link == 1);
    CHECK(k.section == "C");
    CHECK(tight.trains[k.first].run.service->id == "U1");
    CHECK(tight.trains[k.second].run.service->id == "D3");
    CHECK(k.overlap == Approx(-tight.links[1].buffer()).margin(1e-9));
    CHECK(conflict_kind(k) == "crew link shorter than its minimum crew change time");
}

TEST_CASE("links: a scenario with links run undisturbed equals its plan with zero knock-on", "[links][sim]") {
    for (const std::string& path : {kTurnaround, kConnections}) {
        INFO(path);
        const DayPtr d = simulate(read_scenario(path));
        for (const TimingRecord& r : d->result.timing) CHECK(r.knock_on == 0.0);
        CHECK(d->result.waits.empty());
        for (const LinkRecord& l : d->result.links) {
            CHECK(l.waited == 0.0);
            CHECK_FALSE(l.missed);
        }
        for (std::size_t t = 0; t < d->plan.size(); ++t)
            for (const PlannedCall& c : d->plan[t].run.calls)
                if (!std::isnan(c.planned_departure) && c.stops)
                    CHECK(std::fabs(departure_delay(*d, d->plan[t].run.service->id, c.station)) < 1e-3);
    }
}

TEST_CASE("links: a late arrival makes the return working late by what the turnaround buffer does not absorb",
          "[links][sim]") {
    // Closed form of a max-plus recursion (Goverde, max-plus timetable analysis; common practice):
    // the formed service leaves max(0, D - b) late when the set arrives D late against a
    // turnaround buffer b.  Here D = 10 min (a late start on a run with no stop to recover at)
    // and b = 5 min: the return working leaves exactly 5 min late.
    auto buffer_of_5_min = [](Scenario& sc) {
        const std::vector<TrainPlan> plan = plan_trains(sc);
        const LinkPlan& l = link_of(plan, "D1");
        sc.timetable.links[0].min_time = l.departure - l.arrival - 300.0;
    };
    const DayPtr d = day_with(kTurnaround, {{"U1", 600.0}}, buffer_of_5_min);
    const LinkPlan& l = link_of(d->plan, "D1");
    REQUIRE(l.buffer() == Approx(300.0).margin(1e-9));
    const TimingRecord& u1 = timing_of(*d, "U1", "C");
    CHECK(u1.arrival - l.arrival == Approx(600.0).margin(2e-3));
    CHECK(departure_delay(*d, "D1", "C") == Approx(300.0).margin(2e-3));
    // The wait is knock-on at D1's first timing point, caused by the turnaround.
    CHECK(timing_of(*d, "D1", "C").knock_on == Approx(300.0).margin(2e-3));
    REQUIRE(d->result.waits.size() == 1);
    const HoldRecord& w = d->result.waits[0];
    CHECK(w.station == "C");
    CHECK(w.cause.kind == HoldCause::Kind::link);
    CHECK(w.cause.link == 0);
    CHECK(w.cause.train == index_of(d->plan, "U1"));
    CHECK(d->result.links[0].waited == Approx(300.0).margin(2e-3));

    // Within the buffer the return working keeps time: max(0, D - b) = 0 for D = 4 min.
    const DayPtr e = day_with(kTurnaround, {{"U1", 240.0}}, buffer_of_5_min);
    CHECK(std::fabs(departure_delay(*e, "D1", "C")) < 2e-3);
    CHECK(timing_of(*e, "D1", "C").knock_on == 0.0);
}

TEST_CASE("links: a connecting train waits for a late feeder up to its maximum wait then leaves without it",
          "[links][sim]") {
    // By hand (the rule of a connection with maximum wait W, common practice, no source): with the
    // feeder D late against connection buffer b, the connecting train leaves min(max(0, D - b), W)
    // late, and the connection is missed when D - b > W.  W = 3 min here.
    const Scenario sc = read_scenario(kConnections);
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const LinkPlan l = link_of(plan, "D2");
    const double b = l.buffer(), W = 180.0;
    // U1 stops at A only at its start: its late start arrives at B as late (the run to B has no stop).
    struct Case {
        double late, waits;
        bool missed;
    };
    for (const Case c : {Case{b - 60.0, 0.0, false}, Case{b + 100.0, 100.0, false}, Case{b + W + 120.0, W, true}}) {
        INFO("feeder late by " << c.late << " s against a buffer of " << b << " s");
        const DayPtr d = simulate(read_scenario(kConnections), {{"U1", c.late}});
        CHECK(timing_of(*d, "U1", "B").arrival - l.arrival == Approx(c.late).margin(2e-3));
        CHECK(departure_delay(*d, "D2", "B") == Approx(c.waits).margin(2e-3));
        const LinkRecord& r = d->result.links[0];
        CHECK(r.connection);
        CHECK(r.missed == c.missed);
        CHECK(r.waited == Approx(c.waits).margin(2e-3));
        const DaySummary s = summarize_day(d->result);
        CHECK(s.connections == 1);
        CHECK(s.missed_connections == (c.missed ? 1u : 0u));
        if (c.waits > 0.0) {
            REQUIRE_FALSE(d->result.waits.empty());
            bool by_link = false;
            for (const HoldRecord& w : d->result.waits)
                if (w.train == index_of(d->plan, "D2") && w.station == "B" && w.cause.kind == HoldCause::Kind::link)
                    by_link = true;
            CHECK(by_link);
        }
    }
}

TEST_CASE("links: a crew link holds the later service until the crew has arrived and changed", "[links][sim]") {
    const Scenario sc = read_scenario(kConnections);
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const LinkPlan l = link_of(plan, "D3");
    // U1 arrives at C D late (part of its late start is recovered at B): D3 leaves max(0, D - b)
    // late, b its crew link's buffer (the max-plus recursion as for a turnaround).
    const DayPtr d = simulate(read_scenario(kConnections), {{"U1", l.buffer() + 300.0}});
    const double D = timing_of(*d, "U1", "C").arrival - l.arrival;
    REQUIRE(D - l.buffer() > 60.0);
    CHECK(departure_delay(*d, "D3", "C") == Approx(D - l.buffer()).margin(2e-3));
    CHECK(d->result.links[1].waited == Approx(D - l.buffer()).margin(2e-3));
    CHECK_FALSE(d->result.links[1].missed);
}

TEST_CASE("links: a train kept at its origin by the train before records that train as the cause", "[links][sim][causes]") {
    // S-0700 starts 280 s late, after S-0705 was due to appear on the same platform: S-0705 waits
    // for it (to appear, then for its route out), and every such wait names S-0700.
    const DayPtr d = simulate(read_scenario(kSource + "/tests/data/study/delayed_line.yaml"), {{"S-0700", 280.0}});
    const std::uint32_t first = static_cast<std::uint32_t>(index_of(d->plan, "S-0700"));
    const std::uint32_t second = static_cast<std::uint32_t>(index_of(d->plan, "S-0705"));
    std::size_t named = 0;
    for (const HoldRecord& w : d->result.waits) {
        if (w.train != second) continue;
        INFO("S-0705 waits at " << w.station << " from " << w.from << " to " << w.to);
        CHECK(w.station == "A");
        CHECK(w.cause.kind == HoldCause::Kind::train);
        CHECK(w.cause.train == first);
        CHECK(w.cause.section < d->result.section_names.size());
        ++named;
    }
    CHECK(named >= 1);
    // The knock-on S-0705 gathers at A is the time it waited there (its first timing point).
    double waited = 0.0;
    for (const HoldRecord& w : d->result.waits)
        if (w.train == second) waited += w.to - w.from;
    CHECK(timing_of(*d, "S-0705", "A").knock_on == Approx(waited).margin(1e-6));
}
