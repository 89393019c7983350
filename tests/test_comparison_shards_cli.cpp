// Comparisons split into shards (compare --shard K/N) and merged (knockon merge): the merged file
// equals one compare run's to the bit, and shards that do not belong together are refused.
#include <catch2/catch.hpp>

#include "cli_support.hpp"
#include "tools/results/hdf5_read.hpp"

using namespace clitest;

namespace {

// First-come route setting on the single line: some days end in deadlock, so the deadlock
// reports and counts go through the shards too.
const std::string kCrossings = kSource + "/tests/data/study/single_line_crossings.yaml";
const std::string kComparison =
    "compare " + q(kCrossings) + " --replications 30 --order first-come --allow-deadlock";

std::string part(const TempDir& dir, int k) { return q(dir.path / ("part_" + std::to_string(k) + ".h5")); }

// Shard k of 3 of the comparison with `extra` options, into part_k.h5 (or `name`).
Result run_shard(const TempDir& dir, int k, const std::string& extra = " --variants base,cab",
                 const std::string& name = "") {
    const std::string out = name.empty() ? part(dir, k) : q(dir.path / name);
    return clitest::knockon(kComparison + extra + " --shard " + std::to_string(k) + "/3 --threads " +
                                std::to_string(k) + " --out " + out,
                            dir);
}

// Nothing at all under the output's name, nor a temporary copy of it.
bool nothing_written(const TempDir& dir, const std::string& name) {
    for (const auto& e : fs::directory_iterator(dir.path))
        if (e.path().filename().string().rfind(name, 0) == 0) return false;
    return true;
}

}  // namespace

TEST_CASE("three comparison shards merged equal one compare run to the bit") {
    TempDir dir;
    const Result one = clitest::knockon(kComparison + " --variants base,cab --out " + q(dir.path / "one.h5"), dir);
    INFO(one.err);
    REQUIRE(one.status == 0);
    REQUIRE(one.out.find("ended in deadlock") != std::string::npos);
    for (int k = 1; k <= 3; ++k) {
        const Result r = run_shard(dir, k);
        INFO(r.err);
        REQUIRE(r.status == 0);
        CHECK(r.out.find("knockon compare: shard " + std::to_string(k) + " of 3") != std::string::npos);
        CHECK(r.out.find("simulated days per variant") == std::string::npos);   // no figures from one shard
    }
    // Given out of order: the merge puts them in shard order.
    const Result merged = clitest::knockon("merge " + part(dir, 2) + " " + part(dir, 3) + " " + part(dir, 1) +
                                               " --allow-deadlock -o " + q(dir.path / "merged.h5"),
                                           dir);
    INFO(merged.err);
    REQUIRE(merged.status == 0);
    // The same tables as the one run printed, figure for figure.
    CHECK(merged.out == one.out);

    // Every dataset and every attribute below the root equal (h5diff, hdf5-tools); the root's
    // attributes but the command line (provenance) compared below.
    const auto h5diff = [&](const std::string& a, const std::string& b) {
        const std::string cmd = "h5diff --exclude-attribute / " + q(dir.path / a) + " " + q(dir.path / b) + " >" +
                                q(dir.path / "h5diff.txt") + " 2>&1";
        return std::system(cmd.c_str());
    };
    {
        const int rc = h5diff("one.h5", "merged.h5");
        INFO(read_text(dir.path / "h5diff.txt"));
        CHECK(rc == 0);
    }
    // All attributes of both files as h5dump shows them, but its first line (the file's name) and
    // the root's command line (its block).
    const auto attributes = [&](const std::string& file) {
        const std::string txt = file + ".attributes.txt";
        const std::string cmd = "h5dump -A -g / " + q(dir.path / file) +
                                " | awk 'NR == 1 {next} /^   ATTRIBUTE \"command_line\"/ {skip = 1} "
                                "skip {if ($0 ~ /^   }/) skip = 0; next} {print}' >" + q(dir.path / txt);
        REQUIRE(std::system(cmd.c_str()) == 0);
        return read_text(dir.path / txt);
    };
    const std::string a = attributes("one.h5");
    CHECK(a.find("deadlocked_days") != std::string::npos);
    CHECK(a.find("command_line") == std::string::npos);
    CHECK(a == attributes("merged.h5"));
    const knockon::h5::InputFile b((dir.path / "merged.h5").string());
    CHECK(b.text_attribute("/", "kind") == "comparison");

    // The check can fail: a comparison of another seed differs from the merged one.
    REQUIRE(clitest::knockon(kComparison + " --variants base,cab --seed 2 --out " + q(dir.path / "other.h5"), dir)
                .status == 0);
    CHECK(h5diff("other.h5", "merged.h5") != 0);
}

TEST_CASE("merge refuses comparison shards that do not belong together and writes nothing") {
    TempDir dir;
    for (int k = 1; k <= 3; ++k) REQUIRE(run_shard(dir, k).status == 0);
    const std::string out = " -o " + q(dir.path / "merged.h5");
    auto refused = [&](const std::string& inputs, const std::string& file, const std::string& what) {
        const Result r = clitest::knockon("merge " + inputs + out, dir);
        INFO(r.err);
        CHECK(r.status == 2);
        CHECK(r.err.find(file) != std::string::npos);
        CHECK(r.err.find(what) != std::string::npos);
        CHECK(r.out.empty());
        CHECK(nothing_written(dir, "merged.h5"));
    };
    SECTION("a shard of another seed") {
        REQUIRE(run_shard(dir, 2, " --variants base,cab --seed 9", "seed9.h5").status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "seed9.h5") + " " + part(dir, 3), "seed9.h5", "seed differs");
    }
    SECTION("a shard of other variants") {
        REQUIRE(run_shard(dir, 2, " --variants cab,base", "swapped.h5").status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "swapped.h5") + " " + part(dir, 3), "swapped.h5",
                "variants compared differs: cab,base here, base,cab in");
    }
    SECTION("a shard of an edited scenario") {
        const fs::path edited = dir.path / "edited.yaml";
        std::ofstream(edited) << read_text(kCrossings) << "\n# edited after the first shards ran\n";
        const Result r = clitest::knockon("compare " + q(edited) + " --replications 30 --order first-come "
                                          "--allow-deadlock --variants base,cab --shard 2/3 --out " +
                                              q(dir.path / "edited.h5"),
                                          dir);
        REQUIRE(r.status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "edited.h5") + " " + part(dir, 3), "edited.h5", "scenario");
    }
    SECTION("another option") {
        REQUIRE(run_shard(dir, 2, " --variants base,cab --punctuality 2", "punct.h5").status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "punct.h5") + " " + part(dir, 3), "punct.h5", "--punctuality");
    }
    SECTION("a missing shard") { refused(part(dir, 1) + " " + part(dir, 3), "part_1.h5", "missing: shard 2"); }
    SECTION("a shard given twice") {
        fs::copy_file(dir.path / "part_2.h5", dir.path / "again.h5");
        refused(part(dir, 1) + " " + part(dir, 2) + " " + q(dir.path / "again.h5") + " " + part(dir, 3), "again.h5",
                "given twice");
    }
    SECTION("a study shard among comparison shards") {
        const Result r = clitest::knockon("simulate " + q(kCrossings) + " --replications 30 --order first-come "
                                          "--allow-deadlock --shard 2/3 --out " + q(dir.path / "study_2.h5"),
                                          dir);
        REQUIRE(r.status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "study_2.h5") + " " + part(dir, 3), "study_2.h5",
                "is a study shard (simulate --shard), but");
    }
    SECTION("a comparison file instead of a shard") {
        REQUIRE(clitest::knockon(kComparison + " --variants base,cab --out " + q(dir.path / "whole.h5"), dir).status == 0);
        refused(q(dir.path / "whole.h5"), "whole.h5", "not a study shard");
    }
}

TEST_CASE("compare --shard refuses what cannot be split") {
    TempDir dir;
    const std::string base = "compare " + q(kCrossings) + " --variants base,cab --replications 2 ";
    const auto refused = [&](const std::string& args, const std::string& what) {
        const Result r = clitest::knockon(base + args, dir);
        INFO(r.err);
        CHECK(r.status == 2);
        CHECK(r.err.find(what) != std::string::npos);
    };
    refused("--shard 1/3 --out " + q(dir.path / "p.h5"), "needs at least 3 replications");
    refused("--shard 0/2 --out " + q(dir.path / "p.h5"), "--shard must be K/N");
    refused("--shard 3/2 --out " + q(dir.path / "p.h5"), "--shard must be K/N");
    refused("--shard 1/2", "--shard needs --out");
    CHECK(nothing_written(dir, "p.h5"));
}
