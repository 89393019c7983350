// The network demo (scenarios/junction_branch.yaml) simulated end to end: an undisturbed day runs
// as planned, and the knock-on of a small study is traced to its causes in full (README "Where
// knock-on comes from": no share "not recorded" where every hold has a recorded cause).
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <string>
#include <utility>

#include <nlohmann/json.hpp>

#include "cli_support.hpp"

namespace {

using nlohmann::json;
using namespace clitest;

const std::string kNetworkDemo = kSource + "/scenarios/junction_branch.yaml";

}  // namespace

TEST_CASE("network demo: an undisturbed day equals the plan with no knock-on", "[cli][network]") {
    TempDir dir;
    for (const std::string variant : {"", "grade_separated", "double_branch"}) {
        INFO("variant " << (variant.empty() ? "base" : variant));
        const std::string v = variant.empty() ? "" : " --variant " + variant;
        const Result text = clitest::knockon("simulate " + q(kNetworkDemo) + v, dir, 120);
        REQUIRE(text.status == 0);
        CHECK_THAT(text.out, Catch::Matchers::Contains("(0.0 min in all;"));
        CHECK_THAT(text.out, !Catch::Matchers::Contains("not recorded"));

        // Every timing point at its planned time (the plan's running-time integration; half a
        // second is the engine's noise floor, README "Tests": common practice, no source).
        const json plan = json_of(clitest::knockon("plan " + q(kNetworkDemo) + v + " --json", dir, 120));
        const json day = json_of(clitest::knockon("simulate " + q(kNetworkDemo) + v + " --json", dir, 120));
        CHECK(plan["spacing_warnings"].empty());   // the demo keeps the spacing rule
        CHECK(plan["conflicts"].empty());
        CHECK(day["holds"].empty());
        CHECK(day["waits"].empty());
        CHECK(day["attribution"]["knock_on_s"].get<double>() == 0.0);
        std::map<std::pair<std::string, std::string>, std::pair<double, double>> planned;
        for (const json& r : plan["running_times"]) {
            auto time = [&](const char* k) { return r[k].is_null() ? NAN : r[k].get<double>(); };
            planned[{r["train"].get<std::string>(), r["station"].get<std::string>()}] = {time("planned_arrival"),
                                                                                         time("planned_departure")};
        }
        REQUIRE(day["timing"].size() == plan["running_times"].size());
        std::size_t compared = 0;
        for (const json& r : day["timing"]) {
            const auto it = planned.find({r["train"].get<std::string>(), r["station"].get<std::string>()});
            REQUIRE(it != planned.end());
            INFO(r.dump());
            if (!r["arrival"].is_null()) {
                CHECK(std::fabs(r["arrival"].get<double>() - it->second.first) <= 0.5);
                ++compared;
            }
            if (!r["departure"].is_null()) {
                CHECK(std::fabs(r["departure"].get<double>() - it->second.second) <= 0.5);
                ++compared;
            }
        }
        CHECK(compared > 500);
    }
}

TEST_CASE("network demo: a study of 20 days traces all its knock-on to causes", "[cli][network][study]") {
    TempDir dir;
    const Result text = clitest::knockon("simulate " + q(kNetworkDemo) + " --replications 20 --seed 1", dir, 300);
    REQUIRE(text.status == 0);
    CHECK_THAT(text.out, Catch::Matchers::Contains("Where knock-on comes from"));
    CHECK_THAT(text.out, !Catch::Matchers::Contains("not recorded"));

    const json j = json_of(clitest::knockon("simulate " + q(kNetworkDemo) + " --replications 20 --seed 1 --json", dir, 300));
    const json& a = j["attribution"];
    // Drawn delays do cause knock-on here, and every second of it has a cause: a train that held
    // the route (or a link), never "only route setting and reaction" on a day of on-time routes.
    CHECK(a["by_cause_s"]["train"]["mean"].get<double>() > 0.0);
    CHECK(a["by_cause_s"]["none"]["mean"].get<double>() == 0.0);
    for (const json& s : a["sources"]) {
        INFO(s.dump());
        CHECK(s["kind"].get<std::string>() != "unexplained");
    }
}
