#include "sim/shards.hpp"

#include <stdexcept>
#include <string>

namespace knockon {

ReplicationRange shard_range(std::uint32_t shard, std::uint32_t shards, std::uint32_t planned) {
    if (shards == 0 || shard == 0 || shard > shards)
        throw std::invalid_argument("shard " + std::to_string(shard) + " of " + std::to_string(shards) +
                                    " does not exist (shards are numbered 1 to their count)");
    // 64-bit products: planned and shards both up to 2^32 - 1.
    const auto at = [&](std::uint64_t k) { return static_cast<std::uint32_t>(k * planned / shards); };
    return {at(shard - 1), at(shard)};
}

}  // namespace knockon
