// Event kernel: SimTime conversions, the (time, phase, seq) order, lazy cancellation.
// The heap is checked against the simplest thing that can be right: a vector kept sorted by the
// same key (sim/ENGINEERING.md, "Event kernel": differential test against a plain sorted vector).
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <random>
#include <stdexcept>
#include <tuple>
#include <vector>

#include <catch2/catch.hpp>

#include "sim/event_queue.hpp"
#include "sim/sim_time.hpp"

using namespace knockon;

namespace {

bool same_event(const Event& a, const Event& b) {
    return a.time == b.time && a.phase == b.phase && a.seq == b.seq && a.kind == b.kind &&
           a.entity == b.entity && a.generation == b.generation && a.payload == b.payload;
}

// Reference queue: a vector sorted by (time, phase, seq); the front is the next event. It spells
// out the key itself rather than calling the kernel's earlier(), so a fault there shows up.
struct SortedVectorQueue {
    std::vector<Event> v;
    void push(const Event& e) {
        auto key = [](const Event& x) { return std::tuple(x.time.ticks, x.phase, x.seq); };
        auto before = [&key](const Event& a, const Event& b) { return key(a) < key(b); };
        v.insert(std::upper_bound(v.begin(), v.end(), e, before), e);
    }
    Event pop() {
        Event e = v.front();
        v.erase(v.begin());
        return e;
    }
};

// FNV-1a, 64 bit, fed field by field as little-endian bytes so the value does not depend on
// struct padding or host byte order.
struct Fnv1a {
    std::uint64_t h = 14695981039346656037ull;
    void add(std::uint64_t x, int bytes) {
        for (int i = 0; i < bytes; ++i) {
            h ^= (x >> (8 * i)) & 0xffu;
            h *= 1099511628211ull;
        }
    }
};

}  // namespace

TEST_CASE("SimTime rounds seconds to the nearest 1 ms tick", "[sim][time]") {
    // common practice, no source: round to nearest, halves away from zero (as std::round).
    static_assert(SimTime::from_seconds(1.0004).ticks == 1000);
    CHECK(SimTime::from_seconds(1.0004).ticks == 1000);
    CHECK(SimTime::from_seconds(1.0006).ticks == 1001);
    CHECK(SimTime::from_seconds(-1.0004).ticks == -1000);
    CHECK(SimTime::from_seconds(-1.0006).ticks == -1001);
    CHECK(SimTime::from_seconds(0.0005).ticks == 1);
    CHECK(SimTime::from_seconds(-0.0005).ticks == -1);
    // Just below half a tick rounds down: walk down from 0.5 ms over consecutive doubles whose
    // scaled value falls below 0.5 tick (the closest reachable lies ~1e-16 below the half).
    int below_half = 0;
    for (double s = 0.0005; below_half < 50; s = std::nextafter(s, 0.0)) {
        if (s * 1000.0 >= 0.5) {
            REQUIRE(SimTime::from_seconds(s).ticks == 1);
            continue;
        }
        ++below_half;
        REQUIRE(SimTime::from_seconds(s).ticks == 0);
    }
    CHECK(SimTime::from_seconds(6.0 * 3600.0).ticks == 21'600'000);
    CHECK(SimDuration::from_seconds(90.0).ticks == 90'000);

    // Round trip: every tick count survives ticks -> seconds -> ticks (exact while the double
    // holds the millisecond, far beyond any timetable day).
    for (std::int64_t t : {0ll, 1ll, 999ll, 1001ll, -1ll, 86'399'999ll, 3'000'000'000'000ll}) {
        CHECK(SimTime::from_seconds(SimTime{t}.to_seconds()).ticks == t);
        CHECK(SimDuration::from_seconds(SimDuration{t}.to_seconds()).ticks == t);
    }
    CHECK(SimTime::from_seconds(1.0006).to_seconds() == 1.001);
}

TEST_CASE("SimTime refuses non-finite and out-of-range seconds", "[sim][time]") {
    CHECK_THROWS_AS(SimTime::from_seconds(std::numeric_limits<double>::quiet_NaN()),
                    std::out_of_range);
    CHECK_THROWS_AS(SimTime::from_seconds(std::numeric_limits<double>::infinity()),
                    std::out_of_range);
    CHECK_THROWS_AS(SimDuration::from_seconds(1e17), std::out_of_range);
}

TEST_CASE("SimTime arithmetic and printing", "[sim][time]") {
    const SimTime t{5000};
    const SimDuration d{1500};
    CHECK((t + d).ticks == 6500);
    CHECK((t - d).ticks == 3500);
    CHECK((SimTime{6500} - t) == d);
    CHECK(t < t + d);
    CHECK(SimTime::max() > SimTime{INT64_MAX - 1});
    CHECK(to_string(SimTime{12345}) == "12.345 s");
    CHECK(to_string(SimTime{7}) == "0.007 s");
    CHECK(to_string(SimTime{-1500}) == "-1.500 s");
}

TEST_CASE("Equal times pop in phase order, then push order", "[sim][queue]") {
    EventQueue q;
    const SimTime t{1000};
    // Pushed deliberately out of phase order; kind records the push position.
    q.push(t, 2, 0, 0, 0);
    q.push(t, 0, 1, 0, 0);
    q.push(t, 1, 2, 0, 0);
    q.push(t, 0, 3, 0, 0);
    q.push(t, 2, 4, 0, 0);
    q.push(SimTime{999}, 9, 5, 0, 0);   // earlier time beats any phase
    std::vector<std::uint32_t> kinds;
    std::vector<std::uint8_t> phases;
    while (!q.empty()) {
        const Event e = q.pop();
        kinds.push_back(e.kind);
        phases.push_back(e.phase);
    }
    CHECK(kinds == std::vector<std::uint32_t>{5, 1, 3, 2, 0, 4});
    CHECK(phases == std::vector<std::uint8_t>{9, 0, 0, 1, 2, 2});
}

TEST_CASE("Heap pops in the same order as a sorted vector", "[sim][queue]") {
    // Interleaved random pushes and pops; small time steps and few phases give many ties.
    std::mt19937_64 rng(20240611);
    EventQueue q;
    SortedVectorQueue ref;
    std::uint64_t expected_seq = 0;
    std::size_t pops = 0;
    for (int op = 0; op < 20000; ++op) {
        const bool do_push = ref.v.empty() || rng() % 100 < 55;
        if (do_push) {
            const std::int64_t dt = (rng() % 4 == 0) ? 0 : static_cast<std::int64_t>(rng() % 50);
            const SimTime when = q.now() + SimDuration{dt};
            const auto phase = static_cast<std::uint8_t>(rng() % 3);
            const auto kind = static_cast<std::uint32_t>(rng() % 7);
            const auto entity = static_cast<std::uint32_t>(rng() % 100);
            const auto gen = static_cast<std::uint32_t>(rng() % 5);
            const auto payload = static_cast<std::uint32_t>(rng());
            const std::uint64_t seq = q.push(when, phase, kind, entity, gen, payload);
            REQUIRE(seq == expected_seq++);
            ref.push(Event{when, phase, seq, kind, entity, gen, payload});
        } else {
            REQUIRE(q.size() == ref.v.size());
            const Event want = ref.pop();
            REQUIRE(same_event(q.top(), want));
            const Event got = q.pop();
            REQUIRE(same_event(got, want));
            REQUIRE(q.now() == want.time);
            ++pops;
        }
    }
    while (!ref.v.empty()) {
        REQUIRE(same_event(q.pop(), ref.pop()));
        ++pops;
    }
    CHECK(q.empty());
    CHECK(pops == expected_seq);
    CHECK(pops > 10000);   // the run really exercised the heap
}

TEST_CASE("Events in the FIFO lanes keep the same total order as the heap", "[sim][queue]") {
    // As above, with a third of the pushes to each lane: constant delays after now() (in order,
    // as the simulation uses them) and some random ones (out of order: these fall back to the
    // heap).  The pop order must still be the sorted vector's.
    std::mt19937_64 rng(20261202);
    EventQueue q;
    SortedVectorQueue ref;
    std::size_t pops = 0, laned = 0;
    for (int op = 0; op < 20000; ++op) {
        if (ref.v.empty() || rng() % 100 < 55) {
            const int where = static_cast<int>(rng() % 3);   // heap, lane 0, lane 1
            std::int64_t dt = (rng() % 4 == 0) ? 0 : static_cast<std::int64_t>(rng() % 50);
            if (where > 0 && rng() % 5 != 0) dt = where == 1 ? 30 : 45;   // constant delay: in order
            const SimTime when = q.now() + SimDuration{dt};
            const auto phase = static_cast<std::uint8_t>(where > 0 && rng() % 5 != 0 ? where - 1 : rng() % 3);
            const auto kind = static_cast<std::uint32_t>(rng() % 7);
            const auto entity = static_cast<std::uint32_t>(rng() % 100);
            const std::uint64_t seq = where == 0 ? q.push(when, phase, kind, entity, 0, 0)
                                                 : q.push_in_order(where - 1, when, phase, kind, entity, 0, 0);
            laned += where > 0;
            ref.push(Event{when, phase, seq, kind, entity, 0, 0});
        } else {
            REQUIRE(q.size() == ref.v.size());
            const Event want = ref.pop();
            REQUIRE(same_event(q.top(), want));
            REQUIRE(same_event(q.pop(), want));
            ++pops;
        }
    }
    while (!ref.v.empty()) {
        REQUIRE(same_event(q.pop(), ref.pop()));
        ++pops;
    }
    CHECK(q.empty());
    CHECK(laned > 5000);
    CHECK(pops > 10000);
}

TEST_CASE("Scheduling into the past throws", "[sim][queue]") {
    EventQueue q(SimTime{1000});
    CHECK_THROWS_AS(q.push(SimTime{999}, 0, 0, 0, 0), std::logic_error);
    q.push(SimTime{2000}, 1, 0, 0, 0);
    q.pop();
    CHECK(q.now() == SimTime{2000});
    CHECK_THROWS_AS(q.push(SimTime{1999}, 0, 0, 0, 0), std::logic_error);
    CHECK_NOTHROW(q.push(SimTime{2000}, 0, 0, 0, 0));   // same instant is allowed
    CHECK(q.size() == 1);   // the refused pushes left nothing behind
}

TEST_CASE("Empty queue: pop and top throw, pop_current returns false", "[sim][queue]") {
    EventQueue q;
    GenerationTable g;
    Event e;
    CHECK_THROWS_AS(q.pop(), std::logic_error);
    CHECK_THROWS_AS(q.top(), std::logic_error);
    CHECK_FALSE(q.pop_current(e, g));
}

TEST_CASE("Bumping a generation cancels older events only", "[sim][queue][cancel]") {
    EventQueue q;
    GenerationTable g(3);
    const std::uint32_t train = 1, other = 2;
    q.push(SimTime{100}, 0, 10, train, g.current(train));   // will be cancelled
    q.push(SimTime{150}, 0, 11, other, g.current(other));   // untouched entity
    q.push(SimTime{200}, 0, 12, train, g.current(train));   // will be cancelled
    q.push(SimTime{250}, 0, 13, no_entity, 0);              // never stale
    CHECK(g.bump(train) == 1);
    q.push(SimTime{120}, 0, 14, train, g.current(train));   // scheduled after the bump

    std::vector<std::uint32_t> kinds;
    Event e;
    while (q.pop_current(e, g)) {
        kinds.push_back(e.kind);
        CHECK(q.now() == e.time);
    }
    CHECK(kinds == std::vector<std::uint32_t>{14, 11, 13});
    CHECK(q.stale_dropped() == 2);
    CHECK(q.empty());
}

TEST_CASE("Stale events dropped at the end do not advance now()", "[sim][queue][cancel]") {
    EventQueue q;
    GenerationTable g(1);
    q.push(SimTime{100}, 0, 0, 0, g.current(0));
    q.push(SimTime{500}, 0, 0, 0, g.current(0));
    Event e;
    REQUIRE(q.pop_current(e, g));
    g.bump(0);
    CHECK_FALSE(q.pop_current(e, g));
    CHECK(q.now() == SimTime{100});
    CHECK_NOTHROW(q.push(SimTime{300}, 0, 0, 0, g.current(0)));
}

TEST_CASE("GenerationTable grows on demand and protects no_entity", "[sim][cancel]") {
    GenerationTable g;
    CHECK(g.is_current(7, 0));
    CHECK_FALSE(g.is_current(7, 1));
    CHECK(g.bump(7) == 1);
    CHECK(g.size() == 8);
    CHECK_FALSE(g.is_current(7, 0));
    CHECK(g.is_current(7, 1));
    CHECK(g.is_current(no_entity, 12345));
    CHECK_THROWS_AS(g.bump(no_entity), std::logic_error);
}

TEST_CASE("pop_current matches a sorted vector with random cancellations", "[sim][queue][cancel]") {
    std::mt19937_64 rng(77);
    EventQueue q;
    GenerationTable g(20);
    SortedVectorQueue ref;
    std::size_t delivered = 0, dropped = 0;
    auto ref_pop_current = [&](Event& out) {
        while (!ref.v.empty()) {
            const Event e = ref.pop();
            if (g.is_current(e.entity, e.generation)) {
                out = e;
                return true;
            }
            ++dropped;
        }
        return false;
    };
    for (int op = 0; op < 10000; ++op) {
        const auto r = rng() % 100;
        if (r < 50) {
            const SimTime when = q.now() + SimDuration{static_cast<std::int64_t>(rng() % 30)};
            const auto phase = static_cast<std::uint8_t>(rng() % 2);
            const auto entity = static_cast<std::uint32_t>(rng() % 20);
            const std::uint64_t seq = q.push(when, phase, 0, entity, g.current(entity));
            ref.push(Event{when, phase, seq, 0, entity, g.current(entity), 0});
        } else if (r < 60) {
            g.bump(static_cast<std::uint32_t>(rng() % 20));
        } else {
            Event want{}, got{};
            const bool have = ref_pop_current(want);
            REQUIRE(q.pop_current(got, g) == have);
            if (have) {
                REQUIRE(same_event(got, want));
                ++delivered;
            }
        }
    }
    CHECK(q.stale_dropped() == dropped);
    CHECK(delivered > 1000);
    CHECK(dropped > 100);
}

TEST_CASE("Pinned trace fingerprint of a small hold-model run", "[sim][queue][fingerprint]") {
    // common practice, no source (sim/ENGINEERING.md suggests it): the hash of the event trace of a
    // fixed run, pinned when written. A change means the kernel's order changed; if intended,
    // re-pin and say why in the commit. std::mt19937_64's output sequence is fixed by the
    // standard, and only its raw output is used (no std:: distributions), so the value is the
    // same with every standard library.
    std::mt19937_64 rng(406);
    // One draw per statement: the order in which function arguments are evaluated is
    // unspecified (GCC and Clang differ), so two draws in one call would not be portable.
    auto draw = [&rng](std::uint64_t n) { return rng() % n; };
    auto delay = [&draw] { return SimDuration{static_cast<std::int64_t>(draw(60'000))}; };
    EventQueue q(SimTime{21'600'000});   // 06:00
    GenerationTable g(50);
    for (std::uint32_t i = 0; i < 200; ++i) {
        const SimTime when = q.now() + delay();
        const auto phase = static_cast<std::uint8_t>(draw(4));
        q.push(when, phase, i % 5, i % 50, 0, i);
    }
    Fnv1a h;
    Event e;
    std::uint64_t delivered = 0;
    while (delivered < 50'000 && q.pop_current(e, g)) {
        ++delivered;
        h.add(static_cast<std::uint64_t>(e.time.ticks), 8);
        h.add(e.phase, 1);
        h.add(e.seq, 8);
        h.add(e.kind, 4);
        h.add(e.entity, 4);
        h.add(e.generation, 4);
        h.add(e.payload, 4);
        if (draw(10) == 0) {
            // Re-plan one entity: cancel whatever it had pending, schedule one fresh event.
            const auto victim = static_cast<std::uint32_t>(draw(50));
            const SimTime when = q.now() + delay();
            const std::uint32_t gen = g.bump(victim);
            q.push(when, 1, 7, victim, gen, 0);
        }
        // Hold: each delivered event schedules a successor for the same entity, and sometimes
        // a zero-delay follow-up, to keep ties in play.
        const SimTime when = q.now() + delay();
        const auto phase = static_cast<std::uint8_t>(draw(4));
        q.push(when, phase, e.kind, e.entity, g.current(e.entity), e.payload + 1);
        if (draw(8) == 0) q.push(q.now(), 3, 99, e.entity, g.current(e.entity), 0);
    }
    CHECK(delivered == 50'000);
    CHECK(q.stale_dropped() == 11369);
    CHECK(h.h == 0x3587f153fa5f4fcaull);
}
