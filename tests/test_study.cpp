// The Monte Carlo study runner (sim/study): knock-on of a chain of trains against the max-plus
// recursion, determinism across thread counts and replication counts, --until-ci stopping,
// the statistics helpers against closed forms and published values, the accounting of
// primary and knock-on delay, and the figures gathered day by day against two passes over the
// same days.
#include <catch2/catch.hpp>

#include <algorithm>
#include <atomic>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>
#include <memory>
#include <set>
#include <stdexcept>
#include <string>
#include <vector>

#include <boost/math/distributions/students_t.hpp>

#include "models/plan.hpp"
#include "sim/delay_draws.hpp"
#include "sim/simulation.hpp"
#include "sim/study.hpp"
#include "tools/read/scenario_reader.hpp"
#include "sim_test_support.hpp"

using namespace knockon;

namespace {

const std::string kSource = KNOCKON_SOURCE_DIR;
const std::string kAlternating = kSource + "/tests/data/study/alternating_platforms.yaml";
const std::string kDelayedLine = kSource + "/tests/data/study/delayed_line.yaml";
const std::string kTwoTrains = kSource + "/tests/data/two_trains.yaml";
const std::string kDemo = kSource + "/scenarios/demo.yaml";

using simtest::Loaded;

// Primary delays drawn from the scenario's `delays:` section, as `knockon simulate
// --replications` draws them.
StudyOptions drawn_study(const Loaded& f, std::uint64_t seed, std::uint32_t replications, unsigned threads) {
    StudyOptions opt;
    opt.replications = replications;
    opt.threads = threads;
    opt.draw = [&f, seed](std::uint32_t k) {
        return draw_delays(f.scenario, f.plan, seed, k);
    };
    return opt;
}

// Bitwise equality, so that NaN (a timing point not reached) equals NaN and 0.0 differs from -0.0:
// "identical" means identical bytes.
bool same_bits(double a, double b) { return std::bit_cast<std::uint64_t>(a) == std::bit_cast<std::uint64_t>(b); }
template <class T>
bool same_bits(const std::vector<T>& a, const std::vector<T>& b) {
    if (a.size() != b.size()) return false;
    for (std::size_t i = 0; i < a.size(); ++i)
        if (!same_bits(a[i], b[i])) return false;
    return true;
}

// Every field of ReplicationStats, exactly.
void require_identical(const ReplicationStats& a, const ReplicationStats& b) {
    INFO("replication " << a.replication);
    REQUIRE(a.replication == b.replication);
    REQUIRE(a.deadlocked == b.deadlocked);
    REQUIRE(a.events == b.events);
    REQUIRE(a.block_passages == b.block_passages);
    REQUIRE(same_bits(a.total_primary, b.total_primary));
    REQUIRE(same_bits(a.total_knock_on, b.total_knock_on));
    REQUIRE(same_bits(a.mean_arrival_delay, b.mean_arrival_delay));
    REQUIRE(same_bits(a.punctuality, b.punctuality));
}

void flatten(const Estimate& e, std::vector<double>& out) {
    out.insert(out.end(), {e.mean, e.half_width, e.lower, e.upper, static_cast<double>(e.n)});
}

// Every number of a StudySummary in a fixed order, and every name, so that two summaries can
// be compared exactly.
struct FlatSummary {
    std::vector<double> numbers;
    std::vector<std::string> names;
};
FlatSummary flatten(const StudySummary& s) {
    FlatSummary f;
    auto& v = f.numbers;
    v.push_back(static_cast<double>(s.replications));
    v.push_back(static_cast<double>(s.deadlocked));
    v.insert(v.end(), s.thresholds.begin(), s.thresholds.end());
    flatten(s.total_primary, v);
    flatten(s.total_knock_on, v);
    flatten(s.mean_arrival_delay, v);
    v.push_back(s.knock_on_ratio);
    for (const Estimate& e : s.punctuality) flatten(e, v);
    for (const TimingPointStats& tp : s.timing_points) {
        v.insert(v.end(), {static_cast<double>(tp.train), tp.stops ? 1.0 : 0.0, static_cast<double>(tp.reached)});
        f.names.push_back(tp.station);
        flatten(tp.delay, v);
        flatten(tp.knock_on, v);
        v.insert(v.end(), {tp.delay_quantiles.p50, tp.delay_quantiles.p90, tp.delay_quantiles.p95, tp.delay_quantiles.max});
        for (const Estimate& e : tp.punctuality) flatten(e, v);
    }
    for (const TrainStats& t : s.trains) {
        v.push_back(static_cast<double>(t.train));
        flatten(t.primary, v);
        flatten(t.knock_on, v);
        flatten(t.final_delay, v);
    }
    for (const SignalStats& g : s.signals) {
        f.names.push_back(g.signal);
        flatten(g.held, v);
    }
    for (const Estimate& e : s.section_blocked_share) flatten(e, v);
    for (const BufferStats& b : s.buffers) {
        v.insert(v.end(), {static_cast<double>(b.pair), b.planned, b.p10});
        flatten(b.as_run, v);
    }
    return f;
}

std::vector<double> knock_on_per_day(const StudyResult& r) {
    std::vector<double> v;
    for (const ReplicationStats& s : r.replications) v.push_back(s.total_knock_on);
    return v;
}

double half_width_of_first(const std::vector<double>& values, std::size_t n) {
    return estimate_mean(std::vector<double>(values.begin(), values.begin() + static_cast<long>(n))).half_width;
}

// ---- A small max-plus algebra, checked against published values before it predicts anything --

using Vec = std::vector<double>;
using Mat = std::vector<Vec>;
constexpr double kEpsilon = -std::numeric_limits<double>::infinity();   // max-plus zero

// (A ⊗ x)_i = max_j (A_ij + x_j)
Vec otimes(const Mat& A, const Vec& x) {
    Vec y(A.size(), kEpsilon);
    for (std::size_t i = 0; i < A.size(); ++i)
        for (std::size_t j = 0; j < x.size(); ++j) y[i] = std::max(y[i], A[i][j] + x[j]);
    return y;
}
// (x ⊕ y)_i = max(x_i, y_i)
Vec oplus(const Vec& x, const Vec& y) {
    Vec z(x.size());
    for (std::size_t i = 0; i < x.size(); ++i) z[i] = std::max(x[i], y[i]);
    return z;
}

// A chain of trains on one departure route: departure x(k) = max(d(k) + primary(k), x(k-1) + h(k))
// with d the scheduled departures and h(k) the minimum headway of train k behind k-1 -- the
// scalar case of x(k) = A ⊗ x(k-1) ⊕ d(k) (Goverde 2007).  Returns the departure delays x - d.
std::vector<double> max_plus_departure_delays(const std::vector<double>& scheduled, const std::vector<double>& h_min,
                                              const std::vector<double>& primary) {
    std::vector<double> x(scheduled.size()), y(scheduled.size());
    for (std::size_t k = 0; k < scheduled.size(); ++k) {
        const Vec own = {scheduled[k] + primary[k]};
        x[k] = k == 0 ? own[0] : oplus(otimes(Mat{{h_min[k]}}, Vec{x[k - 1]}), own)[0];
        y[k] = x[k] - scheduled[k];
    }
    return y;
}

}  // namespace

// ---- 1. Deterministic knock-on: the max-plus recursion -------------------------------------------

TEST_CASE("max-plus helper reproduces the published examples", "[study][maxplus]") {
    const Mat A = {{2.0, 5.0}, {3.0, 3.0}};
    // tests/REFERENCES.md P2: Heidergott, Olsder, van der Woude, Max Plus at Work (2006): x(0) = (0, 0),
    // x(k) = A ⊗ x(k-1) gives (5,3), (8,8), (13,11), (16,16); eigenvalue 4.
    Vec x = {0.0, 0.0};
    const std::vector<Vec> expected = {{5, 3}, {8, 8}, {13, 11}, {16, 16}};
    for (const Vec& e : expected) {
        x = otimes(A, x);
        CHECK(x == e);
    }
    Vec far = {0.0, 0.0};
    for (int k = 0; k < 40; ++k) far = otimes(A, far);
    CHECK(far[0] / 40.0 == Approx(4.0).margin(0.1));   // P2: cycle mean = eigenvalue 4

    // tests/REFERENCES.md P3: Goverde, Transportation Research B 41(2) 2007: same A, timetable
    // d(k) = (1, 0) + 5k, x(0) = (4, 0): x(k) = A ⊗ x(k-1) ⊕ d(k); delays (0,2), (1,0), (0,0).
    x = {4.0, 0.0};
    const std::vector<Vec> delays = {{0, 2}, {1, 0}, {0, 0}};
    for (int k = 1; k <= 3; ++k) {
        const Vec d = {1.0 + 5.0 * k, 0.0 + 5.0 * k};
        x = oplus(otimes(A, x), d);
        CHECK(x[0] - d[0] == delays[k - 1][0]);
        CHECK(x[1] - d[1] == delays[k - 1][1]);
    }

    // tests/REFERENCES.md P1: follower delay = max(0, leader delay - buffer); buffer 2 min:
    // leader 5 -> 3; 1.5 -> 0; 2 -> 0 (minutes).  Scheduled 10 min apart, minimum headway 8.
    for (const auto& [leader, follower] : std::vector<std::pair<double, double>>{{5, 3}, {1.5, 0}, {2, 0}})
        CHECK(max_plus_departure_delays({0.0, 10.0}, {0.0, 8.0}, {leader, 0.0})[1] == Approx(follower));
}

TEST_CASE("Departure delays of a chain of trains follow the max-plus recursion", "[study][maxplus]") {
    // tests/data/study/alternating_platforms.yaml: four trains start from A every 4 min from
    // alternate platforms over one route out; only the first starts late, by D.
    // Prediction (tests/REFERENCES.md P1 and P3; Goverde 2007; Heidergott, Olsder, van der Woude 2006):
    // departure x(k) = max(d(k), x(k-1) + h(k)), i.e. departure delays y(1) = D and
    // y(k) = max(0, y(k-1) - b(k)), with b(k) the buffer of train k behind k-1 in line section A-B
    // from make_plan (HeadwayPair).
    //
    // One correction, read from the plan too: the plan reserves the route out of A from the
    // moment o(k) = its blocking start, which for a starter at the stopping mark is 18 s before the
    // train is placed at the platform (30 s of minimum dwell before departure), while the follower
    // needs the route only to leave: it departs once the route is set and seen, sight-and-
    // reaction plus set-up after the leader has released it.  So the buffer that absorbs the
    // leader's delay at the departure is b(k) + (d(k) - setup - sight_reaction - o(k)).
    Loaded f(kAlternating);
    const SimModel& model = *f.model;
    const PlanResult plan = make_plan(f.scenario);
    const InterlockingTimes& times = f.scenario.infrastructure.interlocking;
    const std::size_t n = f.plan.size();
    REQUIRE(n == 4);

    std::vector<double> scheduled(n), h_min(n, 0.0), buffer(n, 0.0), slack(n, 0.0);
    for (std::size_t k = 0; k < n; ++k) {
        REQUIRE(plan.trains[k].run.service->id == f.plan[k].run.service->id);
        scheduled[k] = f.plan[k].run.calls[0].scheduled_departure;
        slack[k] = scheduled[k] - times.route_setup - times.sight_reaction - f.plan[k].stairway.routes[0].start;
        CHECK(slack[k] >= 0.0);
    }
    auto section_names_of = [&](const std::vector<std::uint32_t>& idx) {
        std::set<std::string> names;
        for (std::uint32_t i : idx) names.insert(model.section_names()[i]);
        return names;
    };
    std::size_t pairs = 0;
    for (const HeadwayPair& h : plan.headways) {
        if (h.line_section != "A-B") continue;
        ++pairs;
        REQUIRE(h.follower == h.leader + 1);
        // Assumption: the pair is critical on the route out of A (routes[0]) of both trains, so a
        // late leader holds the follower at its platform, not further on.
        INFO("pair " << h.leader << " -> " << h.follower << ", critical section " << h.critical_section);
        CHECK(section_names_of(model.trains()[h.leader].routes[0].sections).count(h.critical_section) == 1);
        CHECK(section_names_of(model.trains()[h.follower].routes[0].sections).count(h.critical_section) == 1);
        CHECK(h.scheduled_headway == Approx(240.0));
        CHECK(h.buffer == Approx(h.scheduled_headway - h.minimum_headway));
        buffer[h.follower] = h.buffer + slack[h.follower];
        h_min[h.follower] = h.minimum_headway - slack[h.follower];
    }
    REQUIRE(pairs == n - 1);

    // Sections a train stands on at A before it leaves.
    auto platform_sections = [&](std::size_t t) {
        std::set<std::uint32_t> out;
        const TrainPath& path = f.plan[t].run.path;
        for (std::size_t j = 0; j < path.sections.size(); ++j)
            if (path.sections[j].s_from < 0.0) out.insert(model.trains()[t].section_index[j]);
        return out;
    };
    // Assumption: consecutive trains use different platforms (their standing sections do not meet).
    for (std::size_t k = 1; k < n; ++k) {
        const auto a = platform_sections(k - 1), b = platform_sections(k);
        REQUIRE_FALSE(b.empty());
        for (std::uint32_t s : a) CHECK(b.count(s) == 0);
    }

    for (double D : {0.0, 60.0, 150.0, 300.0, 400.0}) {
        INFO("late start of the first train D = " << D << " s");
        InjectedDelays delays;
        delays.entry = {D, 0.0, 0.0, 0.0};
        const SimResult day = simulate_day(model, delays, SimOptions{});
        REQUIRE_FALSE(day.deadlock.deadlocked);

        std::vector<double> primary(n, 0.0);
        primary[0] = D;
        const std::vector<double> predicted = max_plus_departure_delays(scheduled, h_min, primary);
        // The same thing in buffers: y(k) = max(0, y(k-1) - b(k)).
        std::vector<double> by_buffer(n, D);
        for (std::size_t k = 1; k < n; ++k) by_buffer[k] = std::max(0.0, by_buffer[k - 1] - buffer[k]);
        for (std::size_t k = 0; k < n; ++k) CHECK(predicted[k] == Approx(by_buffer[k]).margin(1e-9));
        // Not a trivial case: from D = 150 s on the second train inherits a delay, from 300 s the
        // third, at 400 s all four.
        if (D >= 150.0) CHECK(predicted[1] > 10.0);
        if (D >= 300.0) CHECK(predicted[2] > 10.0);
        if (D >= 400.0) CHECK(predicted[3] > 10.0);

        std::vector<const TimingRecord*> at_a(n, nullptr);
        for (const TimingRecord& tr : day.timing)
            if (tr.station == "A") at_a[tr.train] = &tr;
        for (std::size_t k = 0; k < n; ++k) {
            INFO("train " << f.plan[k].run.service->id);
            REQUIRE(at_a[k] != nullptr);
            CHECK(at_a[k]->scheduled_departure == Approx(scheduled[k]));
            CHECK(at_a[k]->departure_delay == Approx(predicted[k]).margin(1.0));
            // The wait beyond the moment the train was ready is its knock-on at A; the first
            // train's late start is its own (primary) delay.
            CHECK(at_a[k]->knock_on == Approx(k == 0 ? 0.0 : predicted[k]).margin(1.0));
        }
        // Assumption: a platform's previous occupant (two trains back) had released it before the
        // next train was due to stand there, so no train waited for its platform.
        for (std::size_t k = 2; k < n; ++k) {
            const auto mine = platform_sections(k);
            bool seen = false;
            for (const SectionRecord& s : day.sections)
                if (s.train == k - 2 && mine.count(s.section)) {
                    seen = true;
                    CHECK(s.released <= f.plan[k].run.appear_time);
                }
            CHECK(seen);   // alternate trains share the platform
        }
        // Assumption: no train stood at a signal away from its platform (nothing but the
        // departure interacts).
        for (const HoldRecord& h : day.holds) CHECK((h.signal == "U02" || h.signal == "U02L"));
    }
}

// ---- 2. Determinism --------------------------------------------------------------------------

TEST_CASE("A study gives identical results on one two and three threads", "[study][determinism]") {
    Loaded f(kDelayedLine);
    StudyOptions opt = drawn_study(f, 7, 23, 1);
    opt.batch = 5;   // several batches, the last one short
    const StudyResult one = run_study(*f.model, opt);
    REQUIRE(one.replications.size() == 23);
    REQUIRE_FALSE(one.partial);
    for (std::uint32_t k = 0; k < one.replications.size(); ++k) REQUIRE(one.replications[k].replication == k);
    // The fixture's days differ and carry knock-on, or identical results would prove little.
    const std::vector<double> knock = knock_on_per_day(one);
    CHECK(*std::max_element(knock.begin(), knock.end()) > 0.0);
    CHECK(std::set<double>(knock.begin(), knock.end()).size() > 5);
    const FlatSummary s1 = flatten(summarize_study(*f.model, one, opt.thresholds));

    for (unsigned threads : {2u, 3u}) {
        INFO(threads << " threads");
        opt.threads = threads;
        const StudyResult many = run_study(*f.model, opt);
        REQUIRE(many.replications.size() == one.replications.size());
        for (std::size_t k = 0; k < one.replications.size(); ++k) require_identical(one.replications[k], many.replications[k]);
        CHECK(many.train_ids == one.train_ids);
        CHECK(many.section_names == one.section_names);
        const FlatSummary sn = flatten(summarize_study(*f.model, many, opt.thresholds));
        CHECK(same_bits(sn.numbers, s1.numbers));
        CHECK(sn.names == s1.names);
    }
}

TEST_CASE("Different seeds give different days and more replications keep the first ones", "[study][determinism]") {
    Loaded f(kDelayedLine);
    const StudyResult a = run_study(*f.model, drawn_study(f, 1, 12, 2));
    const StudyResult b = run_study(*f.model, drawn_study(f, 2, 12, 2));
    CHECK(knock_on_per_day(a) != knock_on_per_day(b));
    std::size_t primary_differs = 0;
    for (std::size_t k = 0; k < 12; ++k)
        primary_differs += a.replications[k].total_primary != b.replications[k].total_primary ? 1 : 0;
    CHECK(primary_differs >= 10);

    // Prefix property: replication k depends on (seed, k) only, not on how many there are.
    StudyOptions longer = drawn_study(f, 1, 30, 2);
    longer.batch = 7;
    const StudyResult c = run_study(*f.model, longer);
    REQUIRE(c.replications.size() == 30);
    for (std::size_t k = 0; k < 12; ++k) require_identical(a.replications[k], c.replications[k]);
}

TEST_CASE("run_study refuses a study without draws or replications", "[study]") {
    Loaded f(kTwoTrains);
    StudyOptions opt;
    CHECK_THROWS_AS(run_study(*f.model, opt), std::invalid_argument);   // no draw
    opt.draw = [](std::uint32_t) { return InjectedDelays{}; };
    opt.replications = 0;
    CHECK_THROWS_AS(run_study(*f.model, opt), std::invalid_argument);
}

TEST_CASE("Traced days are handed over in replication order whatever the threads", "[study][trace]") {
    Loaded f(kDelayedLine);
    StudyOptions opt = drawn_study(f, 3, 17, 3);
    opt.batch = 4;
    opt.trace = [](std::uint32_t k) { return k % 3 == 1; };
    std::vector<std::uint32_t> handed;
    std::vector<double> traced_knock_on;
    opt.on_trace = [&](std::uint32_t k, const SimResult& day) {
        handed.push_back(k);
        double sum = 0.0;
        for (const TimingRecord& tr : day.timing) sum += tr.knock_on;
        traced_knock_on.push_back(sum);
    };
    std::vector<std::pair<std::uint32_t, std::uint32_t>> progress;
    opt.progress = [&](std::uint32_t done, std::uint32_t planned) { progress.emplace_back(done, planned); };
    const StudyResult r = run_study(*f.model, opt);
    CHECK(handed == std::vector<std::uint32_t>{1, 4, 7, 10, 13, 16});
    // The traced day is the replication's day: its knock-on adds up to the replication's.
    for (std::size_t i = 0; i < handed.size(); ++i)
        CHECK(traced_knock_on[i] == Approx(r.replications[handed[i]].total_knock_on).epsilon(1e-12));
    CHECK(progress == std::vector<std::pair<std::uint32_t, std::uint32_t>>{{4, 17}, {8, 17}, {12, 17}, {16, 17}, {17, 17}});
}

TEST_CASE("A stop request ends the study after the current batch and marks it partial", "[study]") {
    Loaded f(kDelayedLine);
    std::atomic<bool> stop{false};
    StudyOptions opt = drawn_study(f, 1, 40, 2);
    opt.batch = 10;
    opt.stop = &stop;
    opt.progress = [&](std::uint32_t done, std::uint32_t) {
        if (done >= 20) stop.store(true);
    };
    const StudyResult r = run_study(*f.model, opt);
    CHECK(r.replications.size() == 20);
    CHECK(r.partial);
    // Stopping on the last batch is not partial.
    stop.store(false);
    opt.progress = [&](std::uint32_t done, std::uint32_t) {
        if (done >= 40) stop.store(true);
    };
    const StudyResult whole = run_study(*f.model, opt);
    CHECK(whole.replications.size() == 40);
    CHECK_FALSE(whole.partial);
}

// ---- 3. --until-ci ---------------------------------------------------------------------------

TEST_CASE("until_ci stops at the first whole batch whose half-width is below the target", "[study][until_ci]") {
    Loaded f(kDelayedLine);
    const std::uint32_t cap = 150;
    // The days of the full study; by the prefix property every shorter run repeats its first days.
    const StudyResult full = run_study(*f.model, drawn_study(f, 1, cap, 2));
    const std::vector<double> knock = knock_on_per_day(full);
    const double hw50 = half_width_of_first(knock, 50), hw100 = half_width_of_first(knock, 100);
    // The fixture's knock-on varies enough that the interval narrows between the batches.
    REQUIRE(hw50 > 0.0);
    REQUIRE(hw100 < hw50);
    auto run_until = [&](double target, std::uint32_t replications, unsigned threads) {
        StudyOptions opt = drawn_study(f, 1, replications, threads);
        opt.until_ci = target;
        return run_study(*f.model, opt);
    };

    {
        INFO("a target met after two batches");
        const double target = 0.5 * (hw50 + hw100);
        const StudyResult r = run_until(target, cap, 2);
        CHECK(r.replications.size() == 100);
        CHECK_FALSE(r.partial);
        CHECK(estimate_mean(knock_on_per_day(r)).half_width < target);
        for (std::size_t k = 0; k < r.replications.size(); ++k)
            CHECK(same_bits(r.replications[k].total_knock_on, knock[k]));
    }
    {
        INFO("a target met at once stops after the first batch, not before");
        const StudyResult r = run_until(1e9, cap, 3);
        CHECK(r.replications.size() == 50);
        CHECK(estimate_mean(knock_on_per_day(r)).half_width < 1e9);
    }
    for (std::uint32_t c : {150u, 120u}) {
        INFO("an unreachable target runs to the cap " << c << ", also when it is not a whole batch");
        const StudyResult r = run_until(1e-6, c, 2);
        CHECK(r.replications.size() == c);
        CHECK_FALSE(r.partial);
    }
    for (double target : {0.25 * hw50, 0.9 * hw50, 1.1 * hw50, 0.9 * hw100, 1.01 * hw100}) {
        // Whatever the target, the run ends on a whole batch or at the cap, with the target met
        // if it ends early, and never runs past a batch where the target was already met.
        const StudyResult r = run_until(target, 120, 2);
        const std::size_t n = r.replications.size();
        INFO("target " << target << " s: stopped after " << n);
        CHECK((n % 50 == 0 || n == 120));
        if (n < 120) CHECK(estimate_mean(knock_on_per_day(r)).half_width < target);
        for (std::size_t m = 50; m < n; m += 50) CHECK(half_width_of_first(knock, m) >= target);
    }
}

// ---- 4. Statistics helpers -------------------------------------------------------------------

TEST_CASE("estimate_mean: Student t interval of half-width t(0.975 n-1) s over sqrt(n)", "[study][stats]") {
    const std::vector<double> v = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10};
    const Estimate e = estimate_mean(v);
    const double s = std::sqrt(82.5 / 9.0);   // sum of squared deviations from 5.5 is 82.5
    CHECK(e.n == 10);
    CHECK(e.mean == Approx(5.5));
    // Standard Student t table: t(0.975, 9 degrees of freedom) = 2.262.
    CHECK(e.half_width == Approx(2.262 * s / std::sqrt(10.0)).epsilon(2e-4));
    // The same with the quantile from Boost.Math (an independent call, not the code under test).
    const double t9 = boost::math::quantile(boost::math::students_t(9.0), 0.975);
    CHECK(t9 == Approx(2.262).margin(5e-4));
    CHECK(e.half_width == Approx(t9 * s / std::sqrt(10.0)).epsilon(1e-12));
    CHECK(e.lower == Approx(e.mean - e.half_width));
    CHECK(e.upper == Approx(e.mean + e.half_width));

    // Two values: t(0.975, 1) = 12.706 (standard Student t table).
    const Estimate two = estimate_mean({10.0, 20.0});
    CHECK(two.half_width == Approx(12.706 * std::sqrt(50.0) / std::sqrt(2.0)).epsilon(1e-4));
    // One value: no spread to estimate; no values: all zero.
    const Estimate one = estimate_mean({42.0});
    CHECK(one.mean == 42.0);
    CHECK(one.half_width == 0.0);
    CHECK(one.lower == 42.0);
    CHECK(one.upper == 42.0);
    CHECK(estimate_mean({}).n == 0);
    // Constant values: zero width.
    CHECK(estimate_mean({3.0, 3.0, 3.0}).half_width == 0.0);
}

TEST_CASE("estimate_share: Wilson score interval", "[study][stats]") {
    // Wilson (1927): centre (p + z^2/2n) / (1 + z^2/n), half-width
    // z sqrt(p(1-p)/n + z^2/4n^2) / (1 + z^2/n), z = 1.959964; computed here from the formula.
    auto wilson = [](double k, double n) {
        const double z = 1.959964, p = k / n, d = 1.0 + z * z / n;
        const double c = (p + z * z / (2 * n)) / d, h = z * std::sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / d;
        return std::make_pair(c - h, c + h);
    };
    const Estimate e = estimate_share(8, 10);
    CHECK(e.mean == Approx(0.8));
    CHECK(e.lower == Approx(wilson(8, 10).first).epsilon(1e-6));
    CHECK(e.upper == Approx(wilson(8, 10).second).epsilon(1e-6));
    CHECK(e.lower == Approx(0.490).margin(5e-4));
    CHECK(e.upper == Approx(0.943).margin(5e-4));
    CHECK(e.half_width == Approx((e.upper - e.lower) / 2));
    CHECK(e.n == 10);
    // Published examples, from memory: Newcombe, Statistics in Medicine 17 (1998) 857-872,
    // table of the single-proportion methods, Wilson score without continuity correction:
    // 81/263 -> 0.2553-0.3662; 15/148 -> 0.0624-0.1605; 0/20 -> 0.0000-0.1611; 1/29 -> 0.0061-0.1718.
    const struct {
        std::size_t k, n;
        double lo, hi;
    } newcombe[] = {{81, 263, 0.2553, 0.3662}, {15, 148, 0.0624, 0.1605}, {0, 20, 0.0, 0.1611}, {1, 29, 0.0061, 0.1718}};
    for (const auto& x : newcombe) {
        INFO(x.k << "/" << x.n);
        const Estimate w = estimate_share(x.k, x.n);
        CHECK(w.lower == Approx(x.lo).margin(1e-4));
        CHECK(w.upper == Approx(x.hi).margin(1e-4));
    }
    // The interval stays inside [0, 1] at the extremes.
    const Estimate all = estimate_share(20, 20);
    CHECK(all.upper == Approx(1.0).margin(1e-12));
    CHECK(all.lower == Approx(1.0 - 0.1611).margin(1e-4));   // mirror image of 0/20
    CHECK(estimate_share(0, 0).n == 0);
}

TEST_CASE("quantiles: linear interpolation between order statistics", "[study][stats]") {
    std::vector<double> v;
    for (int i = 100; i >= 1; --i) v.push_back(i);   // unsorted on purpose
    const Quantiles q = quantiles(v);
    // Hyndman & Fan (1996) definition 7 (position p (n - 1)), the default of R's quantile() and
    // NumPy's percentile (from memory): on 1..100, p50 = 50.5, p90 = 90.1, p95 = 95.05.
    CHECK(q.p50 == Approx(50.5));
    CHECK(q.p90 == Approx(90.1));
    CHECK(q.p95 == Approx(95.05));
    CHECK(q.max == 100.0);
    const Quantiles single = quantiles({7.0});
    CHECK(single.p50 == 7.0);
    CHECK(single.p95 == 7.0);
    CHECK(single.max == 7.0);
    CHECK(quantiles({}).max == 0.0);
}

TEST_CASE("RunningMean: the estimate of estimate_mean, one value at a time", "[study][stats]") {
    auto running = [](const std::vector<double>& values) {
        RunningMean m;
        for (double v : values) m.add(v);
        return m.estimate();
    };
    // 1..10: mean 5.5, sum of squared deviations n(n^2 - 1)/12 = 82.5 (closed form).
    std::vector<double> v;
    for (int i = 1; i <= 10; ++i) v.push_back(i);
    const double t9 = boost::math::quantile(boost::math::students_t(9.0), 0.975);
    const Estimate e = running(v);
    CHECK(e.n == 10);
    CHECK(e.mean == 5.5);
    CHECK(e.half_width == Approx(t9 * std::sqrt(82.5 / 9.0) / std::sqrt(10.0)).epsilon(1e-14));
    CHECK(same_bits(e.mean, estimate_mean(v).mean));   // the same sum over the same n

    // Small spread on a large mean, where the sum of squares would cancel (sum x^2 is about 1e17,
    // whose rounding step is 16): 1e8 + 1..10 has the same spread as 1..10 (closed form).
    std::vector<double> far;
    for (double x : v) far.push_back(1e8 + x);
    const Estimate f = running(far);
    CHECK(f.mean == 1e8 + 5.5);
    CHECK(f.half_width == Approx(e.half_width).epsilon(1e-12));
    CHECK(f.half_width == Approx(estimate_mean(far).half_width).epsilon(1e-12));

    // Uneven, unsorted values: against the two-pass estimate (mean identical, half-width to a few
    // units in the last place: Welford's update and the two-pass sum round differently).
    std::vector<double> uneven;
    for (int i = 0; i < 1000; ++i) uneven.push_back(std::fmod(i * 7919.0, 613.0) * 0.37 + (i % 3 == 0 ? 3600.0 : 0.0));
    const Estimate u = running(uneven), u2 = estimate_mean(uneven);
    CHECK(same_bits(u.mean, u2.mean));
    CHECK(u.half_width == Approx(u2.half_width).epsilon(1e-13));
    CHECK(u.lower == Approx(u2.lower).epsilon(1e-13));
    CHECK(u.upper == Approx(u2.upper).epsilon(1e-13));
    CHECK(u.n == u2.n);

    // Constant whole seconds: exactly no spread, as the two-pass gives.
    CHECK(running({300.0, 300.0, 300.0, 300.0}).half_width == 0.0);
    // One value: no spread to estimate; none: all zero.
    const Estimate one = running({42.0});
    CHECK(one.mean == 42.0);
    CHECK(one.half_width == 0.0);
    CHECK(one.lower == 42.0);
    CHECK(running({}).n == 0);
    CHECK(running({}).mean == 0.0);

    // zeros(k): the state k values of 0 leave, so a figure first seen on day k+1 counts the days
    // before it as 0.
    RunningMean late = RunningMean::zeros(3);
    late.add(12.0);
    late.add(0.0);
    const Estimate l = late.estimate(), l2 = running({0.0, 0.0, 0.0, 12.0, 0.0});
    CHECK(l.n == 5);
    CHECK(same_bits(l.mean, l2.mean));
    CHECK(same_bits(l.half_width, l2.half_width));

    // Zeros, also after a sum that cancelled to 0, against Welford's update written out (common
    // practice, no source): the short way for a 0 on a zero sum leaves the same bits.
    const std::vector<double> zeros_between{0.0, 0.0, 5.0, -5.0, 0.0, -0.0, 0.0, 3.0, 0.0, -3.0, 0.0, 0.25};
    RunningMean fast;
    double n = 0.0, sum = 0.0, m2 = 0.0;
    for (double x : zeros_between) {
        fast.add(x);
        const double before = n > 0.0 ? sum / n : 0.0;
        n += 1.0;
        sum += x;
        m2 += (x - before) * (x - sum / n);
        const Estimate got = fast.estimate();
        CHECK(same_bits(got.mean, sum / n));
        if (n < 2.0) continue;
        // The Student t half-width (common practice, no source) from the written-out sums.
        const double t = boost::math::quantile(boost::math::students_t(n - 1.0), 0.975);
        CHECK(same_bits(got.half_width, t * std::sqrt(std::max(0.0, m2) / (n - 1.0)) / std::sqrt(n)));
    }
    CHECK(fast.estimate().half_width > 0.0);   // the series has spread: the check is of something
}

// ---- 5. Knock-on accounting ------------------------------------------------------------------

TEST_CASE("Knock-on: a late leader's follower gathers knock-on but no primary delay", "[study][knock_on]") {
    // alternating_platforms.yaml, the first train 300 s late: by the max-plus test above the
    // second leaves about 188 s late although nothing was injected into it.
    Loaded f(kAlternating);
    StudyOptions opt;
    opt.replications = 3;
    opt.threads = 2;
    opt.batch = 2;
    opt.draw = [](std::uint32_t) {
        InjectedDelays d;
        d.entry = {300.0, 0.0, 0.0, 0.0};
        return d;
    };
    const StudyResult r = run_study(*f.model, opt);
    REQUIRE(r.replications.size() == 3);
    // The same delays every day: the same day every day, apart from its number, and the day
    // simulated here on its own.
    const InjectedDelays delays = opt.draw(0);
    const ReplicationFigures s =
        replication_figures(*f.model, simulate_day(*f.model, delays, opt.sim), delays, opt.thresholds, 0);
    for (ReplicationStats other : r.replications) {
        other.replication = 0;
        require_identical(s.stats, other);
    }
    const std::size_t p1 = f.train_index("P1"), p2 = f.train_index("P2");
    CHECK(s.stats.total_primary == 300.0);
    CHECK(s.train_primary[p1] == 300.0f);
    CHECK(s.train_primary[p2] == 0.0f);
    CHECK(s.train_knock_on[p1] == 0.0f);   // its own late start is primary, not knock-on
    CHECK(s.train_knock_on[p2] > 100.0f);
    double sum = 0.0;
    for (float k : s.train_knock_on) sum += k;
    CHECK(s.stats.total_knock_on == Approx(sum).epsilon(1e-6));
    double per_point = 0.0;
    for (float k : s.knock_on) per_point += k;
    CHECK(s.stats.total_knock_on == Approx(per_point).epsilon(1e-6));

    const StudySummary sum_up = summarize_study(*f.model, r, opt.thresholds);
    CHECK(sum_up.total_primary.mean == 300.0);
    CHECK(sum_up.total_primary.half_width == 0.0);   // every day the same
    CHECK(sum_up.knock_on_ratio == Approx(s.stats.total_knock_on / 300.0));
    CHECK(sum_up.trains[p1].primary.mean == 300.0);
    CHECK(sum_up.trains[p1].primary.half_width == 0.0);
    CHECK(sum_up.trains[p2].primary.mean == 0.0);
    CHECK(sum_up.trains[p2].knock_on.mean == Approx(s.train_knock_on[p2]));
}

TEST_CASE("Knock-on: replication_figures adds up the day's timing records", "[study][knock_on]") {
    Loaded f(kDelayedLine);
    const InjectedDelays d = draw_delays(f.scenario, f.plan, 11, 4);
    const SimResult day = simulate_day(*f.model, d, SimOptions{});
    const ReplicationFigures s = replication_figures(*f.model, day, d, {180.0, 300.0}, 4);
    double knock = 0.0;
    std::vector<double> per_train(f.plan.size(), 0.0);
    for (const TimingRecord& tr : day.timing) {
        knock += tr.knock_on;
        per_train[tr.train] += tr.knock_on;
    }
    double primary = 0.0;
    for (double x : d.entry) primary += x;
    for (const auto& v : d.dwell)
        for (double x : v) primary += x;
    for (const auto& v : d.running)
        for (double x : v) primary += x;
    CHECK(s.stats.replication == 4);
    CHECK(s.stats.total_knock_on == Approx(knock).epsilon(1e-12));
    CHECK(s.stats.total_primary == Approx(primary).epsilon(1e-12));
    for (std::size_t t = 0; t < per_train.size(); ++t) CHECK(s.train_knock_on[t] == Approx(per_train[t]).epsilon(1e-5));
    CHECK(s.arrival_delay.size() == day.timing.size());
    CHECK(s.buffer.size() == f.model->buffer_pairs().size());
}

TEST_CASE("Knock-on: an undisturbed day has none at all", "[study][knock_on]") {
    for (const std::string& path : {kTwoTrains, kDemo, kAlternating}) {
        INFO(path);
        Loaded f(path);
        const InjectedDelays none;
        const SimResult day = simulate_day(*f.model, none, SimOptions{});
        REQUIRE_FALSE(day.deadlock.deadlocked);
        const ReplicationFigures s = replication_figures(*f.model, day, none, {180.0, 300.0}, 0);
        CHECK(s.stats.total_primary == 0.0);
        CHECK(s.stats.total_knock_on == 0.0);   // exactly: losses below 0.5 s are not counted
        for (float k : s.knock_on) CHECK(k == 0.0f);
        CHECK(s.held.empty());
    }
}

// ---- 6. Bounded memory: figures gathered day by day ------------------------------------------

namespace {

// A figure gathered day by day against the same figure from two passes over the kept days.  The
// mean is the same sum in the same order over the same n: identical.  The half-width comes from
// Welford's running sum of squared deviations instead of the two-pass one, so it may differ in
// the last bits: a tight relative tolerance (1e-10; the days' spread here is far above rounding),
// and a margin of 1e-12 of the mean for figures whose spread is itself rounding noise.
void check_same_estimate(const Estimate& got, const Estimate& want) {
    CHECK(got.n == want.n);
    CHECK(same_bits(got.mean, want.mean));
    const double margin = 1e-12 * std::abs(want.mean);
    CHECK(got.half_width == Approx(want.half_width).epsilon(1e-10).margin(margin));
    CHECK(got.lower == Approx(want.lower).epsilon(1e-10).margin(margin));
    CHECK(got.upper == Approx(want.upper).epsilon(1e-10).margin(margin));
}

}  // namespace

TEST_CASE("Study figures gathered day by day equal two passes over the same days", "[study][memory]") {
    Loaded f(kDelayedLine);
    StudyOptions opt = drawn_study(f, 5, 40, 1);
    opt.batch = 7;   // several batches, the last one short
    const StudyResult study = run_study(*f.model, opt);
    const StudySummary s = summarize_study(*f.model, study, opt.thresholds);
    REQUIRE(study.replications.size() == 40);
    CHECK(study.figures.days() == 40);

    // The days again, one by one, each kept whole.
    std::vector<ReplicationFigures> days;
    for (std::uint32_t k = 0; k < 40; ++k) {
        const InjectedDelays d = opt.draw(k);
        days.push_back(replication_figures(*f.model, simulate_day(*f.model, d, opt.sim), d, opt.thresholds, k));
        require_identical(days.back().stats, study.replications[k]);
    }
    auto column = [&](auto value) {
        std::vector<double> v;
        for (const ReplicationFigures& day : days) v.push_back(value(day));
        return v;
    };

    // Per timing record: knock-on over all days; delay (early as 0), quantiles and punctuality
    // over the days reached.
    REQUIRE(s.timing_points.size() == days[0].arrival_delay.size());
    std::size_t some_late = 0, some_on_time = 0;
    for (std::size_t k = 0; k < s.timing_points.size(); ++k) {
        INFO("timing record " << k);
        const TimingPointStats& tp = s.timing_points[k];
        check_same_estimate(tp.knock_on, estimate_mean(column([k](const ReplicationFigures& d) { return d.knock_on[k]; })));
        std::vector<double> delays;
        std::vector<std::size_t> within_count(opt.thresholds.size(), 0);
        for (const ReplicationFigures& day : days) {
            const double d = day.arrival_delay[k];
            if (std::isnan(d)) continue;
            delays.push_back(std::max(0.0, d));
            for (std::size_t i = 0; i < opt.thresholds.size(); ++i) within_count[i] += d < opt.thresholds[i] ? 1 : 0;
        }
        CHECK(tp.reached == delays.size());
        if (delays.empty()) continue;
        some_late += std::count_if(delays.begin(), delays.end(), [](double d) { return d > 0.0; }) > 0 ? 1 : 0;
        some_on_time += std::count(delays.begin(), delays.end(), 0.0) > 0 ? 1 : 0;
        check_same_estimate(tp.delay, estimate_mean(delays));
        const Quantiles q = quantiles(delays);
        CHECK(same_bits(std::vector<double>{tp.delay_quantiles.p50, tp.delay_quantiles.p90, tp.delay_quantiles.p95,
                                            tp.delay_quantiles.max},
                        std::vector<double>{q.p50, q.p90, q.p95, q.max}));
        REQUIRE(tp.punctuality.size() == opt.thresholds.size());
        for (std::size_t i = 0; i < opt.thresholds.size(); ++i) {
            const Estimate w = estimate_share(within_count[i], delays.size());
            CHECK(same_bits(std::vector<double>{tp.punctuality[i].mean, tp.punctuality[i].lower, tp.punctuality[i].upper},
                            std::vector<double>{w.mean, w.lower, w.upper}));
        }
    }
    // Not a trivial fixture: timing points late on some days and on time on others.
    CHECK(some_late > 5);
    CHECK(some_on_time > 5);

    // Per train.
    REQUIRE(s.trains.size() == f.plan.size());
    for (std::size_t t = 0; t < s.trains.size(); ++t) {
        INFO("train " << t);
        check_same_estimate(s.trains[t].primary, estimate_mean(column([t](const ReplicationFigures& d) { return d.train_primary[t]; })));
        check_same_estimate(s.trains[t].knock_on, estimate_mean(column([t](const ReplicationFigures& d) { return d.train_knock_on[t]; })));
        check_same_estimate(s.trains[t].final_delay,
                            estimate_mean(column([t](const ReplicationFigures& d) { return d.train_final_delay[t]; })));
    }

    // Signals: every signal held on any day, 0 on the days it was not.
    std::set<std::string> held_signals;
    for (const ReplicationFigures& day : days)
        for (const auto& [signal, seconds] : day.held) held_signals.insert(signal);
    REQUIRE(s.signals.size() == held_signals.size());
    CHECK(s.signals.size() >= 2);
    for (std::size_t i = 0; i < s.signals.size(); ++i) {
        const SignalStats& g = s.signals[i];
        INFO("signal " << g.signal);
        CHECK(held_signals.count(g.signal) == 1);
        check_same_estimate(g.held, estimate_mean(column([&g](const ReplicationFigures& d) {
                                const auto it = d.held.find(g.signal);
                                return it == d.held.end() ? 0.0 : it->second;
                            })));
        if (i > 0) CHECK(s.signals[i - 1].held.mean >= g.held.mean);   // largest first
    }

    // Sections.
    REQUIRE(s.section_blocked_share.size() == f.model->section_names().size());
    for (std::size_t k = 0; k < s.section_blocked_share.size(); ++k)
        check_same_estimate(s.section_blocked_share[k],
                            estimate_mean(column([k](const ReplicationFigures& d) { return d.section_blocked[k] / 86400.0; })));

    // Buffers: over the days both trains ran; p10 the order statistic at floor(0.1 (n - 1)).
    std::size_t buffers_seen = 0;
    for (std::size_t k = 0; k < f.model->buffer_pairs().size(); ++k) {
        INFO("buffer pair " << k);
        std::vector<double> v;
        for (const ReplicationFigures& day : days)
            if (!std::isnan(day.buffer[k])) v.push_back(day.buffer[k]);
        const auto it = std::find_if(s.buffers.begin(), s.buffers.end(), [k](const BufferStats& b) { return b.pair == k; });
        if (v.empty()) {
            CHECK(it == s.buffers.end());
            continue;
        }
        REQUIRE(it != s.buffers.end());
        ++buffers_seen;
        check_same_estimate(it->as_run, estimate_mean(v));
        std::sort(v.begin(), v.end());
        CHECK(same_bits(it->p10, v[static_cast<std::size_t>(0.1 * static_cast<double>(v.size() - 1))]));
        CHECK(it->planned == f.model->buffer_pairs()[k].planned_buffer);
    }
    CHECK(buffers_seen == s.buffers.size());
    CHECK(buffers_seen > 5);

    // Gathered in replication order on the calling thread: two threads, other batches, the same
    // summary to the bit.
    StudyOptions two = opt;
    two.threads = 2;
    two.batch = 3;
    const StudyResult study2 = run_study(*f.model, two);
    const FlatSummary a = flatten(s), b = flatten(summarize_study(*f.model, study2, two.thresholds));
    CHECK(same_bits(a.numbers, b.numbers));
    CHECK(a.names == b.names);

    // Summarised with other thresholds than it ran with: refused, not misread.
    CHECK_THROWS_AS(summarize_study(*f.model, study, {60.0}), std::invalid_argument);
}

TEST_CASE("StudyFigures refuses a day of another shape", "[study][memory]") {
    auto day = [](std::size_t records, std::uint32_t k) {
        ReplicationFigures d;
        d.stats.replication = k;
        d.arrival_delay.assign(records, 10.0f);
        d.knock_on.assign(records, 0.0f);
        d.attribution_layout.records = static_cast<std::uint32_t>(records);   // its attribution row, all 0
        d.attribution.assign(d.attribution_layout.width(), 0.0f);
        return d;
    };
    StudyFigures figures({180.0}, 3);
    figures.add(day(3, 0));
    figures.add(day(3, 1));
    CHECK(figures.days() == 2);
    CHECK(figures.timing()[0].reached() == 2);
    CHECK(figures.timing()[0].within[0] == 2);
    CHECK_THROWS_AS(figures.add(day(4, 2)), std::logic_error);
    figures.add(day(3, 2));
    CHECK_THROWS_AS(figures.add(day(3, 3)), std::logic_error);   // beyond the 3 days planned
}

TEST_CASE("The smallest tenth of the planned buffers holds the 10th percentile of any prefix", "[study][memory]") {
    // The buffer p10 is the order statistic at floor(0.1 (n - 1)) (README; no interpolation): for
    // n up to the planned P it lies among the smallest floor(0.1 (P - 1)) + 1 values.
    for (std::size_t planned : {1u, 2u, 10u, 11u, 95u, 400u}) {
        INFO("planned " << planned);
        SmallestValues lowest(buffer_p10_index(planned) + 1);
        std::vector<double> all;
        for (std::size_t n = 1; n <= planned; ++n) {
            // Scrambled, with repeats and negative values (a follower held up).
            const float x = static_cast<float>(static_cast<int>((n * 7919) % 211) - 40) * 1.5f;
            lowest.add(x);
            all.push_back(x);
            std::vector<double> sorted = all;
            std::sort(sorted.begin(), sorted.end());
            const std::size_t at = static_cast<std::size_t>(0.1 * static_cast<double>(n - 1));
            CHECK(buffer_p10_index(n) == at);
            const std::vector<double> kept = lowest.sorted();
            REQUIRE(at < kept.size());
            CHECK(kept[at] == sorted[at]);
            CHECK(kept.size() == std::min(n, buffer_p10_index(planned) + 1));
        }
    }
}
