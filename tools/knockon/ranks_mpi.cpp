// The ranks of an MPI run (built when CMake found MPI; tools/knockon/ranks.hpp says what each call
// does).  Only the main thread of a rank calls MPI (MPI_THREAD_FUNNELED): a study's worker threads
// never do.
#include <mpi.h>
#include <unistd.h>

#include <algorithm>
#include <climits>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <stdexcept>

#include "tools/results/output_file.hpp"
#include "tools/knockon/interrupt.hpp"
#include "tools/knockon/ranks.hpp"

namespace knockon::cli {
namespace {

enum Tag : int { kChunkSize = 1, kChunk = 2, kFailure = 3 };

// A failure report: the exit status, then as much of the message as fits.  Small, so that MPI
// sends it at once (eagerly) whatever rank 0 is doing.
constexpr int kFailureBytes = 1024;

// How long a rank other than 0, told to stop by a signal, waits before it ends.
constexpr unsigned kLingerSeconds = 2;

bool g_started = false;
int g_rank = 0, g_count = 1;
// Rank 0: the receive of any other rank's failure report, posted at start and tested while rank 0
// works or waits for chunks.
MPI_Request g_failure = MPI_REQUEST_NULL;
char g_failure_report[kFailureBytes];

// The environment an MPI launcher gives each process it starts (Open MPI's mpirun, or a PMI/PMIx
// launcher such as a batch system's srun).  A process started on its own has none of these.
bool launched_by_mpi() {
    for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_RANK", "PMI_SIZE"})
        if (std::getenv(name)) return true;
    return false;
}

[[noreturn]] void end_every_rank(int status) {
    knockon::remove_temporary_files();   // before MPI_Abort, which may end this process at once
    std::fflush(stdout);
    std::fflush(stderr);
    MPI_Abort(MPI_COMM_WORLD, status);
    std::_Exit(status);   // MPI_Abort does not return; should it, still end here
}

// Rank 0 has received a failure report: says whose and what, and ends every rank.
[[noreturn]] void report_failure(const MPI_Status& from, const std::string& command) {
    int length = 0;
    MPI_Get_count(&from, MPI_CHAR, &length);
    std::int32_t status = 1;
    std::string message = "(no message)";
    if (length >= static_cast<int>(sizeof status)) {
        std::memcpy(&status, g_failure_report, sizeof status);
        message.assign(g_failure_report + sizeof status, static_cast<std::size_t>(length) - sizeof status);
    }
    std::fprintf(stderr, "knockon %s: process %d of %d: %s\n", command.c_str(), from.MPI_SOURCE + 1, g_count,
                 message.c_str());
    end_every_rank(status);
}

}  // namespace

void start_ranks(int& argc, char**& argv) {
    if (!launched_by_mpi()) return;
    int provided = 0;
    MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
    g_started = true;
    MPI_Comm_rank(MPI_COMM_WORLD, &g_rank);
    MPI_Comm_size(MPI_COMM_WORLD, &g_count);
    if (g_rank != 0) {
        // Rank 0 speaks for the run: the others' output would repeat its own P - 1 times.
        if (!std::freopen("/dev/null", "w", stdout) || !std::freopen("/dev/null", "w", stderr))
            end_every_rank(1);
        // Rank 0 alone writes a file: when mpirun stops the run, the others must not end before
        // it has removed its temporary file (interrupt.hpp says why).  Longer than mpirun's default
        // wait between SIGTERM and SIGKILL (1 s), so that those ranks end by its SIGKILL.
        linger_on_signals(kLingerSeconds);
    } else if (g_count > 1) {
        MPI_Irecv(g_failure_report, kFailureBytes, MPI_CHAR, MPI_ANY_SOURCE, kFailure, MPI_COMM_WORLD, &g_failure);
    }
}

void end_ranks() {
    if (!g_started) return;
    if (g_failure != MPI_REQUEST_NULL) {
        MPI_Cancel(&g_failure);
        MPI_Wait(&g_failure, MPI_STATUS_IGNORE);
    }
    MPI_Finalize();
    g_started = false;
}

int rank() { return g_rank; }
int rank_count() { return g_count; }

void fail_all_ranks(int status, const std::string&, const std::string& message) {
    if (g_count == 1) return;
    if (g_rank == 0) end_every_rank(status);
    char report[kFailureBytes];
    const std::int32_t code = status;
    std::memcpy(report, &code, sizeof code);
    const std::size_t text = std::min(message.size(), sizeof report - sizeof code);
    std::memcpy(report + sizeof code, message.data(), text);
    MPI_Send(report, static_cast<int>(sizeof code + text), MPI_CHAR, 0, kFailure, MPI_COMM_WORLD);
    // Rank 0 reads the report after its current batch of days and ends every rank, this one too.
    // Should it never come to read it, end them from here after a minute.
    for (int i = 0; i < 600; ++i) ::usleep(100'000);
    end_every_rank(status);
}

void check_other_ranks(const std::string& command) {
    if (g_failure == MPI_REQUEST_NULL) return;
    int done = 0;
    MPI_Status from;
    MPI_Test(&g_failure, &done, &from);
    if (done) report_failure(from, command);
}

void send_to_rank0(std::vector<std::string>& chunks) {
    for (std::string& chunk : chunks) {
        if (chunk.empty()) continue;
        if (chunk.size() > static_cast<std::size_t>(INT_MAX))
            throw std::runtime_error("a share of the days to send to process 1 is over 2 GiB in one piece");
        const std::uint64_t size = chunk.size();
        MPI_Send(&size, 1, MPI_UINT64_T, 0, kChunkSize, MPI_COMM_WORLD);
        MPI_Send(chunk.data(), static_cast<int>(size), MPI_BYTE, 0, kChunk, MPI_COMM_WORLD);
        std::string().swap(chunk);   // its memory back now, not after the last chunk
    }
    const std::uint64_t end = 0;
    MPI_Send(&end, 1, MPI_UINT64_T, 0, kChunkSize, MPI_COMM_WORLD);
}

void receive_from_rank(int from, const std::string& command, const std::function<void(std::string&&)>& take) {
    while (true) {
        std::uint64_t size = 0;
        MPI_Request requests[2] = {g_failure, MPI_REQUEST_NULL};
        MPI_Irecv(&size, 1, MPI_UINT64_T, from, kChunkSize, MPI_COMM_WORLD, &requests[1]);
        int which = MPI_UNDEFINED;
        MPI_Status status;
        MPI_Waitany(2, requests, &which, &status);
        if (which == 0) report_failure(status, command);
        if (size == 0) return;
        std::string chunk(size, '\0');
        MPI_Recv(chunk.data(), static_cast<int>(size), MPI_BYTE, from, kChunk, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
        take(std::move(chunk));
    }
}

}  // namespace knockon::cli
