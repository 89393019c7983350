// The movement authority used on its own, through its interface in train, route and section
// indices, as any engine would: a grant only of free sections, what a waiting train is kept
// from and by whom, the set-up and reaction times, releases, and the timetable order's promise.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include "sim/day_records.hpp"
#include "sim/day_state.hpp"
#include "sim/movement_authority.hpp"
#include "sim_test_support.hpp"

namespace knockon {
namespace {

using day::MovementAuthority;

const std::string kTwoTrains = simtest::kSource + "/tests/data/two_trains.yaml";

// What the authority granted, in the order it told of it.
struct Told final : MovementAuthority::Grants {
    std::vector<std::pair<std::uint32_t, long>> grants;   // (train, route or kToAppear)
    void appear_granted(std::uint32_t t, const HoldCause&) override { grants.push_back({t, MovementAuthority::kToAppear}); }
    void route_granted(std::uint32_t t, std::size_t route, const HoldCause&) override {
        grants.push_back({t, static_cast<long>(route)});
    }
};

// The shared state an authority works on, laid out as the engine lays it out.
struct Bench {
    simtest::Loaded f{kTwoTrains};
    InjectedDelays delays = simtest::no_delays(f.plan);
    day::DayEvents events{f.plan.size()};
    std::vector<day::TrainState> states;
    day::DayRecords records{*f.model, delays};
    day::SectionAuthority authority;
    Told told;

    explicit Bench(RouteOrder order) : states(make_states(*f.model)), authority(*f.model, order, states, events, records) {}

    static std::vector<day::TrainState> make_states(const SimModel& model) {
        std::vector<day::TrainState> st(model.trains().size());
        for (std::size_t t = 0; t < st.size(); ++t) {
            const SimModel::Train& tr = model.trains()[t];
            st[t].route_set.assign(tr.routes.size(), kNoTime);
            st[t].route_record.assign(tr.routes.size(), -1);
            st[t].section_record.assign(tr.plan->run.path.sections.size(), -1);
            st[t].holds.assign(tr.plan->run.path.sections.size(), 0);
        }
        return st;
    }
    const SimModel::Train& train(std::uint32_t t) const { return f.model->trains()[t]; }
    std::uint32_t index(const std::string& id) const { return static_cast<std::uint32_t>(f.train_index(id)); }
};

}  // namespace

// Fixed-block route locking (common practice, no source): a route is given only when every
// section it needs is free, and a train waiting for one is kept by the train holding it.
TEST_CASE("movement authority grants only free sections and names who keeps them", "[authority]") {
    Bench b(RouteOrder::first_come);
    const std::uint32_t t1 = b.index("T1"), t2 = b.index("T2");
    // Both trains start at the same platform: they appear on the same sections.
    REQUIRE(b.train(t1).origin_sections == b.train(t2).origin_sections);
    REQUIRE_FALSE(b.train(t1).origin_sections.empty());

    b.authority.ask_to_appear(t1);
    b.authority.ask_to_appear(t2);
    b.authority.grant_pending(b.told);
    REQUIRE(b.told.grants == std::vector<std::pair<std::uint32_t, long>>{{t1, MovementAuthority::kToAppear}});
    for (std::uint32_t k : b.train(t1).origin_path_sections) CHECK(b.states[t1].holds[k] == 1);
    CHECK(b.authority.pending_request(t1) == MovementAuthority::kNothing);
    REQUIRE(b.authority.pending_request(t2) == MovementAuthority::kToAppear);
    std::vector<DeadlockBlock> blocks;
    b.authority.blocks(t2, MovementAuthority::kToAppear, blocks);
    REQUIRE(blocks.size() == b.train(t2).origin_sections.size());
    for (const DeadlockBlock& block : blocks) {
        CHECK(block.by == DeadlockBlock::By::held);
        CHECK(block.train == t1);
    }

    // T1's first route is free: granted at once, set after the set-up time (6 s in the fixture,
    // tests/REFERENCES.md B2), known to the driver the sight-and-reaction time (12 s, B3) later.
    b.authority.ask_for_route(t1, 0);
    b.authority.grant_pending(b.told);
    REQUIRE(b.told.grants.size() == 2);
    CHECK(b.told.grants.back() == std::pair<std::uint32_t, long>{t1, 0});
    CHECK(b.states[t1].route_set[0] == Approx(6.0));
    CHECK_FALSE(b.authority.route_known(t1, 0));
    Event e;
    REQUIRE(b.events.next(e));
    CHECK(e.kind == day::kAuthorityCheck);
    CHECK(e.time.to_seconds() == Approx(18.0));
    CHECK(b.authority.route_known(t1, 0));
    for (std::uint32_t k : b.train(t1).routes[0].path_sections) CHECK(b.states[t1].holds[k] == 1);

    // T1 gives up the platform: T2 may appear; a section given up twice was held once.
    for (std::uint32_t k : b.train(t1).origin_path_sections) {
        CHECK(b.authority.release(t1, k));
        CHECK_FALSE(b.authority.release(t1, k));
    }
    b.authority.grant_pending(b.told);
    REQUIRE(b.told.grants.size() == 3);
    CHECK(b.told.grants.back() == std::pair<std::uint32_t, long>{t2, MovementAuthority::kToAppear});
    CHECK(b.authority.pending_request(t2) == MovementAuthority::kNothing);
}

// Timetable order: a free section is still kept for the train planned to use it first.
TEST_CASE("movement authority in timetable order keeps a free section for the train planned first", "[authority]") {
    Bench b(RouteOrder::timetable);
    const std::uint32_t t1 = b.index("T1"), t2 = b.index("T2");
    b.authority.ask_to_appear(t2);
    b.authority.grant_pending(b.told);
    CHECK(b.told.grants.empty());
    std::vector<DeadlockBlock> blocks;
    b.authority.blocks(t2, b.authority.pending_request(t2), blocks);
    REQUIRE_FALSE(blocks.empty());
    for (const DeadlockBlock& block : blocks) {
        CHECK(block.by == DeadlockBlock::By::promised);
        CHECK(block.train == t1);
    }
    b.authority.ask_to_appear(t1);
    b.authority.grant_pending(b.told);
    REQUIRE(b.told.grants == std::vector<std::pair<std::uint32_t, long>>{{t1, MovementAuthority::kToAppear}});
    // A section out of use keeps every train from it, whoever is planned first.
    const std::uint32_t g = b.train(t1).routes[0].sections.front();
    b.authority.close_section(g);
    b.authority.ask_for_route(t1, 0);
    b.authority.grant_pending(b.told);
    CHECK(b.told.grants.size() == 1);
    blocks.clear();
    b.authority.blocks(t1, 0, blocks);
    REQUIRE(blocks.size() == 1);
    CHECK(blocks[0].section == g);
    CHECK(blocks[0].by == DeadlockBlock::By::disruption);
    b.authority.reopen_section(g);
    b.authority.grant_pending(b.told);
    CHECK(b.told.grants.size() == 2);
}

}  // namespace knockon
