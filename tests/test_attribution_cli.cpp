// "Where knock-on comes from" in the outputs: the day's and the study's terminal table, JSON and
// HDF5 results (README "Where knock-on comes from", tools/results/HDF5_LAYOUT.md: our own layout).  In
// each, the knock-on attributed adds up to the knock-on the same output measures.
#include <catch2/catch.hpp>

#include <string>

#include <nlohmann/json.hpp>

#include "cli_support.hpp"
#include "tools/results/hdf5_read.hpp"
#include "tools/results/results_file.hpp"

namespace {

using nlohmann::json;
using namespace clitest;

const std::string kDelays = " --delay SU-0700:entry:8 --delay FU-0708:dwell@HBT:4";

}  // namespace

TEST_CASE("attribution outputs: a day's table JSON and HDF5 add up to its knock-on", "[cli][attribution]") {
    TempDir dir;
    const Result text = clitest::knockon("simulate " + q(kDemo) + kDelays, dir);
    REQUIRE(text.status == 0);
    CHECK_THAT(text.out, Catch::Matchers::Contains("Where knock-on comes from"));
    CHECK_THAT(text.out, Catch::Matchers::Contains("SU-0700 late start or entry at MFQ"));

    const fs::path out = dir.path / "day.h5";
    const json j = json_of(clitest::knockon("simulate " + q(kDemo) + kDelays + " --json --out " + q(out), dir));
    double measured = 0.0;
    for (const json& t : j["timing"]) measured += t["knock_on"].get<double>();
    REQUIRE(measured > 60.0);
    const json& a = j["attribution"];
    CHECK(a["knock_on_s"].get<double>() == Approx(measured).margin(1e-6));
    double damage = 0.0, edges = 0.0, causes = 0.0;
    for (const json& s : a["sources"]) damage += s["damage_s"].get<double>();
    for (const json& e : a["edges"]) edges += e["seconds"].get<double>();
    for (const auto& [kind, seconds] : a["by_cause_s"].items()) causes += seconds.get<double>();
    CHECK(damage == Approx(measured).margin(1e-3));
    CHECK(edges == Approx(measured).margin(1e-3));
    CHECK(causes == Approx(measured).margin(1e-3));
    // The largest source is the late start, traced to its train and place.
    REQUIRE_FALSE(a["sources"].empty());
    bool late_start = false;
    for (const json& s : a["sources"])
        if (s["kind"] == "entry" && s["train"] == "SU-0700" && s["place"] == "MFQ") late_start = true;
    CHECK(late_start);

    const knockon::h5::InputFile f(out.string());
    double in_file = 0.0, edges_in_file = 0.0, timing = 0.0;
    for (double x : f.number_column("/day/attribution_sources", "damage")) in_file += x;
    for (double x : f.number_column("/day/attribution_edges", "seconds")) edges_in_file += x;
    for (double x : f.number_column("/day/timing", "knock_on")) timing += x;
    CHECK(in_file == Approx(timing).margin(1e-3));
    CHECK(edges_in_file == Approx(timing).margin(1e-3));
    CHECK(f.rows("/day/attribution_sources") == a["sources"].size());
}

TEST_CASE("attribution outputs: a study's table JSON and HDF5 add up to its knock-on", "[cli][attribution][study]") {
    TempDir dir;
    const fs::path out = dir.path / "study.h5";
    const json j = json_of(clitest::knockon("simulate " + q(kDemo) + " --replications 12 --threads 2 --json --out " + q(out), dir));
    const double knock_on = j["per_day"]["total_knock_on_s"]["mean"].get<double>();
    REQUIRE(knock_on > 60.0);
    const json& a = j["attribution"];
    double damage = 0.0, received = 0.0, causes = 0.0;
    for (const json& s : a["sources"]) damage += s["damage_s"]["mean"].get<double>();
    for (const json& p : a["places"]) received += p["received_s"]["mean"].get<double>();
    for (const auto& [kind, e] : a["by_cause_s"].items()) causes += e["mean"].get<double>();
    // The days' figures are kept as float: a relative 1e-5 of the day's knock-on.
    CHECK(damage == Approx(knock_on).epsilon(1e-5));
    CHECK(received == Approx(knock_on).epsilon(1e-5));
    CHECK(causes == Approx(knock_on).epsilon(1e-5));
    for (const json& s : a["sources"]) {
        CHECK(s["damage_s"]["n"] == 12);
        CHECK(s["damage_s"]["ci95_lower"].get<double>() <= s["damage_s"]["mean"].get<double>());
    }
    REQUIRE_FALSE(a["buffers"].empty());   // the demo's thin buffers pass knock-on on

    const Result text = clitest::knockon("simulate " + q(kDemo) + " --replications 12 --threads 2", dir);
    REQUIRE(text.status == 0);
    CHECK_THAT(text.out, Catch::Matchers::Contains("Where knock-on comes from (mean per day"));
    CHECK_THAT(text.out, Catch::Matchers::Contains("Buffers to widen first"));

    const knockon::ResultsFile r = knockon::read_results(out.string());
    REQUIRE(r.study);
    REQUIRE(r.study->attribution);
    const knockon::StoredAttribution& s = *r.study->attribution;
    REQUIRE(s.sources.size() == a["sources"].size());
    for (std::size_t i = 0; i < s.sources.size(); ++i) {
        CHECK(s.sources[i].kind == a["sources"][i]["kind"]);
        CHECK(s.sources[i].damage.mean == a["sources"][i]["damage_s"]["mean"].get<double>());
    }
    CHECK(s.places.size() == a["places"].size());
    CHECK(s.causes.size() == 5);
}
