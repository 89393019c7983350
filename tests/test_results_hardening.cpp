// Results files read defensively (tools/results/results_file.cpp, hdf5_read.cpp): a file that is not a
// knockon results file of a known schema is refused with exit status 2, naming the file and the
// first thing wrong; no input crashes the report, makes it allocate for records the file does not
// hold, or puts NaN or infinity into it.  The layout is ours (tools/results/HDF5_LAYOUT.md); the
// wrong-layout files come from tests/make_wrong_results.py (h5py), which changes one thing each.
#include <catch2/catch.hpp>

#include <regex>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "tools/results/results_file.hpp"
#include "tools/results/sim_hdf5.hpp"

using namespace clitest;

// clitest::knockon under a name that does not clash with namespace knockon.
static Result run_cli(const std::string& args, const TempDir& dir, int timeout_s) { return clitest::knockon(args, dir, timeout_s); }
using Catch::Matchers::Contains;
using Catch::Matchers::StartsWith;

namespace {

const std::string kData = kSource + "/tests/data/results/";

// NaN or infinity as printed by printf or a stream ("nan", "-inf", "NaN", "Infinity"), standing as
// a value: not inside a longer word.
bool shows_non_finite(const std::string& html) {
    static const std::regex pattern("(^|[^A-Za-z0-9_])[-+]?(nan|NaN|NAN|inf|Inf|INF|infinity|Infinity)($|[^A-Za-z0-9_])");
    return std::regex_search(html, pattern);
}

// What every refusal looks like: the command, the file, then what is wrong (main.cpp, exit 2).
void check_refusal(const LimitedRun& r, const std::string& file) {
    CHECK(r.signal == 0);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, StartsWith("knockon report: " + file + ": "));
}

// Good results files of each kind from the study fixture, then the wrong ones derived from them.
struct WrongFiles {
    TempDir dir;
    std::string kind;
    fs::path scenario, variants, out;
    struct Case {
        std::string file, expect, what;
    };
    std::vector<Case> cases;

    explicit WrongFiles(const std::string& kind_) : kind(kind_) {
        const std::string python = python_with_h5py();
        // tools/setup.sh installs python3-h5py; without it this check cannot run at all.
        REQUIRE_FALSE(python.empty());
        scenario = dir.path / "delayed_line.yaml";
        fs::copy_file(kDelayedLine, scenario);
        variants = dir.path / "variants.yaml";
        std::ofstream(variants) << read_text(kDelayedLine)
                                << "\nvariants:\n  slow_release:\n    description: sections released 20 s after "
                                   "the tail clears them\n    infrastructure: {signalling: {interlocking: {release: 20 s}}}\n";
        const fs::path good = dir.path / "good";
        fs::create_directories(good);
        // A day with stands at signals (a long dwell holds the next trains) and sampled motion.
        if (kind == "day")
            REQUIRE(run_cli("simulate " + q(scenario) + " --sample 60 --delay S-0700:dwell@B:8 --out " +
                                q(good / "day.h5"), dir, 120)
                        .status == 0);
        if (kind == "study")
            REQUIRE(run_cli("simulate " + q(scenario) + " --replications 20 --traces sample:2 --out " +
                                q(good / "study.h5"), dir, 120)
                        .status == 0);
        if (kind == "comparison")
            REQUIRE(run_cli("compare " + q(variants) + " --replications 10 --out " + q(good / "comparison.h5"), dir, 120)
                        .status == 0);
        out = dir.path / "wrong";
        const std::string cmd = python + " " + q(kSource + "/tests/make_wrong_results.py") + " " + q(good) + " " +
                                q(out) + " " + kind + " >" + q(dir.path / "gen.log") + " 2>&1";
        INFO(read_text(dir.path / "gen.log"));
        REQUIRE(std::system(cmd.c_str()) == 0);
        std::istringstream manifest(read_text(out / "manifest.tsv"));
        std::string line;
        while (std::getline(manifest, line)) {
            const auto a = line.find('\t'), b = line.find('\t', a + 1);
            if (a == std::string::npos || b == std::string::npos) continue;
            cases.push_back({line.substr(0, a), line.substr(a + 1, b - a - 1), line.substr(b + 1)});
        }
    }

    // Runs the report on every case: refused (exit 2, naming the file) where the layout says so;
    // else refused the same way or accepted with no NaN or infinity in the page; never a crash, a
    // hang or more than 1 GB of memory.
    void check_all() {
        REQUIRE(cases.size() > 50);
        std::size_t refused = 0, accepted = 0;
        for (const Case& c : cases) {
            INFO(c.file << " (" << c.expect << "): " << c.what);
            const fs::path file = out / c.file, html = dir.path / "report.html";
            const fs::path& plan = kind == "comparison" ? variants : scenario;
            const LimitedRun r = knockon_limited(
                {"report", file.string(), "--scenario", plan.string(), "-o", html.string()}, dir.path / "err.txt");
            INFO("exit " << r.status << ", signal " << r.signal << ": " << r.err);
            CHECK(r.signal == 0);
            CHECK(r.max_rss_kb < 1024 * 1024);
            if (c.expect == "refuse" || r.status != 0) {
                check_refusal(r, file.string());
                CHECK_FALSE(fs::exists(html));
                ++refused;
            } else {
                CHECK_FALSE(shows_non_finite(read_text(html)));
                fs::remove(html);
                ++accepted;
            }
        }
        CHECK(refused > 0);
        CHECK(accepted > 0);   // the "any" cases include valid files: the check must see some pass
    }
};

}  // namespace

TEST_CASE("results reading: a study file with no punctuality thresholds is refused", "[results][hardening]") {
    // Once a SIGSEGV: the report took the first of no thresholds.
    const TempDir dir;
    const std::string file = kData + "study_thresholds_empty.h5";
    const LimitedRun r = knockon_limited({"report", file, "--scenario", kDemo, "-o", (dir.path / "x.html").string()},
                                         dir.path / "err.txt");
    check_refusal(r, file);
    CHECK_THAT(r.err, Contains("/study: attribute 'thresholds_s' is empty"));
    CHECK_FALSE(fs::exists(dir.path / "x.html"));
}

TEST_CASE("results reading: a table declaring 3e8 records in 90 KB is refused without allocating", "[results][hardening]") {
    // Once 4.7 GB and a bad_alloc: every column was allocated for the records declared.
    const TempDir dir;
    const std::string file = kData + "study_per_day_3e8_rows.h5";
    const LimitedRun r = knockon_limited({"report", file, "--scenario", kDemo, "-o", (dir.path / "x.html").string()},
                                         dir.path / "err.txt");
    check_refusal(r, file);
    CHECK_THAT(r.err, Contains("/study/per_day: declares 300000000 records"));
    CHECK(r.max_rss_kb < 200 * 1024);
}

TEST_CASE("results reading: a seed above 2^53 comes back exactly", "[results][hardening]") {
    // A u64 read through a double loses the low bits above 2^53 (IEEE 754 binary64: 53-bit
    // significand), and 2^64 - 1 rounds to 2^64, which does not fit the integer it is cast to.
    const TempDir dir;
    const fs::path out = dir.path / "day.h5";
    knockon::SimResult day;
    day.train_ids = {"t1"};
    day.section_names = {"s1"};
    knockon::Hdf5RunInfo info;
    info.scenario_file = "x.yaml";
    info.scenario_name = "x";
    info.command_line = "knockon simulate x.yaml";
    info.variant = "base";
    info.step = 2.0;
    for (const std::uint64_t seed : {18446744073709551615ull, 9007199254740993ull, 0ull}) {
        info.seed = seed;
        fs::remove(out);
        knockon::write_sim_hdf5(out.string(), day, info);
        CHECK(knockon::read_results(out.string()).facts.seed == seed);
    }
}

TEST_CASE("results reading: wrong layouts of a day file", "[results][hardening][python]") {
    WrongFiles("day").check_all();
}

TEST_CASE("results reading: wrong layouts of a study file", "[results][hardening][python]") {
    WrongFiles("study").check_all();
}

TEST_CASE("results reading: wrong layouts of a comparison file", "[results][hardening][python]") {
    WrongFiles("comparison").check_all();
}
