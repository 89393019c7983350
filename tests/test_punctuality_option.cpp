// `--punctuality`: user thresholds reach the single-day summary and the study, and bad lists are
// refused with the option named.  The rule itself ("within N minutes" = delay strictly below N
// minutes: 2:59 counts within 3, 3:00 does not) follows the published punctuality definitions
// collected in tests/REFERENCES.md C4.
#include <catch2/catch.hpp>

#include <array>
#include <cstdio>
#include <string>

#include <nlohmann/json.hpp>

#include "sim/day_summary.hpp"

namespace {

struct Run {
    int status = -1;
    std::string out;
};

Run run(const std::string& args) {
    const std::string cmd = std::string(KNOCKON_EXE) + " " + args + " 2>&1";
    Run r;
    FILE* p = popen(cmd.c_str(), "r");
    REQUIRE(p != nullptr);
    std::array<char, 4096> buf{};
    while (std::size_t n = fread(buf.data(), 1, buf.size(), p)) r.out.append(buf.data(), n);
    const int st = pclose(p);
    r.status = WIFEXITED(st) ? WEXITSTATUS(st) : -1;
    return r;
}

const std::string kTwo = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/two_trains.yaml";

}  // namespace

TEST_CASE("punctuality boundary: a delay counts within N minutes only when strictly below", "[punctuality]") {
    // tests/REFERENCES.md C4: "within 3 min" counts 2:59 and not 3:00.
    CHECK(knockon::within(179.0, 180.0));
    CHECK_FALSE(knockon::within(180.0, 180.0));
}

TEST_CASE("punctuality option sets the thresholds of a day and of a study", "[punctuality][cli]") {
    const Run day = run("simulate " + kTwo + " --json --punctuality 2,4.5");
    REQUIRE(day.status == 0);
    const auto j = nlohmann::json::parse(day.out);
    REQUIRE(j["summary"]["punctuality"].size() == 2);
    CHECK(j["summary"]["punctuality"][0]["threshold_s"].get<double>() == 120.0);
    CHECK(j["summary"]["punctuality"][1]["threshold_s"].get<double>() == 270.0);

    const Run study = run("simulate " + kTwo + " --replications 3 --json --punctuality 5,1");
    REQUIRE(study.status == 0);
    const auto s = nlohmann::json::parse(study.out.substr(study.out.find('{')));
    REQUIRE(s["per_day"]["punctuality"].size() == 2);
    CHECK(s["per_day"]["punctuality"][0]["threshold_s"].get<double>() == 60.0);   // sorted ascending
    CHECK(s["per_day"]["punctuality"][1]["threshold_s"].get<double>() == 300.0);
}

TEST_CASE("bad --punctuality lists are refused naming the option", "[punctuality][cli]") {
    for (const char* bad : {"0", "-3", "3,,5", "abc", "3;5"}) {
        const Run r = run("simulate " + kTwo + " --punctuality='" + std::string(bad) + "'");
        INFO(bad);
        CHECK(r.status == 2);
        CHECK(r.out.find("--punctuality") != std::string::npos);
    }
}
