// Comparing variants: paired differences with common random numbers (sim/comparison), the plan
// figures compared, the demo's four-aspect variant in a small study, and `knockon compare` end to
// end.
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "models/plan.hpp"
#include "sim/comparison.hpp"
#include "sim/delay_draws.hpp"
#include "sim/simulation.hpp"
#include "sim/study.hpp"
#include "tools/read/scenario_reader.hpp"
#include "cli_support.hpp"

using namespace knockon;
using Catch::Matchers::Contains;
namespace fs = std::filesystem;

namespace {

const std::string kSource = KNOCKON_SOURCE_DIR;
const std::string kExe = KNOCKON_EXE;
const std::string kDemo = kSource + "/scenarios/demo.yaml";
// A single line with hourly crossings and timetable variants: PD one minute later, PD renamed with
// and without a draw_key.
const std::string kRetimed = kSource + "/tests/data/study/retimed_crossing.yaml";

std::string read_text(const fs::path& path) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

// The two-train test line with primary delays (T1 late often enough to hold T2 back now and then)
// and a variant that changes nothing.
std::string two_trains_with_delays() {
    return read_text(kSource + "/tests/data/two_trains.yaml") +
           "\n"
           "delays:\n"
           "  entry:\n"
           "    - {probability: 60 %, distribution: exponential, mean: 4 min}\n"
           "  dwell:\n"
           "    - {probability: 30 %, distribution: weibull, shape: 1.5, scale: 40 s}\n"
           "variants:\n"
           "  same:\n"
           "    description: identical to the base\n"
           "  four:\n"
           "    infrastructure: {signalling: {areas: [{from: 0 km, to: 10 km, system: four_aspect}]}}\n";
}

// A study of `replications` days of one scenario with the given seed (what `compare` runs per variant).
struct Run {
    Scenario scenario;
    std::vector<TrainPlan> plan;
};
StudyResult study(const Run& r, std::uint64_t seed, std::uint32_t replications) {
    StudyOptions o;
    o.replications = replications;
    o.draw = [&](std::uint32_t k) { return draw_delays(r.scenario, r.plan, seed, k); };
    SimModel model(r.scenario, r.plan);
    return run_study(model, o);
}
Run prepare(Scenario sc) {
    Run r{std::move(sc), {}};
    r.plan = plan_trains(r.scenario);
    return r;
}

struct Result {
    int status = -1;
    std::string out, err;
};
Result run_knockon(const std::string& args) {
    std::string tmpl = (fs::temp_directory_path() / "knockon_compare_XXXXXX").string();
    REQUIRE(mkdtemp(tmpl.data()) != nullptr);
    const fs::path dir = tmpl, out = dir / "out.txt", err = dir / "err.txt";
    const std::string cmd = "'" + kExe + "' " + args + " >'" + out.string() + "' 2>'" + err.string() + "'";
    const int rc = std::system(cmd.c_str());
    Result r;
    r.status = (rc != -1 && WIFEXITED(rc)) ? WEXITSTATUS(rc) : -1;
    r.out = read_text(out);
    r.err = read_text(err);
    std::error_code ec;
    fs::remove_all(dir, ec);
    return r;
}

}  // namespace

TEST_CASE("paired differences: mean and Student-t interval of the per-replication differences", "[compare]") {
    // differences 1, 2, 3: mean 2, s = 1, half-width t(0.975; 2) s / sqrt 3 with t = 4.302653
    // (Student t table, any statistics text; from memory, checked against Boost.Math in study tests).
    const PairedFigure f = paired_figure({1.0, 2.0, 3.0}, {2.0, 4.0, 6.0});
    CHECK(f.first.mean == Approx(2.0));
    CHECK(f.other.mean == Approx(4.0));
    CHECK(f.difference.mean == Approx(2.0));
    CHECK(f.difference.half_width == Approx(4.302653 / std::sqrt(3.0)).epsilon(1e-6));
    CHECK(f.difference.n == 3);
    // The paired interval is narrower than either mean's own when the days move together.
    CHECK(f.difference.half_width < f.other.half_width);
    CHECK_THROWS_AS(paired_figure({1.0, 2.0}, {1.0}), std::invalid_argument);
}

TEST_CASE("identical variants differ by exactly 0 with common random numbers", "[compare]") {
    // models/DOMAIN.md section 5: the same primary delays in each variant (common random numbers), so
    // that differences are the variants', not the dice's.  With independent draws the same check
    // fails, as the last part shows.
    const std::string text = two_trains_with_delays();
    const Run base = prepare(parse_scenario(text, "t.yaml"));
    const Run same = prepare(parse_scenario(text, "t.yaml", "same"));
    const std::uint32_t n = 40;
    const StudyResult a = study(base, 7, n);
    const StudyResult b = study(same, 7, n);
    const StudyComparison c = compare_studies(a, b, StudyOptions{}.thresholds);
    REQUIRE(c.replications == n);
    // The days do vary (otherwise the check below would prove nothing).
    REQUIRE(c.total_knock_on.first.half_width > 0.0);
    REQUIRE(c.total_primary.first.half_width > 0.0);
    for (const PairedFigure* f : {&c.total_knock_on, &c.mean_arrival_delay, &c.total_primary, &c.punctuality[0],
                                  &c.punctuality[1]}) {
        CHECK(f->difference.mean == 0.0);
        CHECK(f->difference.half_width == 0.0);
    }
    // Independent draws (another seed for the second variant): the same variant now "differs".
    const StudyResult indep = study(same, 8, n);
    const StudyComparison ci = compare_studies(a, indep, StudyOptions{}.thresholds);
    CHECK(ci.total_primary.difference.half_width > 0.0);
    CHECK(ci.total_knock_on.difference.half_width > 0.0);
}

TEST_CASE("a changed variant sees the same primary delays day by day", "[compare]") {
    // Draws are keyed by seed, replication, the trains' draw keys and station ids
    // (sim/delay_draws.hpp), none of which the signalling changes: the primary delay of every day
    // is the same in both variants.
    const std::string text = two_trains_with_delays();
    const Run base = prepare(parse_scenario(text, "t.yaml"));
    const Run four = prepare(parse_scenario(text, "t.yaml", "four"));
    const StudyResult a = study(base, 3, 30);
    const StudyResult b = study(four, 3, 30);
    for (std::size_t k = 0; k < a.replications.size(); ++k)
        CHECK(a.replications[k].total_primary == b.replications[k].total_primary);
    const StudyComparison c = compare_studies(a, b, StudyOptions{}.thresholds);
    CHECK(c.total_primary.difference.mean == 0.0);
    // Four-aspect signalling lets a follower read further ahead: never more knock-on on any day
    // here (tests/REFERENCES.md B5: more aspects, earlier clear indication).
    for (std::size_t k = 0; k < a.replications.size(); ++k)
        CHECK(b.replications[k].total_knock_on <= a.replications[k].total_knock_on + 1e-6);
}

TEST_CASE("a retimed repeat pattern keeps every train's primary delays day by day", "[compare]") {
    // Draws are keyed by a train's draw name and run number, not by its id, which carries the
    // time (sim/delay_draws.hpp): moving the PD pattern by a minute renames its runs (PD-0609
    // becomes PD-0610) but leaves every train's primary delays as they were, to the bit.
    const Run base = prepare(read_scenario(kRetimed));
    const Run later = prepare(read_scenario(kRetimed, "pd_one_minute_later"));
    const Run renamed = prepare(read_scenario(kRetimed, "pd_renamed"));
    REQUIRE(base.plan.size() == later.plan.size());
    REQUIRE(base.plan[15].run.service->id == "PD-0609");
    REQUIRE(later.plan[15].run.service->id == "PD-0610");
    double total = 0.0;
    bool renamed_differs = false;
    for (std::uint32_t k = 0; k < 20; ++k) {
        const InjectedDelays a = draw_delays(base.scenario, base.plan, 5, k);
        const InjectedDelays b = draw_delays(later.scenario, later.plan, 5, k);
        CHECK(a.entry == b.entry);
        CHECK(a.dwell == b.dwell);
        CHECK(a.running == b.running);
        for (double x : a.entry) total += x;
        // Renamed without a draw_key, PD draws anew (the check above can fail).
        const InjectedDelays c = draw_delays(renamed.scenario, renamed.plan, 5, k);
        renamed_differs = renamed_differs || c.entry != a.entry || c.dwell != a.dwell;
    }
    CHECK(total > 0.0);
    CHECK(renamed_differs);
}

TEST_CASE("compare_studies refuses studies that cannot be paired", "[compare]") {
    StudyResult a, b;
    a.replications.resize(3);
    b.replications.resize(2);
    for (std::uint32_t k = 0; k < 3; ++k) a.replications[k].replication = k;
    for (std::uint32_t k = 0; k < 2; ++k) b.replications[k].replication = k;
    for (auto* s : {&a, &b})
        for (ReplicationStats& r : s->replications) r.punctuality = {1.0, 1.0};
    CHECK_THROWS_AS(compare_studies(a, b, {180.0, 300.0}), std::invalid_argument);
    b.replications.push_back(a.replications[2]);
    b.replications[2].replication = 5;   // same count, but day 2 paired with day 5
    CHECK_THROWS_AS(compare_studies(a, b, {180.0, 300.0}), std::invalid_argument);
    b.replications[2].replication = 2;
    CHECK_NOTHROW(compare_studies(a, b, {180.0, 300.0}));
    CHECK_THROWS_AS(compare_studies(a, b, {180.0}), std::invalid_argument);
}

TEST_CASE("plan figures: mean minimum headway and the largest consumption", "[compare]") {
    // Plain arithmetic (common practice, no source).
    PlanResult p;
    p.headways.resize(3);
    p.headways[0].minimum_headway = 120.0;
    p.headways[1].minimum_headway = 180.0;
    p.headways[2].minimum_headway = 240.0;
    auto cap = [](const char* ls, Direction d, const char* window, double c) {
        CapacityFigure f;
        f.line_section = ls;
        f.direction = d;
        f.window = window;
        f.consumption = c;
        return f;
    };
    p.capacity = {cap("A-B", Direction::up, "peak hour", 0.4), cap("A-B", Direction::up, "day", 0.2),
                  cap("B-A", Direction::down, "peak hour", 0.6), cap("B-A", Direction::down, "day", 0.1)};
    const PlanFigures f = plan_figures(p);
    CHECK(f.headway_pairs == 3);
    CHECK(f.mean_minimum_headway == Approx(180.0));
    CHECK(f.peak_consumption == Approx(0.6));
    CHECK(f.peak_section == "B-A down");
    CHECK(f.day_consumption == Approx(0.2));
    CHECK(f.day_section == "A-B up");
    CHECK(plan_figures(PlanResult{}).mean_minimum_headway == 0.0);
}

TEST_CASE("demo: four-aspect signalling gives no more knock-on than three-aspect", "[compare][demo]") {
    // tests/REFERENCES.md B5/B6: same signals, one more aspect: the driver reads three blocks ahead
    // instead of two and never needs a longer warning.  With common random numbers the mean
    // paired difference of 20 days must not lie above 0 by more than its own CI half-width.
    const Run base = prepare(read_scenario(kDemo));
    const Run four = prepare(read_scenario(kDemo, "four_aspect"));
    REQUIRE(!base.scenario.delays.empty());
    const StudyResult a = study(base, 1, 20);
    const StudyResult b = study(four, 1, 20);
    const StudyComparison c = compare_studies(a, b, StudyOptions{}.thresholds);
    CHECK(c.total_primary.difference.mean == 0.0);
    CHECK(c.total_knock_on.first.mean > 0.0);   // the demo's delays do propagate
    CHECK(c.total_knock_on.difference.mean <= c.total_knock_on.difference.half_width);
}

TEST_CASE("demo: no simulated day ends in deadlock", "[compare][demo][sim]") {
    // A double-track line with an overtaking loop and timetable-order route setting cannot lock
    // up (common practice, no source): every train can always run on to the line end or its
    // terminus.  A deadlock here is an engine fault; days 1 and 3 of seed 1 once locked up when
    // a duplicated sighting event skipped a signal, and the train waited at it for good.
    const Run base = prepare(read_scenario(kDemo));
    const StudyResult a = study(base, 1, 12);
    REQUIRE(a.replications.size() == 12);
    for (const ReplicationStats& d : a.replications) CHECK(!d.deadlocked);
}

TEST_CASE("knockon compare on the demo: text, JSON and bad input", "[compare][cli]") {
    const Result text = run_knockon("compare '" + kDemo + "' --variants base,four_aspect --replications 10");
    CHECK(text.status == 0);
    CHECK_THAT(text.out, Contains("four_aspect"));
    CHECK_THAT(text.out, Contains("Paired differences against base"));
    CHECK_THAT(text.out, Contains("mean minimum headway"));

    const Result js = run_knockon("compare '" + kDemo + "' --variants base,four_aspect --replications 10 --json");
    REQUIRE(js.status == 0);
    const nlohmann::json j = nlohmann::json::parse(js.out);
    REQUIRE(j["variants"].size() == 2);
    CHECK(j["variants"][0]["name"] == "base");
    CHECK(j["variants"][1]["name"] == "four_aspect");
    CHECK(j["study"]["replications"] == 10);
    CHECK(j["variants"][0]["difference"].is_null());
    const auto& d = j["variants"][1]["difference"];
    CHECK(d["against"] == "base");
    CHECK(d["total_primary_s"]["mean"] == 0.0);   // common random numbers
    CHECK(d["mean_minimum_headway_s"].get<double>() <= 1e-6);   // B5/B6, as in test_variants
    CHECK(j["variants"][1]["per_day"]["total_knock_on_s"]["n"] == 10);

    const Result unknown = run_knockon("compare '" + kDemo + "' --variants base,five_aspect --replications 2");
    CHECK(unknown.status == 2);
    CHECK_THAT(unknown.err, Contains("five_aspect"));
    CHECK_THAT(unknown.err, Contains("four_aspect"));   // the known names are listed
    CHECK(unknown.out.empty());

    const Result one = run_knockon("compare '" + kDemo + "' --variants base --replications 2");
    CHECK(one.status == 2);
    const Result twice = run_knockon("compare '" + kDemo + "' --variants base,base --replications 2");
    CHECK(twice.status == 2);
    const Result plan_unknown = run_knockon("plan '" + kDemo + "' --variant nosuch");
    CHECK(plan_unknown.status == 2);
    CHECK_THAT(plan_unknown.err, Contains("nosuch"));
    const Result sim_unknown = run_knockon("simulate '" + kDemo + "' --variant nosuch");
    CHECK(sim_unknown.status == 2);
    CHECK_THAT(sim_unknown.err, Contains("nosuch"));
    const Result sim = run_knockon("simulate '" + kDemo + "' --variant shorter_blocks --json");
    REQUIRE(sim.status == 0);
    const nlohmann::json sj = nlohmann::json::parse(sim.out);
    CHECK_THAT(sj["scenario"]["name"].get<std::string>(), Contains("shorter_blocks"));
    CHECK(sj["scenario"]["signals"] == 64);   // the variant's signal list, not the base's 44
}

TEST_CASE("knockon compare of timetable variants: retimed or renamed with a draw_key gives primary difference 0", "[compare][cli]") {
    const Result js = run_knockon("compare '" + kRetimed +
                                  "' --variants base,pd_one_minute_later,pd_renamed_keyed,pd_renamed --replications 20 --threads 2 --json");
    REQUIRE(js.status == 0);
    const nlohmann::json j = nlohmann::json::parse(js.out);
    REQUIRE(j["variants"].size() == 4);
    // The days do differ, so a difference of exactly 0 means the same draws every day.
    CHECK(j["variants"][0]["per_day"]["total_primary_s"]["ci95_half_width"].get<double>() > 0.0);
    for (int v : {1, 2}) {
        INFO(j["variants"][v]["name"]);
        CHECK(j["variants"][v]["difference"]["total_primary_s"]["mean"] == 0.0);
        CHECK(j["variants"][v]["difference"]["total_primary_s"]["ci95_half_width"] == 0.0);
    }
    // The key kept the renamed pattern's draws and the trains are the same: nothing differs.
    CHECK(j["variants"][2]["difference"]["total_knock_on_s"]["ci95_half_width"] == 0.0);
    // Renamed without a draw_key: new draws for PD, so the primary delay differs from day to day.
    CHECK(j["variants"][3]["difference"]["total_primary_s"]["ci95_half_width"].get<double>() > 0.0);
}

TEST_CASE("knockon validate checks every variant", "[compare][cli]") {
    const Result r = run_knockon("validate '" + kDemo + "'");
    CHECK(r.status == 0);
    CHECK_THAT(r.out, Contains("ok (base and 2 variants)"));
    CHECK_THAT(r.out, Contains("variant shorter_blocks"));
}

TEST_CASE("knockon compare: Ctrl-C during the first study stops cleanly and writes no file", "[compare][cli]") {
    // A comparison pairs whole studies: with the first variant stopped there is nothing to
    // compare, so the command says so, exits 130 (the shell's code for an interrupted command)
    // and leaves neither the results file nor its temporary file behind.
    // The temporary file is created once every variant is planned, just before the studies run.
    const clitest::TempDir dir;
    const fs::path out = dir.path / "cmp.h5", err_log = dir.path / "err.txt";
    const clitest::Interrupted run = clitest::interrupt_knockon(
        {"compare", kDemo, "--variants", "base,four_aspect", "--replications", "10000000", "--out", out.string()}, out,
        "/dev/null", err_log);
    const std::string err = read_text(err_log);
    const bool out_exists = fs::exists(out), temporary_exists = fs::exists(run.temporary);
    REQUIRE(run.started);
    REQUIRE(WIFEXITED(run.status));
    CHECK(WEXITSTATUS(run.status) == 130);
    CHECK_THAT(err, Contains("stopped by Ctrl-C"));
    CHECK_THAT(err, Contains("base (stopped after"));
    CHECK_THAT(err, Contains("four_aspect (not run)"));
    CHECK_THAT(err, Contains("nothing to compare"));
    CHECK_FALSE(out_exists);
    CHECK_FALSE(temporary_exists);
}
