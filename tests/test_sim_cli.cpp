// End-to-end runs of `knockon simulate`: the HDF5 results file read back with the plain HDF5 C API
// (tools/results/HDF5_LAYOUT.md), a failed write, the deadlock exit status, and refused --delay options.
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <unistd.h>

#include "models/plan.hpp"
#include "sim/simulation.hpp"
#include "tools/read/scenario_reader.hpp"
#include "cli_support.hpp"
#include "hdf5_test_support.hpp"

namespace fs = std::filesystem;
using namespace knockon;

namespace {

using namespace clitest;

const std::string kDeadlock = kSource + "/tests/data/sim/single_line_deadlock.yaml";

// Every run under a 20 s guard: a deadlocked day must be reported, not hang.
Result run_knockon(const std::string& args, const TempDir& dir) { return clitest::knockon(args, dir, 20); }

}  // namespace

TEST_CASE("simulate --out writes /day/timing, /day/occupancy and /day/routes with every record", "[sim][cli][hdf5]") {
    // tools/results/HDF5_LAYOUT.md: one record per train and timing point, per train and section used,
    // per route asked for.  Counts from the same day simulated in this process.
    TempDir dir;
    const fs::path h5 = dir.path / "day.h5";
    const Result r = run_knockon("simulate " + q(kTwoTrains) + " --out " + q(h5.string()), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    REQUIRE(fs::exists(h5));

    const Scenario sc = read_scenario(kTwoTrains);
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    const SimResult day = simulate_day(model, InjectedDelays{}, SimOptions{});
    std::size_t calls = 0;
    for (const TrainPlan& tp : plan) calls += tp.run.service->calls.size();
    REQUIRE(calls == 6);   // two trains calling at A, B and C

    const h5test::Reader file(h5);
    CHECK(file.count("/day/timing") == calls);
    CHECK(file.count("/day/occupancy") == day.sections.size());
    CHECK(file.count("/day/routes") == day.routes.size());
    CHECK(day.sections.size() >= 2 * 8);   // each train passes every block of the line
}

TEST_CASE("simulate --out into an unwritable directory fails and leaves no file", "[sim][cli][hdf5]") {
    TempDir dir;
    const fs::path locked = dir.path / "locked";
    fs::create_directories(locked);
    fs::permissions(locked, fs::perms::owner_read | fs::perms::owner_exec);
    const fs::path target = locked / "day.h5";
    // Root ignores directory permissions: then a path under a regular file stands in.
    std::ofstream(dir.path / "plain.txt") << "x";
    const bool root = ::geteuid() == 0;
    const fs::path bad = root ? dir.path / "plain.txt" / "day.h5" : target;
    const Result r = run_knockon("simulate " + q(kTwoTrains) + " --out " + q(bad.string()), dir);
    CHECK(r.status != 0);
    CHECK(r.err.find(bad.filename().string()) != std::string::npos);
    CHECK_FALSE(fs::exists(target));
    for (const auto& e : fs::directory_iterator(locked)) FAIL("left behind: " << e.path());
}

TEST_CASE("simulate exits 3 and prints DEADLOCK on a deadlocked day", "[sim][cli][deadlock]") {
    TempDir dir;
    for (const std::string order : {"timetable", "first-come"}) {
        const Result r = run_knockon("simulate " + q(kDeadlock) + " --order " + order, dir);
        INFO(r.out << r.err);
        CHECK(r.status == 3);
        CHECK(r.out.find("DEADLOCK") != std::string::npos);
        CHECK(r.out.find("UP1") != std::string::npos);
        CHECK(r.out.find("DN1") != std::string::npos);
    }
}

TEST_CASE("simulate refuses a bad --delay with exit status 2, naming the option", "[sim][cli]") {
    TempDir dir;
    for (const std::string spec : {"T9:entry:3",           // unknown train
                                   "T1:dwell@Z:2",         // unknown station
                                   "T1:run@Nowhere:1",     // unknown station
                                   "T1:entry",             // malformed: two parts
                                   "T1:entry:soon",        // malformed minutes
                                   "T1:wait@B:2",          // unknown kind
                                   "T1:entry:-1"}) {       // negative
        const Result r = run_knockon("simulate " + q(kTwoTrains) + " --delay " + q(spec), dir);
        INFO(spec << ": " << r.err);
        CHECK(r.status == 2);
        CHECK(r.err.find("--delay") != std::string::npos);
        CHECK(r.err.find(spec) != std::string::npos);
    }
    // A good one is accepted and takes effect.
    const Result ok = run_knockon("simulate " + q(kTwoTrains) + " --delay T1:entry:3 --json", dir);
    CHECK(ok.status == 0);
    CHECK(ok.out.find("\"departure_delay\": 180.0") != std::string::npos);
}
