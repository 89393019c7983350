// Where knock-on comes from (sim/attribution): every knock-on second traced to its direct cause and
// back to the primary delays that started it.  The shares add up to the knock-on measured, on the
// demo and on random days; turnaround chains give what the max-plus recursion gives by hand; a
// Monte Carlo study of an exponential primary delay meets the closed form.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <random>
#include <sstream>
#include <string>

#include "layout_generator.hpp"
#include "models/plan.hpp"
#include "sim/attribution.hpp"
#include "sim/delay_draws.hpp"
#include "sim/record_places.hpp"
#include "sim/study.hpp"
#include "sim_test_support.hpp"

using namespace knockon;
using namespace knockon::simtest;

namespace {

const std::string kTurnaround = kSource + "/tests/data/links/single_line_turnaround.yaml";
const std::string kChain = kSource + "/tests/data/links/three_train_chain.yaml";

// What does not add up in a day's attribution, or "" when everything does: over the day, per
// timing record (the edges that reach it) and per direct cause, to the millisecond.  Conservation
// is our own rule (README "Where knock-on comes from"; common practice, no source).
std::string conservation_mismatch(const SimResult& day, const DayAttribution& a) {
    std::ostringstream why;
    double measured = 0.0, damage = 0.0, by_cause = 0.0;
    for (const TimingRecord& r : day.timing) measured += r.knock_on;
    for (double x : a.damage) damage += x;
    for (double x : a.by_cause) by_cause += x;
    if (std::fabs(damage - measured) > 1e-3) why << "damage " << damage << " s against knock-on " << measured << " s\n";
    if (std::fabs(by_cause - measured) > 1e-3) why << "direct causes " << by_cause << " s against " << measured << " s\n";
    std::vector<double> reached(day.timing.size(), 0.0);
    for (const DelayEdge& e : a.edges) reached[e.record] += e.seconds;
    for (std::size_t r = 0; r < day.timing.size(); ++r)
        if (std::fabs(reached[r] - day.timing[r].knock_on) > 1e-3)
            why << day.train_ids[day.timing[r].train] << " at " << day.timing[r].station << ": edges " << reached[r]
                << " s, knock-on " << day.timing[r].knock_on << " s\n";
    for (double x : a.damage)
        if (x < -1e-9) why << "a negative damage " << x << "\n";
    return why.str();
}

double damage_of_entry(const Day& d, const DayAttribution& a, const std::string& train) {
    return a.damage[a.index.entry(index_of(d.plan, train))];
}

const LinkPlan& link_into(const std::vector<TrainPlan>& plan, const std::string& to) {
    const std::size_t t = index_of(plan, to);
    REQUIRE(plan[t].incoming.size() == 1);
    return plan[t].incoming.front();
}

// The turnaround fixture with its buffer set to 5 min.
Scenario turnaround_with_5_min_buffer() {
    Scenario sc = read_scenario(kTurnaround);
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const LinkPlan& l = link_into(plan, "D1");
    sc.timetable.links[0].min_time = l.departure - l.arrival - 300.0;
    return sc;
}

std::size_t d_records(const StudyResult& s) { return s.timing_template.size(); }

// A uniform in [0, 1) from 53 random bits (the same on every standard library).
double uniform(std::mt19937_64& g) { return static_cast<double>(g() >> 11) * 0x1.0p-53; }

}  // namespace

TEST_CASE("attribution: the shares add up to the knock-on measured on demo days", "[attribution][conservation]") {
    Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    const DelayDrawer drawer(sc, plan);
    double total = 0.0;
    for (std::uint32_t k = 0; k < 4; ++k) {
        INFO("demo, seed 1, replication " << k);
        const InjectedDelays delays = drawer.draw(1, k);
        const SimResult day = simulate_day(model, delays, SimOptions{});
        const DayAttribution a = attribute_knock_on(day, delays);
        CHECK(conservation_mismatch(day, a) == "");
        for (const TimingRecord& r : day.timing) total += r.knock_on;
        // Most of the demo's knock-on goes back to primary delays (the holder late), not to
        // causes the engine did not record.
        double primary = 0.0, all = 0.0;
        for (std::size_t i = 0; i < a.damage.size(); ++i) {
            all += a.damage[i];
            if (is_primary(delay_source(a.index, i, day.timing).kind)) primary += a.damage[i];
        }
        if (all > 0.0) CHECK(primary / all > 0.5);
    }
    CHECK(total > 600.0);   // the check is of something: the demo's days have knock-on
}

TEST_CASE("attribution: record places are the stations sorted by id and each record's index among them",
          "[attribution][places]") {
    // Common practice, no source: a sorted set of names and each name's rank in it.
    const RecordPlaces p = record_places(std::vector<std::string>{"Bexfold", "Amber Hill", "Bexfold", "Crane"});
    CHECK(p.places == std::vector<std::string>{"Amber Hill", "Bexfold", "Crane"});
    CHECK(p.of_record == std::vector<std::uint32_t>{1, 0, 1, 2});
    // The demo model lays out its days' records as the engine does.
    Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    const DelayDrawer drawer(sc, plan);
    const InjectedDelays delays = drawer.draw(1, 0);
    const SimResult day = simulate_day(model, delays, SimOptions{});
    const RecordPlaces own = record_places(day.timing);
    REQUIRE(own.places.size() > 2);
    CHECK(model.record_places().places == own.places);
    CHECK(model.record_places().of_record == own.of_record);
}

TEST_CASE("attribution: the shares add up to the knock-on measured on random days", "[attribution][conservation][property]") {
    // KNOCKON_PROPERTY_SEED=<n> reruns one case.
    std::uint64_t first = 1, cases = 60;
    if (const char* s = std::getenv("KNOCKON_PROPERTY_SEED")) first = std::strtoull(s, nullptr, 10), cases = 1;
    std::size_t with_knock_on = 0;
    for (std::uint64_t seed = first; seed < first + cases; ++seed) {
        const layoutgen::Layout layout = layoutgen::random_layout(seed);
        INFO("seed " << seed << " (rerun: KNOCKON_PROPERTY_SEED=" << seed << "): " << layout.summary);
        Scenario scenario;
        REQUIRE_NOTHROW(scenario = parse_scenario(layout.yaml, "random-" + std::to_string(seed) + ".yaml"));
        PlanResult plan;
        try {
            plan = make_plan(scenario);
        } catch (const std::exception&) {
            continue;   // a layout the planner refuses is not one the property speaks of
        }
        // Random primary delays: late starts, long dwells and slow runs, each with probability 0.4,
        // exponential with a mean of 3 min.
        std::mt19937_64 g(seed);
        InjectedDelays delays = no_delays(plan.trains);
        auto draw = [&] { return uniform(g) < 0.4 ? -180.0 * std::log(1.0 - uniform(g)) : 0.0; };
        for (double& x : delays.entry) x = draw();
        for (auto& v : delays.dwell)
            for (double& x : v) x = draw();
        for (auto& v : delays.running)
            for (double& x : v) x = 0.3 * draw();
        const SimModel model(scenario, plan.trains);
        const SimResult day = simulate_day(model, delays, SimOptions{});
        const DayAttribution a = attribute_knock_on(day, delays);
        CHECK(conservation_mismatch(day, a) == "");
        // The places a study works out once, with the model, are those of the day's own records.
        const RecordPlaces own = record_places(day.timing);
        CHECK(model.record_places().places == own.places);
        CHECK(model.record_places().of_record == own.of_record);
        for (const TimingRecord& r : day.timing)
            if (r.knock_on > 0.0) {
                ++with_knock_on;
                break;
            }
    }
    if (cases > 1) CHECK(with_knock_on >= 10);
}

TEST_CASE("attribution: a turnaround passes max(0 D-b) of a late arrival on and it is that delay's damage",
          "[attribution][links]") {
    // Max-plus recursion of a turnaround (tests/REFERENCES.md P1, P3: max-plus algebra, Goverde 2007):
    // the set arriving D late against a turnaround buffer b makes the return working
    // max(0, D - b) late.  U1 starts D late and passes B, so it reaches C D late; b = 5 min.
    for (const double D : {600.0, 420.0, 240.0}) {
        INFO("D = " << D << " s, b = 300 s");
        const DayPtr d = simulate(turnaround_with_5_min_buffer(), {{"U1", D}});
        const InjectedDelays delays = [&] {
            InjectedDelays x = no_delays(d->plan);
            x.entry[index_of(d->plan, "U1")] = D;
            return x;
        }();
        const DayAttribution a = attribute_knock_on(d->result, delays);
        const double expected = std::max(0.0, D - 300.0);
        CHECK(timing_of(*d, "D1", "C").knock_on == Approx(expected).margin(2e-3));
        CHECK(damage_of_entry(*d, a, "U1") == Approx(expected).margin(2e-3));
        CHECK(a.by_cause[static_cast<std::size_t>(HoldCause::Kind::link)] == Approx(expected).margin(2e-3));
        CHECK(a.through_link[0] == Approx(expected).margin(2e-3));
        CHECK(conservation_mismatch(d->result, a) == "");
    }
}

TEST_CASE("attribution: Monte Carlo knock-on of an exponential delay on a turnaround meets the closed form",
          "[attribution][study]") {
    // Closed form (tests/REFERENCES.md P4: Schwanhaeusser; the memorylessness of the exponential
    // distribution): for X ~ Exp(mean m), E[max(0, X - b)] = m exp(-b/m).
    // A primary delay occurring with probability p then gives a mean knock-on p m exp(-b/m) on a
    // turnaround with buffer b.  p = 0.6, m = 4 min, b = 5 min: 0.6 * 240 * exp(-1.25) = 41.26 s.
    const double p = 0.6, m = 240.0, b = 300.0;
    Scenario sc = turnaround_with_5_min_buffer();
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    const std::size_t u1 = index_of(plan, "U1");
    auto draw = [&](std::uint32_t k) {
        std::mt19937_64 g(1000 + k);
        InjectedDelays x = no_delays(plan);
        if (uniform(g) < p) x.entry[u1] = -m * std::log(1.0 - uniform(g));
        return x;
    };
    const std::uint32_t days = 800;
    std::vector<double> knock_on, damage;
    for (std::uint32_t k = 0; k < days; ++k) {
        const InjectedDelays delays = draw(k);
        const SimResult day = simulate_day(model, delays, SimOptions{});
        const DayAttribution a = attribute_knock_on(day, delays);
        double sum = 0.0;
        for (const TimingRecord& r : day.timing) sum += r.knock_on;
        knock_on.push_back(sum);
        damage.push_back(a.damage[a.index.entry(u1)]);
    }
    const double closed = p * m * std::exp(-b / m);
    for (const auto* v : {&knock_on, &damage}) {
        const Estimate e = estimate_mean(*v);
        const double se = e.half_width / 1.96;   // large n: the t quantile is about 1.96
        INFO("mean " << e.mean << " s, standard error " << se << " s, closed form " << closed << " s");
        CHECK(std::fabs(e.mean - closed) < 3.0 * se);
        CHECK(se < 0.25 * closed);   // enough days for the check to mean something
    }

    // The study gives the same mean damage of U1's late start, with its interval, whatever the
    // thread count (to the bit).
    StudyOptions o;
    o.replications = days;
    o.draw = draw;
    o.threads = 1;
    const StudyResult one = run_study(model, o);
    o.threads = 2;
    const StudyResult two = run_study(model, o);
    const StudySummary s1 = summarize_study(model, one, o.thresholds), s2 = summarize_study(model, two, o.thresholds);
    REQUIRE_FALSE(s1.attribution.sources.empty());
    const SourceDamage& top = s1.attribution.sources.front();
    CHECK(top.source == SourceIndex{d_records(one), plan.size(), one.section_names.size()}.entry(u1));
    CHECK(top.damage.mean == Approx(estimate_mean(damage).mean).epsilon(1e-5));
    CHECK(std::fabs(top.damage.mean - closed) < 3.0 * top.damage.half_width / 1.96);
    REQUIRE(s2.attribution.sources.size() == s1.attribution.sources.size());
    for (std::size_t i = 0; i < s1.attribution.sources.size(); ++i) {
        CHECK(s2.attribution.sources[i].source == s1.attribution.sources[i].source);
        CHECK(s2.attribution.sources[i].damage.mean == s1.attribution.sources[i].damage.mean);
        CHECK(s2.attribution.sources[i].damage.half_width == s1.attribution.sources[i].damage.half_width);
    }
    // The turnaround is the link all of it passed through.
    REQUIRE(s1.attribution.links.size() == 1);
    CHECK(s1.attribution.links[0].knock_on.mean == Approx(s1.total_knock_on.mean).epsilon(1e-5));
}

TEST_CASE("attribution: a delay tree on a three-train chain checked by hand", "[attribution][links][tree]") {
    // U1 forms D1 at C, D1 forms U2 at A (its turnaround buffer there set to b2 = 2 min).  U1
    // starts D = 15 min late; D1 itself starts R = 2 min late.  By hand (the split rule of the
    // README, "Where knock-on comes from"):
    // - U1 reaches C D late (it passes B: no stop to recover at), so D1's set is y1 = D - b1 late
    //   for it (b1 its turnaround buffer); D1 was to leave R late anyway, so its knock-on at C is
    //   y1 - R, all U1's entry delay (U1 is D late, more than y1 - R).
    // - D1 leaves C y1 late: its delay is {U1 entry: y1 - R, D1 entry: R}.  Arriving at A D_A
    //   late (measured against the plan, as the buffer), its delay is shared in the same
    //   proportion (scaled alike by whatever it recovered on the way).
    // - U2 waits for its set at A: y2 = D_A - b2 (max-plus), passed on in that proportion:
    //   U1 entry y2 (y1 - R) / y1, D1 entry y2 R / y1.
    // The tree of U1's late start: U1 -> D1 at C (link 0) y1 - R; D1 -> U2 at A (link 1)
    // y2 (y1 - R) / y1.  The tree of D1's late start: D1 -> U2 at A (link 1) y2 R / y1.  No other
    // edge.  Here b1 = 651.8 s, so y1 = 248.2 s; D1 keeps its delay to A, D_A = 248.2 s, so
    // y2 = 128.2 s, split 128.2 x 128.2 / 248.2 = 66.2 s and 128.2 x 120 / 248.2 = 62.0 s; U1's
    // damage 128.2 + 66.2 = 194.4 s, D1's 62.0 s (together the day's knock-on, 256.4 s).
    const double D = 900.0, R = 120.0;
    auto d = std::make_unique<Day>(read_scenario(kChain));
    {
        const std::vector<TrainPlan> plan = plan_trains(d->scenario);
        const LinkPlan& l = link_into(plan, "U2");
        d->scenario.timetable.links[1].min_time = l.departure - l.arrival - 120.0;
    }
    d->plan = plan_trains(d->scenario);
    InjectedDelays delays = no_delays(d->plan);
    const std::size_t u1 = index_of(d->plan, "U1"), d1 = index_of(d->plan, "D1");
    const std::uint32_t u2 = static_cast<std::uint32_t>(index_of(d->plan, "U2"));
    delays.entry[u1] = D;
    delays.entry[d1] = R;
    const SimModel model(d->scenario, d->plan);
    d->result = simulate_day(model, delays, SimOptions{});
    const DayAttribution a = attribute_knock_on(d->result, delays);
    REQUIRE(conservation_mismatch(d->result, a) == "");

    const double b1 = link_into(d->plan, "D1").buffer(), b2 = link_into(d->plan, "U2").buffer();
    const double y1 = D - b1;
    const double D_A = timing_of(*d, "D1", "A").arrival - link_into(d->plan, "U2").arrival;
    const double y2 = D_A - b2;
    INFO("b1 " << b1 << " s, b2 " << b2 << " s, D1 at A " << D_A << " s late");
    REQUIRE(b2 == Approx(120.0).margin(1e-6));
    REQUIRE(y1 > R);
    REQUIRE(y2 > 60.0);
    CHECK(timing_of(*d, "D1", "C").knock_on == Approx(y1 - R).margin(2e-3));
    CHECK(timing_of(*d, "U2", "A").knock_on == Approx(y2).margin(2e-3));

    const std::size_t u1_entry = a.index.entry(u1), d1_entry = a.index.entry(d1);
    struct Expected {
        std::size_t source;
        std::size_t holder, link, receiver;
        double seconds;
    };
    const std::vector<Expected> expected = {
        {u1_entry, u1, 0, d1, y1 - R},
        {u1_entry, d1, 1, u2, y2 * (y1 - R) / y1},
        {d1_entry, d1, 1, u2, y2 * R / y1},
    };
    CHECK(a.edges.size() == expected.size());
    for (const Expected& x : expected) {
        bool found = false;
        for (const DelayEdge& e : a.edges) {
            if (e.source != x.source || e.cause.train != x.holder || e.cause.link != x.link ||
                d->result.timing[e.record].train != x.receiver)
                continue;
            found = true;
            CHECK(e.cause.kind == HoldCause::Kind::link);
            CHECK(e.seconds == Approx(x.seconds).margin(2e-3));
        }
        CHECK(found);
    }
    CHECK(a.damage[u1_entry] == Approx(y1 - R + y2 * (y1 - R) / y1).margin(2e-3));
    CHECK(a.damage[d1_entry] == Approx(y2 * R / y1).margin(2e-3));
    // The figures of the comment above, to the tenth of a second.
    CHECK(a.damage[u1_entry] == Approx(194.4).margin(0.05));
    CHECK(a.damage[d1_entry] == Approx(62.0).margin(0.05));
}

TEST_CASE("attribution: a late start with a long preparation at the origin is the train's own delay not knock-on",
          "[attribution][origin]") {
    // The train appears at its origin its late start after its planned appearance (the planned
    // departure less the minimum dwell) and is ready a minimum dwell plus its extra dwell later,
    // or at its planned departure plus the late start, whichever is later; with nothing in its
    // way it leaves then, so its departure delay is the late start plus the extra dwell and it
    // gathers no knock-on (the engine's rule, README "Simulation"; common practice, no source).
    // FU-1808 at MFQ: min dwell 60 s, late start 131.1 s, extra dwell 106.1 s.
    Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    InjectedDelays delays = no_delays(plan);
    const std::size_t t = index_of(plan, "FU-1808");
    delays.entry[t] = 131.1;
    delays.dwell[t][0] = 106.1;
    const SimResult day = simulate_day(model, delays, SimOptions{});
    const TimingRecord* mfq = nullptr;
    for (const TimingRecord& r : day.timing)
        if (r.train == t && r.station == "MFQ") mfq = &r;
    REQUIRE(mfq != nullptr);
    CHECK(mfq->departure_delay == Approx(131.1 + 106.1).margin(2e-3));
    CHECK(mfq->knock_on == 0.0);
    for (const HoldRecord& w : day.waits) CHECK(day.train_ids[w.train] != "FU-1808");
}

TEST_CASE("attribution: every wait on the demo's studied days has a recorded cause", "[attribution][causes]") {
    // 30 days of the demo study (seed 1): a train kept ready to leave is kept by something the
    // day recorded (a train, a link, a disruption, the dispatcher), never by nothing
    // (README "Where knock-on comes from"; common practice, no source).
    Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    const DelayDrawer drawer(sc, plan);
    double waited = 0.0;
    for (std::uint32_t k = 0; k < 30; ++k) {
        const InjectedDelays delays = drawer.draw(1, k);
        const SimResult day = simulate_day(model, delays, SimOptions{});
        for (const KnockOnPart& p : day.knock_on_parts) {
            if (p.run) continue;
            INFO("day " << k << ": " << day.train_ids[day.timing[p.record].train] << " at " << day.timing[p.record].station
                        << ", " << p.seconds << " s from " << p.from);
            CHECK(p.cause.kind != HoldCause::Kind::none);
            waited += p.seconds;
        }
        CHECK(conservation_mismatch(day, attribute_knock_on(day, delays)) == "");
    }
    CHECK(waited > 600.0);   // the check is of something: the demo's trains do wait
}

TEST_CASE("attribution: a route held just before a timing point takes the time lost on the run after it",
          "[attribution][causes]") {
    // Demo study, seed 1, day 1: FU-0708 asks for the route from U09 (the FRX home signal's rear)
    // before it passes BKW, SU-0700 holds it 10 s, and the train, braking for it and
    // re-accelerating after it, loses 26.9 s on the run BKW-FRX that begins after the grant.
    // That time is the hold's, so SU-0700 is its direct cause (README "Where knock-on comes
    // from", rule 1; common practice, no source).
    Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    const InjectedDelays delays = DelayDrawer(sc, plan).draw(1, 1);
    const SimResult day = simulate_day(model, delays, SimOptions{});
    const std::size_t t = index_of(plan, "FU-0708"), su = index_of(plan, "SU-0700");
    std::size_t frx = day.timing.size();
    for (std::size_t r = 0; r < day.timing.size(); ++r)
        if (day.timing[r].train == t && day.timing[r].station == "FRX") frx = r;
    REQUIRE(frx < day.timing.size());
    REQUIRE(day.timing[frx].knock_on > 20.0);
    bool held_before_run = false;
    for (const RouteRecord& rr : day.routes)
        if (rr.train == t && rr.entry_signal == "U09" && rr.held_by.kind == HoldCause::Kind::train &&
            rr.held_by.train == su && rr.granted <= day.timing[frx - 1].departure)
            held_before_run = true;
    CHECK(held_before_run);   // the case is what it says: the hold ended before the run began
    const DayAttribution a = attribute_knock_on(day, delays);
    double by_su = 0.0, reached = 0.0;
    for (const DelayEdge& e : a.edges) {
        if (e.record != frx) continue;
        reached += e.seconds;
        if (e.cause.kind == HoldCause::Kind::train && e.cause.train == su) by_su += e.seconds;
    }
    CHECK(reached == Approx(day.timing[frx].knock_on).margin(1e-3));
    CHECK(by_su == Approx(day.timing[frx].knock_on).margin(1e-3));
}

TEST_CASE("attribution: on the demo's studied days knock-on with no recorded cause is only next to a train's own slow running",
          "[attribution][causes]") {
    // 30 days of the demo study (seed 1).  What remains "not recorded" is time a train lost on a
    // run beside a stretch of its own slow running (the run into it, over it or out of it):
    // braking to the lower limit before the stretch and accelerating after the tail has left it
    // cost more than the drawn extra running time, which is all the expected running time holds
    // (README "Where knock-on comes from"; common practice, no source).  Every such second is
    // checked here; any other would be a cause the engine failed to record.
    Scenario sc = read_scenario(kSource + "/scenarios/demo.yaml");
    const std::vector<TrainPlan> plan = plan_trains(sc);
    const SimModel model(sc, plan);
    const DelayDrawer drawer(sc, plan);
    double none = 0.0, all = 0.0;
    for (std::uint32_t k = 0; k < 30; ++k) {
        const InjectedDelays delays = drawer.draw(1, k);
        const SimResult day = simulate_day(model, delays, SimOptions{});
        const DayAttribution a = attribute_knock_on(day, delays);
        CHECK(conservation_mismatch(day, a) == "");
        for (const TimingRecord& r : day.timing) all += r.knock_on;
        none += a.by_cause[static_cast<std::size_t>(HoldCause::Kind::none)];
        for (const DelayEdge& e : a.edges) {
            if (e.cause.kind != HoldCause::Kind::none) continue;
            const TimingRecord& r = day.timing[e.record];
            INFO("day " << k << ": " << day.train_ids[r.train] << " at " << r.station << ", " << e.seconds << " s");
            // Slow running on the run to this record (from the previous call), the one before or the one after.
            bool own_slow_running = false;
            const std::vector<double>& running = delays.running[r.train];
            for (std::uint32_t c = r.call >= 2 ? r.call - 2 : 0; c <= r.call && c < running.size(); ++c)
                if (running[c] > 0.0) own_slow_running = true;
            CHECK(own_slow_running);
        }
    }
    INFO("not recorded " << none / 30.0 << " s per day of " << all / 30.0 << " s of knock-on");
    CHECK(all > 6000.0 * 30.0);      // the check is of something: the demo's days have knock-on
    CHECK(none < 0.005 * all);       // and what stays unrecorded is a small part of it
}
