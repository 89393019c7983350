// What the timetable does on a network's single track (models/single_track_plan on the layout of
// models/network/single_track): crossings, stretch capacity and trains too long for the crossing
// place they stand at, with each train's direction on a stretch found from the segments it runs
// over (models/single_track: position_on, stretch_passes).  Checked against hand readings of the
// drawings and timetables at the top of tests/data/network/crossing_branch.yaml and of the network
// demo, scenarios/junction_branch.yaml (hand computation, no source).
#include <catch2/catch.hpp>

#include <optional>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

namespace {

const std::string kCrossingBranch = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/crossing_branch.yaml";
const std::string kDemo = std::string(KNOCKON_SOURCE_DIR) + "/scenarios/junction_branch.yaml";

double hms(int h, int m, int s = 0) { return h * 3600.0 + m * 60.0 + s; }

std::size_t train_of(const PlanResult& plan, const std::string& id) {
    for (std::size_t t = 0; t < plan.trains.size(); ++t)
        if (plan.trains[t].run.service->id == id) return t;
    FAIL("no train " << id);
    return 0;
}

const std::string& id_of(const PlanResult& plan, std::size_t t) { return plan.trains[t].run.service->id; }

std::size_t stretch_named(const SingleTrackLayout& layout, const std::string& name) {
    for (std::size_t s = 0; s < layout.stretches.size(); ++s)
        if (layout.stretches[s].name == name) return s;
    FAIL("no stretch " << name);
    return 0;
}

double stop_s(const ServiceRun& run, const std::string& station) {
    for (const PlannedCall& c : run.calls)
        if (c.station == station) return c.s;
    FAIL("no call at " << station);
    return 0.0;
}

}  // namespace

TEST_CASE("network crossings: trains that start in the same heading cross at a loop between stretches drawn towards it") {
    const Scenario sc = read_scenario(kCrossingBranch);
    const PlanResult plan = make_plan(sc);
    const std::size_t east = train_of(plan, "EAST"), west = train_of(plan, "WEST");
    // Each starts in the forward heading of its first segment (A from Wb, B from Eb) ...
    CHECK(plan.trains[east].run.path.direction == Direction::up);
    CHECK(plan.trains[west].run.path.direction == Direction::up);

    // ... yet on the drawing EAST runs from Wb to the loop (up on Wb-CRS, whose lower place is Wb)
    // and on from the loop to Eb (down on Eb-CRS, whose lower place is Eb); WEST the other way.
    const SingleTrackLayout& layout = plan.single_track;
    const std::size_t wb = stretch_named(layout, "Wb-CRS"), eb = stretch_named(layout, "Eb-CRS");
    CHECK(stretch_direction(layout, wb, plan.trains[east].run.path) == std::optional<Direction>(Direction::up));
    CHECK(stretch_direction(layout, eb, plan.trains[east].run.path) == std::optional<Direction>(Direction::down));
    CHECK(stretch_direction(layout, wb, plan.trains[west].run.path) == std::optional<Direction>(Direction::down));
    CHECK(stretch_direction(layout, eb, plan.trains[west].run.path) == std::optional<Direction>(Direction::up));

    // Where each stands at CRS: 250 m along its loop track from S1 (the place's first node), EAST
    // heading away from S1, WEST towards it.
    const CrossingPlace& crs = layout.places[layout.stretches[wb].upper];
    CHECK(crs.name == "CRS");
    REQUIRE(crs.tracks.size() == 2);
    const auto east_at = position_on(crs.tracks[0].axis, plan.trains[east].run.path, stop_s(plan.trains[east].run, "CRS"));
    const auto west_at = position_on(crs.tracks[1].axis, plan.trains[west].run.path, stop_s(plan.trains[west].run, "CRS"));
    REQUIRE(east_at);
    REQUIRE(west_at);
    CHECK(east_at->x == Approx(250.0));
    CHECK(east_at->direction == Direction::up);
    CHECK(west_at->x == Approx(250.0));
    CHECK(west_at->direction == Direction::down);
    // WEST does not run over L1 at all.
    CHECK_FALSE(position_on(crs.tracks[0].axis, plan.trains[west].run.path, stop_s(plan.trains[west].run, "CRS")));

    // By hand from the timetable: EAST is at CRS 06:03-06:06, WEST 06:04-06:06, so they cross
    // there, each arriving over the stretch the other leaves by.  EAST arrives first and waits on
    // L1 for WEST to come off B; WEST then waits for nothing on A, which EAST left before 06:03.
    CHECK(plan.conflicts.empty());
    CHECK(plan.crossings_too_short.empty());
    REQUIRE(plan.crossings.size() == 1);
    const Crossing& c = plan.crossings.front();
    CHECK(layout.places[c.place].name == "CRS");
    CHECK(c.proper);
    CHECK(id_of(plan, c.waiting) == "EAST");
    CHECK(id_of(plan, c.opposing) == "WEST");
    CHECK(c.waiting_track == "L1");
    CHECK(c.waiting_stops);
    CHECK(c.stretch == eb);
    CHECK(c.other_stretch == wb);
    // WEST releases B after passing EST (06:01) and before it stands at CRS (06:04); EAST blocks it
    // for its departure at 06:06, after its arrival at 06:03.
    CHECK(c.opposing_release > hms(6, 1));
    CHECK(c.opposing_release < hms(6, 4));
    CHECK(c.waiting_blocks > hms(6, 3));
    CHECK(c.waiting_blocks <= hms(6, 6));
    CHECK(c.buffer == Approx(c.waiting_blocks - c.opposing_release));
    CHECK(c.buffer > 0.0);
    CHECK(c.other_buffer > 0.0);

    // Capacity of each stretch counts one train each way over the day.
    REQUIRE(plan.stretch_capacity.size() == 4);
    for (const StretchCapacity& f : plan.stretch_capacity)
        if (f.window == std::string("day")) {
            CHECK(f.trains_up == 1u);
            CHECK(f.trains_down == 1u);
        }
}

TEST_CASE("network crossings: trains longer than the loop they stand in are flagged") {
    // Variant long_train: both trains 550 m long in 500 m loop tracks.  EAST stops with its head
    // 250 m along L1 from S1, heading away from S1: its tail would stand 300 m behind S1.  WEST
    // stops 250 m along L2 heading towards S1: its tail would stand 800 m from S1, 300 m beyond S2.
    const Scenario sc = read_scenario(kCrossingBranch, "long_train");
    const PlanResult plan = make_plan(sc);
    REQUIRE(plan.crossings.size() == 1);
    REQUIRE(plan.crossings_too_short.size() == 2);
    for (const CrossingTooShort& t : plan.crossings_too_short) {
        INFO(id_of(plan, t.train));
        CHECK(t.crossing == 0);
        CHECK(t.lo == 0.0);
        CHECK(t.hi == Approx(500.0));
        CHECK(t.head == Approx(250.0));
        if (id_of(plan, t.train) == "EAST") {
            CHECK(t.track == "L1");
            CHECK(t.tail == Approx(-300.0));
        } else {
            CHECK(id_of(plan, t.train) == "WEST");
            CHECK(t.track == "L2");
            CHECK(t.tail == Approx(800.0));
        }
    }
}

TEST_CASE("network crossings: the demo's branch trains meet one after the other at PLC and HTB and fit its loops") {
    // By hand from the demo's timetable: one train works the branch, leaving Orlen Vale at
    // HH:16 (up, through PLC and HTB to QSB, due about 15 min later) and QSB at HH:46 (down, due
    // at Orlen Vale about 16 min later, before the next leaves at HH+1:16), 06:16 to 20:16.  So no two
    // trains are ever on the branch together: no crossing proper.  The up train and the same
    // hour's down train are one set, turned back at QSB: a set never meets itself, so they make
    // no meeting.  At PLC the down train releases PLC-HTB before the next hour's up train enters
    // it (14 times); at HTB likewise with HTB-QSB.  The 45 m DMU2 stands well inside the 500 m
    // loops: nothing is too long.
    const Scenario sc = read_scenario(kDemo);
    const PlanResult plan = make_plan(sc);
    CHECK(plan.crossings_too_short.empty());
    const SingleTrackLayout& layout = plan.single_track;
    std::size_t at_plc = 0, at_htb = 0;
    for (const Crossing& c : plan.crossings) {
        const std::string& place = layout.places[c.place].name;
        if (place != "PLC" && place != "HTB") continue;
        (place == "PLC" ? at_plc : at_htb) += 1;
        INFO(place << ": " << id_of(plan, c.opposing) << " then " << id_of(plan, c.waiting));
        CHECK_FALSE(c.proper);
        CHECK(c.buffer > 0.0);
        const std::string& opposing = id_of(plan, c.opposing);
        const std::string& waiting = id_of(plan, c.waiting);
        // The down train first, then the next hour's up train, over the stretch the down train came by.
        CHECK(opposing.size() == 9);   // "BR-0616.2": down
        const int next = std::stoi(opposing.substr(3, 2)) + 1;
        CHECK(waiting == "BR-" + std::string(next < 10 ? "0" : "") + std::to_string(next) + "16");
        CHECK(layout.stretches[c.stretch].name == (place == "PLC" ? "PLC-HTB" : "HTB-QSB"));
        // The opposing train releases the stretch between leaving its origin and reaching its
        // terminus; the waiting one blocks it between leaving its origin and reaching its terminus.
        for (const auto& [t, at] : {std::pair{c.opposing, c.opposing_release}, std::pair{c.waiting, c.waiting_blocks}}) {
            const ServiceRun& run = plan.trains[t].run;
            CHECK(at > run.calls.front().planned_departure);
            CHECK(at < run.calls.back().planned_arrival);
        }
    }
    CHECK(at_plc == 14);
    CHECK(at_htb == 14);
}
