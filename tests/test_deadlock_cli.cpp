// Deadlock end to end through the knockon program: a study or comparison with deadlocked days
// exits 3 unless --allow-deadlock (0), writes its files whole either way, and every output states
// the deadlocked days first (terminal, JSON, HDF5 root, report page, plot); a single deadlocked
// day shows what it did and the trains left waiting, never a punctuality; the study file's new
// figures read back.
#include <catch2/catch.hpp>

#include <cmath>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

#include "hdf5_test_support.hpp"
#include "results_test_support.hpp"
#include "tools/results/results_file.hpp"

using namespace resultstest;
using Catch::Matchers::Contains;
using Catch::Matchers::StartsWith;
using nlohmann::json;

namespace {

// About a third of its days end in deadlock under first-come route setting, none under the
// timetable order; it has a variant (cab signalling) for compare.
const std::string kCrossings = kSource + "/tests/data/study/single_line_crossings.yaml";
// One train each way, meeting on the single line: the day deadlocks.
const std::string kHeadOn = kSource + "/tests/data/sim/head_on.yaml";

std::string second_line(const std::string& text) {
    std::istringstream in(text);
    std::string line;
    std::getline(in, line);
    std::getline(in, line);
    return line;
}

// The JSON documents put "deadlock" first, before any figure.
void check_deadlock_first(const std::string& out) { CHECK_THAT(out, StartsWith("{\n \"deadlock\": {")); }

}  // namespace

TEST_CASE("A study with deadlocked days exits 3 unless --allow-deadlock and says so first", "[cli][study][deadlock]") {
    TempDir dir;
    const std::string study = "simulate " + q(kCrossings) + " --replications 40 --order first-come --threads 2";
    const fs::path h5 = dir.path / "study.h5";

    const Result refused = run_knockon(study + " --json --out " + q(h5), dir);
    INFO(refused.err);
    CHECK(refused.status == 3);
    CHECK_THAT(refused.err, Contains("ended in deadlock") && Contains("exit status 3") && Contains("--allow-deadlock"));
    check_deadlock_first(refused.out);
    const json j = json::parse(refused.out);
    const json& d = j["deadlock"];
    const std::size_t deadlocked = d["deadlocked_days"], complete = d["complete_days"];
    REQUIRE(deadlocked > 0);
    REQUIRE(complete > 0);
    CHECK(deadlocked + complete == 40);
    CHECK(d["accepted"] == false);
    CHECK_THAT(d["notice"].get<std::string>(), StartsWith("DEADLOCK on " + std::to_string(deadlocked) + " of 40"));
    REQUIRE(d["first"].is_object());
    CHECK_FALSE(d["first"]["cause"].get<std::string>().empty());
    // Every figure is over the complete days alone.
    CHECK(j["per_day"]["total_knock_on_s"]["n"] == complete);
    CHECK(j["per_day"]["punctuality"][0]["share"]["n"] == complete);
    CHECK(j["trains"][0]["knock_on_s"]["n"] == complete);
    CHECK(j["study"]["deadlocked_days"] == deadlocked);

    // The file is written whole all the same, and says it on its root and in /study.
    REQUIRE(fs::exists(h5));
    {
        const h5test::Reader f(h5);
        CHECK(f.number_attr<std::uint32_t>("/", "deadlocked_days", H5T_NATIVE_UINT32) == deadlocked);
        CHECK(f.text_attr("/", "deadlock_notice") == d["notice"].get<std::string>());
        CHECK(f.number_attr<std::uint32_t>("/study", "complete_days", H5T_NATIVE_UINT32) == complete);
        CHECK(f.number_attr<std::uint32_t>("/study", "first_deadlock_replication", H5T_NATIVE_UINT32) ==
              d["first"]["replication"].get<std::uint32_t>());
        std::size_t flagged = 0;
        for (std::uint8_t x : f.column<std::uint8_t>("/study/per_day", "deadlocked", H5T_NATIVE_UINT8)) flagged += x;
        CHECK(flagged == deadlocked);   // every day keeps its row, flagged
        CHECK(f.count("/study/per_day") == 40);
    }
    // ... and reads back (HDF5_LAYOUT.md, schema 4).
    const knockon::ResultsFile file = knockon::read_results(h5.string());
    REQUIRE(file.study);
    const knockon::StudySummary& s = file.study->summary;
    CHECK(s.deadlocked == deadlocked);
    CHECK(s.complete == complete);
    REQUIRE(s.first_deadlock);
    CHECK(s.first_deadlock->replication == d["first"]["replication"].get<std::uint32_t>());
    CHECK(s.first_deadlock->report.cause == d["first"]["cause"].get<std::string>());
    CHECK(s.first_deadlock->report.description == d["first"]["description"].get<std::string>());
    CHECK(s.first_deadlock->report.time == d["first"]["time"].get<double>());
    CHECK(s.total_knock_on.n == complete);
    CHECK(s.total_knock_on.mean == j["per_day"]["total_knock_on_s"]["mean"].get<double>());

    // --allow-deadlock: the same figures, status 0, and the output says they were accepted.
    const Result allowed = run_knockon(study + " --json --allow-deadlock", dir);
    INFO(allowed.err);
    CHECK(allowed.status == 0);
    CHECK_THAT(allowed.err, Contains("accepted (--allow-deadlock)"));
    json a = json::parse(allowed.out), b = j;
    CHECK(a["deadlock"]["accepted"] == true);
    for (json* x : {&a, &b}) {
        (*x)["deadlock"].erase("accepted");
        (*x)["study"].erase("command_line");
    }
    CHECK(a == b);

    // The text says it on its second line, before the caution and any figure.
    const Result text = run_knockon(study + " --allow-deadlock", dir);
    CHECK(text.status == 0);
    CHECK_THAT(second_line(text.out), StartsWith("DEADLOCK on " + std::to_string(deadlocked) + " of 40 simulated days; "
                                                 "the first, replication "));
    CHECK_THAT(second_line(text.out), Contains("Every figure is of the " + std::to_string(complete) + " complete days") &&
                                          Contains("Accepted with --allow-deadlock."));
    CHECK_THAT(text.out, Contains("the figures below are of the " + std::to_string(complete) + " complete days"));

    // The timetable order deadlocks no day of this fixture: status 0, nothing said.
    const Result clean = run_knockon("simulate " + q(kCrossings) + " --replications 10 --json", dir);
    CHECK(clean.status == 0);
    const json c = json::parse(clean.out);
    CHECK(c["deadlock"]["deadlocked_days"] == 0);
    CHECK(c["deadlock"]["first"].is_null());
    CHECK(c["deadlock"]["notice"] == "");
}

TEST_CASE("A deadlocked single day shows what it did and who waits, never a punctuality", "[cli][sim][deadlock]") {
    TempDir dir;
    const Result r = run_knockon("simulate " + q(kHeadOn) + " --order timetable", dir);
    INFO(r.out << r.err);
    CHECK(r.status == 3);
    CHECK_THAT(second_line(r.out), StartsWith("DEADLOCK at ") && Contains("2 of 2 trains never reached") &&
                                       Contains("Cause: PU and PD wait for each other"));
    CHECK_THAT(r.out, Contains("the trains left waiting") && Contains("INCOMPLETE") &&
                          Contains("PU stands at signal") && Contains("PD stands at BRC"));
    CHECK_THAT(r.out, Contains("Trains that never reached their last timing point"));
    // The repeated complaint: a punctuality of 100 % and "no train ends late" on a day that stopped.
    CHECK(r.out.find("Punctuality within") == std::string::npos);
    CHECK(r.out.find("No train ends late") == std::string::npos);
    CHECK(r.out.find("mean delay") == std::string::npos);

    const Result js = run_knockon("simulate " + q(kHeadOn) + " --order timetable" + " --json --allow-deadlock", dir);
    CHECK(js.status == 0);
    check_deadlock_first(js.out);
    const json j = json::parse(js.out);
    CHECK(j["deadlock"]["deadlocked"] == true);
    CHECK(j["deadlock"]["trains_not_finished"] == 2);
    REQUIRE(j["deadlock"]["waiting"].size() == 2);
    for (const json& w : j["deadlock"]["waiting"]) {
        CHECK(w["waits_for"] == "route");
        REQUIRE_FALSE(w["blocks"].empty());
        CHECK((w["blocks"][0]["train"] == "PU" || w["blocks"][0]["train"] == "PD"));
        CHECK(w["blocks"][0]["train"] != w["train"]);
    }
    CHECK(j["summary"]["complete"] == false);
    CHECK(j["summary"]["trains_not_finished"] == 2);
    CHECK(j["summary"]["mean_arrival_delay_s"].is_null());
    CHECK(j["summary"]["total_final_delay_s"].is_null());
    for (const json& p : j["summary"]["punctuality"]) CHECK(p["share"].is_null());

    // A day that runs to the end says nothing of deadlock and gives its punctuality.
    const Result whole = run_knockon("simulate " + q(kTwoTrains) + " --json", dir);
    CHECK(whole.status == 0);
    const json w = json::parse(whole.out);
    CHECK(w["deadlock"]["deadlocked"] == false);
    CHECK(w["summary"]["complete"] == true);
    CHECK(w["summary"]["punctuality"][0]["share"].is_number());
}

TEST_CASE("A day file keeps a link wait of a deadlocked day", "[cli][deadlock][links]") {
    // tools/results/HDF5_LAYOUT.md /day/deadlock, fields link and link_from (schema 9): written by
    // simulate, read back by read_results, the same as the JSON says.
    TempDir dir;
    const fs::path h5 = dir.path / "day.h5";
    const Result r = run_knockon("simulate " + q(kSource + "/tests/data/links/crew_link_deadlock.yaml") +
                                     " --delay UP1:entry:45 --order first-come --allow-deadlock --json --out " + q(h5),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const json j = json::parse(r.out);
    std::size_t links = 0;
    for (const json& w : j["deadlock"]["waiting"])
        if (w["waits_for"] == "link") {
            ++links;
            CHECK(w["link"]["from"] == "UP1");
            CHECK(w["link"]["kind"] == (w["train"] == "DN2" ? "crew" : "turnaround"));
        }
    CHECK(links == 2);
    const knockon::ResultsFile file = knockon::read_results(h5.string());
    REQUIRE(file.day);
    const knockon::SimResult& day = *file.day;
    std::size_t read = 0;
    for (const knockon::DeadlockWait& w : day.deadlock.waiting) {
        if (w.waits_for != knockon::DeadlockWait::For::link) continue;
        ++read;
        CHECK(day.train_ids[w.link_from] == "UP1");
        CHECK(w.link_kind ==
              (day.train_ids[w.train] == "DN2" ? knockon::LinkKind::crew : knockon::LinkKind::turnaround));
    }
    CHECK(read == 2);
    CHECK(day.deadlock.description == j["deadlock"]["description"].get<std::string>());
}

TEST_CASE("compare with deadlocked days pairs the complete days and exits 3 unless allowed",
          "[cli][compare][deadlock]") {
    TempDir dir;
    const fs::path h5 = dir.path / "cmp.h5";
    const std::string args = "compare " + q(kCrossings) + " --variants base,cab --replications 30 --order first-come";
    const Result r = run_knockon(args + " --json --out " + q(h5), dir);
    INFO(r.err);
    CHECK(r.status == 3);
    check_deadlock_first(r.out);
    const json j = json::parse(r.out);
    std::size_t total = 0;
    REQUIRE(j["deadlock"]["variants"].size() == 2);
    for (std::size_t v = 0; v < 2; ++v) {
        const json& d = j["deadlock"]["variants"][v];
        CHECK(d["name"] == j["variants"][v]["name"]);
        total += d["deadlocked_days"].get<std::size_t>();
        CHECK(j["variants"][v]["per_day"]["total_knock_on_s"]["n"] == d["complete_days"]);
        CHECK(j["variants"][v]["per_day"]["complete_days"] == d["complete_days"]);
    }
    REQUIRE(total > 0);
    CHECK(j["deadlock"]["deadlocked_days"] == total);
    // Pairs: the days complete in both, no more than either has.
    const std::size_t paired = j["variants"][1]["difference"]["paired_days"];
    CHECK(paired <= j["deadlock"]["variants"][0]["complete_days"].get<std::size_t>());
    CHECK(paired <= j["deadlock"]["variants"][1]["complete_days"].get<std::size_t>());
    CHECK(j["variants"][1]["difference"]["total_knock_on_s"]["n"] == paired);
    REQUIRE(fs::exists(h5));
    const h5test::Reader f(h5);
    CHECK(f.number_attr<std::uint32_t>("/", "deadlocked_days", H5T_NATIVE_UINT32) == total);
    CHECK_THAT(f.text_attr("/", "deadlock_notice"), StartsWith("DEADLOCK on " + std::to_string(total) + " days ("));

    const Result text = run_knockon(args + " --allow-deadlock", dir);
    CHECK(text.status == 0);
    CHECK_THAT(second_line(text.out), StartsWith("DEADLOCK on " + std::to_string(total) + " days (base: "));
    CHECK_THAT(text.out, Contains("days paired"));
}

TEST_CASE("report and plot of results with deadlocked days say so first", "[cli][results_report][deadlock]") {
    TempDir dir;
    // A study: the alert above the caution; the figures over the complete days.
    const fs::path study = dir.path / "study.h5";
    REQUIRE(run_knockon("simulate " + q(kCrossings) +
                            " --replications 30 --order first-come --traces sample:3 --allow-deadlock --out " + q(study),
                        dir)
                .status == 0);
    const fs::path page = dir.path / "study.html";
    const Result rep = run_knockon("report " + q(study) + " -o " + q(page), dir);
    INFO(rep.err);
    REQUIRE(rep.status == 0);
    const std::string html = read_text(page);
    check_self_contained(html);
    const std::size_t alert = html.find("<div class=\"alert\""), caution = html.find("<div class=\"caution\"");
    REQUIRE(alert != std::string::npos);
    CHECK(alert < caution);
    CHECK(html.find("DEADLOCK on ", alert) < caution);
    CHECK_THAT(html, Contains("days that ended in deadlock") && Contains("complete days, which every figure is of"));

    // A chart of it: the statement framed above the chart, the chart unchanged below.
    const fs::path svg = dir.path / "punctuality.svg";
    REQUIRE(run_knockon("plot " + q(study) + " --chart punctuality --svg " + q(svg), dir).status == 0);
    const std::string chart = read_text(svg);
    CHECK_THAT(chart, Contains("class=\"knockon-chart with-alert\""));
    const std::size_t inner = chart.find("class=\"knockon-chart bars\"");
    REQUIRE(inner != std::string::npos);
    CHECK(chart.find("class=\"alert\"") < inner);
    CHECK(count_class(chart, "bar") > 0);

    // A deadlocked day: an incomplete day, with the trains left waiting and no punctuality drawn.
    const fs::path day = dir.path / "day.h5";
    REQUIRE(run_knockon("simulate " + q(kHeadOn) + " --order timetable" + " --out " + q(day), dir).status == 3);
    REQUIRE(fs::exists(day));   // written whole, exit status 3 all the same
    const fs::path day_page = dir.path / "day.html";
    REQUIRE(run_knockon("report " + q(day) + " -o " + q(day_page), dir).status == 0);
    const std::string d = read_text(day_page);
    check_self_contained(d);
    CHECK(d.find("<div class=\"alert\"") < d.find("<div class=\"caution\""));
    CHECK_THAT(d, Contains("DEADLOCK at ") && Contains("INCOMPLETE") && Contains("Trains left waiting") &&
                      Contains("not given: the day is incomplete") && Contains("No distribution of arrival delay"));
    CHECK(count_class(d, "cdf-line") == 0);
    CHECK(d.find("Punctuality by station") == std::string::npos);

    const fs::path bad = dir.path / "day_punctuality.svg";
    const Result refused = run_knockon("plot " + q(day) + " --chart punctuality --svg " + q(bad), dir);
    CHECK(refused.status == 2);
    CHECK_THAT(refused.err, Contains("not drawn for a day that ended in deadlock"));
    CHECK_FALSE(fs::exists(bad));
    const fs::path held = dir.path / "day_signals.svg";
    REQUIRE(run_knockon("plot " + q(day) + " --chart signals --svg " + q(held), dir).status == 0);
    CHECK_THAT(read_text(held), Contains("with-alert") && Contains("DEADLOCK at "));
}
