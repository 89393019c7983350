#pragma once
// The processes one command runs in: this process alone, or the ranks an MPI launcher (mpirun)
// started.  Two builds of the same calls: tools/knockon/ranks_mpi.cpp when the build found MPI,
// tools/knockon/ranks_single.cpp otherwise (one process, always rank 0 of 1).
//
// MPI is started only when the environment shows that an MPI launcher started the program, so a
// program built with MPI and started on its own behaves as one built without: no MPI start-up,
// nothing printed.  Under a launcher every rank runs the same command; the ranks other than 0 print
// nothing (their stdout and stderr go to /dev/null): rank 0 prints the results, and prints for them
// the failure any rank reports.
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

namespace knockon::cli {

// Starts MPI when launched by an MPI launcher (and built with it); otherwise does nothing.
void start_ranks(int& argc, char**& argv);
// Ends MPI when it was started (after the command returned normally).
void end_ranks();

int rank();         // 0 .. rank_count() - 1; 0 without a launcher
int rank_count();   // 1 without a launcher
inline bool spread_over_ranks() { return rank_count() > 1; }

// A command has failed on this rank (status as main() would exit with, the message it would print).
// On rank 0: removes this process's temporary output files and ends every rank with `status`
// (MPI_Abort).  On another rank: hands the failure to rank 0, which prints it ("process K of P:
// message") and ends every rank the same way.  Returns only when there is one rank.
void fail_all_ranks(int status, const std::string& command, const std::string& message);

// Rank 0, while it works on its own share: if another rank has reported a failure, prints it and
// ends every rank (as fail_all_ranks).  Cheap: one non-blocking test.
void check_other_ranks(const std::string& command);

// Another rank: sends its share to rank 0, a chunk at a time (each chunk freed once sent).
void send_to_rank0(std::vector<std::string>& chunks);
// Rank 0: receives the chunks `from` sends, in order, handing each to `take`; ends every rank if
// any rank reports a failure meanwhile.
void receive_from_rank(int from, const std::string& command, const std::function<void(std::string&& chunk)>& take);

}  // namespace knockon::cli
