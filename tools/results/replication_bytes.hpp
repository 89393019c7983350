#pragma once
// One simulated day's contribution to a study (ReplicationFigures) as bytes, for handing days
// between the processes of one study (the ranks of an MPI run) so that one of them folds them all
// in replication order (fold_day, sim/study.hpp).
//
// Every float and double travels as its bits, so the day folded on the receiving side is the day
// that was simulated, to the bit.  The bytes are in the sending machine's order: the processes of
// one study run the same program on the same kind of machine (they are never a file format).
// Of a deadlocked day's report only what a study keeps travels: time, cause and description.
#include <cstddef>
#include <stdexcept>
#include <string>

#include "sim/study_figures.hpp"

namespace knockon {

struct ReplicationBytesError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// Appends the day to `out`.
void append_day_bytes(std::string& out, const ReplicationFigures& day);

// Reads one day from `bytes` starting at `at`, and moves `at` past it.  Throws ReplicationBytesError
// when the bytes end before the day does or hold an impossible count.
ReplicationFigures read_day_bytes(const std::string& bytes, std::size_t& at);

}  // namespace knockon
