// Study HDF5 files: `knockon simulate SCENARIO --replications N --out study.h5 [--traces ...]` is run
// on a small fixture with drawn primary delays, and the file is read back with the plain HDF5 C API
// (not the writer's wrappers) to check the layout of tools/results/HDF5_LAYOUT.md, agreement with the
// --json output of the same run, which days are traced, byte-identical files whatever --threads,
// and that a failed or interrupted run leaves a whole file or none.
#include <catch2/catch.hpp>

#include <hdf5.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <csignal>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <set>
#include <string>
#include <thread>
#include <vector>

#include <sys/wait.h>
#include <unistd.h>

#include <nlohmann/json.hpp>

#include "cli_support.hpp"
#include "hdf5_test_support.hpp"
#include "tools/results/study_hdf5.hpp"

using namespace knockon;
using Catch::Matchers::Contains;
namespace fs = std::filesystem;
using clitest::read_text;
using h5test::Reader;

namespace {

// A fresh directory holding the fixture: tests/data/two_trains.yaml with a `delays:` section, so
// that days differ (half the trains start late, exponential with a mean of 2 min).
struct Fixture {
    fs::path dir, scenario;
    explicit Fixture(const std::string& tag)
        : dir(fs::temp_directory_path() / ("knockon-study-h5-" + tag + "-" + std::to_string(::getpid()))) {
        fs::remove_all(dir);
        fs::create_directories(dir);
        scenario = dir / "delayed.yaml";
        std::ofstream out(scenario);
        out << read_text(fs::path(KNOCKON_SOURCE_DIR) / "tests/data/two_trains.yaml")
            << "\ndelays: {entry: [{probability: 50 %, distribution: exponential, mean: 2 min}]}\n";
    }
    ~Fixture() {
        std::error_code ec;
        fs::remove_all(dir, ec);
    }
    std::vector<std::string> entries() const {
        std::vector<std::string> out;
        for (const auto& e : fs::directory_iterator(dir)) out.push_back(e.path().filename().string());
        std::sort(out.begin(), out.end());
        return out;
    }
    // Runs `knockon simulate <fixture> <args>`, stdout and stderr to files; returns the exit status.
    int simulate(const std::string& args, const std::string& tag = "run") const {
        const std::string cmd = std::string(KNOCKON_EXE) + " simulate '" + scenario.string() + "' " + args + " >'" +
                                (dir / (tag + ".out")).string() + "' 2>'" + (dir / (tag + ".err")).string() + "'";
        const int rc = std::system(cmd.c_str());
        return WIFEXITED(rc) ? WEXITSTATUS(rc) : -1;
    }
    std::string out(const std::string& tag = "run") const { return read_text(dir / (tag + ".out")); }
    std::string err(const std::string& tag = "run") const { return read_text(dir / (tag + ".err")); }
};

// Row of /study/summary for one figure.
struct SummaryRow {
    double mean, half_width, lower, upper;
    std::uint64_t n;
};
SummaryRow summary_row(const Reader& f, const std::string& figure) {
    const auto figures = f.text_column("/study/summary", "figure");
    const auto at = std::find(figures.begin(), figures.end(), figure);
    INFO(figure);
    REQUIRE(at != figures.end());
    const auto i = static_cast<std::size_t>(at - figures.begin());
    return {f.f64("/study/summary", "mean")[i], f.f64("/study/summary", "ci95_half_width")[i],
            f.f64("/study/summary", "ci95_lower")[i], f.f64("/study/summary", "ci95_upper")[i],
            f.column<std::uint64_t>("/study/summary", "n", H5T_NATIVE_UINT64)[i]};
}

}  // namespace

TEST_CASE("study HDF5: per-day records and statistics agree with the JSON output", "[study_hdf5]") {
    Fixture fx("json");
    const fs::path out = fx.dir / "study.h5";
    REQUIRE(fx.simulate("--replications 20 --out '" + out.string() + "' --json") == 0);
    INFO(fx.err());
    const nlohmann::json j = nlohmann::json::parse(fx.out());
    Reader f(out);

    // Layout of tools/results/HDF5_LAYOUT.md (our own spec).
    CHECK(f.text_attr("/", "kind") == "study");
    CHECK(f.number_attr<int>("/", "schema_version", H5T_NATIVE_INT) == kSimHdf5SchemaVersion);
    CHECK(f.number_attr<std::uint64_t>("/", "seed", H5T_NATIVE_UINT64) == 1);  // the default seed
    CHECK(f.number_attr<std::uint32_t>("/", "replications", H5T_NATIVE_UINT32) == 20);
    CHECK(f.number_attr<std::uint8_t>("/", "partial", H5T_NATIVE_UINT8) == 0);
    CHECK(f.text_attr("/", "scenario_name") == "Two trains, one track (test)");
    CHECK_THAT(f.text_attr("/", "command_line"), Contains("--replications 20"));
    CHECK(f.number_attr<std::uint32_t>("/study", "replications", H5T_NATIVE_UINT32) == 20);
    CHECK(f.number_attr<std::uint8_t>("/study", "partial", H5T_NATIVE_UINT8) == 0);
    CHECK(f.number_attr<std::uint32_t>("/study", "deadlocked_days", H5T_NATIVE_UINT32) ==
          j["study"]["deadlocked_days"].get<std::uint32_t>());
    CHECK(f.number_attr<double>("/study", "knock_on_ratio", H5T_NATIVE_DOUBLE) ==
          j["per_day"]["knock_on_ratio"].get<double>());
    CHECK(f.f64_array_attr("/study", "thresholds_s") == std::vector<double>{180.0, 300.0});

    using Names = std::vector<std::string>;
    CHECK(f.field_names("/study/per_day") ==
          Names{"replication", "deadlocked", "events", "block_passages", "total_primary", "total_knock_on",
                "mean_arrival_delay", "moved_crossings", "changed_orders", "missed_connections", "punctual_3min", "punctual_5min"});
    CHECK(f.field_names("/study/summary") ==
          Names{"figure", "unit", "mean", "ci95_half_width", "ci95_lower", "ci95_upper", "n"});
    CHECK(f.field_names("/study/trains") ==
          Names{"train", "primary_mean", "primary_ci95_half_width", "knock_on_mean", "knock_on_ci95_half_width",
                "final_delay_mean", "final_delay_ci95_half_width"});
    CHECK(f.field_names("/study/signals") == Names{"signal", "held_mean", "held_ci95_half_width"});
    CHECK(f.field_names("/study/sections") ==
          Names{"section", "blocked_share_mean", "blocked_share_ci95_half_width"});
    CHECK(f.field_names("/study/trains_index") == Names{"index", "id"});
    const Names tp = f.field_names("/study/timing_points");
    REQUIRE(tp.size() == 13 + 3 * 2);
    CHECK(tp[0] == "train");
    CHECK(tp[5] == "delay_mean");
    CHECK(tp[13] == "punctual_3min_share");
    CHECK(tp[18] == "punctual_5min_upper");

    // Every day, in replication order.
    REQUIRE(f.count("/study/per_day") == 20);
    const auto reps = f.column<std::uint32_t>("/study/per_day", "replication", H5T_NATIVE_UINT32);
    for (std::uint32_t k = 0; k < 20; ++k) CHECK(reps[k] == k);
    const auto primary = f.f64("/study/per_day", "total_primary");
    const auto knock = f.f64("/study/per_day", "total_knock_on");
    // The fixture draws delays: the days differ (a study of identical days would hide mix-ups).
    CHECK(std::set<double>(primary.begin(), primary.end()).size() > 5);

    // The same estimates as --json (common practice, no source: the same doubles, written twice).
    const SummaryRow k_on = summary_row(f, "total_knock_on");
    CHECK(k_on.mean == j["per_day"]["total_knock_on_s"]["mean"].get<double>());
    CHECK(k_on.half_width == j["per_day"]["total_knock_on_s"]["ci95_half_width"].get<double>());
    CHECK(k_on.n == 20);
    const SummaryRow prim = summary_row(f, "total_primary");
    CHECK(prim.mean == j["per_day"]["total_primary_s"]["mean"].get<double>());
    CHECK(prim.lower == j["per_day"]["total_primary_s"]["ci95_lower"].get<double>());
    CHECK(summary_row(f, "mean_arrival_delay").upper == j["per_day"]["mean_arrival_delay_s"]["ci95_upper"].get<double>());
    CHECK(summary_row(f, "punctual_3min").mean == j["per_day"]["punctuality"][0]["share"]["mean"].get<double>());
    CHECK(summary_row(f, "punctual_5min").mean == j["per_day"]["punctuality"][1]["share"]["mean"].get<double>());
    CHECK(f.text_column("/study/summary", "unit") == Names{"s", "s", "s", "count", "count", "count", "share", "share"});

    // The summary is the statistics of the per_day column. Mean: the sum in replication order / n.
    double sum = 0.0;
    for (double v : primary) sum += v;
    CHECK(prim.mean == sum / 20.0);
    // From memory (Student t table): t(0.975, 19 df) = 2.093; half-width = t * s / sqrt(n).
    double ss = 0.0;
    for (double v : primary) ss += (v - prim.mean) * (v - prim.mean);
    CHECK(prim.half_width == Approx(2.093 * std::sqrt(ss / 19.0) / std::sqrt(20.0)).epsilon(1e-4));
    CHECK(prim.lower == Approx(prim.mean - prim.half_width));
    double knock_sum = 0.0;
    for (double v : knock) knock_sum += v;
    CHECK(k_on.mean == Approx(knock_sum / 20.0));

    // Per timing point, train, signal and section: as many rows as in the JSON, the same figures.
    REQUIRE(f.count("/study/timing_points") == j["timing_points"].size());
    const auto tp_knock = f.f64("/study/timing_points", "knock_on_mean");
    const auto tp_delay = f.f64("/study/timing_points", "delay_mean");
    const auto tp_p90 = f.f64("/study/timing_points", "p90");
    const auto reached = f.column<std::uint32_t>("/study/timing_points", "reached", H5T_NATIVE_UINT32);
    const auto stations = f.text_column("/study/timing_points", "station");
    for (std::size_t i = 0; i < tp_knock.size(); ++i) {
        INFO("timing point " << i);
        const auto& jt = j["timing_points"][i];
        CHECK(stations[i] == jt["station"].get<std::string>());
        CHECK(tp_knock[i] == jt["knock_on_s"]["mean"].get<double>());
        CHECK(reached[i] == jt["reached"].get<std::uint32_t>());
        if (reached[i] > 0) {
            CHECK(tp_delay[i] == jt["arrival_delay_s"]["mean"].get<double>());
            CHECK(tp_p90[i] == jt["p90_s"].get<double>());
            CHECK(f.f64("/study/timing_points", "punctual_3min_lower")[i] ==
                  jt["punctuality"][0]["share"]["ci95_lower"].get<double>());
        } else {
            CHECK(std::isnan(tp_delay[i]));  // HDF5_LAYOUT.md: NaN where the train never got there
        }
    }
    REQUIRE(f.count("/study/trains") == j["trains"].size());
    const auto train_ids = f.text_column("/study/trains_index", "id");
    const auto train_rows = f.column<std::uint32_t>("/study/trains", "train", H5T_NATIVE_UINT32);
    const auto train_knock = f.f64("/study/trains", "knock_on_mean");
    for (std::size_t i = 0; i < train_rows.size(); ++i) {
        CHECK(train_ids[train_rows[i]] == j["trains"][i]["train"].get<std::string>());
        CHECK(train_knock[i] == j["trains"][i]["knock_on_s"]["mean"].get<double>());
    }
    REQUIRE(f.count("/study/signals") == j["signals"].size());
    const auto held = f.f64("/study/signals", "held_mean");
    for (std::size_t i = 0; i + 1 < held.size(); ++i) CHECK(held[i] >= held[i + 1]);  // largest first
    REQUIRE(f.count("/study/sections") == j["sections"].size());
    CHECK(f.count("/study/sections_index") == j["sections"].size());
    CHECK(f.f64("/study/sections", "blocked_share_mean")[0] ==
          j["sections"][0]["blocked_share"]["mean"].get<double>());

    REQUIRE(f.count("/study/buffers") == j["buffers"].size());
    if (!j["buffers"].empty()) {
        CHECK(train_ids[f.column<std::uint32_t>("/study/buffers", "leader", H5T_NATIVE_UINT32)[0]] ==
              j["buffers"][0]["leader"].get<std::string>());
        CHECK(f.f64("/study/buffers", "as_run_mean")[0] == j["buffers"][0]["as_run_s"]["mean"].get<double>());
        CHECK(f.f64("/study/buffers", "planned")[0] == j["buffers"][0]["planned_s"].get<double>());
    }

    // --traces none is the default: the group is there, empty.
    CHECK(f.members("/replications").empty());
    CHECK(f.text_attr("/replications", "traces") == "none");
    CHECK_FALSE(f.exists("/day"));
    CHECK(fx.entries() == Names{"delayed.yaml", "run.err", "run.out", "study.h5"});  // no temporary left
}

TEST_CASE("study HDF5: --traces none, all and sample:K write those days", "[study_hdf5]") {
    Fixture fx("traces");
    const fs::path none = fx.dir / "none.h5", all = fx.dir / "all.h5", sample = fx.dir / "sample.h5";
    REQUIRE(fx.simulate("--replications 20 --traces none --out '" + none.string() + "'") == 0);
    REQUIRE(fx.simulate("--replications 20 --traces all --out '" + all.string() + "'") == 0);
    REQUIRE(fx.simulate("--replications 20 --traces sample:5 --out '" + sample.string() + "'") == 0);

    CHECK(Reader(none).members("/replications").empty());
    CHECK(Reader(all).members("/replications").size() == 20);
    CHECK(Reader(all).number_attr<std::uint32_t>("/replications", "traced", H5T_NATIVE_UINT32) == 20);

    Reader f(sample);
    // HDF5_LAYOUT.md: day k traced when floor((k+1)K/N) > floor(kK/N); N = 20, K = 5: the last of
    // each block of 4.
    CHECK(f.members("/replications") == std::vector<std::string>{"000003", "000007", "000011", "000015", "000019"});
    CHECK(f.text_attr("/replications", "traces") == "sample:5");
    CHECK(f.number_attr<std::uint32_t>("/replications", "traced", H5T_NATIVE_UINT32) == 5);

    // A traced day is laid out like /day, and is the day that per_day summarises.
    const auto per_day_events = f.column<std::uint64_t>("/study/per_day", "events", H5T_NATIVE_UINT64);
    const auto per_day_knock = f.f64("/study/per_day", "total_knock_on");
    const auto per_day_primary = f.f64("/study/per_day", "total_primary");
    for (const std::string day : {"000003", "000007", "000011", "000015", "000019"}) {
        INFO(day);
        const std::string g = "/replications/" + day;
        const std::size_t k = std::stoul(day);
        for (const char* t : {"trains", "sections", "timing", "occupancy", "routes", "holds", "trajectories"})
            CHECK(f.exists(g + "/" + t));
        CHECK(f.count(g + "/trains") == 2);
        CHECK(f.count(g + "/timing") == f.count("/study/timing_points"));
        CHECK(f.number_attr<std::uint64_t>(g, "events", H5T_NATIVE_UINT64) == per_day_events[k]);
        // sim/study.cpp: the day's knock-on total is the sum of its timing records' knock_on.
        double knock = 0.0;
        for (double v : f.f64(g + "/timing", "knock_on")) knock += v;
        CHECK(knock == per_day_knock[k]);
    }
    // Days differ, so the groups are not copies of one day.
    std::set<double> primaries;
    for (std::size_t k : {3, 7, 11, 15, 19}) primaries.insert(per_day_primary[k]);
    CHECK(primaries.size() > 1);

    // Tracing changes no figure: per_day and summary as without traces.
    Reader n(none);
    CHECK(n.f64("/study/per_day", "total_knock_on") == per_day_knock);
    CHECK(n.f64("/study/summary", "mean") == f.f64("/study/summary", "mean"));
}

TEST_CASE("study HDF5: the same seed gives the same bytes with 1 or 2 threads", "[study_hdf5]") {
    Fixture fx("threads");
    const fs::path out = fx.dir / "study.h5";
    // 120 days: more than one batch of 50, so the threads interleave across batches.
    const std::string args = "--replications 120 --seed 7 --traces sample:7 --out '" + out.string() + "'";
    REQUIRE(fx.simulate(args + " --threads 1") == 0);
    const std::string one = read_text(out);
    REQUIRE(fx.simulate(args + " --threads 2") == 0);
    const std::string two = read_text(out);
    REQUIRE(fx.simulate("--threads=2 " + args) == 0);
    const std::string two_again = read_text(out);
    REQUIRE(one.size() > 0);
    // sim/ENGINEERING.md "Random numbers and reproducibility": results do not depend on the thread count.
    CHECK(one == two);
    CHECK(one == two_again);
    Reader f(out);
    CHECK(f.members("/replications").size() == 7);
    CHECK(f.number_attr<std::uint64_t>("/", "seed", H5T_NATIVE_UINT64) == 7);
    // HDF5_LAYOUT.md: the stored command line leaves out --threads.
    const std::string cl = f.text_attr("/", "command_line");
    CHECK_THAT(cl, Contains("--seed 7"));
    CHECK_FALSE(cl.find("--threads") != std::string::npos);
}

TEST_CASE("study HDF5: an unwritable path fails and leaves no file", "[study_hdf5]") {
    Fixture fx("unwritable");
    const std::string bad = "/nonexistent-dir-knockon-study/x.h5";
    REQUIRE_FALSE(fs::exists("/nonexistent-dir-knockon-study"));
    CHECK(fx.simulate("--replications 20 --traces all --out " + bad) == 1);  // main.cpp: 1 = failure while running
    CHECK_THAT(fx.err(), Contains(bad));
    CHECK_FALSE(fs::exists("/nonexistent-dir-knockon-study"));
    CHECK(fx.out().empty());  // no results printed as if all went well

    // A directory at the path: refused before any day runs (bad input, exit 2), and left as it was.
    const fs::path taken = fx.dir / "taken";
    fs::create_directories(taken / "inside");
    CHECK(fx.simulate("--replications 20 --traces all --out '" + taken.string() + "'", "late") == 2);
    CHECK_THAT(fx.err("late"), Contains(taken.string()) && Contains("is a directory"));
    CHECK(fx.out("late").empty());
    CHECK(fs::is_directory(taken / "inside"));
    CHECK(fx.entries() == std::vector<std::string>{"delayed.yaml", "late.err", "late.out", "run.err", "run.out", "taken"});
}

TEST_CASE("study HDF5: bad --traces values are usage errors naming the option", "[study_hdf5]") {
    Fixture fx("usage");
    const fs::path out = fx.dir / "x.h5";
    for (const std::string v : {"sample:0", "sample:", "sample:x", "sample:-1", "sample:5x", "some", "ALL", ""}) {
        INFO("--traces '" << v << "'");
        CHECK(fx.simulate("--replications 5 --out '" + out.string() + "' --traces '" + v + "'") == 2);  // main.cpp: 2 = usage
        CHECK_THAT(fx.err(), Contains("--traces"));
    }
    CHECK(fx.simulate("--replications 5 --traces all") == 2);  // nowhere to write them
    CHECK_THAT(fx.err(), Contains("--traces needs --out"));
    CHECK(fx.simulate("--traces all --out '" + out.string() + "'") == 2);  // a single day
    CHECK_THAT(fx.err(), Contains("--traces needs --replications"));
    CHECK_FALSE(fs::exists(out));
}

TEST_CASE("study HDF5: Ctrl-C writes a whole file of the days finished", "[study_hdf5]") {
    Fixture fx("interrupt");
    const fs::path out = fx.dir / "study.h5";
    const clitest::Interrupted run = clitest::interrupt_knockon(
        {"simulate", fx.scenario.string(), "--replications", "10000000", "--threads", "2", "--traces", "sample:10000",
         "--out", out.string()},
        out, fx.dir / "child.out", "/dev/null");
    REQUIRE(run.started);
    REQUIRE(WIFEXITED(run.status));
    CHECK(WEXITSTATUS(run.status) == 130);  // the shell's code for an interrupted command
    REQUIRE(fs::exists(out));
    CHECK_FALSE(fs::exists(run.temporary));

    Reader f(out);
    CHECK(f.number_attr<std::uint8_t>("/", "partial", H5T_NATIVE_UINT8) == 1);
    CHECK(f.number_attr<std::uint8_t>("/study", "partial", H5T_NATIVE_UINT8) == 1);
    const auto days = f.number_attr<std::uint32_t>("/", "replications", H5T_NATIVE_UINT32);
    CHECK(days > 0);
    CHECK(days < 10000000);
    CHECK(days % 50 == 0);  // sim/study.hpp: stops at the end of a batch of 50
    CHECK(f.count("/study/per_day") == days);
    CHECK(summary_row(f, "total_knock_on").n == days);
    // The traced days it finished: every 1000th, the last of each block (sample:10000 of 10^7).
    const auto traced = f.members("/replications");
    CHECK(traced.size() == days / 1000);
    if (!traced.empty()) CHECK(traced.front() == "000999");
}

TEST_CASE("study HDF5: which days --traces picks", "[study_hdf5]") {
    // HDF5_LAYOUT.md (our own rule): K of N spread evenly, exactly K when K <= N, all when K >= N.
    const auto sample = [](std::uint32_t k) { return *parse_trace_selection("sample:" + std::to_string(k)); };
    for (const auto& [n, k] : std::vector<std::pair<std::uint32_t, std::uint32_t>>{
             {20, 5}, {10, 3}, {7, 7}, {100, 1}, {1000, 999}, {5, 9}, {1, 1}}) {
        INFO("N = " << n << ", K = " << k);
        std::vector<std::uint32_t> picked;
        for (std::uint32_t r = 0; r < n; ++r)
            if (sample(k).traced(r, n)) picked.push_back(r);
        CHECK(picked.size() == std::min(n, k));
        if (k <= n) CHECK(picked.back() == n - 1);  // the last of the last block
    }
    std::vector<std::uint32_t> picked;
    for (std::uint32_t r = 0; r < 10; ++r)
        if (sample(3).traced(r, 10)) picked.push_back(r);
    CHECK(picked == std::vector<std::uint32_t>{3, 6, 9});  // floor((r+1)*3/10) steps at r = 3, 6, 9
    CHECK(sample(1).traced(99, 100));
    CHECK_FALSE(sample(1).traced(98, 100));
    CHECK(sample(1).traced(0, 1));
    // K = N - 1: every day but the first; (k+1)K overflows 32 bits for the last one.
    CHECK(sample(4294967294u).traced(4294967294u, 4294967295u));
    CHECK_FALSE(sample(4294967294u).traced(0, 4294967295u));

    CHECK(parse_trace_selection("all")->traced(5, 10));
    CHECK_FALSE(parse_trace_selection("none")->traced(5, 10));
    CHECK(parse_trace_selection("sample:12")->text() == "sample:12");
    for (const char* bad : {"", "sample:", "sample:0", "sample:+3", "sample: 3", "sample:3 ", "sample:99999999999", "All"})
        CHECK_FALSE(parse_trace_selection(bad).has_value());
    CHECK(replication_group_name(42) == "000042");
    CHECK(replication_group_name(1234567) == "1234567");
}

TEST_CASE("study HDF5: the Python example reads a study file", "[study_hdf5][python]") {
    // Runs tools/read_results_example.py where some python3 has h5py; skipped (with a warning) elsewhere.
    const std::string python = clitest::python_with_h5py();
    if (python.empty()) {
        WARN("no python3 with h5py: example not run");
        return;
    }
    Fixture fx("python");
    const fs::path out = fx.dir / "study.h5";
    REQUIRE(fx.simulate("--replications 20 --traces sample:2 --out '" + out.string() + "'") == 0);
    const fs::path log = fx.dir / "log.txt";
    const int rc = clitest::run_read_results_example(python, out, log);
    INFO(read_text(log));
    REQUIRE(rc == 0);
    CHECK_THAT(read_text(log), Contains("per_day: 20 records"));
    CHECK_THAT(read_text(log), Contains("total_knock_on"));
    CHECK_THAT(read_text(log), Contains("traced days: 2 (000009, 000019)"));
    CHECK_THAT(read_text(log), Contains("timing 6"));  // the first traced day, read like /day
}
