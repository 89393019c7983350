// Minimum headways, critical sections, buffers, conflicts and UIC 406 capacity consumption.
//
// Most checks run on tests/data/plan/two_speed_line.yaml, whose trains hold their speed exactly
// (see the hand-check notes there), so headways follow in closed form from blocking time theory.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <sstream>
#include <string>
#include <tuple>
#include <vector>

#include "models/capacity.hpp"
#include "models/plan.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

namespace {

const std::string kDataDir = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/plan/";

std::size_t train_index(const PlanResult& plan, const std::string& id) {
    for (std::size_t i = 0; i < plan.trains.size(); ++i)
        if (plan.trains[i].run.service->id == id) return i;
    FAIL("no train " << id);
    return 0;
}

const HeadwayPair& pair_of(const PlanResult& plan, const std::string& leader, const std::string& follower) {
    const std::size_t l = train_index(plan, leader), f = train_index(plan, follower);
    for (const HeadwayPair& h : plan.headways)
        if (h.leader == l && h.follower == f) return h;
    FAIL("no headway pair " << leader << " -> " << follower);
    throw;  // not reached
}

const SectionBlocking& blocking_of(const PlanResult& plan, const std::string& train, const std::string& section) {
    for (const SectionBlocking& b : plan.trains[train_index(plan, train)].stairway.sections)
        if (b.section == section) return b;
    FAIL("train " << train << " does not block section " << section);
    throw;  // not reached
}

// A hand-made stairway: (section, start, end) relative to the reference time.
SectionStairway stairway(std::size_t train, double reference,
                         const std::vector<std::tuple<std::string, double, double>>& blocks) {
    SectionStairway s;
    s.train = train;
    s.reference = reference;
    for (const auto& [id, start, end] : blocks) {
        SectionBlocking b;
        b.section = id;
        b.start = reference + start;
        b.end = reference + end;
        s.sections.push_back(b);
    }
    return s;
}

std::string read_text_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    REQUIRE(in);
    std::ostringstream text;
    text << in.rdbuf();
    return text.str();
}

struct Fixture {
    Scenario scenario;
    PlanResult plan;
    explicit Fixture(const std::string& file)
        : scenario(read_scenario(kDataDir + file)), plan(make_plan(scenario)) {}
};

}  // namespace

TEST_CASE("Minimum headway of two stairways: shift until they touch", "[headway]") {
    // models/DOMAIN.md 4 (blocking time theory): the follower's blocking of each shared section must
    // start no earlier than the leader's ends; the tightest section is the critical one. [D]
    const SectionStairway leader = stairway(0, 1000.0, {{"a", -50, 100}, {"b", 0, 160}, {"c", 40, 200}});
    const SectionStairway follower = stairway(1, 5000.0, {{"a", -60, 80}, {"b", -30, 150}, {"d", 0, 300}});
    const auto h = minimum_headway(leader, follower);
    REQUIRE(h);
    CHECK(h->headway == Approx(190.0).margin(1e-9));  // b: 160 - (-30); a gives only 160
    CHECK(h->critical_section == "b");
    // No shared section: no headway constraint at all.
    CHECK_FALSE(minimum_headway(leader, stairway(2, 0.0, {{"x", 0, 100}})));
}

TEST_CASE("Identical trains at constant speed: minimum headway = blocking time of one route", "[headway]") {
    // tests/REFERENCES.md B1 composition with 2 km blocks at 160 km/h: 6 + 12 + 45 + 45 + 9 + 3 = 120 s;
    // at 60 km/h: 18 + 120 + 120 + 24 + 3 = 285 s.
    const Fixture fx("two_speed_line.yaml");
    bool fast = false, slow = false;
    for (const HeadwayMatrixEntry& e : fx.plan.headway_matrix) {
        if (e.line_section != "A-B") continue;
        if (e.leader_type == "FAST" && e.follower_type == "FAST") {
            CHECK(e.minimum_headway == Approx(120.0).margin(0.05));
            fast = true;
        }
        if (e.leader_type == "SLOW" && e.follower_type == "SLOW") {
            CHECK(e.minimum_headway == Approx(285.0).margin(0.05));
            slow = true;
        }
    }
    CHECK(fast);
    CHECK(slow);
}

TEST_CASE("Critical block: fast behind slow at the end, slow behind fast at the start", "[headway]") {
    // tests/REFERENCES.md B7 (standard result of blocking time theory): for unequal speeds the critical
    // block is the last block of the line section when a fast train follows a slow one, the first
    // when a slow train follows a fast one.  Line section A (3 km) - B (11 km), blocks of 2 km.
    const Fixture fx("two_speed_line.yaml");
    const PlanResult& plan = fx.plan;

    SECTION("fast behind slow") {
        const HeadwayPair& h = pair_of(plan, "S1", "F1");
        CHECK(h.line_section == "A-B");
        const SectionBlocking& crit = blocking_of(plan, "F1", h.critical_section);
        INFO("critical section " << h.critical_section);
        // The last block of the line section: from the 10 km signal (B lies at 11 km).
        CHECK(crit.x_lo >= 10000.0 - 1e-6);
        CHECK(crit.x_lo < 11000.0);
        // [D] from B1: slow tail clears 12 km + 3 s, fast's route from 10 km starts 18 s before
        // it passes 8 km: 9200/16.667 + 3 - 5000/44.444 + 18 = 552 + 3 - 112.5 + 18 = 460.5 s.
        CHECK(h.minimum_headway == Approx(460.5).margin(0.1));
        CHECK(h.scheduled_headway == Approx(1800.0).margin(1e-6));
        CHECK(h.buffer == Approx(1800.0 - 460.5).margin(0.1));
    }
    SECTION("slow behind fast") {
        const HeadwayPair& h = pair_of(plan, "F1", "S2");
        const SectionBlocking& crit = blocking_of(plan, "S2", h.critical_section);
        INFO("critical section " << h.critical_section);
        // The first block of the line section: from the 2 km signal to the 4 km one and its
        // 200 m overlap (A lies at 3 km).
        CHECK(crit.x_lo >= 2000.0 - 1e-6);
        CHECK(crit.x_hi <= 4200.0 + 1e-6);
        // [D] from B1: fast tail clears the overlap end 4.2 km + 3 s, slow's route from 2 km
        // starts 18 s before it passes 0 km: 1400/44.444 + 3 + 3000/16.667 + 18 = 232.5 s.
        CHECK(h.minimum_headway == Approx(232.5).margin(0.1));
    }
    SECTION("the headway matrix keeps the same critical sections") {
        for (const HeadwayMatrixEntry& e : plan.headway_matrix) {
            if (e.leader_type == "SLOW" && e.follower_type == "FAST") CHECK(e.critical_section == "U:10.200-12.000");
            if (e.leader_type == "FAST" && e.follower_type == "SLOW") CHECK(e.critical_section == "U:4.000-4.200");
        }
    }
}

TEST_CASE("Buffer = scheduled headway - minimum headway; negative buffer is a conflict", "[headway][conflict]") {
    // models/DOMAIN.md 4: buffer time = scheduled headway - minimum headway.  FAST behind FAST needs 120 s
    // (B1, see above); F3 runs 160 s after F2, F4 95 s after F3.
    const Fixture fx("two_speed_line.yaml");
    const PlanResult& plan = fx.plan;

    const HeadwayPair& ok = pair_of(plan, "F2", "F3");
    CHECK(ok.scheduled_headway == Approx(160.0).margin(1e-6));
    CHECK(ok.minimum_headway == Approx(120.0).margin(0.05));
    CHECK(ok.buffer == Approx(40.0).margin(0.5));
    CHECK(ok.buffer == Approx(ok.scheduled_headway - ok.minimum_headway).margin(1e-9));

    const HeadwayPair& tight = pair_of(plan, "F3", "F4");
    CHECK(tight.scheduled_headway == Approx(95.0).margin(1e-6));
    CHECK(tight.buffer == Approx(-25.0).margin(0.5));

    // The overlap on the critical section is the missing time (common practice, no source:
    // the stairways overlap by exactly what the shift lacks).
    const std::size_t f3 = train_index(plan, "F3"), f4 = train_index(plan, "F4");
    const Conflict* on_critical = nullptr;
    for (const Conflict& c : plan.conflicts)
        if (c.section == tight.critical_section && c.first == f3 && c.second == f4) on_critical = &c;
    REQUIRE(on_critical != nullptr);
    CHECK(on_critical->overlap == Approx(-tight.buffer).margin(1.0));
    CHECK(on_critical->overlap == Approx(25.0).margin(0.5));
    CHECK(on_critical->from == Approx(blocking_of(plan, "F4", tight.critical_section).start).margin(1e-9));
    // No conflict between trains with positive buffers, and none is larger than the tight pair's.
    for (const Conflict& c : plan.conflicts) {
        CHECK(c.first == f3);
        CHECK(c.second == f4);
        CHECK(c.overlap <= 25.0 + 0.5);
        CHECK(c.overlap > 0.0);
    }
}

TEST_CASE("UIC 406 compression of identical trains: n * h_min", "[capacity]") {
    // tests/REFERENCES.md C1 (UIC Code 406): 12 identical trains with h_min = 3 min in 60 min -> 60 %.
    // The stairway's tightest section is "b" (180 s); "a" and "c" need less.
    std::vector<SectionStairway> trains;
    for (std::size_t k = 0; k < 12; ++k)
        trains.push_back(stairway(k, 6 * 3600.0 + 300.0 * k, {{"a", -60, 90}, {"b", 0, 180}, {"c", 30, 150}}));
    REQUIRE(minimum_headway(trains[0], trains[1])->headway == Approx(180.0).margin(1e-9));
    const double occupation = compressed_occupation(trains);
    CHECK(occupation == Approx(12 * 180.0).margin(1e-6));
    CHECK(occupation / 3600.0 == Approx(0.60).margin(1e-9));
    // One train still occupies its own headway (the cycle closes on itself), none occupies nothing.
    CHECK(compressed_occupation({trains[0]}) == Approx(180.0).margin(1e-9));
    CHECK(compressed_occupation({}) == 0.0);
}

TEST_CASE("UIC 406 compression of a mixed pattern: sum of the headways round the cycle", "[capacity]") {
    // tests/REFERENCES.md C1: compressed in timetable order, the first train of the next cycle
    // following the last.  A (fast) then B (slow) then A again: h(A,B) + h(B,A).  [D]
    const auto fast = [](std::size_t k, double t) { return stairway(k, t, {{"x", -40, 60}, {"y", 0, 80}}); };
    const auto slow = [](std::size_t k, double t) { return stairway(k, t, {{"x", -100, 200}, {"y", -20, 400}}); };
    // h(fast, slow) = max(60+100, 80+20) = 160; h(slow, fast) = max(200+40, 400-0) = 400.
    const double h_fs = 160.0, h_sf = 400.0;
    REQUIRE(minimum_headway(fast(0, 0), slow(1, 1000))->headway == Approx(h_fs).margin(1e-9));
    REQUIRE(minimum_headway(slow(0, 0), fast(1, 1000))->headway == Approx(h_sf).margin(1e-9));
    CHECK(compressed_occupation({fast(0, 0), slow(1, 900)}) == Approx(h_fs + h_sf).margin(1e-9));
    // Grouping like trains saves capacity: F F S S needs 2*h(F,F) + h(F,S) + h(S,S) + h(S,F).
    const double h_ff = 100.0, h_ss = 420.0;  // x: 60+40 vs y: 80; x: 300 vs y: 420
    CHECK(compressed_occupation({fast(0, 0), fast(1, 600), slow(2, 1200), slow(3, 1800)}) ==
          Approx(h_ff + h_fs + h_ss + h_sf).margin(1e-9));
    CHECK(compressed_occupation({fast(0, 0), slow(1, 600), fast(2, 1200), slow(3, 1800)}) ==
          Approx(2 * (h_fs + h_sf)).margin(1e-9));
}

TEST_CASE("UIC 406 consumption of a clock-face timetable", "[capacity][plan]") {
    // tests/REFERENCES.md C1: consumption = trains x minimum headway / window for identical trains;
    // tests/data/plan/clock_face.yaml: 6 trains an hour, 96 a day, h_min 120 s (B1).
    const Fixture fx("clock_face.yaml");
    const PlanResult& plan = fx.plan;
    REQUIRE(plan.trains.size() == 96);
    double h_min = 0.0;
    for (const HeadwayMatrixEntry& e : plan.headway_matrix)
        if (e.line_section == "A-B") h_min = e.minimum_headway;
    CHECK(h_min == Approx(120.0).margin(0.05));

    const ConsumptionLimit limit = uic406_limit(LineType::high_speed);
    int seen = 0;
    for (const CapacityFigure& f : plan.capacity) {
        INFO(f.line_section << " " << f.window);
        CHECK(f.line_section == "A-B");
        CHECK(f.direction == Direction::up);
        if (f.window == "peak hour") {
            ++seen;
            CHECK(f.trains == 6);
            CHECK(f.to - f.from == Approx(3600.0));
            CHECK(f.consumption == Approx(6 * h_min / 3600.0).epsilon(0.01));
            CHECK(f.consumption == Approx(0.20).epsilon(0.01));
            CHECK(f.limit == Approx(limit.peak));
        } else if (f.window == "day") {
            ++seen;
            CHECK(f.trains == 96);
            CHECK(f.to - f.from == Approx(86400.0));
            CHECK(f.consumption == Approx(96 * h_min / 86400.0).epsilon(0.01));
            CHECK(f.consumption == Approx(11520.0 / 86400.0).epsilon(0.01));
            CHECK(f.limit == Approx(limit.day));
        } else {
            FAIL("unexpected window " << f.window);
        }
        CHECK(f.consumption == Approx(f.occupation / (f.to - f.from)).epsilon(1e-12));
    }
    CHECK(seen == 2);  // the down line section carries no trains: no figures for it
}

TEST_CASE("UIC 406 mixed two-train cycle through make_plan", "[capacity][plan]") {
    // tests/REFERENCES.md C1 with B7's headways: the 08:00 hour holds S1 (slow) and F1 (fast), so its
    // compressed occupation is h(S,F) + h(F,S) = 460.5 + 232.5 = 693 s.  [D]
    const Fixture fx("two_speed_line.yaml");
    const CapacityFigure* peak = nullptr;
    for (const CapacityFigure& f : fx.plan.capacity)
        if (f.window == "peak hour") peak = &f;
    REQUIRE(peak != nullptr);
    CHECK(peak->from == Approx(8 * 3600.0));
    CHECK(peak->trains == 2);
    CHECK(peak->occupation == Approx(693.0).margin(0.2));
}

TEST_CASE("Trains count in a line section they run through without a call at its stations",
          "[headway][capacity][plan]") {
    // Guards against taking a train into a line section only when it has calls at both of its
    // stations (models/headway.cpp, stairway_in): then no train here would count at all.
    // models/DOMAIN.md 4: headways and UIC 406 consumption (C1) concern every train that uses the line
    // section in the window.  The README lets a service list only the stations it stops at or is
    // timed at, so a train may run through a station with no call there.  Here the fixture gets a
    // third station M at 7 km that no service lists: the trains still run A -> M -> B.
    std::string text = read_text_file(kDataDir + "two_speed_line.yaml");
    const std::string b_line = "    - {id: B, name: Brackwater, at: 11 km}";
    const auto at = text.find(b_line);
    REQUIRE(at != std::string::npos);
    text.insert(at, "    - {id: M, name: Midhope, at: 7 km}\n");
    const Scenario sc = parse_scenario(text, "two_speed_line_with_m.yaml");  // a valid scenario
    const PlanResult plan = make_plan(sc);

    for (const char* ls : {"A-M", "M-B"}) {
        INFO("line section " << ls);
        // F2 -> F3: identical FAST trains 160 s apart, minimum headway 120 s (B1).
        const HeadwayPair* pair = nullptr;
        for (const HeadwayPair& h : plan.headways)
            if (h.line_section == ls && plan.trains[h.leader].run.service->id == "F2" &&
                plan.trains[h.follower].run.service->id == "F3")
                pair = &h;
        CHECK(pair != nullptr);
        if (pair) {
            CHECK(pair->scheduled_headway == Approx(160.0).margin(0.01));
            CHECK(pair->minimum_headway == Approx(120.0).margin(0.05));
        }
        // All six trains count in the day's consumption (C1).
        std::size_t day_trains = 0;
        for (const CapacityFigure& f : plan.capacity)
            if (f.line_section == ls && f.window == "day") day_trains = f.trains;
        CHECK(day_trains == 6);
    }
}

TEST_CASE("UIC 406 recommended limits, as recalled", "[capacity]") {
    // tests/REFERENCES.md C2: UIC Code 406 recommended limits, peak hour / daily - as recalled, [M].
    CHECK(uic406_limit(LineType::suburban).peak == Approx(0.85));
    CHECK(uic406_limit(LineType::suburban).day == Approx(0.70));
    CHECK(uic406_limit(LineType::high_speed).peak == Approx(0.75));
    CHECK(uic406_limit(LineType::high_speed).day == Approx(0.60));
    CHECK(uic406_limit(LineType::mixed).peak == Approx(0.75));
    CHECK(uic406_limit(LineType::mixed).day == Approx(0.60));
}
