#include "tools/knockon/rank_study.hpp"

#include <stdexcept>
#include <vector>

#include "sim/shards.hpp"
#include "tools/results/replication_bytes.hpp"
#include "tools/knockon/options.hpp"
#include "tools/knockon/ranks.hpp"

namespace knockon::cli {
namespace {

// A rank sends its days in chunks of about this size: big enough that a chunk costs little, small
// enough that a chunk is freed as soon as it is sent.
constexpr std::size_t kChunkBytes = 8u << 20;

}  // namespace

std::string study_fingerprint(const std::string& scenario_hash, const std::string& command_line) {
    return "scenario " + scenario_hash + ", command '" + command_line_without_threads(command_line) + "'";
}

std::optional<StudyResult> run_study_on_ranks(const SimModel& model, StudyOptions options, const std::string& fingerprint,
                                              const std::string& command) {
    if (options.stop) throw std::logic_error("run_study_on_ranks: a study over ranks is not stopped by a flag");
    const auto ranks = static_cast<std::uint32_t>(rank_count());
    const std::uint32_t planned = options.replications;
    if (planned < ranks)
        throw UsageError("a study over " + std::to_string(ranks) + " processes needs at least " +
                         std::to_string(ranks) + " replications, not " + std::to_string(planned));
    const ReplicationRange block = shard_range(static_cast<std::uint32_t>(rank()) + 1, ranks, planned);
    options.first = block.first;
    options.replications = block.size();
    options.planned = planned;

    if (rank() != 0) {
        // The fingerprint first, then the days, in replication order.
        std::vector<std::string> chunks{fingerprint, std::string()};
        options.trace = nullptr;
        options.on_trace = nullptr;
        options.progress = nullptr;
        options.on_day = [&chunks](const ReplicationFigures& day) {
            if (chunks.back().size() >= kChunkBytes) chunks.emplace_back();
            append_day_bytes(chunks.back(), day);
        };
        run_study(model, options);
        send_to_rank0(chunks);
        return std::nullopt;
    }

    // Rank 0: its own block first (a failure another rank reports ends the run after a batch) ...
    const auto progress = options.progress;
    options.progress = [&](std::uint32_t done, std::uint32_t of) {
        check_other_ranks(command);
        if (progress) progress(done, of);
    };
    StudyResult study = run_study(model, options);
    // ... then every other rank's, in rank order: the days come in replication order.
    for (std::uint32_t from = 1; from < ranks; ++from) {
        bool first_chunk = true;
        receive_from_rank(static_cast<int>(from), command, [&](std::string&& chunk) {
            if (first_chunk) {
                first_chunk = false;
                if (chunk != fingerprint)
                    throw UsageError("process " + std::to_string(from + 1) + " of " + std::to_string(ranks) +
                                     " runs another study than process 1: " + chunk + " there, " + fingerprint +
                                     " here; every process must run the same command on the same scenario text");
                return;
            }
            for (std::size_t at = 0; at < chunk.size();) {
                ReplicationFigures day = read_day_bytes(chunk, at);
                if (day.stats.replication != study.replications.size())
                    throw std::runtime_error("process " + std::to_string(from + 1) + " sent replication " +
                                             std::to_string(day.stats.replication) + " where replication " +
                                             std::to_string(study.replications.size()) + " should come");
                fold_day(study, std::move(day));
            }
        });
    }
    if (study.replications.size() != planned)
        throw std::runtime_error("the processes sent " + std::to_string(study.replications.size()) + " days of " +
                                 std::to_string(planned));
    // The traced days of the other blocks, run again here, in replication order after rank 0's own.
    if (options.trace && options.on_trace)
        for (std::uint32_t k = block.end; k < planned; ++k)
            if (options.trace(k)) {
                const InjectedDelays delays = options.draw(k);
                options.on_trace(k, simulate_day(model, delays, options.sim));
            }
    return study;
}

}  // namespace knockon::cli
