// End-to-end runs of plan, simulate, a study, compare, report and plot on the network demo
// (scenarios/junction_branch.yaml): every output names the layout and shows it along its
// corridors.  Small replication counts keep them quick.
#include <catch2/catch.hpp>

#include <string>

#include "results_test_support.hpp"

using namespace resultstest;

namespace {

const std::string kJunction = kSource + "/scenarios/junction_branch.yaml";

// The two corridor diagrams of a report page and their trains.
void check_corridor_diagrams(const std::string& page) {
    CHECK(page.find("Time-distance diagram, corridor Main (WRF-OLV-EMR)") != std::string::npos);
    CHECK(page.find("Time-distance diagram, corridor Branch (OLV-PLC-HTB-QSB)") != std::string::npos);
    CHECK(count_class(page, "station-line") == 3 + 4);
    CHECK(count_class(page, "train-path") > 0);
    CHECK(page.find("distance along Branch [km]") != std::string::npos);
    CHECK(page.find("Line 0.0 km") == std::string::npos);
    check_self_contained(page);
}

}  // namespace

TEST_CASE("knockon plan of a network names its segments and corridors in text JSON and CSV", "[cli][network]") {
    TempDir dir;
    const Result text = run_knockon("plan " + q(kJunction), dir);
    INFO(text.err);
    REQUIRE(text.status == 0);
    CHECK(text.out.find("Network of 17 segments, 6 stations, 32 signals; corridors Main (WRF OLV EMR), Branch "
                        "(OLV PLC HTB QSB); 2 train types, 91 trains.") != std::string::npos);
    CHECK(text.out.find("Line 0.0 km") == std::string::npos);
    CHECK(text.out.find("Corridors (distance along the trains' paths") != std::string::npos);

    const Result json = run_knockon("plan " + q(kJunction) + " --json", dir);
    REQUIRE(json.status == 0);
    CHECK(json.out.find("\"layout\": \"network\"") != std::string::npos);
    CHECK(json.out.find("\"segments\": 17") != std::string::npos);
    CHECK(json.out.find("\"line_length_m\"") == std::string::npos);
    CHECK(json.out.find("\"corridors\"") != std::string::npos);

    const Result csv = run_knockon("plan " + q(kJunction) + " --csv " + q(dir.path / "tables"), dir);
    REQUIRE(csv.status == 0);
    const std::string corridors = read_text(dir.path / "tables" / "corridors.csv");
    // A header and one row per station of each corridor, at its distance (by hand: see
    // test_network_views.cpp).
    CHECK(corridors.rfind("corridor,station,name,distance_m,trains\n", 0) == 0);
    CHECK(corridors.find("Main,OLV,Orlen Vale,2300") != std::string::npos);
    CHECK(corridors.find("Branch,QSB,Quenby Sands,14450") != std::string::npos);
    CHECK(std::count(corridors.begin(), corridors.end(), '\n') == 1 + 3 + 4);
    // A line keeps its head line and writes no corridors table.
    const Result line = run_knockon("plan " + q(kTwoTrains) + " --csv " + q(dir.path / "line"), dir);
    REQUIRE(line.status == 0);
    CHECK(line.out.find("\nLine 10.0 km, ") != std::string::npos);
    CHECK(!fs::exists(dir.path / "line" / "corridors.csv"));
}

TEST_CASE("knockon report of a network's plan draws a diagram per corridor", "[cli][network][report]") {
    TempDir dir;
    const fs::path html = dir.path / "plan.html";
    const Result r = run_knockon("report " + q(kJunction) + " -o " + q(html), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    check_corridor_diagrams(page);
    CHECK(page.find("a network, reported along its corridors") != std::string::npos);
}

TEST_CASE("knockon report of a network's day and study draws the day as run along the corridors",
          "[cli][network][report]") {
    TempDir dir;
    const fs::path day = dir.path / "day.h5", study = dir.path / "study.h5";
    Result r = run_knockon("simulate " + q(kJunction) + " --seed 3 --out " + q(day), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    r = run_knockon("report " + q(day) + " -o " + q(dir.path / "day.html"), dir);
    REQUIRE(r.status == 0);
    std::string page = read_text(dir.path / "day.html");
    check_corridor_diagrams(page);
    CHECK(count_class(page, "asrun-path") > 0);

    r = run_knockon("simulate " + q(kJunction) + " --replications 4 --traces sample:2 --out " + q(study), dir);
    REQUIRE(r.status == 0);
    r = run_knockon("report " + q(study) + " -o " + q(dir.path / "study.html"), dir);
    REQUIRE(r.status == 0);
    page = read_text(dir.path / "study.html");
    check_corridor_diagrams(page);
    CHECK(count_class(page, "asrun-path") > 0);
    // Punctuality by station names the network's stations.
    CHECK(page.find("Quenby Sands") != std::string::npos);

    // plot: one corridor at a time; an unknown one is refused, naming those there are.
    r = run_knockon("plot " + q(study) + " --chart time-distance --corridor Branch --svg " + q(dir.path / "b.svg"), dir);
    REQUIRE(r.status == 0);
    const std::string svg = read_text(dir.path / "b.svg");
    CHECK(svg.find("corridor Branch") != std::string::npos);
    CHECK(count_class(svg, "station-line") == 4);
    r = run_knockon("plot " + q(kJunction) + " --chart time-distance --corridor Coast --svg " + q(dir.path / "c.svg"), dir);
    CHECK(r.status == 2);
    CHECK(r.err.find("no corridor 'Coast'; the network has Main, Branch") != std::string::npos);
    CHECK(!fs::exists(dir.path / "c.svg"));
    r = run_knockon("plot " + q(kTwoTrains) + " --chart time-distance --corridor Main --svg " + q(dir.path / "d.svg"), dir);
    CHECK(r.status == 2);
    CHECK(r.err.find("--corridor is for a network scenario") != std::string::npos);
}

TEST_CASE("knockon report of a network comparison of its variants", "[cli][network][report]") {
    TempDir dir;
    const fs::path cmp = dir.path / "cmp.h5";
    Result r = run_knockon("compare " + q(kJunction) + " --variants base,grade_separated,double_branch --replications 3 --out " + q(cmp), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    r = run_knockon("report " + q(cmp) + " -o " + q(dir.path / "cmp.html"), dir);
    REQUIRE(r.status == 0);
    const std::string page = read_text(dir.path / "cmp.html");
    check_corridor_diagrams(page);
    CHECK(page.find("double_branch") != std::string::npos);
}
