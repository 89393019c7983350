// A network file as the services plan and simulate run (models/network/runs, tools/read
// network_scenario): repeat patterns expanded, a reversing run split into one service per heading
// joined by a turnaround link, links between runs read and located, line sections along the
// corridors.  The example is tests/data/network/loop_line.yaml (R1 from Ashcombe to Tarnwick and
// back, every hour from 06:00 to 08:00, reversing at TRM with a 4 min minimum turnaround).
#include <catch2/catch.hpp>

#include <algorithm>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "models/plan.hpp"
#include "models/service_paths.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace knockon;

namespace {

const std::string kLoopLine = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/loop_line.yaml";
const std::string kJunction = std::string(KNOCKON_SOURCE_DIR) + "/scenarios/junction_branch.yaml";

const Service& service(const Scenario& sc, const std::string& id) {
    auto it = std::find_if(sc.timetable.services.begin(), sc.timetable.services.end(),
                           [&](const Service& s) { return s.id == id; });
    REQUIRE(it != sc.timetable.services.end());
    return *it;
}

std::vector<std::string> problems_of(const std::string& text) {
    try {
        parse_scenario(text, "n.yaml");
    } catch (const ScenarioError& e) {
        return e.messages;
    }
    return {};
}

std::string with_links(const std::string& links) {
    std::string text = clitest::read_text(kLoopLine);
    const std::string anchor = "\ndelays:";
    const auto at = text.find(anchor);
    REQUIRE(at != std::string::npos);
    return text.insert(at, "\n  links:\n" + links);
}

}  // namespace

TEST_CASE("network runs: a repeat pattern gives a run per hour and a reversal splits each in two") {
    const Scenario sc = read_scenario(kLoopLine);
    REQUIRE(sc.network);
    std::vector<std::string> ids;
    for (const Service& s : sc.timetable.services) ids.push_back(s.id);
    CHECK(ids == std::vector<std::string>{"R1-0600", "R1-0600.2", "R1-0700", "R1-0700.2", "R1-0800", "R1-0800.2",
                                          "F1"});
    CHECK(sc.network->runs.size() == ids.size());

    const Service& out = service(sc, "R1-0700");
    const Service& back = service(sc, "R1-0700.2");
    // Out to the terminus: ends at TRM, no departure there; back: starts at TRM at the reversal's
    // dep shifted by the hour, no arrival.
    REQUIRE(out.calls.size() == 3);
    CHECK(out.calls.back().station == "TRM");
    CHECK_FALSE(out.calls.back().departure);
    REQUIRE(back.calls.size() == 3);
    CHECK(back.calls.front().station == "TRM");
    CHECK(back.calls.front().departure == Approx(7 * 3600 + 30 * 60));
    CHECK_FALSE(back.calls.front().arrival);
    CHECK(back.calls.back().station == "ASH");
    CHECK(out.direction != back.direction);
    CHECK_FALSE(out.continues);
    CHECK(back.continues);
    // Draws: the pattern's name and run, the part after the reversal keyed apart.
    CHECK(out.draw.name == "R1");
    CHECK(back.draw.name == "R1.2");
    CHECK(out.draw.occurrence == 1u);
    CHECK(back.draw.occurrence == 1u);
    // Messages about the part after the reversal point at the calls as written.
    CHECK(back.first_call == 2);
    CHECK(sc.where(back, 1).find("timetable.services[0].calls[3]") != std::string::npos);
    CHECK(sc.where(out, 1).find("timetable.services[0].calls[1]") != std::string::npos);

    // Each reversal is a turnaround of min_turnaround from the part arriving to the part leaving.
    REQUIRE(sc.timetable.links.size() == 3);
    for (const ServiceLink& l : sc.timetable.links) {
        CHECK(l.kind == LinkKind::turnaround);
        CHECK(l.to == l.from + ".2");
        CHECK(l.min_time == Approx(240.0));
    }
}

TEST_CASE("network runs: the plan keeps each turnaround on its platform and reports its buffer") {
    const Scenario sc = read_scenario(kLoopLine);
    const PlanResult plan = make_plan(sc);
    REQUIRE(plan.links.size() == 3);
    for (const LinkPlan& l : plan.links) {
        const TrainPlan& in = plan.trains[l.from];
        const TrainPlan& out = plan.trains[l.to];
        CHECK(in.run.calls[l.from_call].station == "TRM");
        CHECK(out.run.calls[l.to_call].station == "TRM");
        // Both parts use platform T1 (the call's track), the later one running back from it.
        CHECK(in.run.path.pieces.back().track == "T1");
        CHECK(out.run.path.pieces.front().track == "T1");
        // buffer = departure - (arrival + minimum), by the definition of a link buffer.
        CHECK(l.buffer() == Approx(l.departure - l.arrival - 240.0));
    }
}

TEST_CASE("network runs: links between runs are read and each mistake located") {
    // A connection at Cobbler's Hey from the fast train to the next run back.
    const std::string ok = "    - {from: F1, feeds: R1-0700.2, at: TRM, transfer: 2 min, max_wait: 3 min}\n";
    const Scenario sc = parse_scenario(with_links(ok), "n.yaml");
    REQUIRE(sc.timetable.links.size() == 4);
    CHECK(sc.timetable.links.back().kind == LinkKind::connection);
    CHECK(sc.where_link(3).find("n.yaml:") == 0);

    auto one = [](const std::vector<std::string>& p) { return p.size() == 1 ? p.front() : std::string("(several)"); };
    CHECK(one(problems_of(with_links("    - {from: F1, feeds: R1-0630.2, at: TRM, transfer: 2 min, max_wait: 3 min}\n")))
              .find("timetable.links[0].feeds: unknown service \"R1-0630.2\"") != std::string::npos);
    CHECK(one(problems_of(with_links("    - {from: F1, feeds: R1-0700.2, at: XXX, transfer: 2 min, max_wait: 3 min}\n")))
              .find("timetable.links[0].at: no station has the id \"XXX\"") != std::string::npos);
    // The set of R1-0700 already forms R1-0700.2 at its reversal (R1-0800.2 leaves from its platform).
    CHECK(problems_of(with_links("    - {from: R1-0700, forms: R1-0800.2, turnaround: 5 min}\n"))
              .front().find("already the earlier service of a turnaround (the reversal of its service)") != std::string::npos);
}

TEST_CASE("network runs: line sections run along the corridors, both ways") {
    const Scenario sc = read_scenario(kJunction);
    const auto paths = service_paths(sc);
    std::vector<std::string> names;
    for (const LineSection& ls : paths->line_sections())
        names.push_back(ls.corridor + ":" + ls.name() + (ls.direction == Direction::up ? "+" : "-"));
    CHECK(names == std::vector<std::string>{"Main:WRF-OLV+", "Main:OLV-EMR+", "Main:EMR-OLV-", "Main:OLV-WRF-",
                                           "Branch:OLV-PLC+", "Branch:PLC-HTB+", "Branch:HTB-QSB+",
                                           "Branch:QSB-HTB-", "Branch:HTB-PLC-", "Branch:PLC-OLV-"});
    // The up trains on the main line follow each other every 30 min: consecutive pairs in WRF-OLV
    // have that scheduled headway (the timetable's clock-face interval).
    const PlanResult plan = make_plan(sc);
    std::size_t pairs = 0;
    for (const HeadwayPair& h : plan.headways) {
        if (h.line_section != "WRF-OLV") continue;
        ++pairs;
        CHECK(h.scheduled_headway == Approx(1800.0));
        CHECK(h.buffer > 0.0);
    }
    CHECK(pairs == 29);   // 30 runs of UP, from 06:01 to 20:31 (until 21:00)
}

TEST_CASE("network runs: corridors that share a stretch share its line section, listed once") {
    // Main and branch trains run together from AAV to FRK, so both corridors (AAV-GLN and AAV-HLT)
    // hold AAV-FRK and FRK-AAV; the stretch is one line section with all their trains, and its
    // headways and UIC 406 figures appear once.
    const Scenario sc = read_scenario(std::string(KNOCKON_SOURCE_DIR) + "/tests/data/network/shared_corridors.yaml");
    const auto paths = service_paths(sc);
    std::vector<std::string> names;
    for (const LineSection& ls : paths->line_sections()) names.push_back(ls.name());
    CHECK(names == std::vector<std::string>{"AAV-FRK", "FRK-GLN", "GLN-FRK", "FRK-AAV", "FRK-HLT", "HLT-FRK"});
    const PlanResult plan = make_plan(sc);
    std::size_t shared_up = 0;
    for (std::size_t i = 0; i < plan.headways.size(); ++i) {
        const HeadwayPair& h = plan.headways[i];
        for (std::size_t j = 0; j < i; ++j)
            CHECK_FALSE((plan.headways[j].line_section == h.line_section && plan.headways[j].leader == h.leader &&
                         plan.headways[j].follower == h.follower));
        if (h.line_section == "AAV-FRK") ++shared_up;
    }
    // 9 main and 9 branch trains up between 06:00 and 09:00 (every 20 min each), all consecutive
    // pairs of the one line section.
    CHECK(shared_up == 17);
    std::size_t day_figures = 0;
    for (const CapacityFigure& f : plan.capacity)
        if (f.line_section == "AAV-FRK" && f.window == "day") {
            ++day_figures;
            CHECK(f.trains == 18);
        }
    CHECK(day_figures == 1);
}
