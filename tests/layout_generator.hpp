#pragma once
// A seeded generator of random valid scenarios for the property tests: lines that vary what real
// layouts vary (aspect systems, where starters and homes stand, sighting distances, how far in
// the first signal stands, gradients, loops, single and double track, trains that start at a
// station or enter at speed, stopping and passing) with trains far enough apart that none can
// hinder another.  Whether a case respects the signal-spacing rule is left to the plan (cases it
// warns about are set aside by the caller).
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <string>
#include <vector>

namespace knockon::layoutgen {

// SplitMix64: small, fast and the same on every platform (std::uniform_*_distribution is not).
class Rng {
public:
    explicit Rng(std::uint64_t seed) : x_(seed) {}
    std::uint64_t next() {
        std::uint64_t z = (x_ += 0x9E3779B97F4A7C15ull);
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
        return z ^ (z >> 31);
    }
    double uniform(double lo, double hi) { return lo + (hi - lo) * static_cast<double>(next() >> 11) * 0x1.0p-53; }
    int pick(int n) { return static_cast<int>(next() % static_cast<std::uint64_t>(n)); }
    bool chance(double p) { return uniform(0.0, 1.0) < p; }

private:
    std::uint64_t x_;
};

struct Layout {
    std::string yaml;
    std::string summary;   // one line: what was drawn, for the failure message
};

inline std::string km(double metres) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3f km", metres / 1000.0);
    return buf;
}

inline std::string clock(double seconds) {
    const long s = std::lround(seconds);
    char buf[32];
    std::snprintf(buf, sizeof buf, "\"%02ld:%02ld:%02ld\"", s / 3600, s / 60 % 60, s % 60);
    return buf;
}

// One random scenario.  Distances along a direction of travel (d) map to chainage x = d (up) or
// x = L - d (down).
inline Layout random_layout(std::uint64_t seed) {
    Rng rng(seed);
    Layout out;
    const double L = std::round(rng.uniform(12000.0, 24000.0) / 10.0) * 10.0;
    const bool single = rng.chance(0.35);
    const char* systems[] = {"two_aspect", "three_aspect", "four_aspect", "cab_fixed_block"};
    const std::string system = systems[rng.pick(4)];
    const double sighting = std::round(rng.uniform(100.0, 800.0));
    const double overlap = std::round(rng.uniform(50.0, 200.0));
    const double line_speed_kmh = 80.0 + 10.0 * rng.pick(9);   // 80-160 km/h
    const double v = line_speed_kmh / 3.6;

    // Rolling stock: a multiple unit, and on some lines a freight train.
    const double emu_brake = rng.uniform(0.6, 1.0), emu_length = std::round(rng.uniform(60.0, 200.0));
    const bool freight = rng.chance(0.4);
    const double frt_brake = rng.uniform(0.35, 0.55), frt_length = std::round(rng.uniform(250.0, 600.0));
    const double frt_speed_kmh = std::min(line_speed_kmh, 80.0 + 10.0 * rng.pick(3));

    // Gradients: level, or a few bands up to 8 per mille.
    std::vector<std::pair<double, double>> grads = {{0.0, 0.0}};
    if (rng.chance(0.6))
        for (double x = rng.uniform(1000.0, 4000.0); x < L - 500.0; x += rng.uniform(1500.0, 5000.0))
            grads.push_back({std::round(x), rng.chance(0.3) ? 0.0 : std::round(rng.uniform(-8.0, 8.0))});

    // The braking distance the block lengths are drawn against: the slower-braking type at its top
    // speed on the steepest fall, with the brake delay (2 s) and a margin.
    double steepest = 0.0;
    for (auto& g : grads) steepest = std::max(steepest, std::fabs(g.second));
    auto braking = [&](double speed, double b) { return speed * 2.0 + speed * speed / (2.0 * (b - 9.81 * steepest / 1000.0)); };
    double D = braking(v, emu_brake);
    if (freight) D = std::max(D, braking(frt_speed_kmh / 3.6, frt_brake));
    D = D * 1.1 + 60.0;

    // Stations: 2-4, at least 3 km apart and 1.5 km from the ends.
    const int n_st = 2 + rng.pick(3);
    std::vector<double> st;
    for (int attempt = 0; attempt < 200 && static_cast<int>(st.size()) < n_st; ++attempt) {
        const double x = std::round(rng.uniform(1500.0, L - 1500.0) / 10.0) * 10.0;
        if (std::all_of(st.begin(), st.end(), [&](double y) { return std::fabs(x - y) >= 3000.0; })) st.push_back(x);
    }
    std::sort(st.begin(), st.end());
    std::vector<bool> has_loop(st.size());
    for (std::size_t k = 0; k < st.size(); ++k) has_loop[k] = rng.chance(0.4);

    const std::string main_up = single ? "M" : "U", main_down = single ? "M" : "D";
    std::string tracks = "    - {id: " + main_up + ", from: 0 km, to: " + km(L) + ", directions: " +
                         (single ? "both" : "up") + "}\n";
    if (!single) tracks += "    - {id: D, from: 0 km, to: " + km(L) + ", directions: down}\n";
    std::string signals;
    int sig_no = 0;
    auto add_signal = [&](const std::string& track, double x, bool up) {
        char buf[160];
        std::snprintf(buf, sizeof buf, "    - {id: G%03d, track: %s, at: %s, direction: %s}\n", ++sig_no,
                      track.c_str(), km(x).c_str(), up ? "up" : "down");
        signals += buf;
    };
    // Loops (one per direction on double track, one for both on single track), per station.
    std::vector<std::string> loop_up(st.size()), loop_down(st.size());
    std::vector<double> starter_gap(st.size()), home_gap(st.size());
    for (std::size_t k = 0; k < st.size(); ++k) {
        starter_gap[k] = std::round(rng.uniform(0.0, 600.0));
        home_gap[k] = std::round(rng.uniform(300.0, 1500.0));
        // A single-track loop reaches as far behind the mark as beyond it: the home stays outside.
        if (single && has_loop[k]) home_gap[k] = std::max(home_gap[k], starter_gap[k] + overlap + 200.0);
    }
    std::string summary;
    for (int dir = 0; dir < 2; ++dir) {
        const bool up = dir == 0;
        const std::string main = up ? main_up : main_down;
        auto x_of = [&](double d) { return up ? d : L - d; };
        std::vector<double> sd;   // stations in travel order, as d
        for (double x : st) sd.push_back(up ? x : L - x);
        std::vector<std::size_t> order(st.size());
        for (std::size_t k = 0; k < st.size(); ++k) order[k] = up ? k : st.size() - 1 - k;
        std::sort(sd.begin(), sd.end());
        std::vector<double> sigs;   // main-track signals, as d
        const double first = std::round(rng.uniform(0.0, 2000.0));
        sigs.push_back(first);
        for (std::size_t i = 0; i < sd.size(); ++i) {
            const std::size_t k = order[i];
            const double home = sd[i] - home_gap[k], starter = sd[i] + starter_gap[k];
            // Block signals between the last signal and the home, each block at least D.
            const double last = sigs.back();
            if (home > last + 200.0) {
                const int n = std::max(1, static_cast<int>((home - last) / D));
                for (int j = 1; j < n; ++j) sigs.push_back(std::round(last + (home - last) * j / n));
                sigs.push_back(home);
            }
            if (starter > sigs.back() + 1.0) sigs.push_back(starter);
            // A loop beside the platform, for trains that call on it: from the home side of the
            // platform to beyond the starter's overlap, with a starter of its own.
            if (has_loop[k]) {
                // (single track: one loop for both directions, as long either side of the mark)
                const double half = starter_gap[k] + overlap + 150.0;
                const double a = single ? sd[i] - half : sd[i] - 250.0, b = starter + overlap + 150.0;
                std::string id = (single ? "L" : (up ? "UL" : "DL")) + std::to_string(k);
                if (up || !single) {
                    tracks += "    - {id: " + id + ", parent: " + main + ", from: " + km(std::min(x_of(a), x_of(b))) +
                              ", to: " + km(std::max(x_of(a), x_of(b))) + ", directions: " +
                              (single ? "both" : up ? "up" : "down") + ", speed_limit: 60 km/h}\n";
                }
                (up ? loop_up : loop_down)[k] = id;
                add_signal(id, x_of(starter), up);
            }
        }
        // Blocks on to the far end.
        const double tail_from = sigs.back();
        const int n = static_cast<int>((L - 300.0 - tail_from) / D);
        for (int j = 1; j <= n; ++j) sigs.push_back(std::round(tail_from + (L - 300.0 - tail_from) * j / std::max(n, 1)));
        for (double d : sigs)
            if (d >= 0.0 && d < L) add_signal(main, x_of(d), up);
        summary += (up ? " up signals at" : "; down signals at");
        for (double d : sigs) summary += " " + std::to_string(static_cast<long>(d));
    }

    std::string y = "knockon: 1\nname: Random layout " + std::to_string(seed) + " (generated)\nline_type: mixed\n";
    y += "infrastructure:\n  length: " + km(L) + "\n  gradients:\n";
    for (auto& g : grads) {
        char buf[96];
        std::snprintf(buf, sizeof buf, "    - {from: %s, value: %.0f per mille}\n", km(g.first).c_str(), g.second);
        y += buf;
    }
    y += "  speed_limits: [{from: 0 km, value: " + std::to_string(static_cast<int>(line_speed_kmh)) + " km/h}]\n";
    y += "  tracks:\n" + tracks;
    y += "  stations:\n";
    for (std::size_t k = 0; k < st.size(); ++k)
        y += "    - {id: S" + std::to_string(k) + ", name: Station " + std::to_string(k) + ", at: " + km(st[k]) + "}\n";
    y += "  signalling:\n    areas: [{from: 0 km, to: " + km(L) + ", system: " + system + "}]\n";
    y += "    defaults: {sighting_distance: " + std::to_string(static_cast<int>(sighting)) +
         " m, overlap: " + std::to_string(static_cast<int>(overlap)) + " m, distant_distance: " +
         std::to_string(static_cast<long>(std::ceil(D))) + " m}\n";
    y += "    interlocking: {route_setup: " + std::to_string(3 + rng.pick(12)) + " s, release: " +
         std::to_string(1 + rng.pick(5)) + " s, sight_reaction: " + std::to_string(6 + rng.pick(10)) + " s}\n";
    y += "  signals:\n" + signals;
    char types[1200];
    std::snprintf(types, sizeof types,
                  "train_types:\n"
                  "  - {id: MU, length: %.0f m, mass: 220 t, rotating_mass_factor: 1.08, max_speed: 160 km/h,\n"
                  "     traction: {max_force: 200 kN, power: 3 MW}, resistance: {a: 2 kN, b: 20 N/(m/s), c: 5 N/(m/s)2},\n"
                  "     braking: {deceleration: %.2f m/s2, delay: 2 s}, min_dwell: 30 s}\n"
                  "  - {id: FR, length: %.0f m, mass: 1200 t, rotating_mass_factor: 1.06, max_speed: %.0f km/h,\n"
                  "     traction: {max_force: 300 kN, power: 4 MW}, resistance: {a: 12 kN, b: 100 N/(m/s), c: 10 N/(m/s)2},\n"
                  "     braking: {deceleration: %.2f m/s2, delay: 2 s}, min_dwell: 60 s}\n",
                  emu_length, emu_brake, frt_length, frt_speed_kmh, frt_brake);
    y += types;

    // Services: per direction 1-3 trains, 25 min apart; on single track the down trains come an
    // hour and a half after the up ones, so no two trains meet.
    y += "timetable:\n  rounding: 1 s\n  services:\n";
    int svc = 0;
    for (int dir = 0; dir < 2; ++dir) {
        const bool up = dir == 0;
        const int n = 1 + rng.pick(3);
        for (int j = 0; j < n; ++j) {
            const double t0 = 6 * 3600.0 + (up ? 0.0 : (single ? 5400.0 : 300.0)) + j * 1500.0 + rng.pick(60);
            const bool frt = freight && rng.chance(0.35);
            const bool enters = rng.chance(0.5);
            const bool leaves = rng.chance(0.6);
            std::vector<std::size_t> order(st.size());
            for (std::size_t k = 0; k < st.size(); ++k) order[k] = up ? k : st.size() - 1 - k;
            std::string calls;
            for (std::size_t i = 0; i < order.size(); ++i) {
                const std::size_t k = order[i];
                const bool last = i + 1 == order.size();
                const bool first = i == 0;
                bool stops = frt ? false : rng.chance(0.6);
                if (first && !enters) stops = true;
                if (last && !leaves) stops = true;
                const std::string& loop = (up ? loop_up : loop_down)[k];
                const bool on_loop = stops && !frt && !loop.empty() && rng.chance(0.5);
                std::string c = "{station: S" + std::to_string(k);
                if (first) c += stops ? ", dep: " + clock(t0) : ", pass: " + clock(t0);
                else if (!stops) c += ", pass: auto";
                if (on_loop) c += ", track: " + loop;
                calls += (i ? ", " : "") + c + "}";
            }
            y += "    - {id: T" + std::to_string(++svc) + ", type: " + (frt ? "FR" : "MU") +
                 ", category: c, direction: " + (up ? "up" : "down") + (enters ? ", enter: {}" : "") +
                 (leaves ? ", leave: true" : "") + ",\n       calls: [" + calls + "]}\n";
        }
    }
    out.yaml = y;
    out.summary = (single ? "single track, " : "double track, ") + system + ", sighting " +
                  std::to_string(static_cast<int>(sighting)) + " m," + summary;
    return out;
}

}  // namespace knockon::layoutgen
