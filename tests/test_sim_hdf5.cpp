// HDF5 results writer: a hand-made SimResult is written, then read back with the plain HDF5 C API
// (not through the writer's own wrappers) to check the layout of tools/results/HDF5_LAYOUT.md, exact
// round trips (strings, NaN, a uint64 seed above 2^63), byte-identical repeated writes, and that a
// failed write leaves nothing behind.
#include <catch2/catch.hpp>

#include <hdf5.h>

#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <string>
#include <vector>

#include <unistd.h>

#include "cli_support.hpp"
#include "hdf5_test_support.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/results/output_file.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/results/results_file.hpp"
#include "tools/results/sim_hdf5.hpp"

using namespace knockon;
using Catch::Matchers::Contains;
using Catch::Matchers::StartsWith;
namespace fs = std::filesystem;
using clitest::read_text;
using h5test::Reader;

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

SimResult small_result() {
    SimResult r;
    r.train_ids = {"ic101", "regional-2040", "frt9"};
    r.section_names = {"S01", "S02", "loop U2", "S04"};
    // train 0 starts at its origin (no scheduled arrival), stops at BB, passes CC.
    r.timing = {
        {0, 0, "AA", true, kNaN, 28800.0, kNaN, 28800.0, kNaN, 0.0},
        {0, 1, "Beta", true, 29100.0, 29160.0, 29112.625, 29172.625, 12.625, 12.625, 7.25},
        {0, 2, "CC", false, 29400.0, 29400.0, 29405.5, 29405.5, 5.5, 5.5},
        {1, 0, "AA", true, kNaN, 28860.0, kNaN, 28865.0, kNaN, 5.0},
    };
    r.sections = {
        {0, 0, 28790.0, 28800.0, 28830.0, 28834.0, 28834.0},
        {0, 2, 29000.0, 29010.0, 29050.5, 29053.25, 29053.25},
        {1, 1, 28855.0, kNaN, kNaN, kNaN, 29999.0},  // locked, never entered
    };
    r.routes = {
        {0, "U01", "U02", 28780.0, 28781.0, 28789.0},
        {1, "U01", "U03-long-signal-name", 28850.0, 28851.5, kNaN},  // never cleared
    };
    r.holds = {{1, "U01", 28865.0, 28902.75}};
    // samples stay empty: the trajectories dataset must still exist, with 0 records.
    r.deadlock.deadlocked = true;
    r.deadlock.time = 30000.5;
    r.deadlock.cause = "frt9 waits for regional-2040";
    r.deadlock.description = "train frt9 waits for S02, held by regional-2040";
    // frt9 stands at a signal, kept from its route by each kind of block; regional-2040 cannot
    // enter: its route is set, but its signal is out of view from outside the line.
    DeadlockWait frt9;
    frt9.train = 2;
    frt9.waits_for = DeadlockWait::For::route;
    frt9.chainage = 12345.5;
    frt9.since = 29990.25;
    frt9.signal = "S02";
    frt9.blocks = {{1, DeadlockBlock::By::held, 1}, {2, DeadlockBlock::By::promised, 0},
                   {3, DeadlockBlock::By::disruption, 0}};
    DeadlockWait regional;
    regional.train = 1;
    regional.waits_for = DeadlockWait::For::entry_view;
    regional.since = 28860.0;
    regional.signal = "U01";
    regional.route_set = 28851.5;
    regional.read_from = 150.0;
    r.deadlock.waiting = {frt9, regional};
    r.events = 1234567;
    r.block_passages = 42;
    return r;
}

Hdf5RunInfo small_info() {
    Hdf5RunInfo info;
    info.scenario_file = "scenarios/invented-line.yaml";
    info.scenario_name = "Invented line";
    info.command_line = "knockon simulate scenarios/invented-line.yaml --hdf5 out.h5";
    info.seed = 9223372036854775813ULL;  // above 2^63: a signed or double round trip would change it
    info.program_version = "0.1.0-test";
    info.variant = "base";
    info.step = 1.5;
    return info;
}

// A fresh directory for one test, removed afterwards.
struct TempDir {
    fs::path path;
    explicit TempDir(const std::string& tag)
        : path(fs::temp_directory_path() / ("knockon-hdf5-" + tag + "-" + std::to_string(::getpid()))) {
        fs::remove_all(path);
        fs::create_directories(path);
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
    std::vector<std::string> entries() const {
        std::vector<std::string> out;
        for (const auto& e : fs::directory_iterator(path)) out.push_back(e.path().filename().string());
        return out;
    }
};

const char* const kDatasets[] = {"/day/trains",       "/day/sections", "/day/timing",   "/day/occupancy",
                                 "/day/routes",       "/day/holds",    "/day/trajectories", "/day/deadlock",
                                 "/day/deadlock_blocks", "/day/waits", "/day/links"};

}  // namespace

TEST_CASE("HDF5 results: every dataset exists with its record count", "[sim_hdf5]") {
    TempDir dir("counts");
    const fs::path out = dir.path / "run.h5";
    const SimResult r = small_result();
    write_sim_hdf5(out.string(), r, small_info());

    Reader f(out);
    // Layout of tools/results/HDF5_LAYOUT.md (our own spec): one record per SimResult record.
    CHECK(f.count("/day/trains") == 3);
    CHECK(f.count("/day/sections") == 4);
    CHECK(f.count("/day/timing") == 4);
    CHECK(f.count("/day/occupancy") == 3);
    CHECK(f.count("/day/routes") == 2);
    CHECK(f.count("/day/holds") == 1);
    CHECK(f.count("/day/trajectories") == 0);  // empty, but created
    CHECK(f.count("/day/deadlock") == 2);         // one per waiting train
    CHECK(f.count("/day/deadlock_blocks") == 3);  // one per section kept from one

    // HDF5_LAYOUT.md: the fields of each table, in order.
    using Names = std::vector<std::string>;
    CHECK(f.field_names("/day/trains") == Names{"index", "id"});
    CHECK(f.field_names("/day/sections") == Names{"index", "id"});
    CHECK(f.field_names("/day/timing") == Names{"train", "call", "station", "stops", "scheduled_arrival",
                                                "scheduled_departure", "arrival", "departure", "arrival_delay",
                                                "departure_delay", "knock_on"});
    CHECK(f.field_names("/day/occupancy") ==
          Names{"train", "section", "locked", "head_enters", "head_leaves", "tail_clears", "released"});
    CHECK(f.field_names("/day/routes") ==
          Names{"train", "entry_signal", "exit_signal", "requested", "granted", "cleared"});
    const Names causes{"cause", "cause_train", "cause_section", "cause_signal", "cause_link"};
    Names holds{"train", "signal", "from", "to"}, waits{"train", "station", "from", "to"};
    holds.insert(holds.end(), causes.begin(), causes.end());
    waits.insert(waits.end(), causes.begin(), causes.end());
    CHECK(f.field_names("/day/holds") == holds);
    CHECK(f.field_names("/day/waits") == waits);
    CHECK(f.field_names("/day/links") ==
          Names{"from", "to", "connection", "arrival", "departure", "waited", "missed"});
    CHECK(f.field_names("/day/trajectories") == Names{"train", "time", "position", "chainage", "speed"});
    CHECK(f.field_names("/day/deadlock") == Names{"train", "waits_for", "chainage", "station", "since", "signal",
                                                  "route_set", "read_from", "link", "link_from", "text"});
    CHECK(f.field_names("/day/deadlock_blocks") == Names{"train", "section", "by", "holder"});

    for (const char* name : kDatasets) {
        INFO(name);
        hid_t d = H5Dopen2(f.file, name, H5P_DEFAULT);
        REQUIRE(d >= 0);
        hid_t dcpl = H5Dget_create_plist(d);
        // sim/ENGINEERING.md "HDF5": chunked, shuffle + deflate (in that order: shuffle helps deflate).
        CHECK(H5Pget_layout(dcpl) == H5D_CHUNKED);
        REQUIRE(H5Pget_nfilters(dcpl) == 2);
        unsigned flags = 0;
        std::size_t nelmts = 0;
        CHECK(H5Pget_filter2(dcpl, 0, &flags, &nelmts, nullptr, 0, nullptr, nullptr) == H5Z_FILTER_SHUFFLE);
        nelmts = 0;
        CHECK(H5Pget_filter2(dcpl, 1, &flags, &nelmts, nullptr, 0, nullptr, nullptr) == H5Z_FILTER_DEFLATE);
        H5Pclose(dcpl);
        H5Dclose(d);
        CHECK_FALSE(f.text_attr(name, "description").empty());
        // HDF5_LAYOUT.md: units is "field: unit, field: unit, ..." naming every field in order.
        std::vector<std::string> unit_fields;
        const std::string units = f.text_attr(name, "units");
        for (std::size_t at = 0; at < units.size();) {
            const std::size_t colon = units.find(": ", at);
            REQUIRE(colon != std::string::npos);
            unit_fields.push_back(units.substr(at, colon - at));
            const std::size_t comma = units.find(", ", colon);
            at = comma == std::string::npos ? units.size() : comma + 2;
        }
        CHECK(unit_fields == f.field_names(name));
    }
}

TEST_CASE("HDF5 results: field values, strings and NaN round-trip exactly", "[sim_hdf5]") {
    TempDir dir("values");
    const fs::path out = dir.path / "run.h5";
    write_sim_hdf5(out.string(), small_result(), small_info());
    Reader f(out);

    // common practice, no source: a lossless format gives back the very bits written.
    CHECK(f.text_column("/day/trains", "id") == std::vector<std::string>{"ic101", "regional-2040", "frt9"});
    CHECK(f.column<std::uint32_t>("/day/trains", "index", H5T_NATIVE_UINT32) == std::vector<std::uint32_t>{0, 1, 2});
    CHECK(f.text_column("/day/sections", "id") == std::vector<std::string>{"S01", "S02", "loop U2", "S04"});

    CHECK(f.text_column("/day/timing", "station") == std::vector<std::string>{"AA", "Beta", "CC", "AA"});
    CHECK(f.column<std::uint8_t>("/day/timing", "stops", H5T_NATIVE_UINT8) == std::vector<std::uint8_t>{1, 1, 0, 1});
    CHECK(f.column<std::uint32_t>("/day/timing", "call", H5T_NATIVE_UINT32) == std::vector<std::uint32_t>{0, 1, 2, 0});
    const auto arrival = f.column<double>("/day/timing", "arrival", H5T_NATIVE_DOUBLE);
    REQUIRE(arrival.size() == 4);
    CHECK(std::isnan(arrival[0]));  // sim_result.hpp: NaN where not applicable stays NaN
    CHECK(arrival[1] == 29112.625);
    CHECK(arrival[2] == 29405.5);
    const auto sched_arr = f.column<double>("/day/timing", "scheduled_arrival", H5T_NATIVE_DOUBLE);
    CHECK(std::isnan(sched_arr[0]));
    CHECK(std::isnan(sched_arr[3]));
    CHECK(sched_arr[1] == 29100.0);
    CHECK(f.column<double>("/day/timing", "departure_delay", H5T_NATIVE_DOUBLE)[3] == 5.0);
    CHECK(f.column<double>("/day/timing", "knock_on", H5T_NATIVE_DOUBLE) == std::vector<double>{0.0, 7.25, 0.0, 0.0});

    CHECK(f.column<std::uint32_t>("/day/occupancy", "section", H5T_NATIVE_UINT32) ==
          std::vector<std::uint32_t>{0, 2, 1});
    const auto tail = f.column<double>("/day/occupancy", "tail_clears", H5T_NATIVE_DOUBLE);
    CHECK(tail[1] == 29053.25);
    CHECK(std::isnan(tail[2]));
    CHECK(f.column<double>("/day/occupancy", "released", H5T_NATIVE_DOUBLE)[2] == 29999.0);

    CHECK(f.text_column("/day/routes", "exit_signal") == std::vector<std::string>{"U02", "U03-long-signal-name"});
    CHECK(f.text_column("/day/routes", "entry_signal") == std::vector<std::string>{"U01", "U01"});
    const auto cleared = f.column<double>("/day/routes", "cleared", H5T_NATIVE_DOUBLE);
    CHECK(cleared[0] == 28789.0);
    CHECK(std::isnan(cleared[1]));
    CHECK(f.column<double>("/day/routes", "granted", H5T_NATIVE_DOUBLE)[1] == 28851.5);

    CHECK(f.text_column("/day/holds", "signal") == std::vector<std::string>{"U01"});
    CHECK(f.column<double>("/day/holds", "to", H5T_NATIVE_DOUBLE)[0] == 28902.75);
    CHECK(f.column<std::uint32_t>("/day/holds", "train", H5T_NATIVE_UINT32)[0] == 1);
}

TEST_CASE("HDF5 results: root and /day attributes", "[sim_hdf5]") {
    TempDir dir("attrs");
    const fs::path out = dir.path / "run.h5";
    write_sim_hdf5(out.string(), small_result(), small_info());
    Reader f(out);

    // Layout of tools/results/HDF5_LAYOUT.md (our own spec).
    CHECK(f.attr_class("/", "schema_version") == H5T_INTEGER);
    CHECK(f.number_attr<int>("/", "schema_version", H5T_NATIVE_INT) == 9);
    CHECK(f.text_attr("/", "kind") == "day");
    CHECK(f.text_attr("/", "variant") == "base");
    CHECK(f.number_attr<double>("/", "step_m", H5T_NATIVE_DOUBLE) == 1.5);
    CHECK(f.text_attr("/", "program") == "knockon");
    CHECK(f.text_attr("/", "program_version") == "0.1.0-test");
    CHECK(f.text_attr("/", "scenario_file") == "scenarios/invented-line.yaml");
    CHECK(f.text_attr("/", "scenario_name") == "Invented line");
    CHECK(f.text_attr("/", "command_line") == "knockon simulate scenarios/invented-line.yaml --hdf5 out.h5");
    CHECK(f.number_attr<std::uint64_t>("/", "seed", H5T_NATIVE_UINT64) == 9223372036854775813ULL);
    CHECK(f.text_attr("/", "time_unit") == "s after midnight of the simulated day");
    CHECK(f.text_attr("/", "caution") == kSafetyCaution);
    CHECK_THAT(f.text_attr("/", "caution"), Contains("licensed signalling engineers"));

    CHECK(f.exists("/day"));
    CHECK(f.number_attr<std::uint64_t>("/day", "events", H5T_NATIVE_UINT64) == 1234567);
    CHECK(f.number_attr<std::uint64_t>("/day", "block_passages", H5T_NATIVE_UINT64) == 42);
    CHECK(f.number_attr<std::uint8_t>("/day", "deadlocked", H5T_NATIVE_UINT8) == 1);
    CHECK(f.text_attr("/day", "deadlock_description") == "train frt9 waits for S02, held by regional-2040");
    CHECK(f.text_attr("/day", "deadlock_cause") == "frt9 waits for regional-2040");
    CHECK(f.number_attr<double>("/day", "last_event_time", H5T_NATIVE_DOUBLE) == 30000.5);
    // ic101 reached CC, its last timing point; regional-2040 only left AA; frt9 has no record.
    CHECK(f.number_attr<std::uint32_t>("/day", "trains_not_finished", H5T_NATIVE_UINT32) == 2);
    // The deadlock is stated first, on the root: how many days (a day file: 1) and what happened
    // (30000.5 s is 08:20:01 to the nearest second).
    CHECK(f.number_attr<std::uint32_t>("/", "deadlocked_days", H5T_NATIVE_UINT32) == 1);
    CHECK_THAT(f.text_attr("/", "deadlock_notice"), StartsWith("DEADLOCK at 08:20:01"));
    CHECK_THAT(f.text_attr("/", "deadlock_notice"),
               Contains("2 of 3 trains never reached their last timing point") &&
                   Contains("Cause: frt9 waits for regional-2040.") && Contains("no punctuality"));
}

TEST_CASE("HDF5 results: the deadlock report reads back as written", "[sim_hdf5][deadlock]") {
    // tools/results/HDF5_LAYOUT.md /day/deadlock and /day/deadlock_blocks, read by read_results.
    TempDir dir("deadlock");
    const fs::path out = dir.path / "run.h5";
    const SimResult r = small_result();
    write_sim_hdf5(out.string(), r, small_info());
    const ResultsFile file = read_results(out.string());
    REQUIRE(file.day);
    const DeadlockReport& got = file.day->deadlock;
    CHECK(got.deadlocked);
    CHECK(got.time == 30000.5);
    CHECK(got.cause == r.deadlock.cause);
    CHECK(got.description == r.deadlock.description);
    REQUIRE(got.waiting.size() == 2);
    for (std::size_t i = 0; i < 2; ++i) {
        const DeadlockWait &a = got.waiting[i], &b = r.deadlock.waiting[i];
        INFO("waiting train " << i);
        CHECK(a.train == b.train);
        CHECK(a.waits_for == b.waits_for);
        CHECK(std::isnan(a.chainage) == std::isnan(b.chainage));
        if (!std::isnan(b.chainage)) CHECK(a.chainage == b.chainage);
        CHECK(a.station == b.station);
        CHECK(a.since == b.since);
        CHECK(a.signal == b.signal);
        CHECK(std::isnan(a.route_set) == std::isnan(b.route_set));
        CHECK(std::isnan(a.read_from) == std::isnan(b.read_from));
        REQUIRE(a.blocks.size() == b.blocks.size());
        for (std::size_t k = 0; k < a.blocks.size(); ++k) {
            CHECK(a.blocks[k].section == b.blocks[k].section);
            CHECK(a.blocks[k].by == b.blocks[k].by);
            if (b.blocks[k].by != DeadlockBlock::By::disruption) CHECK(a.blocks[k].train == b.blocks[k].train);
        }
    }
    CHECK(got.waiting[1].route_set == 28851.5);
    CHECK(got.waiting[1].read_from == 150.0);

    // A day that ran to the end: empty tables, root says 0 days and no notice.
    SimResult clean = small_result();
    clean.deadlock = DeadlockReport{};
    const fs::path plain = dir.path / "plain.h5";
    write_sim_hdf5(plain.string(), clean, small_info());
    Reader f(plain);
    CHECK(f.count("/day/deadlock") == 0);
    CHECK(f.count("/day/deadlock_blocks") == 0);
    CHECK(f.number_attr<std::uint32_t>("/", "deadlocked_days", H5T_NATIVE_UINT32) == 0);
    CHECK(f.text_attr("/", "deadlock_notice").empty());
    CHECK(read_results(plain.string()).day->deadlock.waiting.empty());
}

TEST_CASE("HDF5 results: an empty program_version means this build's version", "[sim_hdf5]") {
    TempDir dir("version");
    const fs::path out = dir.path / "run.h5";
    Hdf5RunInfo info = small_info();
    info.program_version.clear();
    write_sim_hdf5(out.string(), SimResult{}, info);
    Reader f(out);
    CHECK(f.text_attr("/", "program_version") == KNOCKON_VERSION);
    // A result with no records at all still has every dataset.
    for (const char* name : kDatasets) {
        INFO(name);
        CHECK(f.count(name) == 0);
    }
    CHECK(f.number_attr<std::uint8_t>("/day", "deadlocked", H5T_NATIVE_UINT8) == 0);
    CHECK(f.text_attr("/day", "deadlock_description").empty());
}

TEST_CASE("HDF5 results: more records than one chunk are all written", "[sim_hdf5]") {
    TempDir dir("chunks");
    const fs::path out = dir.path / "run.h5";
    SimResult r = small_result();
    // Trajectory records are 36 bytes, so chunks hold 16384 of them; 40000 spans three chunks.
    REQUIRE(h5::RecordTable::chunk_records_for(36) == 16384);
    for (std::uint32_t i = 0; i < 40000; ++i)
        r.samples.push_back({i % 3, 28800.0 + i * 0.5, i * 1.25, 1000.0 + i * 1.25, i % 40 * 0.25});
    write_sim_hdf5(out.string(), r, small_info());
    Reader f(out);
    REQUIRE(f.count("/day/trajectories") == 40000);
    const auto time = f.column<double>("/day/trajectories", "time", H5T_NATIVE_DOUBLE);
    const auto chainage = f.column<double>("/day/trajectories", "chainage", H5T_NATIVE_DOUBLE);
    const auto train = f.column<std::uint32_t>("/day/trajectories", "train", H5T_NATIVE_UINT32);
    for (std::size_t i : {std::size_t{0}, std::size_t{16383}, std::size_t{16384}, std::size_t{32768},
                          std::size_t{39999}}) {
        INFO(i);
        CHECK(time[i] == 28800.0 + static_cast<double>(i) * 0.5);
        CHECK(chainage[i] == 1000.0 + static_cast<double>(i) * 1.25);
        CHECK(train[i] == i % 3);
    }
}

TEST_CASE("HDF5 results: wide records get smaller chunks", "[sim_hdf5]") {
    // sim/ENGINEERING.md "HDF5": ~16 K records a chunk, a chunk under the 1 MiB chunk cache.
    CHECK(h5::RecordTable::chunk_records_for(8) == 16384);
    CHECK(h5::RecordTable::chunk_records_for(128) == 8192);
    CHECK(h5::RecordTable::chunk_records_for(2u << 20) == 1);
}

TEST_CASE("HDF5 results: writing twice gives the same bytes, with no time stamps", "[sim_hdf5]") {
    TempDir dir("repeat");
    const fs::path a = dir.path / "a.h5";
    const fs::path b = dir.path / "b.h5";
    write_sim_hdf5(a.string(), small_result(), small_info());
    const std::string first = read_text(a);
    write_sim_hdf5(a.string(), small_result(), small_info());  // over the existing file
    write_sim_hdf5(b.string(), small_result(), small_info());  // under another name
    REQUIRE(first.size() > 0);
    CHECK(read_text(a) == first);
    CHECK(read_text(b) == first);

    // sim/ENGINEERING.md "HDF5": object time tracking off, else bytes change from one second to the next.
    Reader f(a);
    for (const std::string name : {"/", "/day", "/day/timing", "/day/trajectories"}) {
        INFO(name);
        H5O_info_t oi{};
        REQUIRE(H5Oget_info_by_name2(f.file, name.c_str(), &oi, H5O_INFO_TIME, H5P_DEFAULT) >= 0);
        CHECK(oi.ctime == 0);
        CHECK(oi.mtime == 0);
    }
}

TEST_CASE("HDF5 results: no temporary file is left after success", "[sim_hdf5]") {
    TempDir dir("clean");
    const fs::path out = dir.path / "run.h5";
    write_sim_hdf5(out.string(), small_result(), small_info());
    CHECK(dir.entries() == std::vector<std::string>{"run.h5"});
}

TEST_CASE("HDF5 results: an unwritable path throws naming it and leaves no file", "[sim_hdf5]") {
    const std::string bad = "/nonexistent-dir-knockon/x.h5";
    REQUIRE_FALSE(fs::exists("/nonexistent-dir-knockon"));
    CHECK_THROWS_WITH(write_sim_hdf5(bad, small_result(), small_info()), Contains(bad));
    CHECK_FALSE(fs::exists(bad));
    CHECK_FALSE(fs::exists("/nonexistent-dir-knockon"));
}

TEST_CASE("HDF5 results: a directory at the path is refused before anything is written", "[sim_hdf5]") {
    TempDir dir("rename");
    const fs::path target = dir.path / "taken";
    fs::create_directories(target / "inside");
    CHECK_THROWS_AS(write_sim_hdf5(target.string(), small_result(), small_info()), OutputPathError);
    CHECK_THROWS_WITH(write_sim_hdf5(target.string(), small_result(), small_info()),
                      Contains(target.string()) && Contains("is a directory"));
    CHECK(fs::is_directory(target / "inside"));
    CHECK(dir.entries() == std::vector<std::string>{"taken"});
}

TEST_CASE("HDF5 results: a directory that appears at the path while writing is not replaced", "[sim_hdf5]") {
    TempDir dir("late");
    const fs::path target = dir.path / "taken";
    h5::OutputFile file(target.string());
    file.root().create_group("day");
    fs::create_directories(target / "inside");  // after the start, before the rename
    CHECK_THROWS_WITH(file.commit(), Contains(target.string()) && Contains("is a directory"));
    CHECK(fs::is_directory(target / "inside"));
    CHECK(dir.entries() == std::vector<std::string>{"taken"});  // the temporary file is gone too
}

TEST_CASE("HDF5 results: the Python example reads the file", "[sim_hdf5][python]") {
    // Runs tools/read_results_example.py where some python3 has h5py; skipped (with a warning) elsewhere.
    const std::string python = clitest::python_with_h5py();
    if (python.empty()) {
        WARN("no python3 with h5py: example not run");
        return;
    }
    TempDir dir("python");
    const fs::path out = dir.path / "run.h5";
    write_sim_hdf5(out.string(), small_result(), small_info());
    const fs::path log = dir.path / "log.txt";
    const int rc = clitest::run_read_results_example(python, out, log);
    INFO(read_text(log));
    REQUIRE(rc == 0);
    // The example prints each table with its record count.
    CHECK_THAT(read_text(log), Contains("timing: 4 records"));
    CHECK_THAT(read_text(log), Contains("trajectories: 0 records"));
    CHECK_THAT(read_text(log), Contains("regional-2040"));
}

TEST_CASE("HDF5 wrapper: failures name the file and the object", "[sim_hdf5]") {
    TempDir dir("wrapper");
    const h5::QuietErrors quiet;
    h5::File file((dir.path / "actual.h5").string(), "shown.h5");
    const h5::Group root = file.root();
    const h5::Group day = root.create_group("day");
    // The shown name, not the actual (temporary) one, and the object path inside the file.
    CHECK_THROWS_WITH(root.create_group("day"), Contains("shown.h5: /day: cannot create group"));
    h5::RecordTable t(day, "names", h5::RecordLayout().add("index", h5::FieldKind::u32).add_text("id", 3));
    CHECK_THROWS_WITH(h5::RecordTable(day, "names", h5::RecordLayout().add("x", h5::FieldKind::u8)),
                      Contains("shown.h5: /day/names: cannot create dataset"));
    t.begin().u32(0);
    CHECK_THROWS_WITH(t.text("four"), Contains("shown.h5: /day/names") && Contains("longer than the field"));
    CHECK_THROWS_AS(t.begin().f64(1.0), std::logic_error);  // fields out of layout order
}

TEST_CASE("HDF5 wrapper: an output file appears only when committed with every object closed", "[sim_hdf5]") {
    TempDir dir("pending");
    const fs::path target = dir.path / "out.h5";
    {
        h5::OutputFile file(target.string());
        const h5::Group g = file.root().create_group("day");
        CHECK(dir.entries().size() == 1);                 // the temporary file only
        CHECK_FALSE(fs::exists(target));
    }  // dropped without commit: nothing is left
    CHECK(dir.entries().empty());
    {
        h5::OutputFile file(target.string());
        const h5::Group g = file.root().create_group("day");
        // Closing with a group still open would leave the file unfinished: refused, and discarded.
        CHECK_THROWS_WITH(file.commit(), Contains(target.string()) && Contains("cannot close"));
        CHECK(dir.entries().empty());
    }
    {
        h5::OutputFile file(target.string());
        file.root().create_group("day");
        file.commit();
    }
    CHECK(dir.entries() == std::vector<std::string>{"out.h5"});
    Reader f(target);
    CHECK(f.exists("/day"));
}
