#pragma once
// A Monte Carlo study spread over the ranks of an MPI run (tools/knockon/ranks).
//
// Rank r runs block r + 1 of P of the replications (shard_range, the blocks of simulate --shard),
// with its own threads.  The other ranks hand their days (ReplicationFigures, every value to the
// bit: tools/results/replication_bytes) to rank 0, which folds them after its own block, rank by rank,
// so in replication order, with fold_day, as one process and `knockon merge` do: the study equals
// a one-process run's to the bit, whatever the number of ranks and threads.
//
// Traced days: rank 0 runs the traced days of the other ranks' blocks again once it has folded
// every day (a day depends on its replication number alone), so that all traces reach the one file
// it writes.  That repeats the traced days' work; with `--traces all` rank 0 runs the whole study
// again (README, "Running a study on a cluster").
#include <optional>
#include <string>

#include "sim/study.hpp"

namespace knockon::cli {

// What the ranks of one study must agree on: the hash of the scenario text and variant they read,
// and the command line but for --threads (each rank may have its own).
std::string study_fingerprint(const std::string& scenario_hash, const std::string& command_line);

// `options` as for run_study over the whole study (first 0, every planned replication); its trace,
// on_trace and progress are used on rank 0 only, and `stop` must be null (under MPI a signal ends
// every rank at once).  A rank whose `fingerprint` (study_fingerprint) differs from rank 0's fails
// the run (UsageError, exit status 2).  Needs at least as many replications as ranks (UsageError).  Returns the whole study on
// rank 0; on the other ranks nullopt, once their days are sent.
std::optional<StudyResult> run_study_on_ranks(const SimModel& model, StudyOptions options, const std::string& fingerprint,
                                              const std::string& command);

}  // namespace knockon::cli
