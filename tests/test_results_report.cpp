// `knockon report` and `knockon plot` on results files, end to end: a study with traced days, a
// study without, a single day and a comparison are simulated on the study fixture, then reported
// and plotted; the pages and charts are checked by their CSS classes and words, the traced day
// drawn against the median rule computed here from the file, and bad input (missing or foreign
// files, another kind, a day that was not traced, a missing scenario) against exit status 2 with
// a clear message and no output file.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "results_test_support.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/results/hdf5_read.hpp"
#include "tools/results/plan_output.hpp"

using namespace resultstest;
using Catch::Matchers::Contains;

namespace {

constexpr int kDays = 12;

// A study of the fixture with 3 traced days (sample:3 of 12: replications 3, 7 and 11).
fs::path traced_study(const TempDir& dir, const std::string& name = "study.h5") {
    const fs::path out = dir.path / name;
    const Result r = run_knockon("simulate " + q(kDelayedLine) + " --replications " + std::to_string(kDays) +
                                     " --traces sample:3 --out " + q(out),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    return out;
}

// Bad input: exit status 2, the message says `what`, and `output` was not written.
void check_refused(const std::string& args, const TempDir& dir, const fs::path& output, const std::string& what) {
    const Result r = run_knockon(args, dir);
    INFO(args);
    INFO(r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Contains(what));
    CHECK_FALSE(fs::exists(output));
}

}  // namespace

TEST_CASE("report of a study: every results section, the median traced day drawn over the plan",
          "[results_report][cli]") {
    TempDir dir;
    const fs::path study = traced_study(dir);
    const fs::path html = dir.path / "study.html";
    const Result r = run_knockon("report " + q(study) + " -o " + q(html) + " --all", dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    check_self_contained(page);
    for (const char* id : {"verdict", "time-distance", "delays", "delay-growth", "capacity", "buffers", "conflicts",
                           "running-times", "headway-matrix", "spacing", "run-facts"})
        CHECK(page.find(std::string("<section id=\"") + id + "\"") != std::string::npos);
    // Facts: the command, seed and version from the file, the caution.
    CHECK(page.find(knockon::kSafetyCaution) != std::string::npos);
    CHECK(page.find("--traces sample:3") != std::string::npos);
    CHECK(page.find("<th scope=\"row\">seed</th><td>1</td>") != std::string::npos);
    CHECK(page.find("results written by") != std::string::npos);

    // The traced day drawn: of the traced days (3, 7, 11) the one whose knock-on is nearest the
    // median knock-on over all days, computed here from /study/per_day.
    const knockon::h5::InputFile f(study.string());
    const std::vector<double> knock_on = f.number_column("/study/per_day", "total_knock_on");
    REQUIRE(knock_on.size() == static_cast<std::size_t>(kDays));
    CHECK(f.members("/replications") == std::vector<std::string>{"000003", "000007", "000011"});
    std::vector<double> sorted = knock_on;
    std::sort(sorted.begin(), sorted.end());
    const double median = (sorted[kDays / 2 - 1] + sorted[kDays / 2]) / 2.0;   // n even
    int best = 3;
    for (int k : {7, 11})
        if (std::abs(knock_on[k] - median) < std::abs(knock_on[best] - median)) best = k;
    CHECK(page.find("replication " + std::to_string(best) + ", the traced day whose knock-on delay") !=
          std::string::npos);
    // With --all every train is in the window: 16 planned paths, each with its as-run path.
    CHECK(count_class(page, "train-path") == 16);
    CHECK(count_class(page, "asrun-path") == 16);
    CHECK(count_class(page, "dimmed") == 16 + 1);
    // The charts of the results are all there.
    CHECK(count_class(page, "cdf-line") == 2);     // the one category and all trains
    CHECK(count_class(page, "cdf-all") == 1);
    CHECK(count_class(page, "threshold-line") == 2);
    // Punctuality: all stations, B and C (A is an origin, never arrived at) x 2 thresholds;
    // primary and knock-on: the category and all trains x 2.
    CHECK(count_class(page, "bar") == 3 * 2 + 2 * 2);
    CHECK(count_class(page, "hbar") > 0);
    CHECK(count_class(page, "cap-bar") == 4);   // the plan's capacity chart stays
    CHECK(page.find("Least punctual timing points") != std::string::npos);
    CHECK(page.find("Thinnest buffers as run") != std::string::npos);
    CHECK(page.find("statistics of every timing point over all 12 days") != std::string::npos);

    // Another traced day when asked for.
    const fs::path seven = dir.path / "seven.html";
    REQUIRE(run_knockon("report " + q(study) + " -o " + q(seven) + " --replication 7", dir).status == 0);
    CHECK(read_text(seven).find("replication 7, as asked for") != std::string::npos);
    // One that was not traced: refused, nothing written.
    const fs::path five = dir.path / "five.html";
    check_refused("report " + q(study) + " -o " + q(five) + " --replication 5", dir, five,
                  "replication 5 was not traced; traced: 3, 7, 11");
}

TEST_CASE("plot draws each chart of a study as a standalone SVG", "[results_report][cli]") {
    TempDir dir;
    const fs::path study = traced_study(dir);
    struct Want {
        std::string chart, cls;
        std::size_t count;
    };
    const std::vector<Want> wants = {{"delay-cdf", "cdf-line", 2},     {"punctuality", "bar", 6},
                                     {"primary-knock-on", "bar", 4},
                                     {"time-distance", "asrun-path", 0}, {"capacity", "cap-bar", 4}};
    for (const Want& w : wants) {
        const fs::path svg = dir.path / (w.chart + ".svg");
        const Result r = run_knockon("plot " + q(study) + " --chart " + w.chart + " --svg " + q(svg), dir);
        INFO(w.chart << ": " << r.err);
        REQUIRE(r.status == 0);
        const std::string s = read_text(svg);
        CHECK(s.rfind("<?xml", 0) == 0);
        CHECK(s.find("xmlns=\"http://www.w3.org/2000/svg\"") != std::string::npos);
        if (w.chart == "time-distance")
            CHECK(count_class(s, "asrun-path") > 0);   // the busiest hour's trains, as run
        else
            CHECK(count_class(s, w.cls) == w.count);
    }
    // Signals ranked by time held: one bar per signal that held a train, sections by blocked
    // share: one per detection section (at most 15 of either).
    const knockon::h5::InputFile f(study.string());
    const fs::path sig = dir.path / "signals.svg", blocked = dir.path / "blocked.svg";
    REQUIRE(run_knockon("plot " + q(study) + " --chart signals --svg " + q(sig), dir).status == 0);
    CHECK(count_class(read_text(sig), "hbar") == std::min<std::size_t>(15, f.rows("/study/signals")));
    REQUIRE(run_knockon("plot " + q(study) + " --chart blocked-share --svg " + q(blocked), dir).status == 0);
    CHECK(count_class(read_text(blocked), "hbar") == std::min<std::size_t>(15, f.rows("/study/sections")));
    // A comparison's chart is not a study's; a results chart needs a results file.
    const fs::path bad = dir.path / "bad.svg";
    check_refused("plot " + q(study) + " --chart variants-knock-on --svg " + q(bad), dir, bad,
                  "unknown chart 'variants-knock-on' for a study file");
    check_refused("plot " + q(kDelayedLine) + " --chart delay-cdf --svg " + q(bad), dir, bad,
                  "needs a results file");
    check_refused("plot " + q(study) + " --chart punctuality --all --svg " + q(bad), dir, bad,
                  "apply to --chart time-distance only");
}

TEST_CASE("report of a study without traced days says how to get the as-run paths", "[results_report][cli]") {
    TempDir dir;
    const fs::path study = dir.path / "plain.h5";
    REQUIRE(run_knockon("simulate " + q(kDelayedLine) + " --replications 6 --out " + q(study), dir).status == 0);
    const fs::path html = dir.path / "plain.html";
    REQUIRE(run_knockon("report " + q(study) + " -o " + q(html), dir).status == 0);
    const std::string page = read_text(html);
    CHECK(page.find("As-run paths are not available") != std::string::npos);
    CHECK(page.find("--traces sample:5") != std::string::npos);
    CHECK(count_class(page, "asrun-path") == 0);
    CHECK(count_class(page, "train-path") > 0);
    CHECK(count_class(page, "cdf-line") == 2);
    // Any --replication is refused: no day was traced.
    const fs::path none = dir.path / "none.html";
    check_refused("report " + q(study) + " -o " + q(none) + " --replication 0", dir, none,
                  "the file holds no traced day");
}

TEST_CASE("report of a single day: its own paths, its empirical distribution of delay", "[results_report][cli]") {
    TempDir dir;
    const fs::path day = dir.path / "day.h5";
    REQUIRE(run_knockon("simulate " + q(kDelayedLine) + " --delay S-0710:dwell@B:4 --out " + q(day), dir).status == 0);
    const fs::path html = dir.path / "day.html";
    const Result r = run_knockon("report " + q(day) + " -o " + q(html) + " --all --punctuality 2,4", dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    check_self_contained(page);
    CHECK(page.find("Simulated day report") != std::string::npos);
    CHECK(page.find("Drawn over the plan: the simulated day as run") != std::string::npos);
    CHECK(count_class(page, "asrun-path") == 16);
    // S-0710 stands 4 minutes longer at B, and S-0715 has to stop at B's home signal U04.
    CHECK(count_class(page, "asrun-hold") > 0);
    CHECK(page.find("The empirical distribution of the") != std::string::npos);
    CHECK(page.find("within 2 min") != std::string::npos);   // the thresholds asked for
    CHECK(page.find("does not record the primary delays") != std::string::npos);
    // A day has no traced days to choose from.
    const fs::path other = dir.path / "other.html";
    check_refused("report " + q(day) + " -o " + q(other) + " --replication 1", dir, other,
                  "is a day file");
}

TEST_CASE("report and plot of a comparison: the variants side by side with paired differences",
          "[results_report][cli]") {
    TempDir dir;
    const fs::path scenario = write_variant_fixture(dir);
    const fs::path cmp = dir.path / "cmp.h5";
    REQUIRE(run_knockon("compare " + q(scenario) + " --replications 6 --out " + q(cmp), dir).status == 0);
    const fs::path html = dir.path / "cmp.html";
    const Result r = run_knockon("report " + q(cmp) + " -o " + q(html), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    check_self_contained(page);
    CHECK(page.find("Comparison report") != std::string::npos);
    CHECK(page.find("<section id=\"variants\"") != std::string::npos);
    CHECK(page.find("Paired differences against base") != std::string::npos);
    CHECK(page.find("slow_release") != std::string::npos);
    CHECK(page.find("A comparison keeps no traced days") != std::string::npos);
    // Knock-on per variant (2 bars), difference in knock-on (1), punctuality per variant (2 x 2)
    // and its differences (1 x 2).
    CHECK(count_class(page, "hbar") == 2 + 1);
    CHECK(count_class(page, "bar") == 2 * 2 + 2);
    CHECK(count_class(page, "ci-whisker") == 2 + 1 + 4 + 2);
    CHECK(count_class(page, "train-path") > 0);   // the reference variant's plan
    for (const std::string chart : {"variants-knock-on", "variants-punctuality", "differences-knock-on",
                                    "differences-punctuality"}) {
        const fs::path svg = dir.path / (chart + ".svg");
        const Result p = run_knockon("plot " + q(cmp) + " --chart " + chart + " --svg " + q(svg), dir);
        INFO(chart << ": " << p.err);
        CHECK(p.status == 0);
        CHECK(read_text(svg).find("ci-whisker") != std::string::npos);
    }
    const fs::path bad = dir.path / "bad.svg";
    check_refused("plot " + q(cmp) + " --chart delay-cdf --svg " + q(bad), dir, bad,
                  "unknown chart 'delay-cdf' for a comparison file");
}

TEST_CASE("report of a results file: bad input gives exit status 2 and no file", "[results_report][cli]") {
    TempDir dir;
    const fs::path html = dir.path / "out.html";
    // A results file that is not there: a missing input is named.
    check_refused("report " + q(dir.path / "nothing.h5") + " -o " + q(html), dir, html, "nothing.h5");

    // An HDF5 file of another kind, and one that is not knockon's.
    const fs::path weather = dir.path / "weather.h5";
    {
        knockon::h5::OutputFile out(weather.string());
        {
            const knockon::h5::Group root = out.root();
            root.attributes().set_i32("schema_version", 3);
            root.attributes().set_text("program", "knockon");
            root.attributes().set_text("kind", "weather");
        }
        out.commit();
    }
    check_refused("report " + q(weather) + " -o " + q(html), dir, html,
                  "root attribute kind is 'weather'; known kinds: day, study, comparison");
    // Schemas this knockon does not read: a newer one, and the first (day files without kind).
    for (const int schema : {10, 1}) {
        const fs::path other = dir.path / ("schema" + std::to_string(schema) + ".h5");
        knockon::h5::OutputFile out(other.string());
        {
            const knockon::h5::Group root = out.root();
            root.attributes().set_i32("schema_version", schema);
            root.attributes().set_text("program", "knockon");
        }
        out.commit();
        check_refused("report " + q(other) + " -o " + q(html), dir, html,
                      schema == 10 ? "schema version 10 is newer than this knockon reads (up to 9)"
                                  : "schema version 1 is older than this knockon reads");
    }
    const fs::path foreign = dir.path / "foreign.h5";
    {
        knockon::h5::OutputFile out(foreign.string());
        { const knockon::h5::Group root = out.root(); }
        out.commit();
    }
    check_refused("report " + q(foreign) + " -o " + q(html), dir, html, "not a knockon results file");
    // A file cut short is no HDF5 file the library can open: an error, not a crash.
    const fs::path study = traced_study(dir);
    const fs::path cut = dir.path / "cut.h5";
    {
        const std::string bytes = read_text(study);
        std::ofstream(cut, std::ios::binary) << bytes.substr(0, bytes.size() / 3);
    }
    const Result r = run_knockon("report " + q(cut) + " -o " + q(html), dir);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Contains("cut.h5"));
    CHECK_FALSE(fs::exists(html));

    // The scenario the results came from has gone: the error names it and says what to do; with
    // --scenario the report is made.
    const fs::path moved = dir.path / "moved.yaml";
    fs::copy_file(kDelayedLine, dir.path / "line.yaml");
    const fs::path own = dir.path / "own.h5";
    REQUIRE(run_knockon("simulate " + q(dir.path / "line.yaml") + " --replications 3 --out " + q(own), dir).status == 0);
    fs::rename(dir.path / "line.yaml", moved);
    check_refused("report " + q(own) + " -o " + q(html), dir, html, "line.yaml");
    check_refused("report " + q(own) + " -o " + q(html), dir, html, "--scenario FILE");
    const Result with = run_knockon("report " + q(own) + " -o " + q(html) + " --scenario " + q(moved), dir);
    INFO(with.err);
    CHECK(with.status == 0);
    CHECK(fs::exists(html));
    fs::remove(html);
    // Options for results files are refused with a scenario, and a day's thresholds with a study.
    check_refused("report " + q(kDelayedLine) + " -o " + q(html) + " --replication 1", dir, html,
                  "--replication applies to a study");
    check_refused("report " + q(own) + " -o " + q(html) + " --punctuality 2", dir, html, "holds its own thresholds");
}
