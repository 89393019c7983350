// End-to-end: what cannot run is named before it runs.  `knockon validate` (and `plan` and
// `simulate`) refuse each kind of mistake with a located message and exit status 2, writing
// nothing; warnings are printed and leave the status 0; options are bounded.
#include <catch2/catch.hpp>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <string>

#include "cli_support.hpp"
#include "input_checks_support.hpp"

namespace fs = std::filesystem;

namespace {

using namespace clitest;
using namespace inputcheck;

// Writes `text` as `name` into `dir` and returns its path.
fs::path write(const TempDir& dir, const std::string& name, const std::string& text) {
    const fs::path p = dir.path / name;
    std::ofstream(p, std::ios::binary) << text;
    return p;
}

// `knockon validate` on `text` must exit 2 with a message at `value` (after `anchor`) for `path`
// holding `what`, and say that nothing was written.
void expect_validate_refuses(const std::string& text, const std::string& value, const std::string& path,
                             const std::string& what, const std::string& anchor = "") {
    TempDir dir;
    const fs::path file = write(dir, "s.yaml", text);
    const Result r = knockon("validate " + q(file), dir, 60);
    INFO(r.err);
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    const std::string head = file.string() + ":" + where(text, value, anchor) + ": " + path + ": ";
    CHECK(r.err.find(head) != std::string::npos);
    CHECK(r.err.find(what) != std::string::npos);
    CHECK(r.err.find("nothing was written") != std::string::npos);
}

}  // namespace

TEST_CASE("validate: absurd numbers are refused, each located with its range", "[cli][checks]") {
    // Each a number that used to pass validate and then printed inf, negative times or failed
    // later without a location.
    const std::string base = fixture("edge_line.yaml");
    struct Case {
        const char *from, *to, *value, *path, *what;
    };
    const Case cases[] = {
        {"percent: 5 %", "percent: 1e308 %", "1e308 %", "train_types[0].supplement.percent", "not 1e+308 %"},
        {"rounding: 30 s", "rounding: 1e308 s", "1e308 s", "timetable.rounding", "at most 3600 s"},
        {"mass: 200 t", "mass: 1e308 t", "1e308 t", "train_types[0].mass", "too large to compute with"},
        {"length: 100 m", "length: 1000000 km", "1000000 km", "train_types[0].length", "at most 5000 m"},
        {"max_speed: 120 km/h", "max_speed: 1e308 km/h", "1e308 km/h", "train_types[0].max_speed", "at most 500 km/h"},
        {"sigma: 0.8", "sigma: 1000", "1000", "delays.dwell[0].sigma", "at most 5"},
        {"scale: 30 s", "scale: 1e308 s", "1e308 s", "delays.running[0].scale", "at most 1440 min"},
        {"min_dwell: 30 s", "min_dwell: 1e308 s", "1e308 s", "train_types[0].min_dwell", "and 120 min"},
        {"shape: 2, scale", "shape: 0.01, scale", "0.01", "delays.running[0].shape", "between 0.1 and 100"},
    };
    for (const Case& c : cases) {
        INFO(c.to);
        expect_validate_refuses(changed(base, c.from, c.to), c.value, c.path, c.what, c.to);
    }
}

TEST_CASE("validate: a repeat every 1e-300 s is refused with its range", "[cli][checks]") {
    const std::string text = changed(fixture("edge_line.yaml"), "      direction: up\n",
                                     "      direction: up\n      repeat: {every: 1e-300 s, until: \"08:10\"}\n");
    expect_validate_refuses(text, "1e-300 s", "timetable.services[0].repeat.every", "between 1 min and 1440 min");
}

TEST_CASE("validate: a time of day of 47:00 is refused", "[cli][checks]") {
    const std::string text = changed(fixture("hand_check_line.yaml"), "dep: \"08:00\"", "dep: \"47:00\"");
    expect_validate_refuses(text, "\"47:00\"", "timetable.services[0].calls[0].dep",
                            "must be between 00:00 and 30:00 (README, input ranges), not 47:00");
}

TEST_CASE("validate: braking of 50 m/s2 is refused", "[cli][checks]") {
    const std::string text = changed(fixture("hand_check_line.yaml"), "deceleration: 0.5 m/s2", "deceleration: 50 m/s2");
    expect_validate_refuses(text, "50 m/s2", "train_types[0].braking.deceleration", "at most 3 m/s2");
}

TEST_CASE("validate: traction of 100 N is refused", "[cli][checks]") {
    const std::string text = changed(fixture("hand_check_line.yaml"), "max_force: 100 kN", "max_force: 100 N");
    expect_validate_refuses(text, "{max_force: 100 N", "train_types[0].traction", "cannot get going on level track");
}

TEST_CASE("validate: power of 2.2 kW is refused", "[cli][checks]") {
    expect_validate_refuses(fixture("power_in_kilowatts.yaml"), "{max_force: 210 kN", "train_types[0].traction",
                            "reaches only 3.56 km/h on level track");
}

TEST_CASE("validate: two signals at one place are refused", "[cli][checks]") {
    const std::string text =
        changed(fixture("hand_check_line.yaml"), "{id: U04, track: U, at: 7.8 km", "{id: U04, track: U, at: 4.5 km");
    expect_validate_refuses(text, "4.5 km", "infrastructure.signals[3].at", "where signal U03", "id: U04");
}

TEST_CASE("validate: a train longer than its loop is refused", "[cli][checks]") {
    const std::string text = fixture("train_longer_than_loop.yaml");
    expect_validate_refuses(text, "U2", "timetable.services[0].calls[3].track", "the train does not fit",
                            "{station: FRX, dep: \"06:20\"");
}

TEST_CASE("validate: a train longer than the line is refused", "[cli][checks]") {
    const std::string text =
        changed(changed(fixture("edge_line.yaml"), "length: 10 km", "length: 4 km"), "length: 100 m", "length: 4.5 km");
    expect_validate_refuses(text, "4.5 km", "train_types[0].length", "longer than the whole line (4 km)",
                            "length: 4.5 km");
}

TEST_CASE("validate: a train that stalls on a climb is refused at its service", "[cli][checks]") {
    // validate used to say ok here, and plan failed with status 1 and no location.
    expect_validate_refuses(fixture("stall_on_climb.yaml"), "id: G1", "timetable.services[0]",
                            "service G1 (train type FRT): stalls at km 5.936 on a 20 per mille climb");
}

TEST_CASE("validate: brakes that cannot hold a train on a fall are refused at its service", "[cli][checks]") {
    expect_validate_refuses(fixture("brakes_cannot_hold_fall.yaml"), "id: G1", "timetable.services[0]",
                            "cannot hold it on the 35 per mille fall from km 2.000 to km 8.000");
}

TEST_CASE("validate: a tight timetable is a warning, status 0", "[cli][checks]") {
    TempDir dir;
    const std::string text =
        changed(fixture("hand_check_line.yaml"), "{station: BEX}", "{station: BEX, arr: \"08:04\"}");
    const fs::path file = write(dir, "s.yaml", text);
    const Result r = knockon("validate " + q(file), dir, 60);
    INFO(r.err);
    CHECK(r.status == 0);
    CHECK(r.out.find(": ok: ") != std::string::npos);
    CHECK(r.out.find("1 warning (on stderr)") != std::string::npos);
    CHECK(r.err.find(file.string() + ":" + where(text, "{station: BEX, arr") +
                     ": timetable.services[0].calls[1]: warning: service A1 from ALD to BEX: the timetable allows "
                     "240.0 s, less than running time plus supplement (350.0 s") != std::string::npos);
}

TEST_CASE("validate: the demo and its variants pass without warnings", "[cli][checks]") {
    TempDir dir;
    const Result r = knockon("validate " + q(kDemo), dir, 120);
    INFO(r.err);
    CHECK(r.status == 0);
    CHECK(r.err.empty());
    CHECK(r.out.find("ok (base and 2 variants)") != std::string::npos);
}

TEST_CASE("plan: a tight timetable is warned of first; the report shows it at its top", "[cli][checks]") {
    TempDir dir;
    const fs::path file = write(dir, "s.yaml",
                                changed(fixture("hand_check_line.yaml"), "{station: BEX}", "{station: BEX, arr: \"08:04\"}"));
    const Result r = knockon("plan " + q(file), dir, 60);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const auto warning = r.out.find("WARNING: on 1 stretch(es) the timetable allows less than running time plus supplement");
    CHECK(warning != std::string::npos);
    CHECK(warning < r.out.find("\nTrains\n"));
    CHECK(r.out.find("  A1    ALD  BEX        240.0       350.0       350.0   110.0") != std::string::npos);

    const fs::path html = dir.path / "plan.html";
    const Result rep = knockon("report " + q(file) + " -o " + q(html), dir, 60);
    INFO(rep.err);
    REQUIRE(rep.status == 0);
    const std::string page = read_text(html);
    const auto box = page.find("<div class=\"warnings\"");
    CHECK(box != std::string::npos);
    CHECK(box < page.find("<table class=\"facts\">"));
    CHECK(page.find("service A1 from ALD to BEX: the timetable allows 240.0 s") != std::string::npos);
}

TEST_CASE("plan and simulate: a train that cannot run is exit 2, located, nothing written", "[cli][checks]") {
    TempDir dir;
    const std::string file = fixture_path("stall_on_climb.yaml");
    const fs::path csv = dir.path / "tables";
    const Result p = knockon("plan " + q(file) + " --csv " + q(csv), dir, 60);
    CHECK(p.status == 2);
    CHECK(p.err.find(file + ":" + where(fixture("stall_on_climb.yaml"), "id: G1") +
                     ": timetable.services[0]: service G1 (train type FRT): stalls at km 5.936") != std::string::npos);
    CHECK_FALSE(fs::exists(csv));
    const fs::path h5 = dir.path / "day.h5";
    const Result s = knockon("simulate " + q(file) + " --out " + q(h5), dir, 60);
    CHECK(s.status == 2);
    CHECK(s.err.find("stalls at km 5.936") != std::string::npos);
    CHECK_FALSE(fs::exists(h5));
}

TEST_CASE("options: --step and --sample below their minimum are refused before any work", "[cli][checks]") {
    TempDir dir;
    const Result p = knockon("plan " + q(kDemo) + " --step 0.001", dir, 30);
    CHECK(p.status == 2);
    CHECK(p.err.find("--step must be between 0.5 and 50 metres, not 0.001") != std::string::npos);
    const Result s = knockon("simulate " + q(kDemo) + " --sample 0.001 --out " + q(dir.path / "d.h5"), dir, 30);
    CHECK(s.status == 2);
    CHECK(s.err.find("--sample must be 0 (no trajectories) or between 0.5 and 86400 seconds") != std::string::npos);
    CHECK_FALSE(fs::exists(dir.path / "d.h5"));
    const Result d = knockon("simulate " + q(kDemo) + " --delay SU-0600:entry:1e300", dir, 30);
    CHECK(d.status == 2);
    CHECK(d.err.find("minutes must be at most 1440") != std::string::npos);
}

TEST_CASE("options: punctuality thresholds that would share a results field are refused", "[cli][checks]") {
    // 2.00000001 and 2.00000002 minutes are 120.0000006 s and 120.0000012 s: both punctual_120s.
    TempDir dir;
    const Result r = knockon("simulate " + q(kDemo) + " --punctuality 2.00000001,2.00000002", dir, 30);
    CHECK(r.status == 2);
    CHECK(r.err.find("would both be stored as the field punctual_120s") != std::string::npos);
    CHECK(knockon("simulate " + q(kDemo) + " --punctuality 2,2.5", dir, 60).status == 0);
}

TEST_CASE("plan: a plan too large for memory is refused at once", "[cli][checks]") {
    // 1442 runs of 9 km at a step of 0.5 m: 2.6e7 points, allowed; a line 5 times as long with
    // trains every minute is not (1442 runs of 49 km: 1.41e8 points at 0.5 m): refused before
    // planning, in seconds.
    TempDir dir;
    std::string text = changed(fixture("edge_line.yaml"), "    - id: T2\n",
                               "    - id: T3\n      type: EMU10\n      category: stopping\n      direction: up\n"
                               "      repeat: {every: 1 min, until: \"29:59\"}\n      calls:\n"
                               "        - {station: A, dep: \"06:00\"}\n        - {station: C}\n    - id: T2\n");
    text = changed(text, "{id: C, name: Crag, at: 9.5 km}", "{id: C, name: Crag, at: 49.5 km}");
    for (const char* x : {"length: 10 km", "to: 10 km, directions", "{from: 0 km, to: 10 km, system"})
        text = changed(text, x, std::string(x).replace(std::string(x).find("10 km"), 5, "50 km"));
    const fs::path file = write(dir, "s.yaml", text);
    const auto t0 = std::chrono::steady_clock::now();
    const Result r = knockon("plan " + q(file) + " --step 0.5", dir, 60);
    const double took = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    INFO(r.err);
    CHECK(r.status == 2);
    CHECK(r.err.find(": the plan would integrate 1.41e+08 grid points (1442 train runs, 70658 train-km at a step of 0.5 m") != std::string::npos);
    CHECK(took < 20.0);
}

TEST_CASE("validate: a signal whose warning is short of the stopping distance is a warning at the signal", "[cli][checks]") {
    // tests/REFERENCES.md B6 with D11: the warning the signal in rear gives (1000 m) is shorter than
    // the stopping distance on the fall before the signal (2378.7 m); warned, status 0.
    TempDir dir;
    const fs::path file = fixture_path("signal_beyond_foot_of_fall.yaml");
    const Result r = knockon("validate " + q(file), dir, 60);
    INFO(r.err);
    CHECK(r.status == 0);
    CHECK(r.err.find(": infrastructure.signals[2]: warning: signal U03: its aspect system gives 1000.0 m of warning") !=
          std::string::npos);
    CHECK(r.err.find("2378.7 m") != std::string::npos);
}
