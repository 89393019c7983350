// End-to-end runs of the real `knockon` binary: `validate` and `plan` in text, JSON and CSV,
// and the refusal of a malformed scenario.
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cli_support.hpp"

namespace fs = std::filesystem;

namespace {

using namespace clitest;

std::vector<std::string> split_csv_line(const std::string& line) {
    // The fixtures' cells hold no commas or quotes, so a plain split is enough here.
    std::vector<std::string> cells;
    std::stringstream s(line);
    std::string cell;
    while (std::getline(s, cell, ',')) cells.push_back(cell);
    if (!line.empty() && line.back() == ',') cells.emplace_back();
    return cells;
}

std::vector<std::vector<std::string>> read_csv(const fs::path& p) {
    std::vector<std::vector<std::string>> rows;
    std::ifstream in(p);
    std::string line;
    while (std::getline(in, line)) rows.push_back(split_csv_line(line));
    return rows;
}

// Columns each table must carry (tools/results/plan_output.cpp; what planners' scripts read).
const std::map<std::string, std::vector<std::string>> kTables = {
    {"trains", {"train", "type", "category", "direction", "from", "to", "departure", "arrival", "length_m",
                "technical_s", "scheduled_s", "timetabled_s"}},
    {"running_times", {"train", "type", "station", "stops", "scheduled_arrival", "scheduled_departure",
                       "planned_arrival", "planned_departure", "technical_running_s", "scheduled_running_s",
                       "timetabled_running_s", "reserve_s"}},
    {"blocking_routes", {"train", "entry_signal", "exit_signal", "setup_s", "sight_reaction_s", "approach_s",
                         "running_s", "clearing_s", "release_s", "blocked_from", "blocked_to", "blocking_time_s"}},
    {"blocking_sections", {"train", "section", "blocked_from", "blocked_to", "occupied_from", "occupied_to"}},
    {"headways", {"line_section", "direction", "leader", "follower", "scheduled_headway_s", "minimum_headway_s",
                  "buffer_s", "critical_section"}},
    {"headway_matrix", {"line_section", "leader_type", "follower_type", "minimum_headway_s", "critical_section"}},
    {"conflicts", {"section", "first", "second", "from", "overlap_s", "kind"}},
    {"capacity", {"line_section", "direction", "window", "from", "to", "trains", "occupation_s", "consumption",
                  "limit"}},
    {"capacity_by_hour", {"line_section", "direction", "from", "to", "trains", "occupation_s", "consumption",
                          "limit"}},
    {"spacing_warnings", {"signal", "train", "speed_kmh", "warning_m", "stopping_distance_m"}},
    {"timetable_warnings", {"train", "from", "to", "timetabled_s", "scheduled_s", "technical_s", "short_s"}},
    {"single_track_stretches", {"stretch", "track", "from_m", "to_m", "lower_place", "lower_kind", "upper_place",
                                "upper_kind", "sections"}},
    {"crossings", {"place", "place_kind", "meeting", "stretch", "opposing", "released", "waiting", "waiting_track",
                   "waiting_stops", "blocks", "buffer_s", "other_stretch", "other_buffer_s"}},
    {"single_track_capacity", {"stretch", "window", "from", "to", "trains_up", "trains_down", "consumption_up",
                               "consumption_down", "occupation_s", "consumption", "limit"}},
    {"crossings_too_short", {"train", "place", "track", "length_m", "head_m", "tail_m", "room_from_m", "room_to_m",
                             "opposing"}},
};

// The two-speed fixture with an unknown key and an unknown unit; returns the 1-based lines
// where they were put.
struct BadFile {
    std::string text;
    int unit_line = 0, key_line = 0;
};
BadFile malformed_two_speed() {
    std::istringstream in(read_text(kTwoSpeed));
    BadFile bad;
    std::string line;
    int n = 0;
    bool in_slow = false;
    while (std::getline(in, line)) {
        ++n;
        if (line.find("- id: SLOW") != std::string::npos) in_slow = true;
        if (in_slow && line == "    length: 200 m") {
            line = "    length: 200 furlongs";
            bad.unit_line = n;
        }
        bad.text += line + "\n";
        if (in_slow && line == "    mass: 1200 t") {
            bad.text += "    colour: red\n";
            bad.key_line = ++n;
        }
    }
    return bad;
}

}  // namespace

TEST_CASE("knockon validate accepts the demo scenario", "[cli]") {
    // README quick start: the bundled demo line must be valid (common practice, no source).
    TempDir dir;
    const Result r = knockon("validate " + q(kDemo), dir);
    INFO(r.err);
    CHECK(r.status == 0);
    CHECK(r.out.find(": ok: ") != std::string::npos);
    CHECK(r.err.empty());
}

TEST_CASE("knockon plan on the demo prints the caution and a capacity table", "[cli]") {
    // README: every output carries the planning-estimate caution; UIC 406 figures are shown
    // with the limits marked as recalled (tests/REFERENCES.md C2).
    TempDir dir;
    const Result r = knockon("plan " + q(kDemo), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    CHECK(r.out.find("Caution: Planning estimates only: signal positions, braking distances and overlaps are "
                     "for licensed signalling engineers") != std::string::npos);
    const auto cap = r.out.find("Capacity consumption (UIC 406 compression)");
    REQUIRE(cap != std::string::npos);
    const std::string rest = r.out.substr(cap);
    CHECK(rest.find("line_section") != std::string::npos);
    CHECK(rest.find("peak hour") != std::string::npos);
    CHECK(rest.find(" day ") != std::string::npos);
    CHECK(std::regex_search(rest, std::regex(R"(\d+\.\d %)")));
    CHECK(r.out.find("as recalled") != std::string::npos);
}

TEST_CASE("knockon plan --json holds every table, the caution and the scenario", "[cli]") {
    TempDir dir;
    const Result r = knockon("plan " + q(kDemo) + " --json", dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    nlohmann::json doc;
    REQUIRE_NOTHROW(doc = nlohmann::json::parse(r.out));
    for (const char* key : {"trains", "running_times", "blocking_routes", "blocking_sections", "headways",
                            "headway_matrix", "conflicts", "capacity", "caution", "scenario"}) {
        INFO("key " << key);
        CHECK(doc.contains(key));
    }
    CHECK(doc["caution"].get<std::string>().rfind("Planning estimates only", 0) == 0);
    REQUIRE(doc["scenario"].contains("trains"));
    CHECK(doc["trains"].size() == doc["scenario"]["trains"].get<std::size_t>());
    CHECK(doc["trains"].size() > 0);
    CHECK(doc["capacity"].size() > 0);
    // Every table record carries that table's columns.
    for (const auto& [table, columns] : kTables)
        for (const auto& rec : doc[table])
            for (const std::string& c : columns) {
                INFO(table << "." << c);
                CHECK(rec.contains(c));
            }
    // Consumption is the compressed occupation over the window (tests/REFERENCES.md C1).
    for (const auto& f : doc["capacity"]) {
        const double window = f["to"].get<double>() - f["from"].get<double>();
        CHECK(f["consumption"].get<double>() == Approx(f["occupation_s"].get<double>() / window).epsilon(1e-9));
    }
}

TEST_CASE("knockon plan --json reports the fixture's headways and conflicts", "[cli]") {
    // tests/data/plan/two_speed_line.yaml hand-check notes (tests/REFERENCES.md B1, B7): FAST behind
    // FAST 120 s, F3 -> F4 scheduled 95 s -> buffer -25 s and a conflict of 25 s.
    TempDir dir;
    const Result r = knockon("plan " + q(kTwoSpeed) + " --json", dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const nlohmann::json doc = nlohmann::json::parse(r.out);
    bool found = false;
    for (const auto& h : doc["headways"])
        if (h["leader"] == "F3" && h["follower"] == "F4") {
            found = true;
            CHECK(h["line_section"] == "A-B");
            CHECK(h["scheduled_headway_s"].get<double>() == Approx(95.0).margin(1e-6));
            CHECK(h["minimum_headway_s"].get<double>() == Approx(120.0).margin(0.05));
            CHECK(h["buffer_s"].get<double>() == Approx(-25.0).margin(0.05));
        }
    CHECK(found);
    REQUIRE(doc["conflicts"].size() > 0);
    double largest = 0.0;
    for (const auto& c : doc["conflicts"]) {
        CHECK(c["first"] == "F3");
        CHECK(c["second"] == "F4");
        largest = std::max(largest, c["overlap_s"].get<double>());
    }
    CHECK(largest == Approx(25.0).margin(0.5));
}

TEST_CASE("knockon plan --csv writes every table with its header", "[cli]") {
    TempDir dir;
    const fs::path csv = dir.path / "out" / "tables";  // created by knockon, parents too
    const Result r = knockon("plan " + q(kTwoSpeed) + " --csv " + q(csv), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    CHECK(r.out.find("Caution:") != std::string::npos);  // the text report still goes to stdout
    for (const auto& [table, columns] : kTables) {
        INFO("table " << table);
        const fs::path file = csv / (table + ".csv");
        REQUIRE(fs::exists(file));
        const auto rows = read_csv(file);
        REQUIRE_FALSE(rows.empty());
        CHECK(rows.front() == columns);
        for (const auto& row : rows) CHECK(row.size() == columns.size());
    }
    // Contents: 6 trains; the tight pair F3 -> F4 with its negative buffer.
    CHECK(read_csv(csv / "trains.csv").size() == 1 + 6);
    bool found = false;
    for (const auto& row : read_csv(csv / "headways.csv"))
        if (row.size() == 8 && row[2] == "F3" && row[3] == "F4") {
            found = true;
            CHECK(std::stod(row[4]) == Approx(95.0).margin(1e-3));
            CHECK(std::stod(row[6]) == Approx(-25.0).margin(0.05));  // B1, models/DOMAIN.md 4
        }
    CHECK(found);
    // Blocking routes: the FAST trains' inner routes are blocked 120 s (B1 with 2 km blocks).
    for (const auto& row : read_csv(csv / "blocking_routes.csv"))
        if (row.size() == 12 && row[0] == "F1" && row[1] == "U04") CHECK(std::stod(row[11]) == Approx(120.0).margin(0.05));
}

TEST_CASE("A malformed scenario: located messages, exit 2, nothing written", "[cli]") {
    // README "Scenario file": unknown keys and units are reported as file:line:column, all at
    // once, exit status 2, nothing written.
    TempDir dir;
    const BadFile bad = malformed_two_speed();
    REQUIRE(bad.unit_line > 0);
    REQUIRE(bad.key_line > 0);
    const fs::path file = dir.path / "bad_scenario.yaml";
    {
        std::ofstream out(file, std::ios::binary);
        out << bad.text;
    }
    const fs::path csv = dir.path / "csv";
    auto located = [&](const std::string& err, int line) {
        return std::regex_search(err, std::regex("bad_scenario\\.yaml:" + std::to_string(line) + ":[1-9][0-9]*: "));
    };

    SECTION("plan") {
        const Result r = knockon("plan " + q(file) + " --csv " + q(csv), dir);
        INFO(r.err);
        CHECK(r.status == 2);
        CHECK(located(r.err, bad.unit_line));
        CHECK(located(r.err, bad.key_line));
        CHECK(r.err.find("furlongs") != std::string::npos);
        CHECK(r.err.find("colour") != std::string::npos);
        CHECK(r.out.empty());
        CHECK((!fs::exists(csv) || fs::is_empty(csv)));
    }
    SECTION("plan --json") {
        const Result r = knockon("plan " + q(file) + " --json", dir);
        CHECK(r.status == 2);
        CHECK(r.out.empty());
        CHECK(located(r.err, bad.unit_line));
    }
    SECTION("validate") {
        const Result r = knockon("validate " + q(file), dir);
        CHECK(r.status == 2);
        CHECK(located(r.err, bad.unit_line));
        CHECK(located(r.err, bad.key_line));
    }
}

TEST_CASE("knockon plan: a missing scenario file is an input error", "[cli]") {
    // Project rule: bad input gives a clear message naming the file and a non-zero exit.
    TempDir dir;
    const fs::path missing = dir.path / "no_such_scenario.yaml";
    const Result r = knockon("plan " + q(missing), dir);
    CHECK(r.status == 2);
    CHECK(r.err.find("no_such_scenario.yaml") != std::string::npos);
    CHECK(r.out.empty());
}
