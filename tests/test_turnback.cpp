// A turnback at a terminus: the set that reverses never leaves its platform, so the platform is
// blocked from the arrival of the incoming part to the departure of the return part plus its
// clearing and release, in the plan's blocking times and in the simulation alike, and a train
// timetabled onto the platform in between must wait (tests/data/network/turnback.yaml).
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <string>

#include "models/plan.hpp"
#include "sim_test_support.hpp"
#include "tools/read/network_reader.hpp"

namespace knockon {
namespace {

const std::string kTurnback = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/turnback.yaml";
// The platform track's section the set stands on: from the signal X (60 m) to the buffer stop.
const std::string kPlatform = "P:0.060-0.300";
// The file's interlocking and the train type's minimum dwell [s].
constexpr double kRelease = 4.0, kMinDwell = 30.0;

const SectionBlocking& blocking(const TrainPlan& tp, const std::string& section) {
    for (const SectionBlocking& b : tp.stairway.sections)
        if (b.section == section) return b;
    FAIL("train " << tp.run.service->id << " does not block " << section);
    return tp.stairway.sections.front();
}

const TrainPlan& train(const std::vector<TrainPlan>& plan, const std::string& id) {
    return plan[simtest::index_of(plan, id)];
}

}  // namespace

TEST_CASE("turnback: the plan blocks the platform from arrival to departure plus release", "[network][turnback]") {
    const Scenario scenario = network_scenario(read_network(kTurnback));
    const PlanResult plan = make_plan(scenario);
    const TrainPlan& in = train(plan.trains, "S");
    const TrainPlan& out = train(plan.trains, "S.2");
    const SectionBlocking& a = blocking(in, kPlatform);
    const SectionBlocking& b = blocking(out, kPlatform);
    const double arrival = in.run.calls.back().planned_arrival;
    const double departure = out.run.calls.front().planned_departure;
    REQUIRE(departure == 6 * 3600.0 + 15 * 60.0);   // 06:15 as the file gives it
    // By hand, blocking time theory (tests/REFERENCES.md B1: blocked from the route's set-up to
    // the tail's clearing plus the release time), with the set standing on the platform between:
    // the incoming part holds the platform from before its arrival (its route in) ...
    CHECK(a.start < arrival);
    // ... to its end, arrival plus the minimum dwell, where the return part takes it over with no
    // release between (the set does not leave) ...
    CHECK(a.end == Approx(arrival + kMinDwell).margin(1e-9));
    CHECK(b.start == a.end);
    CHECK(b.occupied_from == a.end);
    // ... and the return part holds it until its tail has cleared it after the departure, plus
    // the release time: departure + clearing + release.
    const PathSection& sec = *std::find_if(out.run.path.sections.begin(), out.run.path.sections.end(),
                                           [](const PathSection& p) { return p.id == kPlatform; });
    CHECK(b.end == Approx(out.run.tail_clear(sec.s_to) + kRelease).margin(1e-9));
    CHECK(b.end > departure + kRelease);
    // The train timetabled onto the platform in between conflicts with the set standing there.
    bool conflict = false;
    for (const Conflict& c : plan.conflicts)
        conflict = conflict || (c.section == kPlatform && plan.trains[c.second].run.service->id == "F" &&
                                plan.trains[c.first].run.service->id == "S.2");
    CHECK(conflict);
    // The two parts of the set never conflict with each other.
    for (const Conflict& c : plan.conflicts)
        CHECK_FALSE((plan.trains[c.first].run.service->id == "S" && plan.trains[c.second].run.service->id == "S.2"));
}

TEST_CASE("turnback: in the simulation no train enters the platform while the set stands there", "[network][turnback]") {
    const simtest::DayPtr day = simtest::simulate(network_scenario(read_network(kTurnback)));
    const SimResult& r = day->result;
    REQUIRE_FALSE(r.deadlock.deadlocked);
    const auto id = [&](const std::string& name) {
        return static_cast<std::uint32_t>(simtest::index_of(day->plan, name));
    };
    const std::uint32_t platform = static_cast<std::uint32_t>(
        std::find(r.section_names.begin(), r.section_names.end(), kPlatform) - r.section_names.begin());
    REQUIRE(platform < r.section_names.size());
    auto record = [&](std::uint32_t t, std::uint32_t section) -> const SectionRecord& {
        for (const SectionRecord& s : r.sections)
            if (s.train == t && s.section == section) return s;
        FAIL("no record of " << r.train_ids[t] << " on " << r.section_names[section]);
        return r.sections.front();
    };
    const SectionRecord& in = record(id("S"), platform);
    const SectionRecord& out = record(id("S.2"), platform);
    const SectionRecord& other = record(id("F"), platform);
    const TrainPlan& s = train(day->plan, "S");
    const double arrival = s.run.calls.back().planned_arrival;
    const double departure = 6 * 3600.0 + 15 * 60.0;
    // The set reaches the platform as planned and hands it to its return part at arrival plus
    // the minimum dwell (to the engine's millisecond), with no release and no gap between.
    CHECK(in.head_enters < arrival);
    CHECK(in.released == Approx(arrival + kMinDwell).margin(1e-3));
    CHECK(out.locked == in.released);
    // The return part leaves on time and releases the platform after its departure plus the
    // release time (blocking time theory, tests/REFERENCES.md B1: tail cleared plus release).
    for (const TimingRecord& t : r.timing)
        if (t.train == id("S.2") && t.station == "PNK") CHECK(t.departure == Approx(departure).margin(1e-3));
    CHECK(out.released == Approx(out.tail_clears + kRelease).margin(1e-3));
    CHECK(out.released > departure + kRelease);
    // F, timetabled onto the platform at 06:08, gets its route in only once the set has gone.
    CHECK(other.locked >= out.released);
    for (const RouteRecord& rr : r.routes)
        if (rr.train == id("F") && rr.entry_signal == "U2") CHECK(rr.granted >= out.released);
    // No section is ever held by two trains at once (common practice, no source: the
    // interlocking's rule).
    for (const SectionRecord& x : r.sections)
        for (const SectionRecord& y : r.sections) {
            if (&x == &y || x.section != y.section || x.train == y.train) continue;
            const bool apart = x.released <= y.locked + 1e-9 || y.released <= x.locked + 1e-9;
            INFO(r.train_ids[x.train] << " and " << r.train_ids[y.train] << " on " << r.section_names[x.section]);
            CHECK(apart);
        }
}

}  // namespace knockon
