// The dispatcher (route order `dispatch`, sim/dispatch.hpp) on a network's single track, where a
// train's direction on a stretch is not the heading it starts in: tests/data/network/crossing_branch.yaml,
// whose two stretches are drawn towards the loop CRS, so that EAST and WEST both start "forward"
// yet meet head-on.  The rule and the figures below are our own (hand computation, no source).
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "sim/simulation.hpp"
#include "sim_test_support.hpp"

using namespace knockon;

namespace {

const std::string kCrossingBranch = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/crossing_branch.yaml";

using simtest::Loaded;

// The as-run record of train t at station `station`.
const TimingRecord& at(const SimResult& day, std::uint32_t t, const std::string& station) {
    for (const TimingRecord& r : day.timing)
        if (r.train == t && r.station == station) return r;
    FAIL("no record of train " << t << " at " << station);
    return day.timing.front();
}

}  // namespace

TEST_CASE("dispatch on a network: a late train's crossing is kept at the loop or moved by the crossing rule", "[dispatch][simulation]") {
    const Loaded f(kCrossingBranch);
    const auto east = static_cast<std::uint32_t>(f.train_index("EAST")), west = static_cast<std::uint32_t>(f.train_index("WEST"));
    // On the network the two trains oppose each other on both stretches, whatever their paths'
    // own directions say (both "up": each starts forward on its first segment).
    for (const StretchUse& u : f.model->trains()[east].stretch_uses) {
        const StretchUse* w = f.model->trains()[west].use_of(u.stretch);
        REQUIRE(w);
        CHECK(w->direction != u.direction);
    }
    SimOptions options;
    options.route_order = RouteOrder::dispatch;

    // Undisturbed: as planned, EAST waits at CRS (06:03-06:06) for WEST, due there at 06:04.
    const SimResult plain = simulate_day(*f.model, simtest::no_delays(f.plan), options);
    REQUIRE_FALSE(plain.deadlock.deadlocked);
    CHECK(plain.crossing_changes.empty());
    for (const TimingRecord& r : plain.timing) CHECK(r.knock_on == 0.0);

    // WEST enters 6 min late.  When EAST asks for the stretch towards Eb (for its 06:06
    // departure), WEST has not yet come onto it and is forecast to clear it about 06:10; EAST
    // going first would hold WEST outside Eb until EAST has run the 3 km to it, which costs more.
    // So the planned order stands: EAST waits on L1 until WEST is in the loop, and both reach the
    // ends of their paths.
    InjectedDelays delays = simtest::no_delays(f.plan);
    delays.entry[west] = 6.0 * 60.0;
    const SimResult kept = simulate_day(*f.model, delays, options);
    REQUIRE_FALSE(kept.deadlock.deadlocked);
    CHECK(kept.crossing_changes.empty());
    CHECK(at(kept, east, "CRS").departure > at(kept, west, "CRS").arrival);
    CHECK(at(kept, east, "CRS").knock_on > 60.0);   // it waited beyond its 06:06 departure
    CHECK(at(kept, east, "EST").arrival_delay > 60.0);

    // WEST 15 min late: the dispatcher forecasts WEST's delay from what it has seen (the time it
    // has not yet come in), so EAST waits at CRS until waiting would cost it more than going
    // first costs WEST (held outside Eb only for what EAST still needs of the stretch); then
    // EAST goes, and the crossing moves to Eb, the end of the single line: EAST leaves CRS before
    // WEST arrives there.
    delays.entry[west] = 15.0 * 60.0;
    const SimResult moved = simulate_day(*f.model, delays, options);
    REQUIRE_FALSE(moved.deadlock.deadlocked);
    CHECK(at(moved, east, "CRS").departure < at(moved, west, "CRS").arrival);
    REQUIRE(moved.crossing_changes.size() == 1);
    const CrossingChange& c = moved.crossing_changes.front();
    CHECK(c.kind == CrossingChange::Kind::moved_crossing);
    CHECK(c.planned_place == "CRS");
    CHECK(c.actual_place == "Eb");
    CHECK(((c.first == east && c.second == west) || (c.first == west && c.second == east)));
    CHECK(std::isfinite(c.first_change));
    CHECK(std::isfinite(c.second_change));
}
