#pragma once
// A study split into shards that run apart (batch jobs, MPI ranks) and are merged afterwards.
// Each shard runs one contiguous block of the replications, so a merge folds the shards' days in
// shard order and meets them in replication order: the study's running sums then add up exactly
// as in one run, and the merged figures equal that run's to the bit.
#include <cstdint>

namespace knockon {

// Replications [first, end) of a study.
struct ReplicationRange {
    std::uint32_t first = 0, end = 0;
    std::uint32_t size() const { return end - first; }
};

// Shard `shard` (1-based) of `shards` of a study of `planned` replications: replications
// floor((shard-1) planned / shards) to floor(shard planned / shards) - 1, so the blocks follow
// each other without gap or overlap and their sizes differ by at most one.  std::invalid_argument
// unless 1 <= shard <= shards.
ReplicationRange shard_range(std::uint32_t shard, std::uint32_t shards, std::uint32_t planned);

}  // namespace knockon
