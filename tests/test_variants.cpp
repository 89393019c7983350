// Scenario variants: the overlay merge (maps key by key, everything else replaced), located errors
// that point into the overlay or the base as written, the checks of the `variants:` map, and the
// demo's variants against blocking time theory (tests/REFERENCES.md B5/B6).
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <map>
#include <string>
#include <vector>

#include <yaml-cpp/yaml.h>

#include "models/plan.hpp"
#include "sim/comparison.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/read/yaml_merge.hpp"

using namespace knockon;
using Catch::Matchers::Contains;
using Catch::Matchers::StartsWith;

namespace {

const std::string kSource = KNOCKON_SOURCE_DIR;
const std::string kDemo = kSource + "/scenarios/demo.yaml";

std::string read_text(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

// 1-based line of the first line of `text` that contains `needle` (0 when none).
int line_containing(const std::string& text, const std::string& needle) {
    std::istringstream in(text);
    std::string line;
    for (int n = 1; std::getline(in, line); ++n)
        if (line.find(needle) != std::string::npos) return n;
    return 0;
}

// The small two-train test line, with variants appended.
std::string two_trains_with(const std::string& variants) {
    return read_text(kSource + "/tests/data/two_trains.yaml") + "\n" + variants;
}

// All messages of the ScenarioError thrown by parsing `text` as `variant` (empty when none).
std::vector<std::string> errors_of(const std::string& text, const std::string& variant) {
    try {
        parse_scenario(text, "t.yaml", variant);
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    return {};
}

}  // namespace

TEST_CASE("overlay merge: maps merge key by key, lists and scalars are replaced", "[variants]") {
    // Semantics as README "Variants and `compare`" defines them (common practice of configuration
    // overlays, no source).
    YAML::Node base = YAML::Load(
        "a:\n"              // line 1
        "  b: 1\n"          // 2
        "  c: 2\n"          // 3
        "  deep: {x: 1, y: 2}\n"   // 4
        "l: [1, 2, 3]\n"    // 5
        "s: text\n"         // 6
        "m: {k: v}\n");     // 7
    YAML::Node overlay = YAML::Load(
        "a:\n"              // 1
        "  c: 5\n"          // 2
        "  d: 6\n"          // 3
        "  deep: {y: 20}\n" // 4
        "l: [9]\n"          // 5
        "s: {now: map}\n"   // 6
        "m: 7\n"            // 7
        "n: new\n");        // 8
    const int base_a_line = base["a"].Mark().line;
    yamlio::merge_into(base, overlay);
    const YAML::Node& r = base;
    CHECK(r["a"]["b"].as<int>() == 1);
    CHECK(r["a"]["c"].as<int>() == 5);
    CHECK(r["a"]["d"].as<int>() == 6);
    CHECK(r["a"]["deep"]["x"].as<int>() == 1);   // recursion reaches nested maps
    CHECK(r["a"]["deep"]["y"].as<int>() == 20);
    REQUIRE(r["l"].IsSequence());
    CHECK(r["l"].size() == 1);                   // a list is replaced whole, not appended to
    CHECK(r["l"][0].as<int>() == 9);
    CHECK(r["s"].IsMap());                       // a map replaces a scalar
    CHECK(r["m"].as<int>() == 7);                // and a scalar a map
    CHECK(r["n"].as<std::string>() == "new");
    std::size_t keys = 0;
    for (auto it = r["a"].begin(); it != r["a"].end(); ++it) ++keys;
    CHECK(keys == 4);                            // b, c, deep, d: c replaced, not doubled

    // Marks: merged maps keep the base's; values from the overlay keep the overlay's (0-based).
    CHECK(r["a"].Mark().line == base_a_line);
    CHECK(r["a"]["b"].Mark().line == 1);         // base line 2
    CHECK(r["a"]["c"].Mark().line == 1);         // overlay line 2
    CHECK(r["a"]["deep"]["y"].Mark().line == 3); // overlay line 4
    CHECK(r["a"]["deep"]["x"].Mark().line == 3); // base line 4
    CHECK(r["l"].Mark().line == 4);              // overlay line 5
    CHECK(r["n"].Mark().line == 7);              // overlay line 8
}

TEST_CASE("a variant changes the scenario; the base stays as written", "[variants]") {
    std::string text = two_trains_with(
        "variants:\n"
        "  four:\n"
        "    description: four-aspect on the same signals\n"
        "    infrastructure: {signalling: {areas: [{from: 0 km, to: 10 km, system: four_aspect}]}}\n"
        "  fewer_signals:\n"
        "    infrastructure:\n"
        "      signals:\n"
        "        - {id: U01, track: U, at: 0 km, direction: up}\n"
        "        - {id: U02, track: U, at: 0.8 km, direction: up}\n"
        "        - {id: U05, track: U, at: 5.3 km, direction: up}\n"
        "        - {id: U08, track: U, at: 9.8 km, direction: up}\n");
    // A set-up time other than the default, to see that `signalling` is merged, not replaced.
    text.replace(text.find("route_setup: 6 s"), 16, "route_setup: 8 s");
    const Scenario base = parse_scenario(text, "t.yaml");
    const Scenario four = parse_scenario(text, "t.yaml", "four");
    const Scenario fewer = parse_scenario(text, "t.yaml", "fewer_signals");
    const Scenario named_base = parse_scenario(text, "t.yaml", "base");
    REQUIRE(base.infrastructure.areas.size() == 1);
    CHECK(base.infrastructure.areas[0].system == AspectSystem::three_aspect);
    REQUIRE(four.infrastructure.areas.size() == 1);
    CHECK(four.infrastructure.areas[0].system == AspectSystem::four_aspect);
    // Merged, not replaced: the rest of `signalling` (interlocking times) is still the base's.
    CHECK(base.infrastructure.interlocking.route_setup == Approx(8.0));
    CHECK(four.infrastructure.interlocking.route_setup == Approx(8.0));
    CHECK(four.infrastructure.signals.size() == 8);
    CHECK(base.infrastructure.signals.size() == 8);
    CHECK(fewer.infrastructure.signals.size() == 4);   // the list replaced whole
    CHECK(named_base.infrastructure.signals.size() == 8);
    CHECK(four.timetable.services.size() == base.timetable.services.size());
    CHECK_THAT(four.name, Contains("four"));
}

TEST_CASE("errors in an overlay point at the overlay's line, errors in the base at the base's", "[variants]") {
    const std::string text = two_trains_with(
        "variants:\n"
        "  broken:\n"
        "    infrastructure:\n"
        "      length: -3 km\n"
        "      signalling: {areas: [{from: 0 km, to: 10 km, system: five_aspect}]}\n");
    const int length_line = line_containing(text, "length: -3 km");
    const int areas_line = line_containing(text, "five_aspect");
    REQUIRE(length_line > 0);
    CHECK(errors_of(text, "").empty());   // the base is fine
    const auto errs = errors_of(text, "broken");
    REQUIRE(errs.size() >= 2);
    bool length_seen = false, system_seen = false;
    for (const std::string& e : errs) {
        if (e.find("infrastructure.length") != std::string::npos) {
            CHECK_THAT(e, StartsWith("t.yaml:" + std::to_string(length_line) + ":"));
            length_seen = true;
        }
        if (e.find("five_aspect") != std::string::npos) {
            CHECK_THAT(e, StartsWith("t.yaml:" + std::to_string(areas_line) + ":"));
            system_seen = true;
        }
    }
    CHECK(length_seen);
    CHECK(system_seen);

    // An error of the base, seen through a variant that does not touch it, points at the base.
    std::string bad_base = text;
    const std::string good = "min_dwell: 30 s";
    bad_base.replace(bad_base.find(good), good.size(), "min_dwell: 30 parsecs");
    const int dwell_line = line_containing(bad_base, "30 parsecs");
    const std::string ok_variant = "\n  fine:\n    description: changes nothing\n";
    const auto errs2 = errors_of(bad_base + ok_variant, "fine");
    REQUIRE(errs2.size() == 1);
    CHECK_THAT(errs2[0], StartsWith("t.yaml:" + std::to_string(dwell_line) + ":"));
    CHECK_THAT(errs2[0], Contains("min_dwell"));
}

TEST_CASE("an unknown key in an overlay is reported at the overlay", "[variants]") {
    const std::string text = two_trains_with(
        "variants:\n"
        "  typo:\n"
        "    infrastucture: {length: 9 km}\n");
    const int line = line_containing(text, "infrastucture");
    const auto errs = errors_of(text, "typo");
    REQUIRE(errs.size() == 1);
    CHECK_THAT(errs[0], StartsWith("t.yaml:" + std::to_string(line) + ":"));
    CHECK_THAT(errs[0], Contains("unknown key \"infrastucture\""));
}

TEST_CASE("an unknown variant names the file, the variants line and the known names", "[variants]") {
    const std::string text = two_trains_with(
        "variants:\n"
        "  alpha: {description: a}\n"
        "  beta: {description: b}\n");
    const int line = line_containing(text, "variants:");
    const auto errs = errors_of(text, "gamma");
    REQUIRE(errs.size() == 1);
    CHECK_THAT(errs[0], StartsWith("t.yaml:" + std::to_string(line) + ":"));
    CHECK_THAT(errs[0], Contains("gamma"));
    CHECK_THAT(errs[0], Contains("alpha"));
    CHECK_THAT(errs[0], Contains("beta"));

    // No variants at all.
    const auto none = errors_of(read_text(kSource + "/tests/data/two_trains.yaml"), "gamma");
    REQUIRE(none.size() == 1);
    CHECK_THAT(none[0], Contains("gamma"));
    CHECK_THAT(none[0], Contains("no variants"));
}

TEST_CASE("the variants map is checked: nesting, names, description, shape", "[variants]") {
    SECTION("a variant inside a variant") {
        const std::string text = two_trains_with(
            "variants:\n"
            "  outer:\n"
            "    variants: {inner: {description: x}}\n");
        const int line = line_containing(text, "inner");
        for (const std::string v : {"", "outer"}) {
            const auto errs = errors_of(text, v);
            REQUIRE(errs.size() == 1);
            CHECK_THAT(errs[0], StartsWith("t.yaml:" + std::to_string(line) + ":"));
            CHECK_THAT(errs[0], Contains("variants.outer.variants"));
        }
    }
    SECTION("the name base is taken") {
        const auto errs = errors_of(two_trains_with("variants:\n  base: {description: x}\n"), "");
        REQUIRE(errs.size() == 1);
        CHECK_THAT(errs[0], Contains("base"));
    }
    SECTION("names are plain words usable in --variants a,b") {
        const auto errs = errors_of(two_trains_with("variants:\n  \"a,b\": {description: x}\n"), "");
        REQUIRE(errs.size() == 1);
        CHECK_THAT(errs[0], Contains("a,b"));
    }
    SECTION("a variant is a map, its description a text") {
        const std::string text = two_trains_with(
            "variants:\n"
            "  listy: [1, 2]\n"
            "  described: {description: [not, text]}\n");
        const auto errs = errors_of(text, "");
        REQUIRE(errs.size() == 2);
        CHECK_THAT(errs[0], Contains("variants.listy"));
        CHECK_THAT(errs[1], Contains("variants.described.description"));
    }
    SECTION("variants given twice") {
        const auto errs = errors_of(
            two_trains_with("variants:\n  a: {description: x}\n  a: {description: y}\n"), "");
        REQUIRE(errs.size() == 1);
        CHECK_THAT(errs[0], Contains("twice"));
    }
}

TEST_CASE("variant names and descriptions in file order", "[variants]") {
    const std::vector<std::string> names = variant_names(kDemo);
    REQUIRE(names.size() == 2);
    CHECK(names[0] == "four_aspect");
    CHECK(names[1] == "shorter_blocks");
    const std::vector<VariantInfo> info = read_variants(kDemo);
    REQUIRE(info.size() == 2);
    CHECK_THAT(info[0].description, Contains("four-aspect"));
    CHECK(read_variants(kSource + "/tests/data/two_trains.yaml").empty());
}

TEST_CASE("demo: four-aspect signalling on the same signals never lengthens a minimum headway", "[variants][demo]") {
    // tests/REFERENCES.md B5/B6: under four-aspect signalling the warning point is one or two signals in
    // rear, as the braking distance needs; the demo's blocks are each at least a braking distance
    // (B6, three-aspect), so it stays one signal back and no blocking time can grow.
    const Scenario base = read_scenario(kDemo);
    const Scenario four = read_scenario(kDemo, "four_aspect");
    CHECK(base.infrastructure.areas.at(0).system == AspectSystem::three_aspect);
    CHECK(four.infrastructure.areas.at(0).system == AspectSystem::four_aspect);
    const PlanResult pb = make_plan(base);
    const PlanResult pf = make_plan(four);
    REQUIRE(pb.headways.size() == pf.headways.size());
    REQUIRE(!pb.headways.empty());
    for (std::size_t i = 0; i < pb.headways.size(); ++i) {
        const HeadwayPair& b = pb.headways[i];
        const HeadwayPair& f = pf.headways[i];
        REQUIRE(b.leader == f.leader);
        REQUIRE(b.follower == f.follower);
        CHECK(f.minimum_headway <= b.minimum_headway + 1e-6);
    }
    CHECK(plan_figures(pf).mean_minimum_headway <= plan_figures(pb).mean_minimum_headway + 1e-6);
}

TEST_CASE("demo: shorter blocks shorten the minimum headways", "[variants][demo]") {
    // Blocking time theory (tests/REFERENCES.md B1): a shorter block is run through and cleared sooner,
    // so the longest blocking time of a line section, which sets the headway, falls; B6
    // (four-aspect) keeps two halved blocks at least a braking distance.
    const Scenario base = read_scenario(kDemo);
    const Scenario shorter = read_scenario(kDemo, "shorter_blocks");
    CHECK(shorter.infrastructure.signals.size() > base.infrastructure.signals.size());
    const PlanFigures fb = plan_figures(make_plan(base));
    const PlanFigures fs = plan_figures(make_plan(shorter));
    CHECK(fs.headway_pairs == fb.headway_pairs);
    CHECK(fs.mean_minimum_headway < fb.mean_minimum_headway);
    CHECK(fs.peak_consumption <= fb.peak_consumption + 1e-9);
}
