// The network demo's buffers at its flat junction (models/junction_headway) from the command line:
// the plan's table in text, JSON and CSV, and a study whose knock-on passes at the junction
// names junction buffers among those to widen; a line's plan has no such table.
#include <catch2/catch.hpp>

#include <fstream>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

#include "cli_support.hpp"

namespace {

using nlohmann::json;
using namespace clitest;

const std::string kNetworkDemo = kSource + "/scenarios/junction_branch.yaml";

}  // namespace

TEST_CASE("knockon plan lists buffers at a network's junction in text JSON and CSV", "[cli][network]") {
    TempDir dir;
    const Result text = clitest::knockon("plan " + q(kNetworkDemo) + " --csv " + q((dir.path / "csv").string()), dir, 120);
    REQUIRE(text.status == 0);
    CHECK_THAT(text.out, Catch::Matchers::Contains("Headways at junctions"));
    CHECK_THAT(text.out, Catch::Matchers::Contains("same direction, opposing and at junctions"));
    CHECK_THAT(text.out, Catch::Matchers::Contains("junction X   junction"));
    std::ifstream csv(dir.path / "csv" / "junction_headways.csv");
    REQUIRE(csv);
    std::string header;
    std::getline(csv, header);
    CHECK(header.find("junction") == 0);
    CHECK(header.find("buffer_s") != std::string::npos);

    const json plan = json_of(clitest::knockon("plan " + q(kNetworkDemo) + " --json", dir, 120));
    REQUIRE(plan["junction_headways"].is_array());
    REQUIRE_FALSE(plan["junction_headways"].empty());
    for (const json& r : plan["junction_headways"]) {
        INFO(r.dump());
        const std::string at = r["junction"].get<std::string>();
        CHECK((at == "J1" || at == "X" || at == "J2"));
        CHECK(r["buffer_s"].get<double>() ==
              Approx(r["scheduled_headway_s"].get<double>() - r["minimum_headway_s"].get<double>()).margin(1e-6));
    }
    // A line has no junctions: no table at all, so its outputs stay as they were.
    const json line = json_of(clitest::knockon("plan " + q(kSource + "/scenarios/demo.yaml") + " --json", dir, 120));
    CHECK_FALSE(line.contains("junction_headways"));
}

TEST_CASE("network demo: a study names buffers at the junction among those to widen", "[cli][network][study]") {
    TempDir dir;
    const json j = json_of(clitest::knockon("simulate " + q(kNetworkDemo) + " --replications 20 --seed 1 --json", dir, 300));
    // The study's buffers as run and the verdict's buffers to widen (attribution by buffer pair)
    // carry pairs at the junction, named after it.
    std::size_t as_run = 0;
    for (const json& b : j["buffers"]) as_run += b["line_section"].get<std::string>().rfind("junction ", 0) == 0;
    CHECK(as_run > 0);
    std::size_t widen = 0;
    for (const json& b : j["attribution"]["buffers"])
        if (b["line_section"].get<std::string>().rfind("junction ", 0) == 0 && b["knock_on_s"]["mean"].get<double>() > 0.0)
            ++widen;
    CHECK(widen > 0);

    const Result text = clitest::knockon("simulate " + q(kNetworkDemo) + " --replications 20 --seed 1 --out " +
                                             q((dir.path / "s.h5").string()),
                                         dir, 300);
    REQUIRE(text.status == 0);
    const std::string verdict = text.out.substr(text.out.find("Buffers to widen first"));
    CHECK_THAT(verdict.substr(0, verdict.find("Sections the knock-on")), Catch::Matchers::Contains("(junction "));
}
