// Buffers between trains of different corridors that meet at a junction (models/junction_headway):
// the plan pairs them where their paths meet, with the buffer of blocking time theory (the parts
// of a blocking time: tests/REFERENCES.md B1; the minimum headway as the smallest shift at which
// two stairways touch over the sections both block: Pachl, Railway Operation and Control).  The
// stairways of the first cases are worked out by hand from the blocking-time parts, as in
// test_junction_headway.cpp, and laid on hand-made runs at constant speed.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "models/junction_headway.hpp"
#include "models/plan.hpp"
#include "sim/sim_model.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

namespace {

// The hand computation's interlocking times: route setup 8 s, sight and reaction 12 s, release
// 4 s; three aspects (a block's approach is the block before it); trains 100 m long, no overlap.
constexpr double kSetup = 8.0, kSight = 12.0, kRelease = 4.0, kLength = 100.0;

// Every path here runs 2000 m: a first block to 1000 m (its warning at the signal 1000 m before
// the path starts), the junction's section from 1000 m, and a last block to 2000 m.
constexpr double kPath = 2000.0;

// A block [from, exit] of network section `index` for a train at `speed` whose head is at 0 at
// time `t0`, warned at the signal at `warning`.
SectionBlocking block(const char* id, std::size_t index, double warning, double from, double exit, double speed,
                      double t0) {
    SectionBlocking b;
    b.section = id;
    b.index = index;
    b.s_from = from;
    b.s_to = exit;
    b.start = t0 + warning / speed - kSight - kSetup;
    b.end = t0 + (exit + kLength) / speed + kRelease;
    return b;
}

// A train at constant `speed` over the path from station `from` (at 0) to `to` (at kPath), its
// head at 0 at time t0.
TrainPlan train(const char* from, const char* to, double speed, double t0, std::vector<SectionBlocking> blocks) {
    static const TrainType type = [] {
        TrainType t;
        t.id = "T";
        t.length = kLength;
        return t;
    }();
    TrainPlan tp;
    ServiceRun& r = tp.run;
    r.type = &type;
    r.path.length = kPath;
    r.path.stations = {{from, 0.0}, {to, kPath}};
    Trajectory tr;
    tr.s0 = 0.0;
    tr.step = kPath;
    tr.s_end = kPath;
    tr.v = {speed, speed};
    tr.t = {0.0, kPath / speed};
    r.legs.push_back({tr, t0, {}});
    r.appear_time = t0;
    r.vanish_time = t0 + kPath / speed;
    tp.stairway.sections = std::move(blocks);
    return tp;
}

// Network section indices of the hand-made layout; J and X are node sections.
enum : std::size_t { M1, J, M2, B1, X, A1, A2, C1, C2, kSections };

std::vector<bool> nodes() {
    std::vector<bool> out(kSections, false);
    out[J] = out[X] = true;
    return out;
}

std::vector<HeadwayPair> junction_pairs(const std::vector<LineSection>& sections, const std::vector<TrainPlan>& trains) {
    return junction_headways(sections, nodes(), trains, consecutive_headways(sections, trains));
}

}  // namespace

TEST_CASE("junction buffers: a branch train merging behind a main-line train") {
    // Main line MA to MB over M1, J, M2 at 20 m/s from t = 0; the branch train from BA over its
    // own block B1 to J and M2 at 10 m/s from t = 100 s.
    const std::vector<TrainPlan> trains = {
        train("MA", "MB", 20.0, 0.0,
              {block("M1", M1, -1000, 0, 1000, 20, 0), block("J", J, 0, 1000, 1100, 20, 0),
               block("M2", M2, 1000, 1100, 2000, 20, 0)}),
        train("BA", "MB", 10.0, 100.0,
              {block("B1", B1, -1000, 0, 1000, 10, 100), block("J", J, 0, 1000, 1100, 10, 100),
               block("M2", M2, 1000, 1100, 2000, 10, 100)})};
    const std::vector<LineSection> sections = {{"MA", "MB", Direction::up, "Main"},
                                               {"BA", "MB", Direction::up, "Branch"}};
    // No line section holds both trains, so the line sections pair nothing.
    REQUIRE(consecutive_headways(sections, trains).empty());
    const std::vector<HeadwayPair> pairs = junction_pairs(sections, trains);
    REQUIRE(pairs.size() == 1);
    const HeadwayPair& p = pairs[0];
    CHECK(p.leader == 0);
    CHECK(p.follower == 1);
    CHECK(p.junction == "J");
    CHECK(headway_place(p) == "junction J");
    // By hand (blocking time theory, tests/REFERENCES.md B1): the main-line train blocks J from
    // -20 s to 1200/20 + 4 = 64 s and M2 from 1000/20 - 20 = 30 s to 2100/20 + 4 = 109 s; the
    // branch train J from 100 - 20 = 80 s, M2 from 100 + 1000/10 - 20 = 180 s.  Heads reach J at
    // 1000/20 = 50 s and 100 + 1000/10 = 200 s: scheduled headway 150 s.  Minimum headway with
    // those references: J (64 - 50) - (-20 - 100) = 134 s, M2 (109 - 50) - (80 - 100) = 79 s:
    // 134 s, critical at J; buffer 150 - 134 = 16 s (= 80 - 64, J's gap).
    CHECK(p.scheduled_headway == Approx(150.0));
    CHECK(p.minimum_headway == Approx(134.0));
    CHECK(p.buffer == Approx(16.0));
    CHECK(p.critical_section == "J");
    CHECK(p.critical_index == J);

    // Two main-line trains are a line section's pair, not a junction's: a second one behind the
    // first adds no junction pair, and the branch train is then paired with the train before it.
    std::vector<TrainPlan> three = trains;
    three.push_back(train("MA", "MB", 20.0, 60.0,
                          {block("M1", M1, -1000, 0, 1000, 20, 60), block("J", J, 0, 1000, 1100, 20, 60),
                           block("M2", M2, 1000, 1100, 2000, 20, 60)}));
    const std::vector<HeadwayPair> line = consecutive_headways(sections, three);
    REQUIRE(line.size() == 1);
    CHECK(line[0].junction.empty());
    const std::vector<HeadwayPair> at_j = junction_pairs(sections, three);
    REQUIRE(at_j.size() == 1);
    CHECK(at_j[0].leader == 2);
    CHECK(at_j[0].follower == 1);
    // J's gap: 80 - (60 + 64) = -44 s, a conflict.
    CHECK(at_j[0].buffer == Approx(-44.0));
}

TEST_CASE("junction buffers: two trains crossing on a diamond") {
    // Train A (corridor East, EA to EB) and train B (corridor North, NA to NB) cross on the
    // diamond X, 1000 to 1050 m along each path; A at 20 m/s from t = 0, B at 15 m/s from 90 s.
    const std::vector<TrainPlan> trains = {
        train("EA", "EB", 20.0, 0.0,
              {block("A1", A1, -1000, 0, 1000, 20, 0), block("X", X, 0, 1000, 1050, 20, 0),
               block("A2", A2, 1000, 1050, 2000, 20, 0)}),
        train("NA", "NB", 15.0, 90.0,
              {block("C1", C1, -1000, 0, 1000, 15, 90), block("X", X, 0, 1000, 1050, 15, 90),
               block("C2", C2, 1000, 1050, 2000, 15, 90)})};
    const std::vector<LineSection> sections = {{"EA", "EB", Direction::up, "East"},
                                               {"NA", "NB", Direction::up, "North"}};
    const std::vector<HeadwayPair> pairs = junction_pairs(sections, trains);
    REQUIRE(pairs.size() == 1);
    const HeadwayPair& p = pairs[0];
    CHECK(p.leader == 0);
    CHECK(p.follower == 1);
    CHECK(p.junction == "X");
    // By hand (B1): A blocks X from -20 s to 1150/20 + 4 = 61.5 s; B from 90 - 20 = 70 s.  Heads
    // reach X at 50 s and 90 + 1000/15 = 156.667 s: scheduled 106.667 s.  They share X alone:
    // minimum (61.5 - 50) - (-20 - 66.667) = 98.167 s; buffer 8.5 s (= 70 - 61.5).
    CHECK(p.scheduled_headway == Approx(90.0 + 1000.0 / 15.0 - 50.0));
    CHECK(p.minimum_headway == Approx(11.5 + 20.0 + 1000.0 / 15.0));
    CHECK(p.buffer == Approx(8.5));
    CHECK(p.critical_section == "X");

    // The same two trains given one corridor (a line's case) share a corridor at X: no pair.
    const std::vector<LineSection> one = {{"EA", "EB", Direction::up, ""}, {"NA", "NB", Direction::up, ""}};
    CHECK(junction_pairs(one, trains).empty());
    // Nor is a section that is no switch's or diamond's a junction section.
    CHECK(junction_headways(sections, std::vector<bool>(kSections, false), trains, {}).empty());
}

TEST_CASE("junction buffers: the network demo pairs trains at its junction and a line gets none") {
    // Line demo: one corridor, no junction pairs, and the study's buffer pairs are the line
    // sections' pairs alone.
    {
        const Scenario sc = read_scenario(std::string(KNOCKON_SOURCE_DIR) + "/scenarios/demo.yaml");
        const PlanResult plan = make_plan(sc);
        CHECK(plan.junction_headways.empty());
        const SimModel model(sc, plan.trains);
        CHECK(model.buffer_pairs().size() == plan.headways.size());
    }
    const Scenario sc = read_scenario(std::string(KNOCKON_SOURCE_DIR) + "/scenarios/junction_branch.yaml");
    const PlanResult plan = make_plan(sc);
    REQUIRE_FALSE(plan.junction_headways.empty());
    bool crossing_at_x = false, merging_at_j2 = false;
    for (const HeadwayPair& h : plan.junction_headways) {
        INFO(plan.trains[h.leader].run.service->id << " -> " << plan.trains[h.follower].run.service->id << " at "
                                                    << h.junction);
        // Only the flat junction's switches and diamond are junction sections (J3 and the loops'
        // switches carry branch trains alone).
        CHECK((h.junction == "J1" || h.junction == "X" || h.junction == "J2"));
        CHECK(h.buffer == Approx(h.scheduled_headway - h.minimum_headway));
        const bool branch_l = plan.trains[h.leader].run.service->category == "branch";
        const bool branch_f = plan.trains[h.follower].run.service->category == "branch";
        CHECK(branch_l != branch_f);   // a main-line train and a branch train
        crossing_at_x |= h.junction == "X";
        merging_at_j2 |= h.junction == "J2";
        // A negative buffer is a conflict the plan lists between the two trains (blocking times
        // that overlap), and a conflict between them at a junction section comes with a pair.
        bool listed = false;
        for (const Conflict& c : plan.conflicts)
            listed |= c.first == h.leader && c.second == h.follower && c.link < 0;
        CHECK(listed == (h.buffer < -1e-6));
    }
    CHECK(crossing_at_x);
    CHECK(merging_at_j2);
    // The study measures them: every junction pair is a buffer pair named after its junction.
    const SimModel model(sc, plan.trains);
    std::size_t at_junctions = 0;
    for (const SimModel::BufferPair& bp : model.buffer_pairs())
        if (bp.line_section.rfind("junction ", 0) == 0) {
            ++at_junctions;
            CHECK(model.section_names()[bp.section] != "");
        }
    CHECK(at_junctions == plan.junction_headways.size());
    CHECK(model.buffer_pairs().size() == plan.headways.size() + plan.junction_headways.size());
}
