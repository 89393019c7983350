// Links end to end: the plan's link table and conflicts in JSON and CSV, a day's waits and links in
// JSON, a study's missed connections per day with their interval.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <nlohmann/json.hpp>

#include "cli_support.hpp"

using namespace clitest;

namespace {
const std::string kConnections = kSource + "/tests/data/links/double_line_connections.yaml";
}

TEST_CASE("links CLI: the plan lists each link with its buffer in JSON and CSV", "[links][cli]") {
    TempDir dir;
    const Result r = knockon("plan '" + kConnections + "' --json --csv '" + (dir.path / "csv").string() + "'", dir);
    REQUIRE(r.status == 0);
    const auto j = nlohmann::json::parse(r.out);
    REQUIRE(j["links"].size() == 2);
    CHECK(j["links"][0]["kind"] == "connection");
    CHECK(j["links"][0]["from"] == "U1");
    CHECK(j["links"][0]["to"] == "D2");
    CHECK(j["links"][0]["max_wait_s"] == 180.0);
    // buffer = departure - arrival - minimum (the definition of a buffer time; common practice).
    const auto& c = j["links"][0];
    CHECK(c["buffer_s"].get<double>() ==
          Approx(c["departure"].get<double>() - c["arrival"].get<double>() - c["minimum_s"].get<double>()).margin(1e-6));
    CHECK(j["links"][1]["kind"] == "crew");
    CHECK(j["links"][1]["max_wait_s"].is_null());
    CHECK(j["conflicts"].empty());
    const std::string csv = read_text(dir.path / "csv" / "links.csv");
    CHECK(csv.rfind("kind,from,at,arrival,to,departs_from,departure,minimum_s,max_wait_s,buffer_s", 0) == 0);
    // The text shows the links among the thinnest buffers.
    const Result text = knockon("plan '" + kConnections + "'", dir);
    CHECK(text.out.find("connection at B") != std::string::npos);
    CHECK(text.out.find("crew at C") != std::string::npos);
}

TEST_CASE("links CLI: a study counts missed connections per day with an interval", "[links][cli][study]") {
    TempDir dir;
    const std::string out = (dir.path / "study.h5").string();
    const Result r = knockon("simulate '" + kConnections + "' --replications 60 --seed 3 --json --out '" + out + "'", dir);
    REQUIRE(r.status == 0);
    const auto j = nlohmann::json::parse(r.out);
    CHECK(j["per_day"]["connections"] == 1);
    const auto& m = j["per_day"]["missed_connections"];
    // With U1 late on 60 % of days by an exponential 5 min, and D2 waiting 3 min beyond a buffer of
    // about 3.5 min, some days miss the connection and some do not: a mean strictly inside (0, 1).
    CHECK(m["mean"].get<double>() > 0.0);
    CHECK(m["mean"].get<double>() < 1.0);
    CHECK(m["ci95_half_width"].get<double>() > 0.0);
    const Result text = knockon("simulate '" + kConnections + "' --replications 60 --seed 3", dir);
    CHECK(text.out.find("missed connections") != std::string::npos);
    // The report of the study file gives the same mean in its headline table.
    const std::string html = (dir.path / "study.html").string();
    const Result rep = knockon("report '" + out + "' -o '" + html + "'", dir);
    INFO(rep.err);
    REQUIRE(rep.status == 0);
    char expected[64];
    std::snprintf(expected, sizeof expected, "connections missed</td><td class=\"num\">%.2f ± %.2f",
                  m["mean"].get<double>(), m["ci95_half_width"].get<double>());
    CHECK(read_text(html).find(expected) != std::string::npos);
}
