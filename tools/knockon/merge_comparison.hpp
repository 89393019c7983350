#pragma once
// knockon merge of a comparison's shards (compare --shard K/N --out): each variant's days folded
// again, shard by shard, into the comparison file one run of `compare` would have written.
#include <string>
#include <vector>

#include "tools/results/shard_hdf5.hpp"
#include "tools/knockon/options.hpp"

namespace knockon::cli {

// `shards`: comparison shards already checked against each other and whole, in shard order (every
// shard of the comparison once).  Writes --out, prints what compare prints, returns the exit status.
int merge_comparison(const std::vector<ShardFile>& shards, const po::variables_map& vm, const std::string& command_line);

}  // namespace knockon::cli
