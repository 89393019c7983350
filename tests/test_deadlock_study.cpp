// Days that end in deadlock in a study: each keeps its per-day row, flagged, but enters no figure
// across days (the figures are a hand computation over the complete days alone), nor the
// --until-ci rule; the first one's report is kept; a study of deadlocked days only has no
// figures; paired differences take only days complete in both studies.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include <boost/math/distributions/students_t.hpp>

#include "models/plan.hpp"
#include "sim/comparison.hpp"
#include "sim/delay_draws.hpp"
#include "sim/simulation.hpp"
#include "sim/study.hpp"
#include "tools/read/scenario_reader.hpp"
#include "sim_test_support.hpp"

using namespace knockon;

namespace {

const std::string kSource = KNOCKON_SOURCE_DIR;
// Under first-come route setting about a third of its days end in deadlock.
const std::string kCrossings = kSource + "/tests/data/study/single_line_crossings.yaml";
const std::string kHeadOn = kSource + "/tests/data/sim/head_on.yaml";

using simtest::Loaded;

StudyOptions first_come_study(const Loaded& f, std::uint32_t replications, unsigned threads) {
    StudyOptions opt;
    opt.replications = replications;
    opt.threads = threads;
    opt.batch = 10;
    opt.sim.route_order = RouteOrder::first_come;
    opt.draw = [&f](std::uint32_t k) {
        return draw_delays(f.scenario, f.plan, 1, k);
    };
    return opt;
}

// The 95 % Student-t interval of a mean, written out: t(0.975, n - 1) s / sqrt(n) with s the
// sample standard deviation (Boost.Math's Student t quantile).
double t_half_width(const std::vector<double>& v) {
    const double n = static_cast<double>(v.size());
    double mean = 0.0;
    for (double x : v) mean += x;
    mean /= n;
    double ss = 0.0;
    for (double x : v) ss += (x - mean) * (x - mean);
    return boost::math::quantile(boost::math::students_t(n - 1.0), 0.975) * std::sqrt(ss / (n - 1.0)) / std::sqrt(n);
}

double mean_of(const std::vector<double>& v) {
    double s = 0.0;
    for (double x : v) s += x;
    return s / static_cast<double>(v.size());
}

}  // namespace

TEST_CASE("Deadlocked days enter no figure of a study", "[study][deadlock]") {
    const Loaded f(kCrossings);
    const std::uint32_t days = 60;
    const StudyOptions opt = first_come_study(f, days, 2);
    const StudyResult study = run_study(*f.model, opt);
    const StudySummary s = summarize_study(*f.model, study, opt.thresholds);

    // The same days simulated again here, one by one, and the figures worked out by hand over the
    // days that ran to the end (common practice, no source: a day that stopped early has no
    // delays for the trains it left waiting, so it cannot stand for a day).
    std::vector<double> knock_on, primary, mean_delay, all_knock_on;
    std::vector<std::vector<double>> punctual(opt.thresholds.size());
    std::vector<std::uint32_t> deadlocked;
    std::string first_cause;
    std::map<std::size_t, std::vector<double>> point_delays;   // timing record -> delays of the complete days
    std::vector<std::vector<double>> train_knock_on(f.plan.size());
    for (std::uint32_t k = 0; k < days; ++k) {
        const InjectedDelays d = opt.draw(k);
        const SimResult day = simulate_day(*f.model, d, opt.sim);
        const ReplicationFigures r = replication_figures(*f.model, day, d, opt.thresholds, k);
        all_knock_on.push_back(r.stats.total_knock_on);
        if (day.deadlock.deadlocked) {
            if (deadlocked.empty()) first_cause = day.deadlock.cause;
            deadlocked.push_back(k);
            // Its row keeps sums up to the deadlock, but no mean or share over what it recorded.
            CHECK(std::isnan(r.stats.mean_arrival_delay));
            for (double p : r.stats.punctuality) CHECK(std::isnan(p));
            continue;
        }
        knock_on.push_back(r.stats.total_knock_on);
        primary.push_back(r.stats.total_primary);
        mean_delay.push_back(r.stats.mean_arrival_delay);
        for (std::size_t i = 0; i < punctual.size(); ++i) punctual[i].push_back(r.stats.punctuality[i]);
        for (std::size_t i = 0; i < day.timing.size(); ++i)
            if (!std::isnan(day.timing[i].arrival_delay))
                // As the study keeps it: a float, early counted as 0.
                point_delays[i].push_back(std::max(0.0, double{static_cast<float>(day.timing[i].arrival_delay)}));
        for (std::size_t t = 0; t < f.plan.size(); ++t) train_knock_on[t].push_back(r.train_knock_on[t]);
    }
    // The fixture must give both kinds of day, or this test proves nothing.
    REQUIRE(deadlocked.size() >= 5);
    REQUIRE(knock_on.size() >= 20);

    // Every day keeps its row, flagged as simulated.
    REQUIRE(study.replications.size() == days);
    std::vector<std::uint32_t> flagged;
    for (const ReplicationStats& r : study.replications)
        if (r.deadlocked) flagged.push_back(r.replication);
    CHECK(flagged == deadlocked);
    CHECK(s.replications == days);
    CHECK(s.deadlocked == deadlocked.size());
    CHECK(s.complete == knock_on.size());
    REQUIRE(s.first_deadlock);
    CHECK(s.first_deadlock->replication == deadlocked.front());
    CHECK(s.first_deadlock->report.cause == first_cause);
    CHECK_FALSE(first_cause.empty());

    // Per-day figures: over the complete days alone.
    CHECK(s.total_knock_on.n == knock_on.size());
    CHECK(s.total_knock_on.mean == Approx(mean_of(knock_on)).epsilon(1e-12));
    CHECK(s.total_knock_on.half_width == Approx(t_half_width(knock_on)).epsilon(1e-9));
    CHECK(s.total_primary.mean == Approx(mean_of(primary)).epsilon(1e-12));
    CHECK(s.total_primary.half_width == Approx(t_half_width(primary)).epsilon(1e-9));
    CHECK(s.mean_arrival_delay.mean == Approx(mean_of(mean_delay)).epsilon(1e-12));
    CHECK(s.knock_on_ratio == Approx(mean_of(knock_on) / mean_of(primary)).epsilon(1e-12));
    for (std::size_t i = 0; i < punctual.size(); ++i) {
        CHECK(s.punctuality[i].n == knock_on.size());
        CHECK(s.punctuality[i].mean == Approx(mean_of(punctual[i])).epsilon(1e-12));
        CHECK(s.punctuality[i].half_width == Approx(t_half_width(punctual[i])).epsilon(1e-9));
    }
    // The deadlocked days' knock-on (up to the deadlock) would move the mean: the test can tell.
    CHECK(s.total_knock_on.mean != Approx(mean_of(all_knock_on)).epsilon(1e-6));

    // Per timing point: reached only on complete days, with their delays.
    REQUIRE(s.timing_points.size() == study.timing_template.size());
    for (std::size_t i = 0; i < s.timing_points.size(); ++i) {
        const TimingPointStats& tp = s.timing_points[i];
        const auto it = point_delays.find(i);
        const std::size_t reached = it == point_delays.end() ? 0 : it->second.size();
        INFO("timing record " << i << " (" << tp.station << ")");
        CHECK(tp.reached == reached);
        CHECK(tp.knock_on.n == knock_on.size());
        if (reached == 0) continue;
        CHECK(tp.delay.mean == Approx(mean_of(it->second)).epsilon(1e-9));
        std::size_t within = 0;
        for (double x : it->second) within += x < opt.thresholds[0];
        CHECK(tp.punctuality[0].mean == Approx(static_cast<double>(within) / static_cast<double>(reached)));
        CHECK(tp.delay_quantiles.max == *std::max_element(it->second.begin(), it->second.end()));
    }
    // Per train.
    for (const TrainStats& t : s.trains) {
        CHECK(t.knock_on.n == knock_on.size());
        CHECK(t.knock_on.mean == Approx(mean_of(train_knock_on[t.train])).epsilon(1e-9).margin(1e-9));
    }
    for (const SignalStats& g : s.signals) CHECK(g.held.n == knock_on.size());
    for (const Estimate& e : s.section_blocked_share) CHECK(e.n == knock_on.size());
    for (const BufferStats& b : s.buffers) CHECK(b.as_run.n <= knock_on.size());

    SECTION("the same on one thread, to the bit") {
        const StudyResult one = run_study(*f.model, first_come_study(f, days, 1));
        const StudySummary s1 = summarize_study(*f.model, one, opt.thresholds);
        CHECK(s1.deadlocked == s.deadlocked);
        CHECK(s1.first_deadlock->replication == s.first_deadlock->replication);
        CHECK(s1.first_deadlock->report.description == s.first_deadlock->report.description);
        CHECK(s1.total_knock_on.mean == s.total_knock_on.mean);
        CHECK(s1.total_knock_on.half_width == s.total_knock_on.half_width);
    }

    SECTION("--until-ci counts complete days only, and needs ten of them") {
        // A target met by any interval: the study stops at the first batch end (batches of 10)
        // where at least 10 complete days have been simulated.
        StudyOptions until = first_come_study(f, days, 2);
        until.until_ci = 1e12;
        const StudyResult u = run_study(*f.model, until);
        std::uint32_t expected = 0, complete = 0;
        for (std::uint32_t k = 0; k < days; ++k) {
            complete += std::find(deadlocked.begin(), deadlocked.end(), k) == deadlocked.end();
            if ((k + 1) % until.batch == 0 && complete >= 10) {
                expected = k + 1;
                break;
            }
        }
        REQUIRE(expected > 0);
        CHECK(u.replications.size() == expected);
        CHECK(expected > until.batch);   // the first batch alone held fewer than 10 complete days
    }
}

TEST_CASE("A study whose every day deadlocks has no figures", "[study][deadlock]") {
    // head_on.yaml has no delays section: every day is the same day, which deadlocks.
    const Loaded f(kHeadOn);
    StudyOptions opt;
    opt.replications = 5;
    opt.threads = 2;
    opt.until_ci = 60.0;   // never met: no complete day to measure
    opt.draw = [](std::uint32_t) { return InjectedDelays{}; };
    const StudyResult study = run_study(*f.model, opt);
    const StudySummary s = summarize_study(*f.model, study, opt.thresholds);
    CHECK(study.replications.size() == 5);
    CHECK(s.deadlocked == 5);
    CHECK(s.complete == 0);
    REQUIRE(s.first_deadlock);
    CHECK(s.first_deadlock->replication == 0);
    CHECK(s.total_knock_on.n == 0);
    CHECK(std::isnan(s.total_knock_on.mean));
    CHECK(std::isnan(s.mean_arrival_delay.mean));
    CHECK(std::isnan(s.knock_on_ratio));
    REQUIRE(s.punctuality.size() == 2);
    CHECK(std::isnan(s.punctuality[0].mean));
    CHECK(s.timing_points.empty());
    CHECK(s.trains.empty());
    CHECK(s.buffers.empty());
}

TEST_CASE("Paired differences take only the days complete in both studies", "[compare][deadlock]") {
    // Made-up per-day rows: day 1 deadlocked in the first study, day 3 in the other.
    auto study = [](const std::vector<double>& knock_on, std::uint32_t deadlocked_day) {
        StudyResult r;
        for (std::uint32_t k = 0; k < knock_on.size(); ++k) {
            ReplicationStats s;
            s.replication = k;
            s.deadlocked = k == deadlocked_day;
            s.total_knock_on = knock_on[k];
            s.total_primary = 100.0;
            s.mean_arrival_delay = s.deadlocked ? NAN : knock_on[k] / 10.0;
            s.punctuality = {s.deadlocked ? NAN : 0.9};
            r.replications.push_back(s);
        }
        return r;
    };
    const StudyResult a = study({10.0, 900.0, 30.0, 40.0, 50.0}, 1);
    const StudyResult b = study({12.0, 20.0, 35.0, 1.0, 58.0}, 3);
    const StudyComparison c = compare_studies(a, b, {180.0});
    CHECK(c.replications == 5);
    CHECK(c.paired == 3);   // days 0, 2 and 4
    // Differences 2, 5 and 8: mean 5, standard deviation 3 (by hand).
    const std::vector<double> diff = {2.0, 5.0, 8.0};
    CHECK(c.total_knock_on.difference.n == 3);
    CHECK(c.total_knock_on.difference.mean == Approx(5.0));
    CHECK(c.total_knock_on.difference.half_width == Approx(t_half_width(diff)));
    CHECK(c.total_knock_on.first.mean == Approx(30.0));   // 10, 30, 50
    CHECK(c.punctuality[0].difference.mean == 0.0);       // no NaN of a deadlocked day got in
    CHECK(c.mean_arrival_delay.difference.mean == Approx(0.5));

    // No day complete in both: no figure, rather than a zero.
    const StudyComparison none = compare_studies(study({1.0}, 0), study({2.0}, 7), {180.0});
    CHECK(none.paired == 0);
    CHECK(std::isnan(none.total_knock_on.difference.mean));
    CHECK(none.total_knock_on.difference.n == 0);
}
