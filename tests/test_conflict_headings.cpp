// A plan conflict's kind on a network reads the way the two trains run over the conflict's own
// section (models/path: section_meeting, from each path's runs over the segments), not the
// heading each path starts in.  Checked against hand readings of the drawings at the top of
// tests/data/network/meeting_headings.yaml (hand reading, no source).
#include <catch2/catch.hpp>

#include <map>
#include <set>
#include <string>
#include <utility>

#include "models/plan.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

namespace {

const std::string kMeetings = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/meeting_headings.yaml";

// The conflicts of a pair of trains (either order): section -> kind.
std::map<std::string, std::string> kinds_between(const PlanResult& plan, const std::string& a, const std::string& b) {
    std::map<std::string, std::string> out;
    for (const Conflict& c : plan.conflicts) {
        const std::set<std::string> pair{plan.trains[c.first].run.service->id, plan.trains[c.second].run.service->id};
        if (pair == std::set<std::string>{a, b}) out[c.section] = conflict_kind(c);
    }
    return out;
}

const TrainPath& path_of(const PlanResult& plan, const std::string& id) {
    for (const TrainPlan& tp : plan.trains)
        if (tp.run.service->id == id) return tp.run.path;
    FAIL("no train " << id);
    return plan.trains.front().run.path;
}

}  // namespace

TEST_CASE("trains starting in different headings that run one way over a section do not oppose there",
          "[network][plan][conflicts]") {
    const Scenario sc = read_scenario(kMeetings);
    const PlanResult plan = make_plan(sc);
    // P starts heading forward on GA, Q heading backward on GB: their paths start in different
    // directions, which is not how they meet.
    REQUIRE(path_of(plan, "P").direction != path_of(plan, "Q").direction);
    const auto kinds = kinds_between(plan, "P", "Q");
    // Both pass J at 06:00 plus a few seconds on the way to GT: conflicts on GT's sections and on J.
    REQUIRE(kinds.count("J"));
    std::size_t on_gt = 0;
    for (const auto& [section, kind] : kinds) {
        INFO(section);
        if (section.rfind("GT:", 0) == 0) {
            ++on_gt;
            CHECK(kind == "same direction");   // both run forward over GT
        }
    }
    CHECK(on_gt >= 2);
    // J's own section reaches only along its legs (its toe side ends at the switch): P runs over
    // GA's part, Q over GB's; they share no track of it, their routes converge there.
    CHECK(kinds.at("J") == "converging or crossing routes");
}

TEST_CASE("trains starting in one heading that meet head-on in a crossing place's track oppose there",
          "[network][plan][conflicts]") {
    const Scenario sc = read_scenario(kMeetings);
    const PlanResult plan = make_plan(sc);
    // R and S both start heading forward (HX from WX, HZ from WZ), so their paths start in one
    // direction, yet both are timetabled over HL1 at once from its two ends.
    REQUIRE(path_of(plan, "R").direction == path_of(plan, "S").direction);
    const auto kinds = kinds_between(plan, "R", "S");
    std::size_t on_loop = 0, on_stretch = 0;
    for (const auto& [section, kind] : kinds) {
        INFO(section << ": " << kind);
        const SingleTrackStretch* st = plan.single_track.stretch_of_section(section);
        if (section.rfind("HL1:", 0) == 0) {
            // The loop's track between its switches' fouling points is the crossing place's, in
            // no single-track stretch: opposing, with no stretch named.
            ++on_loop;
            CHECK(st == nullptr);
            CHECK(kind == "opposing trains");
        } else if (st) {
            ++on_stretch;
            CHECK(kind == "opposing trains on single-track stretch " + st->name);
        }
    }
    CHECK(on_loop >= 1);
    CHECK(on_stretch >= 2);   // over HX and HZ too, one stretch each side of the loop
}

TEST_CASE("a section's meeting reads each path's heading over the segments both use", "[network][plan][conflicts]") {
    const Scenario sc = read_scenario(kMeetings);
    const PlanResult plan = make_plan(sc);
    const TrainPath &p = path_of(plan, "P"), &q = path_of(plan, "Q"), &r = path_of(plan, "R"), &s = path_of(plan, "S");
    std::string gt, hl1;
    for (const PathSection& sec : p.sections)
        if (sec.id.rfind("GT:", 0) == 0 && gt.empty()) gt = sec.id;
    for (const PathSection& sec : r.sections)
        if (sec.id.rfind("HL1:0.050", 0) == 0) hl1 = sec.id;
    REQUIRE(!gt.empty());
    REQUIRE(!hl1.empty());
    CHECK(section_meeting(p, q, gt) == SectionMeeting::same);
    CHECK(section_meeting(r, s, hl1) == SectionMeeting::opposing);
    CHECK(section_meeting(s, r, hl1) == SectionMeeting::opposing);   // the same whichever is asked first
    CHECK(section_meeting(p, q, "J") == SectionMeeting::apart);
    CHECK(section_meeting(p, r, gt) == SectionMeeting::apart);       // R never runs over GT
}
