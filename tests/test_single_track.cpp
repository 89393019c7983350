// Single-track stretches and crossing places found from the infrastructure; crossings, their
// buffers and the capacity of both directions together checked by hand from blocking times
// (blocking time theory; UIC Code 406 compression); the conflicts a crossing that cannot work
// gives; plan text, JSON and CSV and the report end to end.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

#include "cli_support.hpp"
#include "models/plan.hpp"
#include "models/single_track_plan.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;
namespace fs = std::filesystem;

namespace {

// A 10 km single line with one loop (S2, 4.5-5.5 km) at M: UP1 waits in the loop for DN1.
const std::string kLoopLine = clitest::kSource + "/tests/data/single_track.yaml";
// An invented 30 km single line, loops at HTW (L1) and BRC (L2), hourly trains both ways.
const std::string kTwoLoops = clitest::kSource + "/tests/data/plan/single_line_crossings.yaml";

std::size_t train_index(const PlanResult& plan, const std::string& id) {
    for (std::size_t i = 0; i < plan.trains.size(); ++i)
        if (plan.trains[i].run.service->id == id) return i;
    FAIL("no train " << id);
    return 0;
}

// A train's blocking of the main track S between two chainages, read straight off its section
// blockings (not through the stretch's section list): first start and last end.
struct Span {
    double start = INFINITY, end = -INFINITY;
};
Span blocking_between(const TrainPlan& tp, double lo, double hi) {
    Span s;
    for (const SectionBlocking& b : tp.stairway.sections)
        if (b.section.rfind("S:", 0) == 0 && b.x_lo >= lo - 1e-6 && b.x_hi <= hi + 1e-6) {
            s.start = std::min(s.start, b.start);
            s.end = std::max(s.end, b.end);
        }
    return s;
}

// The longest blocking time of any one section of S between two chainages: the minimum headway
// of a train behind an identical one over that stretch (blocking time theory: the critical section).
double longest_section_blocking(const TrainPlan& tp, double lo, double hi) {
    double h = 0.0;
    for (const SectionBlocking& b : tp.stairway.sections)
        if (b.section.rfind("S:", 0) == 0 && b.x_lo >= lo - 1e-6 && b.x_hi <= hi + 1e-6) h = std::max(h, b.end - b.start);
    return h;
}

std::string replaced(std::string text, const std::string& from, const std::string& to) {
    const auto at = text.find(from);
    REQUIRE(at != std::string::npos);
    return text.replace(at, from.size(), to);
}

}  // namespace

TEST_CASE("Single-track stretches lie between the loops and the line ends", "[single_track]") {
    const Scenario sc = read_scenario(kLoopLine);
    const SingleTrackLayout l = single_track_layout(sc.infrastructure);
    REQUIRE(l.places.size() == 3);
    REQUIRE(l.stretches.size() == 2);
    CHECK(l.places[0].kind == CrossingPlaceKind::line_end);
    CHECK(l.places[1].kind == CrossingPlaceKind::loop);
    CHECK(l.places[1].name == "M");
    CHECK(l.places[2].kind == CrossingPlaceKind::line_end);
    CHECK(l.stretches[0].name == "W-M");
    CHECK(l.stretches[1].name == "M-E");
    CHECK(l.stretches[0].x_lo == 0.0);
    CHECK(l.stretches[0].x_hi == 4500.0);
    CHECK(l.stretches[1].x_lo == 5500.0);
    CHECK(l.stretches[1].x_hi == 10000.0);
    // The loop place offers its main track and the loop; each train stands before the starter
    // facing it: up starters at 5.3 km, down at 4.7 km (fixture), so 800 m either way (by hand).
    const CrossingPlace& m = l.places[1];
    REQUIRE(m.tracks.size() == 2);
    CHECK(m.tracks[0].track == "S");
    CHECK(m.tracks[1].track == "S2");
    CHECK(m.tracks[1].loop);
    CHECK(m.tracks[1].usable(Direction::up) == Approx(800.0));
    CHECK(m.tracks[1].usable(Direction::down) == Approx(800.0));
    // Sections of a stretch lie in it and on the main track; none inside the loop place.
    for (const SingleTrackStretch& st : l.stretches)
        for (const std::string& id : st.sections) {
            INFO(st.name << " " << id);
            CHECK(id.rfind("S:", 0) == 0);
            CHECK(l.stretch_of_section(id) == &st);
        }
    CHECK(l.stretch_of_section("S:4.500-4.700") == nullptr);
}

TEST_CASE("A double-track line has no single-track stretch", "[single_track]") {
    Infrastructure in;
    in.length = 5000.0;
    in.tracks = {{"U", 0.0, 5000.0, true, false}, {"D", 0.0, 5000.0, false, true}};
    CHECK(single_track_layout(in).empty());
}

TEST_CASE("Crossing buffer = the waiting train's blocking start minus the opposing train's release",
          "[single_track][plan]") {
    // Blocking time theory: the stretch M-E (5.5-10 km) may hold one direction at a time, so UP1,
    // waiting in the loop at M, may block it only after DN1 has released its last section there.
    const Scenario sc = read_scenario(kLoopLine);
    const PlanResult plan = make_plan(sc);
    const std::size_t up = train_index(plan, "UP1"), dn = train_index(plan, "DN1");
    REQUIRE(plan.crossings.size() == 1);
    const Crossing& c = plan.crossings.front();
    CHECK(plan.single_track.places[c.place].name == "M");
    CHECK(plan.single_track.stretches[c.stretch].name == "M-E");
    CHECK(c.waiting == up);
    CHECK(c.opposing == dn);
    CHECK(c.waiting_track == "S2");
    CHECK(c.waiting_stops);
    CHECK(c.proper);
    CHECK(plan.single_track.stretches[c.other_stretch].name == "W-M");
    const Span up_me = blocking_between(plan.trains[up], 5500.0, 10000.0);
    const Span dn_me = blocking_between(plan.trains[dn], 5500.0, 10000.0);
    CHECK(c.buffer == Approx(up_me.start - dn_me.end).margin(1e-9));
    // The other stretch: DN1 enters W-M after UP1 has released it.
    const Span up_wm = blocking_between(plan.trains[up], 0.0, 4500.0);
    const Span dn_wm = blocking_between(plan.trains[dn], 0.0, 4500.0);
    CHECK(c.other_buffer == Approx(dn_wm.start - up_wm.end).margin(1e-9));
    // UP1 leaves at 08:07 once DN1 has cleared the stretch (fixture's hand-check notes): a
    // positive buffer of less than the three minutes between DN1's pass at M and UP1's departure.
    CHECK(c.buffer > 0.0);
    CHECK(c.buffer < 180.0);
    CHECK(plan.conflicts.empty());
}

TEST_CASE("Capacity of a single-track stretch counts both directions together", "[single_track][capacity]") {
    // UIC Code 406 compression of the cycle UP1, DN1 on one stretch: an opposing train may block
    // the stretch only once the other has released all of it (blocking time theory), so the
    // compressed occupation of this two-train cycle is the sum of both trains' blocking spans of
    // the stretch, and the consumption that sum over the window (n.h/window with n = 1 per
    // direction).
    const Scenario sc = read_scenario(kLoopLine);
    const PlanResult plan = make_plan(sc);
    const Span up = blocking_between(plan.trains[train_index(plan, "UP1")], 5500.0, 10000.0);
    const Span dn = blocking_between(plan.trains[train_index(plan, "DN1")], 5500.0, 10000.0);
    const auto it = std::find_if(plan.stretch_capacity.begin(), plan.stretch_capacity.end(), [&](const auto& f) {
        return plan.single_track.stretches[f.stretch].name == "M-E" && f.window == "peak hour";
    });
    REQUIRE(it != plan.stretch_capacity.end());
    CHECK(it->trains_up == 1);
    CHECK(it->trains_down == 1);
    CHECK(it->to - it->from == 3600.0);
    CHECK(it->occupation == Approx((up.end - up.start) + (dn.end - dn.start)).epsilon(1e-9));
    CHECK(it->consumption == Approx(it->occupation / 3600.0).epsilon(1e-12));
    // Each direction alone: one train behind its own repeat, at the minimum headway of its
    // critical section (n.h/window with n = 1).
    const double h_up = longest_section_blocking(plan.trains[train_index(plan, "UP1")], 5500.0, 10000.0);
    const double h_dn = longest_section_blocking(plan.trains[train_index(plan, "DN1")], 5500.0, 10000.0);
    CHECK(it->consumption_up == Approx(h_up / 3600.0).epsilon(1e-9));
    CHECK(it->consumption_down == Approx(h_dn / 3600.0).epsilon(1e-9));
    CHECK(it->consumption > it->consumption_up + it->consumption_down - 1e-12);
    CHECK(it->limit == Approx(uic406_limit(LineType::suburban).peak));
}

TEST_CASE("Capacity of a repeating single-line pattern: n times one cycle over the window",
          "[single_track][capacity]") {
    // UIC Code 406 compression of a cyclic pattern through the one compression routine
    // (models/capacity): on the two-loop line's stretch BRC-TRB the hourly pattern of one down
    // and one up stopping train occupies the sum of their blocking spans there (blocking time
    // theory: neither may enter the stretch before the other has released all of it).
    const Scenario sc = read_scenario(kTwoLoops);
    const PlanResult plan = make_plan(sc);
    const Span pu = blocking_between(plan.trains[train_index(plan, "PU-0600")], 20400.0, 30000.0);
    const Span pd = blocking_between(plan.trains[train_index(plan, "PD-0609")], 20400.0, 30000.0);
    std::vector<SectionStairway> cycle;
    const SingleTrackLayout& l = plan.single_track;
    const auto st = std::find_if(l.stretches.begin(), l.stretches.end(), [](auto& s) { return s.name == "BRC-TRB"; });
    REQUIRE(st != l.stretches.end());
    for (const char* id : {"PD-0609", "PU-0600"}) {
        const std::size_t t = train_index(plan, id);
        SectionStairway sw{t, blocking_between(plan.trains[t], st->x_lo, st->x_hi).start, {}};
        for (const SectionBlocking& b : plan.trains[t].stairway.sections)
            if (st->has_section(b.section)) sw.sections.push_back(b);
        cycle.push_back(sw);
    }
    CHECK(compressed_occupation(cycle) == Approx((pu.end - pu.start) + (pd.end - pd.start)).epsilon(1e-9));
}

TEST_CASE("Crossing table of the two-loop line: who waits where", "[single_track][plan]") {
    // The reproducer's own comments: PD waits in loop L2 at Brindlecote for PU; GU waits in loop
    // L1 at Hethwick for PD; GD waits in L1 at Hethwick for PU.
    const Scenario sc = read_scenario(kTwoLoops);
    const PlanResult plan = make_plan(sc);
    // The pair may also follow each other over a stretch at the other loop: the crossing proper.
    auto find = [&](const std::string& waiting, const std::string& opposing) -> const Crossing* {
        for (const Crossing& c : plan.crossings)
            if (c.proper && plan.trains[c.waiting].run.service->id == waiting &&
                plan.trains[c.opposing].run.service->id == opposing)
                return &c;
        return nullptr;
    };
    const Crossing* a = find("PD-0609", "PU-0600");
    REQUIRE(a);
    CHECK(plan.single_track.places[a->place].name == "BRC");
    CHECK(a->waiting_track == "L2");
    CHECK(a->proper);
    const Crossing* b = find("GU-0814", "PD-0809");
    REQUIRE(b);
    CHECK(plan.single_track.places[b->place].name == "HTW");
    CHECK(b->waiting_track == "L1");
    const Crossing* c = find("GD-0946", "PU-1000");
    REQUIRE(c);
    CHECK(plan.single_track.places[c->place].name == "HTW");
    CHECK(c->waiting_track == "L1");
    for (const Crossing& x : plan.crossings) CHECK(x.buffer > 0.0);
    CHECK(plan.crossings_too_short.empty());
}

TEST_CASE("Two opposing trains scheduled onto one stretch are an opposing conflict on it", "[single_track][conflict]") {
    // UP1 booked out of the loop at 08:03, while DN1 (from E at 08:02) is still on M-E.
    const std::string text = replaced(clitest::read_text(kLoopLine), R"({station: M, dep: "08:07", track: S2})",
                                      R"({station: M, dep: "08:03", track: S2})");
    const Scenario sc = parse_scenario(text, "early_crossing.yaml");
    const PlanResult plan = make_plan(sc);
    REQUIRE(!plan.conflicts.empty());
    bool opposing = false;
    for (const Conflict& c : plan.conflicts)
        if (conflict_kind(c) == "opposing trains on single-track stretch M-E") opposing = true;
    CHECK(opposing);
    bool negative = false;
    for (const Crossing& c : plan.crossings) negative = negative || c.buffer < 0.0;
    CHECK(negative);
}

TEST_CASE("A train too long for the crossing place it stands at is a conflict", "[single_track][conflict]") {
    // The loop shortened to 4.6-5.5 km and the trains made 450 m long; UP1 now stands on the main
    // track at M (head at 5.0 km, tail at 4.55 km: beyond the turnout at 4.6 km) while DN1 runs
    // through the loop.  Standing in the loop it would be refused by the input checks instead.
    std::string text = clitest::read_text(kLoopLine);
    text = replaced(text, "{id: S2, parent: S, from: 4.5 km", "{id: S2, parent: S, from: 4.6 km");
    text = replaced(text, "length: 100 m", "length: 450 m");
    text = replaced(text, R"({station: M, dep: "08:07", track: S2})", R"({station: M, dep: "08:07"})");
    text = replaced(text, "{station: M, pass: auto}", "{station: M, pass: auto, track: S2}");
    const Scenario sc = parse_scenario(text, "long_trains.yaml");
    const PlanResult plan = make_plan(sc);
    REQUIRE(plan.crossings_too_short.size() == 1);
    const CrossingTooShort& c = plan.crossings_too_short.front();
    CHECK(plan.trains[c.train].run.service->id == "UP1");
    CHECK(c.track == "S");
    CHECK(c.head == Approx(5000.0));
    CHECK(c.tail == Approx(4550.0));
    CHECK(c.lo == Approx(4600.0));
    // The same train in the loop instead is refused before planning, naming the loop.
    const std::string in_loop = replaced(text, R"({station: M, dep: "08:07"})", R"({station: M, dep: "08:07", track: S2})");
    try {
        parse_scenario(in_loop, "long_in_loop.yaml");
        FAIL("a train longer than its loop was accepted");
    } catch (const std::exception& e) {
        CHECK(std::string(e.what()).find("the train does not fit") != std::string::npos);
    }
}

TEST_CASE("knockon plan shows crossings and single-track capacity in text JSON and CSV", "[cli][single_track]") {
    using namespace clitest;
    TempDir dir;
    const Result text = clitest::knockon("plan " + q(kTwoLoops), dir);
    INFO(text.err);
    REQUIRE(text.status == 0);
    CHECK(text.out.find("Crossings at BRC (tracks S, L2)") != std::string::npos);
    CHECK(text.out.find("Crossings at HTW (tracks S, L1)") != std::string::npos);
    CHECK(text.out.find("Capacity consumption of single-track stretches, both directions together") !=
          std::string::npos);
    CHECK(text.out.find("crossing at BRC") != std::string::npos);   // among the thinnest buffers

    const Result js = clitest::knockon("plan " + q(kTwoLoops) + " --json --csv " + q(dir.path / "csv"), dir);
    INFO(js.err);
    REQUIRE(js.status == 0);
    const nlohmann::json doc = nlohmann::json::parse(js.out);
    REQUIRE(doc["single_track_stretches"].size() == 3);
    bool found = false;
    for (const auto& c : doc["crossings"])
        if (c["waiting"] == "PD-0609" && c["opposing"] == "PU-0600" && c["meeting"] == "crossing") {
            found = true;
            CHECK(c["place"] == "BRC");
            CHECK(c["meeting"] == "crossing");
            CHECK(c["waiting_track"] == "L2");
            CHECK(c["buffer_s"].get<double>() ==
                  Approx(c["blocks"].get<double>() - c["released"].get<double>()).margin(1e-6));
        }
    CHECK(found);
    for (const auto& f : doc["single_track_capacity"]) {
        const double window = f["to"].get<double>() - f["from"].get<double>();
        CHECK(f["consumption"].get<double>() == Approx(f["occupation_s"].get<double>() / window).epsilon(1e-9));
        // Both directions together never take less than either alone.
        CHECK(f["consumption"].get<double>() >= f["consumption_up"].get<double>() - 1e-12);
        CHECK(f["consumption"].get<double>() >= f["consumption_down"].get<double>() - 1e-12);
    }
    const std::string csv = read_text(dir.path / "csv" / "crossings.csv");
    CHECK(csv.rfind("place,place_kind,meeting,stretch,opposing,released,waiting", 0) == 0);
    CHECK(std::count(csv.begin(), csv.end(), '\n') == static_cast<long>(doc["crossings"].size()) + 1);
    CHECK(fs::exists(dir.path / "csv" / "single_track_capacity.csv"));
}

TEST_CASE("knockon report of a single line holds the crossing table and draws loops", "[cli][report][single_track]") {
    using namespace clitest;
    TempDir dir;
    const fs::path html = dir.path / "single.html";
    const Result r = clitest::knockon("report " + q(kTwoLoops) + " --from 06:00 --to 07:00 -o " + q(html), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    CHECK(page.find("<section id=\"crossings\"") != std::string::npos);
    CHECK(page.find("<caption>Crossings at BRC (tracks S, L2)</caption>") != std::string::npos);
    CHECK(page.find("Capacity consumption of single-track stretches, both directions together") != std::string::npos);
    CHECK(page.find("class=\"loop-band\"") != std::string::npos);
    CHECK(page.find("class=\"loop-path\"") != std::string::npos);   // PD-0609 in loop L2 in this hour
}

TEST_CASE("The bundled single line plans without conflicts and the README shows its figures", "[cli][single_track]") {
    using namespace clitest;
    TempDir dir;
    const std::string scenario = kSource + "/scenarios/single_line.yaml";
    const Result v = clitest::knockon("validate " + q(scenario), dir);
    INFO(v.err);
    CHECK(v.status == 0);
    const Result r = clitest::knockon("plan " + q(scenario), dir);
    REQUIRE(r.status == 0);
    CHECK(r.out.find("Conflicts: 0 overlapping blocking times") != std::string::npos);
    // Every line of the README's single-line excerpt is printed by the program as it stands.
    const std::string readme = read_text(kSource + "/README.md");
    const auto from = readme.find("Capacity consumption of single-track stretches, both directions together");
    REQUIRE(from != std::string::npos);
    const std::string block = readme.substr(from, readme.find("```", from) - from);
    std::istringstream lines(block);
    std::string line;
    int checked = 0;
    while (std::getline(lines, line)) {
        if (line.empty()) continue;
        INFO(line);
        CHECK(r.out.find(line) != std::string::npos);
        ++checked;
    }
    CHECK(checked == 8);
}

TEST_CASE("The bundled single line on the day: the README's dispatcher figures are the program's", "[cli][single_track][dispatch]") {
    using namespace clitest;
    TempDir dir;
    const std::string scenario = kSource + "/scenarios/single_line.yaml";
    const std::string readme = read_text(kSource + "/README.md");
    // The moved crossing of the README's example day, line for line.
    const Result day = clitest::knockon("simulate " + q(scenario) + " --delay PU-0700:entry:20", dir);
    INFO(day.err);
    REQUIRE(day.status == 0);
    const std::string moved = "  07:35:59  crossing moved: PU-0700 / PD-0709, planned at DWH, ran at HRM;";
    CHECK(day.out.find(moved) != std::string::npos);
    CHECK(readme.find(moved) != std::string::npos);
    // The 200-day figures the README quotes, under both orders.
    for (const auto& [order, figure] : {std::pair<std::string, std::string>{"dispatch", "23.33 ± 2.70"},
                                        {"timetable", "73.07 ± 17.01"}}) {
        const Result s = clitest::knockon("simulate " + q(scenario) + " --replications 200 --threads 2 --order " + order, dir);
        INFO(order << ": " << s.err);
        REQUIRE(s.status == 0);
        CHECK(s.out.find("knock-on delay           " + figure + " min") != std::string::npos);
        CHECK(readme.find(figure) != std::string::npos);
    }
}
