#pragma once
// Counter-based uniform random numbers for Monte Carlo studies (Random123 Philox4x32-10).
//
// Every number is a pure function of (seed, replication, kind, train key, place key, index): no
// generator state is carried along.  So replications are independent of each other and of the
// thread that runs them, and because the keys come from names (stable_key), not from positions in
// a list, the same train at the same station gets the same draws in every variant of a scenario
// that keeps its draw identity (common random numbers), whatever other trains or signals change.
// What the keys and the index stand for is decided by the caller (sim/delay_draws).
#include <cstdint>
#include <string_view>

#include <Random123/philox.h>

namespace knockon {

// What a draw is for; the first counter word.
enum class StreamKind : std::uint32_t { entry = 1, dwell = 2, running = 3, disruption = 4 };

// FNV-1a, 32 bits: a fixed hash that does not change between builds or standard libraries
// (std::hash may).  Collisions only make two places share draws, never break anything.
constexpr std::uint32_t stable_key(std::string_view text) {
    std::uint32_t h = 2166136261u;
    for (char c : text) {
        h ^= static_cast<unsigned char>(c);
        h *= 16777619u;
    }
    return h;
}

// Two 32-bit words as a double in (0, 1), both ends excluded, so that inverse CDFs stay finite.
// The top 52 bits select one of 2^52 cells; the value is the cell's midpoint, (m + 1/2) / 2^52,
// which is exact in a double, and symmetric: 1 - u is also a possible value.  (The 53-bit form
// m / 2^53 + 2^-54 rounds to exactly 1.0 at the top cell.)
constexpr double open_unit(std::uint32_t hi, std::uint32_t lo) {
    const std::uint64_t x = (static_cast<std::uint64_t>(hi) << 32) | lo;
    return (static_cast<double>(x >> 12) + 0.5) * 0x1p-52;
}

struct UniformPair {
    double first = 0.5, second = 0.5;   // independent uniforms in (0, 1)
};

class RandomStream {
public:
    // Key: (low 32 bits of seed xor high 32 bits, replication).
    RandomStream(std::uint64_t seed, std::uint32_t replication)
        : key_{{static_cast<std::uint32_t>(seed) ^ static_cast<std::uint32_t>(seed >> 32), replication}} {}

    // Two independent uniforms from one Philox block: words 0-1 and words 2-3.  The counter is
    // (kind, train key, place key, index); `index` tells apart draws the other words do not.
    UniformPair uniforms(StreamKind kind, std::uint32_t train_key, std::uint32_t place_key,
                         std::uint32_t index = 0) const {
        const r123::Philox4x32::ctr_type ctr = {
            {static_cast<std::uint32_t>(kind), train_key, place_key, index}};
        const r123::Philox4x32::ctr_type out = r123::Philox4x32()(ctr, key_);
        return {open_unit(out[0], out[1]), open_unit(out[2], out[3])};
    }
    // The first of the pair.
    double uniform(StreamKind kind, std::uint32_t train_key, std::uint32_t place_key,
                   std::uint32_t index = 0) const {
        return uniforms(kind, train_key, place_key, index).first;
    }

private:
    r123::Philox4x32::key_type key_;
};

}  // namespace knockon
