// A study spread over the ranks of an MPI run (mpirun -np P knockon simulate ... --replications N):
// its file equals the one-process, one-thread run's to the bit, and a failing process, bad input
// or Ctrl-C ends every process with no file under the output's name.  Built only when CMake found
// MPI (KNOCKON_MPIEXEC, the launcher it found).
#include <catch2/catch.hpp>

#ifdef KNOCKON_MPIEXEC

#include "cli_support.hpp"

using namespace clitest;

namespace {

// Open MPI's launcher: --oversubscribe lets a test start more ranks than the machine has cores;
// the environment lets it run as root, as CI does (ignored by a non-root user), and has the ranks
// on one machine copy messages through shared memory without reading each other's memory directly
// (which containers often forbid: common practice, no source).  In the sanitized build the leak
// check leaves out what Open MPI itself keeps to the end (tests/data/lsan_open_mpi.supp; the slow
// unwinder, as Open MPI is built without frame pointers).  A hung run is ended after 2 min.
const std::string kLauncher =
    "env OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 OMPI_MCA_btl_vader_single_copy_mechanism=none "

    "LSAN_OPTIONS=suppressions='" KNOCKON_SOURCE_DIR "/tests/data/lsan_open_mpi.supp':fast_unwind_on_malloc=0 "
    "timeout 120 '" KNOCKON_MPIEXEC "' --oversubscribe";

// Runs `launch` (a launcher's arguments, each program quoted by the caller) in `dir`.
Result mpirun(const std::string& launch, const TempDir& dir) {
    const fs::path out = dir.path / "stdout.txt", err = dir.path / "stderr.txt";
    const std::string cmd = "cd " + q(dir.path) + " && " + kLauncher + " " + launch + " >" + q(out) + " 2>" + q(err);
    const int rc = std::system(cmd.c_str());
    Result r;
    r.status = (rc != -1 && WIFEXITED(rc)) ? WEXITSTATUS(rc) : -1;
    r.out = read_text(out);
    r.err = read_text(err);
    return r;
}

const std::string kExeQ = "'" + kExe + "'";
const std::string kStudy = q(kDelayedLine) + " --replications 7 --seed 5 --traces sample:3";

// Nothing at all under the output's name, nor a temporary copy of it.
bool nothing_written(const TempDir& dir, const std::string& name) {
    for (const auto& e : fs::directory_iterator(dir.path))
        if (e.path().filename().string().rfind(name, 0) == 0) return false;
    return true;
}

std::size_t count_of(const std::string& text, const std::string& what) {
    std::size_t n = 0;
    for (std::size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) ++n;
    return n;
}

}  // namespace

TEST_CASE("mpirun with two processes writes the study file one process writes to the bit", "[mpi]") {
    TempDir dir;
    const Result one = clitest::knockon("simulate " + kStudy + " --threads 1 --out " + q(dir.path / "one.h5"), dir);
    INFO(one.err);
    REQUIRE(one.status == 0);
    const Result two =
        mpirun("-np 2 " + kExeQ + " simulate " + kStudy + " --threads 2 --out " + q(dir.path / "two.h5"), dir);
    INFO(two.err);
    REQUIRE(two.status == 0);
    // The same summary, but for how the days were run.
    const std::string how = "2 processes of 2 threads";
    REQUIRE(two.out.find(how) != std::string::npos);
    std::string same = two.out;
    same.replace(same.find(how), how.size(), "1 thread");
    CHECK(same == one.out);
    // Nothing of knockon's own on stderr (the launcher may add notices of its own on some machines).
    CHECK(two.err.find("knockon") == std::string::npos);
    // What a study says on stderr is said once, by the first process, not once per process.
    const Result note = mpirun("-np 3 " + kExeQ + " simulate " + q(kTwoTrains) + " --replications 3", dir);
    INFO(note.err);
    CHECK(note.status == 0);
    CHECK(count_of(note.err, "has no `delays:` section") == 1);
    CHECK(count_of(note.out, "simulated days") == 1);

    // Every dataset and attribute below the root equal (h5diff, hdf5-tools), the traced days too;
    // the root's attributes but the command line (provenance: it names the output) equal as well.
    const auto h5diff = [&](const std::string& a, const std::string& b) {
        const std::string cmd = "h5diff --exclude-attribute / " + q(dir.path / a) + " " + q(dir.path / b) + " >" +
                                q(dir.path / "h5diff.txt") + " 2>&1";
        return std::system(cmd.c_str());
    };
    {
        INFO(read_text(dir.path / "h5diff.txt"));
        CHECK(h5diff("one.h5", "two.h5") == 0);
    }
    const std::string root = "h5dump -A -g / " + q(dir.path / "one.h5") + " | grep -v -e command_line -e one.h5 >" +
                             q(dir.path / "a.txt") + " && h5dump -A -g / " + q(dir.path / "two.h5") +
                             " | grep -v -e command_line -e two.h5 >" + q(dir.path / "b.txt");
    REQUIRE(std::system(root.c_str()) == 0);
    CHECK(read_text(dir.path / "a.txt").find("replications") != std::string::npos);
    CHECK(read_text(dir.path / "a.txt") == read_text(dir.path / "b.txt"));
    // The traced days of the second process's block (sample:3 of 7: days 2, 4 and 6) are there.
    const std::string traced = "h5ls " + q(dir.path / "two.h5") + "/replications >" + q(dir.path / "traced.txt");
    REQUIRE(std::system(traced.c_str()) == 0);
    CHECK(count_of(read_text(dir.path / "traced.txt"), "Group") == 3);

    // The comparison can fail: three processes of another seed give another file.
    REQUIRE(mpirun("-np 3 " + kExeQ + " simulate " + q(kDelayedLine) +
                       " --replications 7 --seed 6 --traces sample:3 --out " + q(dir.path / "other.h5"),
                   dir)
                .status == 0);
    CHECK(h5diff("one.h5", "other.h5") != 0);
}

TEST_CASE("compare under mpirun writes the comparison file one process writes to the bit", "[mpi]") {
    TempDir dir;
    // First-come route setting: some days end in deadlock, so their reports travel too.
    const std::string crossings = kSource + "/tests/data/study/single_line_crossings.yaml";
    const std::string args = "compare " + q(crossings) + " --variants base,cab --replications 30 --order first-come " +
                             "--allow-deadlock --out ";
    const Result one = clitest::knockon(args + q(dir.path / "one.h5"), dir);
    INFO(one.err);
    REQUIRE(one.status == 0);
    REQUIRE(one.out.find("ended in deadlock") != std::string::npos);
    const Result three = mpirun("-np 3 " + kExeQ + " " + args + q(dir.path / "three.h5") + " --threads 2", dir);
    INFO(three.err);
    REQUIRE(three.status == 0);
    // The same tables, but for the threads each process ran.
    std::string same = three.out;
    const std::string how = "(seed 1, 2 threads)";
    REQUIRE(same.find(how) != std::string::npos);
    same.replace(same.find(how), how.size(), "(seed 1, 1 thread)");
    CHECK(same == one.out);
    const std::string cmd = "h5diff --exclude-attribute / " + q(dir.path / "one.h5") + " " + q(dir.path / "three.h5") +
                            " >" + q(dir.path / "h5diff.txt") + " 2>&1";
    const int rc = std::system(cmd.c_str());
    INFO(read_text(dir.path / "h5diff.txt"));
    CHECK(rc == 0);
}

TEST_CASE("mpirun with a failing process or bad input exits non-zero and writes nothing", "[mpi]") {
    TempDir dir;
    const std::string out = " --out " + q(dir.path / "study.h5");
    const auto refused = [&](const std::string& launch, int status, const std::string& what) {
        const Result r = mpirun(launch, dir);
        INFO(r.err);
        CHECK(r.status == status);
        CHECK(r.err.find(what) != std::string::npos);
        CHECK(r.out.find("simulated days") == std::string::npos);
        CHECK(nothing_written(dir, "study.h5"));
        return r;
    };
    SECTION("the second process fails on its own: the first says so and ends both") {
        refused("-np 1 " + kExeQ + " simulate " + kStudy + out + " : -np 1 " + kExeQ + " simulate " + kStudy +
                    " --punctuality x" + out,
                2, "process 2 of 2: knockon simulate: ");
    }
    SECTION("the second process reads another scenario") {
        refused("-np 1 " + kExeQ + " simulate " + kStudy + out + " : -np 1 " + kExeQ + " simulate " + q(kTwoTrains) +
                    " --replications 7 --seed 5 --traces sample:3" + out,
                2, "process 2 of 2 runs another study than process 1: scenario fnv1a64:");
    }
    SECTION("a scenario that is not there: said once, not by every process") {
        const Result r = refused("-np 2 " + kExeQ + " simulate " + q(dir.path / "absent.yaml") +
                                     " --replications 7" + out,
                                 2, "absent.yaml");
        CHECK(count_of(r.err, "nothing was written") == 1);
    }
    SECTION("fewer days than processes") {
        refused("-np 3 " + kExeQ + " simulate " + q(kDelayedLine) + " --replications 2" + out, 2,
                "needs at least 3 replications");
    }
    SECTION("--shard under mpirun") {
        refused("-np 2 " + kExeQ + " simulate " + kStudy + " --shard 1/2" + out, 2, "--shard");
    }
    SECTION("compare --shard under mpirun") {
        refused("-np 2 " + kExeQ + " compare " + q(kSource + "/tests/data/study/single_line_crossings.yaml") +
                    " --variants base,cab --replications 7 --shard 1/2" + out,
                2, "--shard runs one share of a comparison's days in one process");
    }
    SECTION("a command that runs in one process") {
        refused("-np 2 " + kExeQ + " plan " + q(kDelayedLine), 2, "runs in one process");
    }
}

TEST_CASE("Ctrl-C under mpirun ends every process and leaves no file", "[mpi]") {
    TempDir dir;
    // Far more days than run before the signal comes.  The launcher in the background, the signal
    // once the output's temporary file is there (the days are under way), sent once to mpirun, as a
    // terminal's Ctrl-C reaches it.  Not to `timeout` (kLauncher's guard against a hang): it would
    // pass SIGINT on twice, to mpirun and to its process group, and Open MPI's mpirun takes a second
    // signal for a demand to kill every process at once with SIGKILL, which no process can handle
    // (README "Under MPI"; about 2 runs in 10 left the temporary file so).
    std::ofstream(dir.path / "run.sh") << kLauncher << " -np 2 " << kExeQ << " simulate " << q(kDemo)
                                       << " --replications 100000 --out study.h5 >out.txt 2>err.txt &\n"
                                       << "pid=$!\n"
                                       << "for n in $(seq 1200); do\n"
                                       << "  ls | grep -q '^study.h5.partial-' && break\n"
                                       << "  sleep 0.05\n"
                                       << "done\n"
                                       << "ls >seen.txt\n"
                                       << "sleep 1\n"
                                       << "kill -INT $(cat /proc/$pid/task/$pid/children)\n"   // mpirun, the child of timeout
                                       << "wait $pid\n"
                                       << "rc=$?\n"
                                       // mpirun may return while a process still runs its handler:
                                       // up to 10 s for the temporary file to go.
                                       << "for n in $(seq 200); do\n"
                                       << "  ls | grep -q '^study.h5' || break\n"
                                       << "  sleep 0.05\n"
                                       << "done\n"
                                       << "ls >left.txt\n"
                                       << "exit $rc\n";
    const int rc = std::system(("cd " + q(dir.path) + " && bash run.sh").c_str());
    INFO(read_text(dir.path / "err.txt"));
    // The run was under way (its temporary file was there) when the signal came ...
    CHECK(read_text(dir.path / "seen.txt").find("study.h5.partial-") != std::string::npos);
    // ... and it ended, not normally, and left nothing.
    CHECK(!(WIFEXITED(rc) && WEXITSTATUS(rc) == 0));
    // Nothing under the output's name, nor its temporary `.partial-` file: mpirun sends SIGTERM to
    // every process and SIGKILL as soon as one has ended; the processes other than the first linger
    // (interrupt.hpp), so the first has the time to remove its file.
    INFO("left: " << read_text(dir.path / "left.txt"));
    CHECK(nothing_written(dir, "study.h5"));
    CHECK(read_text(dir.path / "out.txt").find("simulated days") == std::string::npos);
}

#endif  // KNOCKON_MPIEXEC
