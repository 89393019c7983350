// A day's figures as bytes between the processes of one study (tools/results/replication_bytes), and a
// study folded from blocks run apart (the way the ranks of an MPI run share a study): the days
// come back to the bit, and the folded study equals one run's to the bit.
#include <catch2/catch.hpp>

#include <cstring>
#include <string>
#include <vector>

#include "sim/delay_draws.hpp"
#include "sim/shards.hpp"
#include "sim/study.hpp"
#include "tools/results/replication_bytes.hpp"
#include "sim_test_support.hpp"

using namespace knockon;

namespace {

const std::string kSource = KNOCKON_SOURCE_DIR;
// Under first-come route setting about a third of its days end in deadlock: both kinds of day.
const std::string kCrossings = kSource + "/tests/data/study/single_line_crossings.yaml";

StudyOptions crossing_study(const simtest::Loaded& f, std::uint32_t replications) {
    StudyOptions opt;
    opt.replications = replications;
    opt.batch = 7;
    opt.sim.route_order = RouteOrder::first_come;
    opt.draw = [&f](std::uint32_t k) { return draw_delays(f.scenario, f.plan, 1, k); };
    return opt;
}

// Equal to the bit (NaN included), not merely ==.
template <class T>
bool same_bits(const T& a, const T& b) {
    return std::memcmp(&a, &b, sizeof(T)) == 0;
}
template <class T>
bool same_bits(const std::vector<T>& a, const std::vector<T>& b) {
    return a.size() == b.size() && (a.empty() || std::memcmp(a.data(), b.data(), a.size() * sizeof(T)) == 0);
}
bool same_bits(const Estimate& a, const Estimate& b) {
    return same_bits(a.mean, b.mean) && same_bits(a.half_width, b.half_width) && same_bits(a.lower, b.lower) &&
           same_bits(a.upper, b.upper) && a.n == b.n;
}

void check_same_day(const ReplicationFigures& a, const ReplicationFigures& b) {
    CHECK(a.stats.replication == b.stats.replication);
    CHECK(a.stats.deadlocked == b.stats.deadlocked);
    CHECK(a.stats.events == b.stats.events);
    CHECK(a.stats.block_passages == b.stats.block_passages);
    CHECK(same_bits(a.stats.total_primary, b.stats.total_primary));
    CHECK(same_bits(a.stats.total_knock_on, b.stats.total_knock_on));
    CHECK(same_bits(a.stats.mean_arrival_delay, b.stats.mean_arrival_delay));
    CHECK(a.stats.moved_crossings == b.stats.moved_crossings);
    CHECK(a.stats.changed_orders == b.stats.changed_orders);
    CHECK(a.stats.missed_connections == b.stats.missed_connections);
    CHECK(same_bits(a.stats.punctuality, b.stats.punctuality));
    CHECK(a.deadlock.deadlocked == b.deadlock.deadlocked);
    CHECK(same_bits(a.deadlock.time, b.deadlock.time));
    CHECK(a.deadlock.cause == b.deadlock.cause);
    CHECK(a.deadlock.description == b.deadlock.description);
    CHECK(same_bits(a.arrival_delay, b.arrival_delay));
    CHECK(same_bits(a.knock_on, b.knock_on));
    CHECK(same_bits(a.train_primary, b.train_primary));
    CHECK(same_bits(a.train_knock_on, b.train_knock_on));
    CHECK(same_bits(a.train_final_delay, b.train_final_delay));
    CHECK(a.held.size() == b.held.size());
    for (const auto& [signal, seconds] : a.held) {
        const auto it = b.held.find(signal);
        REQUIRE(it != b.held.end());
        CHECK(same_bits(seconds, it->second));
    }
    CHECK(same_bits(a.section_blocked, b.section_blocked));
    CHECK(same_bits(a.buffer, b.buffer));
    CHECK(a.attribution_layout == b.attribution_layout);
    CHECK(same_bits(a.attribution, b.attribution));
}

}  // namespace

TEST_CASE("a day's figures go through bytes unchanged to the bit", "[study][ranks]") {
    const simtest::Loaded f(kCrossings);
    const StudyOptions opt = crossing_study(f, 1);
    std::vector<ReplicationFigures> days;
    std::string bytes;
    bool deadlocked = false, complete = false;
    for (std::uint32_t k = 0; k < 12; ++k) {
        const InjectedDelays d = opt.draw(k);
        SimResult day = simulate_day(*f.model, d, opt.sim);
        days.push_back(replication_figures(*f.model, day, d, opt.thresholds, k));
        append_day_bytes(bytes, days.back());
        (day.deadlock.deadlocked ? deadlocked : complete) = true;
    }
    // Both kinds of day, or the NaN means and the deadlock texts go untested.
    REQUIRE(deadlocked);
    REQUIRE(complete);

    std::size_t at = 0;
    for (const ReplicationFigures& day : days) check_same_day(day, read_day_bytes(bytes, at));
    CHECK(at == bytes.size());

    SECTION("bytes that end early are refused, never read past") {
        std::string one;
        append_day_bytes(one, days.front());
        for (std::size_t cut = 0; cut < one.size(); ++cut) {
            const std::string part = one.substr(0, cut);
            std::size_t from = 0;
            CHECK_THROWS_AS(read_day_bytes(part, from), ReplicationBytesError);
        }
    }
    SECTION("a count beyond the bytes is refused before anything is made for it") {
        std::string one;
        append_day_bytes(one, days.front());
        // The punctuality count follows replication (4), deadlocked (1), events and passages (8
        // each), three doubles (8 each) and the crossings moved, orders changed and connections
        // missed (4 each).
        const std::size_t count_at = 4 + 1 + 8 + 8 + 3 * 8 + 3 * 4;
        const std::uint64_t huge = std::uint64_t{1} << 60;
        std::memcpy(one.data() + count_at, &huge, sizeof huge);
        std::size_t from = 0;
        CHECK_THROWS_AS(read_day_bytes(one, from), ReplicationBytesError);
    }
}

TEST_CASE("a study folded from blocks run apart equals one run to the bit", "[study][ranks]") {
    // As the ranks of an MPI run share a study: the first block runs sized for the whole study,
    // the later blocks' days come as bytes and are folded after it in block order.
    const simtest::Loaded f(kCrossings);
    const std::uint32_t planned = 40, blocks = 3;
    const StudyOptions whole_opt = crossing_study(f, planned);
    const StudyResult whole = run_study(*f.model, whole_opt);

    StudyOptions first = whole_opt;
    const ReplicationRange r1 = shard_range(1, blocks, planned);
    first.replications = r1.size();
    first.planned = planned;
    StudyResult folded = run_study(*f.model, first);
    for (std::uint32_t b = 2; b <= blocks; ++b) {
        const ReplicationRange r = shard_range(b, blocks, planned);
        StudyOptions later = whole_opt;
        later.first = r.first;
        later.replications = r.size();
        later.threads = b;   // any thread count
        std::string bytes;
        later.on_day = [&bytes](const ReplicationFigures& day) { append_day_bytes(bytes, day); };
        run_study(*f.model, later);
        for (std::size_t at = 0; at < bytes.size();) fold_day(folded, read_day_bytes(bytes, at));
    }

    const StudySummary a = summarize_study(*f.model, whole, whole_opt.thresholds);
    const StudySummary b = summarize_study(*f.model, folded, whole_opt.thresholds);
    // The fixture must give both kinds of day, or the deadlock path goes untested.
    REQUIRE(a.deadlocked > 0);
    REQUIRE(a.complete > 0);
    CHECK(b.replications == a.replications);
    CHECK(b.deadlocked == a.deadlocked);
    REQUIRE(b.first_deadlock);
    CHECK(b.first_deadlock->replication == a.first_deadlock->replication);
    CHECK(b.first_deadlock->report.cause == a.first_deadlock->report.cause);
    CHECK(same_bits(b.total_primary, a.total_primary));
    CHECK(same_bits(b.total_knock_on, a.total_knock_on));
    CHECK(same_bits(b.mean_arrival_delay, a.mean_arrival_delay));
    REQUIRE(a.moved_crossings.mean > 0.0);   // the single line moves crossings on some days
    CHECK(same_bits(b.moved_crossings, a.moved_crossings));
    CHECK(same_bits(b.changed_orders, a.changed_orders));
    CHECK(same_bits(b.knock_on_ratio, a.knock_on_ratio));
    REQUIRE(b.timing_points.size() == a.timing_points.size());
    for (std::size_t i = 0; i < a.timing_points.size(); ++i) {
        CHECK(same_bits(b.timing_points[i].delay, a.timing_points[i].delay));
        CHECK(same_bits(b.timing_points[i].knock_on, a.timing_points[i].knock_on));
        CHECK(same_bits(b.timing_points[i].delay_quantiles.p95, a.timing_points[i].delay_quantiles.p95));
    }
    REQUIRE(b.buffers.size() == a.buffers.size());
    REQUIRE_FALSE(a.buffers.empty());
    for (std::size_t i = 0; i < a.buffers.size(); ++i) {
        CHECK(same_bits(b.buffers[i].as_run, a.buffers[i].as_run));
        // Needs the first block's figures sized for the whole study (StudyOptions::planned).
        CHECK(same_bits(b.buffers[i].p10, a.buffers[i].p10));
    }
    REQUIRE(b.signals.size() == a.signals.size());
    for (std::size_t i = 0; i < a.signals.size(); ++i) {
        CHECK(b.signals[i].signal == a.signals[i].signal);
        CHECK(same_bits(b.signals[i].held, a.signals[i].held));
    }
    // Where the knock-on came from: every source, place and buffer the same to the bit.
    REQUIRE_FALSE(a.attribution.sources.empty());
    REQUIRE(b.attribution.sources.size() == a.attribution.sources.size());
    for (std::size_t i = 0; i < a.attribution.sources.size(); ++i) {
        CHECK(b.attribution.sources[i].source == a.attribution.sources[i].source);
        CHECK(same_bits(b.attribution.sources[i].damage, a.attribution.sources[i].damage));
    }
    REQUIRE(b.attribution.places.size() == a.attribution.places.size());
    for (std::size_t i = 0; i < a.attribution.places.size(); ++i) {
        CHECK(same_bits(b.attribution.places[i].received, a.attribution.places[i].received));
        CHECK(same_bits(b.attribution.places[i].caused, a.attribution.places[i].caused));
    }
    REQUIRE(b.attribution.buffers.size() == a.attribution.buffers.size());
    for (std::size_t i = 0; i < a.attribution.buffers.size(); ++i)
        CHECK(same_bits(b.attribution.buffers[i].knock_on, a.attribution.buffers[i].knock_on));
}
