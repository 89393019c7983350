// Studies split into shards (simulate --shard K/N) and merged (knockon merge): the merged file
// equals one run's to the bit, and shards that do not belong together are refused.
#include <catch2/catch.hpp>

#include <set>

#include "cli_support.hpp"
#include "sim/shards.hpp"
#include "tools/results/hdf5_read.hpp"
#include "tools/read/scenario_hash.hpp"

using namespace clitest;

namespace {

const std::string kStudy = q(kDelayedLine) + " --replications 7 --seed 5 --traces sample:3";

void run_shard(const TempDir& dir, int k, const std::string& extra = "", const std::string& scenario = kDelayedLine) {
    const Result r = clitest::knockon("simulate " + q(scenario) + " --replications 7 --seed 5 --traces sample:3 --shard " +
                                 std::to_string(k) + "/3 --out " + q(dir.path / ("part_" + std::to_string(k) + ".h5")) +
                                 " --threads " + std::to_string(k) + " " + extra,
                             dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    REQUIRE(r.out.find("shard " + std::to_string(k) + " of 3") != std::string::npos);
}

std::string part(const TempDir& dir, int k) { return q(dir.path / ("part_" + std::to_string(k) + ".h5")); }

// Nothing at all under the output's name, nor a temporary copy of it.
bool nothing_written(const TempDir& dir, const std::string& name) {
    for (const auto& e : fs::directory_iterator(dir.path))
        if (e.path().filename().string().rfind(name, 0) == 0) return false;
    return true;
}

}  // namespace

TEST_CASE("shard_range splits the replications into contiguous blocks without gap or overlap") {
    // Common practice, no source: block k of n is [floor((k-1)N/n), floor(kN/n)).
    for (std::uint32_t planned : {1u, 7u, 100u, 4294967295u})
        for (std::uint32_t shards : {1u, 2u, 3u, 7u}) {
            if (shards > planned) continue;
            std::uint32_t next = 0, smallest = UINT32_MAX, largest = 0;
            for (std::uint32_t k = 1; k <= shards; ++k) {
                const knockon::ReplicationRange r = knockon::shard_range(k, shards, planned);
                CHECK(r.first == next);
                next = r.end;
                smallest = std::min(smallest, r.size());
                largest = std::max(largest, r.size());
            }
            CHECK(next == planned);
            CHECK(largest - smallest <= 1);
        }
    CHECK(knockon::shard_range(2, 3, 7).first == 2);
    CHECK(knockon::shard_range(3, 3, 7).end == 7);
    CHECK_THROWS_AS(knockon::shard_range(0, 3, 7), std::invalid_argument);
    CHECK_THROWS_AS(knockon::shard_range(4, 3, 7), std::invalid_argument);
}

TEST_CASE("scenario_hash tells texts and variants apart") {
    using knockon::scenario_hash;
    CHECK(scenario_hash("a: 1\n", "") == scenario_hash("a: 1\n", "base"));
    CHECK(scenario_hash("a: 1\n", "base") != scenario_hash("a: 2\n", "base"));
    CHECK(scenario_hash("a: 1\n", "base") != scenario_hash("a: 1\n", "other"));
    CHECK(scenario_hash("", "base").rfind("fnv1a64:", 0) == 0);
    CHECK(scenario_hash("", "base").size() == 8 + 16);
}

TEST_CASE("three shards merged equal one run to the bit") {
    TempDir dir;
    const Result one = clitest::knockon("simulate " + kStudy + " --out " + q(dir.path / "one.h5"), dir);
    INFO(one.err);
    REQUIRE(one.status == 0);
    for (int k = 1; k <= 3; ++k) run_shard(dir, k);
    // Given out of order: the merge puts them in shard order.
    const Result merged =
        clitest::knockon("merge " + part(dir, 3) + " " + part(dir, 1) + " " + part(dir, 2) + " -o " + q(dir.path / "study.h5"), dir);
    INFO(merged.err);
    REQUIRE(merged.status == 0);
    // The same summary as the one run printed, figure for figure.
    CHECK(merged.out == one.out);

    // Every dataset and every attribute below the root equal (h5diff, hdf5-tools; the root's
    // attributes are compared below, leaving out the command line, which is provenance).
    const std::string h5diff = "h5diff --exclude-attribute / " + q(dir.path / "one.h5") + " " +
                               q(dir.path / "study.h5") + " >" + q(dir.path / "h5diff.txt") + " 2>&1";
    const int rc = std::system(h5diff.c_str());
    INFO(read_text(dir.path / "h5diff.txt"));
    CHECK(rc == 0);
    const knockon::h5::InputFile a((dir.path / "one.h5").string()), b((dir.path / "study.h5").string());
    for (const char* name : {"kind", "scenario_hash", "variant", "scenario_name", "scenario_file", "program_version"})
        CHECK(a.text_attribute("/", name) == b.text_attribute("/", name));
    for (const char* name : {"seed", "replications", "partial", "deadlocked_days", "step_m", "schema_version"})
        CHECK(a.number_attribute("/", name) == b.number_attribute("/", name));
    CHECK(b.text_attribute("/", "kind") == "study");
    CHECK(b.members("/replications") == a.members("/replications"));
    CHECK(a.members("/replications").size() == 3);
    // The check can fail: a study of another seed differs from the merged one.
    REQUIRE(clitest::knockon("simulate " + q(kDelayedLine) + " --replications 7 --seed 6 --traces sample:3 --out " +
                        q(dir.path / "other.h5"),
                    dir)
                .status == 0);
    const std::string differ = "h5diff --exclude-attribute / " + q(dir.path / "other.h5") + " " +
                               q(dir.path / "study.h5") + " >/dev/null 2>&1";
    CHECK(std::system(differ.c_str()) != 0);
}

TEST_CASE("merge refuses shards that do not belong together and writes nothing") {
    TempDir dir;
    for (int k = 1; k <= 3; ++k) run_shard(dir, k);
    const std::string out = " -o " + q(dir.path / "study.h5");
    auto refused = [&](const std::string& inputs, const std::string& file, const std::string& what) {
        const Result r = clitest::knockon("merge " + inputs + out, dir);
        INFO(r.err);
        CHECK(r.status == 2);
        CHECK(r.err.find(file) != std::string::npos);
        CHECK(r.err.find(what) != std::string::npos);
        CHECK(nothing_written(dir, "study.h5"));
    };
    SECTION("a shard of another seed") {
        REQUIRE(clitest::knockon("simulate " + q(kDelayedLine) + " --replications 7 --seed 9 --shard 2/3 --traces sample:3 --out " +
                            q(dir.path / "seed9.h5"),
                        dir)
                    .status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "seed9.h5") + " " + part(dir, 3), "seed9.h5", "seed differs");
    }
    SECTION("a shard of an edited scenario") {
        const fs::path edited = dir.path / "edited.yaml";
        std::ofstream(edited) << read_text(kDelayedLine) << "\n# edited after the first shards ran\n";
        const Result r = clitest::knockon("simulate " + q(edited) + " --replications 7 --seed 5 --traces sample:3 --shard 2/3 --out " +
                                     q(dir.path / "edited.h5"),
                                 dir);
        REQUIRE(r.status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "edited.h5") + " " + part(dir, 3), "edited.h5", "scenario");
    }
    SECTION("another option") {
        REQUIRE(clitest::knockon("simulate " + q(kDelayedLine) +
                            " --replications 7 --seed 5 --traces sample:3 --punctuality 2 --shard 2/3 --out " +
                            q(dir.path / "punct.h5"),
                        dir)
                    .status == 0);
        refused(part(dir, 1) + " " + q(dir.path / "punct.h5") + " " + part(dir, 3), "punct.h5", "--punctuality");
    }
    SECTION("a missing shard") { refused(part(dir, 1) + " " + part(dir, 3), "part_1.h5", "missing: shard 2"); }
    SECTION("a shard given twice") {
        fs::copy_file(dir.path / "part_2.h5", dir.path / "again.h5");
        refused(part(dir, 1) + " " + part(dir, 2) + " " + q(dir.path / "again.h5") + " " + part(dir, 3), "again.h5",
                "given twice");
    }
    SECTION("a damaged shard: numbers outside what they can be") {
        // Written by h5py (python3-h5py, installed by tools/setup.sh): a day's event count of 2^63,
        // a figure no float can hold, and a held record naming signal 1e12.  Each is refused
        // naming the file, before any cast (which would be undefined).
        const std::vector<std::pair<std::string, std::string>> edits = {
            {"d = f['shard/per_day'][...]; d['events'][0] = 2**63; f['shard/per_day'][...] = d", "events"},
            {"d = f['shard/timing_figures'][...]; d['arrival_delay'][0] = 1e300; f['shard/timing_figures'][...] = d",
             "no stored figure can be"},
            {"d = f['shard/held'][...]; d['signal'][0] = 1e12; f['shard/held'][...] = d", "/shard/held"}};
        const std::string python = python_with_h5py();
        REQUIRE_FALSE(python.empty());
        for (const auto& [edit, what] : edits) {
            fs::copy_file(dir.path / "part_2.h5", dir.path / "damaged.h5", fs::copy_options::overwrite_existing);
            const std::string py = "import h5py\nwith h5py.File('" + (dir.path / "damaged.h5").string() +
                                   "', 'r+') as f:\n    " + edit + "\n";
            std::ofstream(dir.path / "edit.py") << py;
            if (edit.find("held") != std::string::npos &&
                std::system((python + " -c \"import h5py,sys; f=h5py.File('" + (dir.path / "damaged.h5").string() +
                             "'); sys.exit(0 if f['shard/held'].shape[0] > 0 else 1)\"").c_str()) != 0)
                continue;   // no train stood at a signal in this shard: nothing to damage
            REQUIRE(std::system((python + " " + q(dir.path / "edit.py")).c_str()) == 0);
            INFO(edit);
            refused(part(dir, 1) + " " + q(dir.path / "damaged.h5") + " " + part(dir, 3), "damaged.h5", what);
        }
    }
    SECTION("a study file instead of a shard") {
        REQUIRE(clitest::knockon("simulate " + kStudy + " --out " + q(dir.path / "whole.h5"), dir).status == 0);
        refused(q(dir.path / "whole.h5"), "whole.h5", "not a study shard");
    }
}

TEST_CASE("simulate --shard refuses what cannot be split") {
    TempDir dir;
    const std::string base = "simulate " + q(kDelayedLine) + " --replications 2 ";
    CHECK(clitest::knockon(base + "--shard 1/3 --out " + q(dir.path / "p.h5"), dir).status == 2);
    CHECK(clitest::knockon(base + "--shard 0/2 --out " + q(dir.path / "p.h5"), dir).status == 2);
    CHECK(clitest::knockon(base + "--shard 3/2 --out " + q(dir.path / "p.h5"), dir).status == 2);
    CHECK(clitest::knockon(base + "--shard 1/2", dir).status == 2);
    CHECK(clitest::knockon(base + "--shard 1/2 --until-ci 1 --out " + q(dir.path / "p.h5"), dir).status == 2);
    CHECK(clitest::knockon("simulate " + q(kDelayedLine) + " --shard 1/2 --out " + q(dir.path / "p.h5"), dir).status == 2);
    CHECK(nothing_written(dir, "p.h5"));
}
