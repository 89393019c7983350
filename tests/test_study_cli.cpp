// End-to-end runs of `knockon simulate --replications`: the JSON document of a Monte Carlo study,
// its independence of --threads, --seed and --until-ci, and the refusal of bad study options.
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

using namespace clitest;

// A mean with its 95 % interval, as the study JSON writes every figure across days.
void check_estimate(const json& e, std::size_t n) {
    INFO(e.dump());
    REQUIRE(e.is_object());
    for (const char* key : {"mean", "ci95_half_width", "ci95_lower", "ci95_upper", "n"}) REQUIRE(e.contains(key));
    CHECK(e["n"].get<std::size_t>() == n);
    const double mean = e["mean"], hw = e["ci95_half_width"], lo = e["ci95_lower"], hi = e["ci95_upper"];
    CHECK(hw >= 0.0);
    CHECK(lo <= mean);
    CHECK(mean <= hi);
}

}  // namespace

TEST_CASE("knockon simulate --replications --json: the study document", "[cli][study]") {
    TempDir dir;
    const json two = json_of(knockon("simulate " + q(kDemo) + " --replications 20 --threads 2 --json", dir));

    const json& study = two["study"];
    CHECK(study["replications"] == 20);
    CHECK(study["threads"] == 2);
    CHECK(study["seed"] == 1);   // the default
    CHECK(study["partial"] == false);
    CHECK(study["command_line"].get<std::string>().find("--replications 20") != std::string::npos);
    CHECK(two.contains("caution"));

    const json& day = two["per_day"];
    check_estimate(day["total_knock_on_s"], 20);
    check_estimate(day["total_primary_s"], 20);
    check_estimate(day["mean_arrival_delay_s"], 20);
    // Student t interval (README, "Confidence intervals"): symmetric about the mean.
    const json& k = day["total_knock_on_s"];
    CHECK(k["ci95_lower"].get<double>() == Approx(k["mean"].get<double>() - k["ci95_half_width"].get<double>()));
    CHECK(k["ci95_upper"].get<double>() == Approx(k["mean"].get<double>() + k["ci95_half_width"].get<double>()));
    // The demo's delays section injects primary delay and trains delay each other.
    CHECK(day["total_primary_s"]["mean"].get<double>() > 0.0);
    CHECK(k["mean"].get<double>() > 0.0);
    CHECK(day["knock_on_ratio"].get<double>() ==
          Approx(k["mean"].get<double>() / day["total_primary_s"]["mean"].get<double>()));
    REQUIRE(day["punctuality"].size() == 2);
    CHECK(day["punctuality"][0]["threshold_s"] == 180.0);
    CHECK(day["punctuality"][1]["threshold_s"] == 300.0);

    // Timing points: punctuality per threshold with a Wilson interval inside [0, 1].
    REQUIRE(two["timing_points"].is_array());
    REQUIRE_FALSE(two["timing_points"].empty());
    std::size_t with_arrivals = 0;
    for (const json& tp : two["timing_points"]) {
        for (const char* key : {"train", "station", "stops", "reached", "arrival_delay_s", "knock_on_s", "p50_s",
                                "p90_s", "p95_s", "max_s"})
            REQUIRE(tp.contains(key));
        check_estimate(tp["knock_on_s"], 20);
        const std::size_t reached = tp["reached"];
        CHECK(reached <= 20);
        if (reached == 0) continue;
        ++with_arrivals;
        REQUIRE(tp["punctuality"].size() == 2);
        for (std::size_t i = 0; i < 2; ++i) {
            const json& share = tp["punctuality"][i]["share"];
            check_estimate(share, reached);
            CHECK(share["ci95_lower"].get<double>() >= -1e-12);
            CHECK(share["ci95_upper"].get<double>() <= 1.0 + 1e-12);
        }
        CHECK(tp["p50_s"].get<double>() <= tp["p90_s"].get<double>());
        CHECK(tp["p90_s"].get<double>() <= tp["p95_s"].get<double>());
        CHECK(tp["p95_s"].get<double>() <= tp["max_s"].get<double>());
        // Within 5 min is never rarer than within 3 min.
        CHECK(tp["punctuality"][1]["share"]["mean"].get<double>() >= tp["punctuality"][0]["share"]["mean"].get<double>());
    }
    CHECK(with_arrivals > 100);

    // As-run buffers on the planned critical sections, thinnest first.
    REQUIRE(two["buffers"].is_array());
    REQUIRE_FALSE(two["buffers"].empty());
    double previous = -1e300;
    for (const json& b : two["buffers"]) {
        for (const char* key : {"leader", "follower", "line_section", "section", "planned_s", "as_run_s", "p10_s"})
            REQUIRE(b.contains(key));
        const double mean = b["as_run_s"]["mean"];
        CHECK(mean >= previous);
        previous = mean;
    }
    CHECK(two["trains"].size() > 10);
    CHECK(two["sections"].size() > 10);

    SECTION("--threads 1 gives the same document apart from the thread count and the command line") {
        json one = json_of(knockon("simulate " + q(kDemo) + " --replications 20 --threads 1 --json", dir));
        CHECK(one["study"]["threads"] == 1);
        json other = two;
        for (json* j : {&one, &other}) {
            (*j)["study"].erase("threads");
            (*j)["study"].erase("command_line");
        }
        CHECK(one == other);   // every number bit for bit: JSON prints doubles round-trip exact
    }
}

TEST_CASE("knockon simulate --replications: seed and until-ci options and text output", "[cli][study]") {
    TempDir dir;
    const std::string base = "simulate " + q(kDelayedLine) + " --json";
    const json a = json_of(knockon(base + " --replications 30 --seed 5", dir));
    const json b = json_of(knockon(base + " --replications 30 --seed 6", dir));
    const json a2 = json_of(knockon(base + " --replications 30 --seed 5 --threads 3", dir));
    CHECK(a["study"]["seed"] == 5);
    CHECK(a["per_day"] == a2["per_day"]);
    CHECK(a["timing_points"] == a2["timing_points"]);
    CHECK(a["per_day"]["total_knock_on_s"] != b["per_day"]["total_knock_on_s"]);
    CHECK(a["per_day"]["total_primary_s"] != b["per_day"]["total_primary_s"]);

    // --until-ci in minutes: a target met at once stops after the first batch of 50 days; one
    // that cannot be met runs to the cap.
    const json quick = json_of(knockon(base + " --replications 200 --until-ci 1000", dir));
    CHECK(quick["study"]["replications"] == 50);
    CHECK(quick["study"]["partial"] == false);
    CHECK(quick["per_day"]["total_knock_on_s"]["ci95_half_width"].get<double>() < 1000.0 * 60.0);
    const json capped = json_of(knockon(base + " --replications 70 --until-ci 0.0001", dir));
    CHECK(capped["study"]["replications"] == 70);

    const Result text = knockon("simulate " + q(kDelayedLine) + " --replications 12 --threads 2", dir);
    REQUIRE(text.status == 0);
    CHECK(text.out.find("12 simulated days (seed 1, 2 threads)") != std::string::npos);
    CHECK(text.out.find("knock-on delay") != std::string::npos);
    CHECK(text.out.find("Caution:") != std::string::npos);
}

TEST_CASE("knockon simulate --replications without a delays section: a note and no knock-on", "[cli][study]") {
    TempDir dir;
    const Result r = knockon("simulate " + q(kTwoTrains) + " --replications 3 --json", dir);
    const json j = json_of(r);
    CHECK(r.err.find("no `delays:` section") != std::string::npos);
    CHECK(j["study"]["replications"] == 3);
    CHECK(j["per_day"]["total_primary_s"]["mean"] == 0.0);
    CHECK(j["per_day"]["total_knock_on_s"]["mean"] == 0.0);
    CHECK(j["per_day"]["total_knock_on_s"]["ci95_half_width"] == 0.0);
    CHECK(j["per_day"]["knock_on_ratio"] == 0.0);
}

TEST_CASE("knockon simulate: bad study options exit 2 naming the option", "[cli][study]") {
    TempDir dir;
    const std::string s = "simulate " + q(kTwoTrains);
    const struct {
        std::string args, option;
    } cases[] = {
        {" --replications 0", "--replications"},
        {" --replications 5 --threads 0", "--threads"},
        {" --replications 5 --threads 300", "--threads"},
        {" --replications 5 --until-ci -1", "--until-ci"},
        {" --replications 5 --until-ci 0", "--until-ci"},
        {" --until-ci 1", "--until-ci"},
        {" --replications 5 --delay T1:entry:3", "--delay"},
        {" --replications many", "--replications"},
        {" --replications 5 --traces all", "--traces"},
    };
    for (const auto& c : cases) {
        INFO("knockon " << s << c.args);
        const Result r = knockon(s + c.args, dir);
        CHECK(r.status == 2);
        CHECK(r.err.find(c.option) != std::string::npos);
        CHECK(r.out.empty());
    }
}
