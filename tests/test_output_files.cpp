// Output files never harm another file and never stay half-written (tools/results/output_file.hpp):
// temporary names created exclusively and never through a link, targets that are not regular
// files or that are an input refused (exit status 2), and the temporary file removed on SIGTERM,
// SIGHUP and a second Ctrl-C.  Expected behaviour is our own rule (README, "Output files"), from
// the POSIX semantics of open(O_CREAT|O_EXCL) and rename(2).
#include <catch2/catch.hpp>

#include <fcntl.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/sysmacros.h>
#include <unistd.h>

#include <algorithm>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/results/output_file.hpp"

using namespace clitest;

// clitest::knockon under a name that does not clash with namespace knockon.
static Result run_cli(const std::string& args, const TempDir& dir, int timeout_s) { return clitest::knockon(args, dir, timeout_s); }
using Catch::Matchers::Contains;

namespace {

std::vector<std::string> entries(const fs::path& dir) {
    std::vector<std::string> out;
    for (const auto& e : fs::directory_iterator(dir)) out.push_back(e.path().filename().string());
    std::sort(out.begin(), out.end());
    return out;
}

void write_text(const fs::path& p, const std::string& text) {
    std::ofstream out(p, std::ios::binary);
    out << text;
}

// The demo scenario copied into `dir` (a test may overwrite-protect it by comparing bytes).
fs::path copy_scenario(const TempDir& dir, const std::string& from = kTwoTrains) {
    const fs::path p = dir.path / "line.yaml";
    fs::copy_file(from, p);
    return p;
}

}  // namespace

TEST_CASE("output files: the temporary file is created exclusively and never through a link", "[output]") {
    const TempDir dir;
    const fs::path victim = dir.path / "victim.txt";
    write_text(victim, "IMPORTANT DATA");
    const fs::path target = dir.path / "out.txt";

    // A creator that finds a link planted under its first name (as an attacker racing for it would)
    // must be refused by O_EXCL and move to another name; the link's target is never written.
    int attempts = 0;
    std::string first;
    {
        knockon::TemporaryFile tmp(target.string(), [&](const std::string& name) {
            if (attempts++ == 0) {
                first = name;
                fs::create_symlink(victim, name);
            }
            const int fd = ::open(name.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0666);
            if (fd < 0) return false;
            ::close(fd);
            return true;
        });
        CHECK(attempts == 2);
        CHECK(tmp.name() != first);
        CHECK(tmp.name().rfind(target.string() + ".partial-", 0) == 0);
        CHECK(fs::is_symlink(first));   // left alone: it is not ours
    }
    CHECK(read_text(victim) == "IMPORTANT DATA");

    // HDF5 files are created with H5F_ACC_EXCL: a link (even a dangling one) at the name is refused.
    const knockon::h5::QuietErrors quiet;
    const fs::path link = dir.path / "link.h5";
    fs::create_symlink(victim, link);
    CHECK_THROWS_AS(knockon::h5::File(link.string(), "shown.h5"), knockon::h5::Error);
    CHECK(read_text(victim) == "IMPORTANT DATA");
    const fs::path dangling = dir.path / "dangling.h5";
    fs::create_symlink(dir.path / "nowhere.h5", dangling);
    CHECK_THROWS_AS(knockon::h5::File(dangling.string(), "shown.h5"), knockon::h5::Error);
    CHECK_FALSE(fs::exists(dir.path / "nowhere.h5"));
}

TEST_CASE("output files: temporary names cannot be guessed", "[output]") {
    const TempDir dir;
    const fs::path target = dir.path / "out.txt";
    std::vector<std::string> names;
    for (int i = 0; i < 4; ++i) {
        knockon::TemporaryFile tmp(target.string(), [](const std::string& name) {
            const int fd = ::open(name.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW, 0666);
            if (fd >= 0) ::close(fd);
            return fd >= 0;
        });
        names.push_back(tmp.name());
    }   // each removed again
    std::sort(names.begin(), names.end());
    CHECK(std::unique(names.begin(), names.end()) == names.end());   // a new name every time in one process
    CHECK(entries(dir.path).empty());
}

TEST_CASE("output files: a link planted at the old predictable name changes nothing", "[output][cli]") {
    // The reproducer of the defect: a link named <out>.partial-<pid> made before knockon starts.
    const TempDir dir;
    const fs::path scenario = copy_scenario(dir);
    const fs::path victim = dir.path / "victim.txt", out = dir.path / "report.html";
    write_text(victim, "IMPORTANT DATA");
    const std::string cmd = "cd " + q(dir.path) + " && sh -c 'ln -s " + victim.string() + " report.html.partial-$$; exec " +
                            kExe + " report " + scenario.string() + " -o report.html' >/dev/null 2>&1";
    REQUIRE(std::system(cmd.c_str()) == 0);
    CHECK(read_text(victim) == "IMPORTANT DATA");
    CHECK_FALSE(fs::is_symlink(out));
    CHECK(fs::is_regular_file(out));
    CHECK_THAT(read_text(out), Contains("<!DOCTYPE html>"));
}

TEST_CASE("output files: a device node as the target is refused and left as it is", "[output][cli]") {
    const TempDir dir;
    const fs::path scenario = copy_scenario(dir);
    // As root a private node (the null device's numbers), so that a faulty build replaces only that
    // one; otherwise /dev/null itself, which only root could replace.
    fs::path node = "/dev/null";
    if (::geteuid() == 0) {
        node = dir.path / "null";
        REQUIRE(::mknod(node.c_str(), S_IFCHR | 0666, makedev(1, 3)) == 0);
    }
    struct stat before {};
    REQUIRE(::stat(node.c_str(), &before) == 0);
    REQUIRE(S_ISCHR(before.st_mode));
    for (const std::string& args :
         {"report " + q(scenario) + " -o " + q(node), "plot " + q(scenario) + " --chart capacity --svg " + q(node),
          "simulate " + q(scenario) + " --out " + q(node)}) {
        INFO(args);
        const Result r = run_cli(args, dir, 60);
        CHECK(r.status == 2);   // main.cpp: bad input
        CHECK_THAT(r.err, Contains(node.string() + ": is a character device"));
        CHECK(r.out.empty());
    }
    struct stat after {};
    REQUIRE(::stat(node.c_str(), &after) == 0);
    CHECK(S_ISCHR(after.st_mode));
    CHECK(after.st_rdev == before.st_rdev);
    CHECK(after.st_ino == before.st_ino);
}

TEST_CASE("output files: a FIFO or a directory as the target is refused and left as it is", "[output][cli]") {
    const TempDir dir;
    const fs::path scenario = copy_scenario(dir);
    const fs::path fifo = dir.path / "pipe", folder = dir.path / "folder";
    REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
    fs::create_directories(folder / "inside");
    for (const auto& [target, kind] : {std::pair{fifo, std::string("is a FIFO")}, {folder, "is a directory"}}) {
        for (const std::string& args :
             {"plot " + q(scenario) + " --chart capacity --svg " + q(target), "report " + q(scenario) + " -o " + q(target),
              "simulate " + q(scenario) + " --replications 2 --out " + q(target)}) {
            INFO(args);
            const Result r = run_cli(args, dir, 60);   // a FIFO must not be opened: no hang
            CHECK(r.status == 2);
            CHECK_THAT(r.err, Contains(target.string() + ": " + kind));
        }
    }
    struct stat st {};
    REQUIRE(::lstat(fifo.c_str(), &st) == 0);
    CHECK(S_ISFIFO(st.st_mode));
    CHECK(fs::is_directory(folder / "inside"));
    CHECK(entries(dir.path) == std::vector<std::string>{"folder", "line.yaml", "pipe", "stderr.txt", "stdout.txt"});
}

TEST_CASE("output files: an output path that is an input is refused", "[output][cli]") {
    const TempDir dir;
    const fs::path scenario = copy_scenario(dir);
    const std::string original = read_text(scenario);
    const fs::path soft = dir.path / "soft.yaml", hard = dir.path / "hard.yaml";
    fs::create_symlink(scenario, soft);
    fs::create_hard_link(scenario, hard);
    for (const fs::path& out : {scenario, soft, hard}) {
        for (const std::string& args :
             {"report " + q(scenario) + " -o " + q(out), "plot " + q(scenario) + " --chart capacity --svg " + q(out),
              "simulate " + q(scenario) + " --out " + q(out),
              "simulate " + q(scenario) + " --replications 3 --out " + q(out)}) {
            INFO(args);
            const Result r = run_cli(args, dir, 60);
            CHECK(r.status == 2);
            CHECK_THAT(r.err, Contains(out.string() + ": is the input file " + scenario.string()));
        }
    }
    CHECK(read_text(scenario) == original);
    CHECK(fs::is_symlink(soft));

    // A results file and the scenario a report plans from it are inputs too.
    const fs::path results = dir.path / "day.h5";
    REQUIRE(run_cli("simulate " + q(scenario) + " --out " + q(results), dir, 120).status == 0);
    const std::string stored = read_text(results);
    Result r = run_cli("report " + q(results) + " --scenario " + q(scenario) + " -o " + q(results), dir, 60);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Contains("is the input file"));
    r = run_cli("report " + q(results) + " --scenario " + q(scenario) + " -o " + q(hard), dir, 60);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Contains(hard.string() + ": is the input file " + scenario.string()));
    CHECK(read_text(results) == stored);
    CHECK(read_text(scenario) == original);
}

TEST_CASE("output files: a symbolic link at the target is refused, neither followed nor replaced", "[output][cli]") {
    // Followed, a link planted at the output name in a shared directory would choose where the
    // file goes; replaced, a system's link (as /dev/stdout with stdout sent to a file) would be lost.
    const TempDir dir;
    const fs::path scenario = copy_scenario(dir);
    const fs::path other = dir.path / "other.svg", link = dir.path / "chart.svg", dangling = dir.path / "gone.svg";
    write_text(other, "KEEP");
    fs::create_symlink(other, link);
    fs::create_symlink(dir.path / "nowhere.svg", dangling);
    for (const fs::path& target : {link, dangling}) {
        const Result r = run_cli("plot " + q(scenario) + " --chart capacity --svg " + q(target), dir, 60);
        CHECK(r.status == 2);
        CHECK_THAT(r.err, Contains(target.string() + ": is a symbolic link"));
        CHECK(fs::is_symlink(target));
    }
    CHECK(read_text(other) == "KEEP");
    CHECK_FALSE(fs::exists(dir.path / "nowhere.svg"));
    // A link made as /dev/stdout is, with stdout sent to a regular file (so that, followed, it names
    // a regular file).  A private one: a faulty build run as root replaces only that.
    const fs::path out = dir.path / "stdout", sink = dir.path / "sink.txt";
    fs::create_symlink("/proc/self/fd/1", out);
    const std::string cmd = q(kExe) + " plot " + q(scenario) + " --chart capacity --svg " + q(out) + " >" + q(sink) + " 2>&1";
    const int rc = std::system(cmd.c_str());
    CHECK((WIFEXITED(rc) && WEXITSTATUS(rc) == 2));
    CHECK_THAT(read_text(sink), Contains(out.string() + ": is a symbolic link to /proc/self/fd/1"));
    CHECK(fs::is_symlink(out));
}

TEST_CASE("output files: remove_temporary_files removes what is being written", "[output]") {
    const TempDir dir;
    knockon::TemporaryFile tmp((dir.path / "x.txt").string(), [](const std::string& name) {
        const int fd = ::open(name.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW, 0666);
        if (fd >= 0) ::close(fd);
        return fd >= 0;
    });
    REQUIRE(fs::exists(tmp.name()));
    knockon::remove_temporary_files();   // what the signal handlers call
    CHECK_FALSE(fs::exists(tmp.name()));
    CHECK(entries(dir.path).empty());
}

namespace {

// Runs knockon with writes limited to `max_bytes` per file (RLIMIT_FSIZE, with SIGXFSZ ignored, so
// a write beyond it fails with EFBIG as a full disk fails with ENOSPC); returns the wait status.
int run_with_file_size_limit(const std::vector<std::string>& args, const fs::path& dir, rlim_t max_bytes,
                             const fs::path& stderr_file) {
    std::vector<std::string> all = {kExe};
    all.insert(all.end(), args.begin(), args.end());
    std::vector<char*> argv;
    for (std::string& a : all) argv.push_back(a.data());
    argv.push_back(nullptr);
    const pid_t pid = ::fork();
    REQUIRE(pid >= 0);
    if (pid == 0) {
        if (::chdir(dir.c_str()) != 0) ::_exit(126);
        ::signal(SIGXFSZ, SIG_IGN);
        const rlimit limit{max_bytes, max_bytes};
        ::setrlimit(RLIMIT_FSIZE, &limit);
        std::freopen("/dev/null", "w", stdout);
        std::freopen(stderr_file.c_str(), "w", stderr);
        ::execv(kExe.c_str(), argv.data());
        ::_exit(127);
    }
    int status = 0;
    ::waitpid(pid, &status, 0);
    return status;
}

}  // namespace

TEST_CASE("output files: a write that fails part way gives exit 1 and leaves no file", "[output][cli]") {
    // Once a SIGSEGV at exit for studies and comparisons: the HDF5 library's exit handler closed
    // the file whose final flush had failed.  A full disk (ENOSPC) takes the same path as this
    // file size limit (EFBIG), which needs no root.
    const TempDir dir;
    const fs::path logs = dir.path.parent_path() / (dir.path.filename().string() + "-logs");
    fs::create_directories(logs);
    struct Case {
        std::vector<std::string> args;
        rlim_t limit;
    };
    const std::vector<Case> cases = {
        {{"simulate", kDemo, "--replications", "5", "--traces", "all", "--out", "out.h5"}, 200 * 1024},
        {{"compare", kDemo, "--variants", "base,four_aspect", "--replications", "3", "--out", "out.h5"}, 100 * 1024},
        {{"simulate", kDemo, "--sample", "1", "--out", "out.h5"}, 100 * 1024},
        {{"report", kDemo, "-o", "out.html"}, 20 * 1024},
    };
    for (const Case& c : cases) {
        INFO(c.args[0] << " " << c.args.back());
        const fs::path err = logs / "err.txt";
        const int status = run_with_file_size_limit(c.args, dir.path, c.limit, err);
        CHECK(WIFEXITED(status));   // not killed by a signal
        if (WIFEXITED(status)) CHECK(WEXITSTATUS(status) == 1);
        CHECK_THAT(read_text(err), Contains("out.") && Contains("File too large"));
        CHECK(entries(dir.path).empty());   // neither the file nor its temporary file
    }
    fs::remove_all(logs);
}

TEST_CASE("output files: SIGTERM and SIGHUP end a study at once and leave no file", "[output][cli]") {
    for (const int sig : {SIGTERM, SIGHUP}) {
        INFO("signal " << sig);
        const TempDir dir;
        const fs::path out = dir.path / "study.h5";
        const Interrupted run = interrupt_knockon(
            {"simulate", kDemo, "--replications", "10000000", "--traces", "sample:100", "--out", out.string()}, out,
            "/dev/null", "/dev/null", std::chrono::milliseconds(300), sig);
        REQUIRE(run.started);
        CHECK(WIFSIGNALED(run.status));   // ends by the signal itself: a shell reports 128 + its number
        if (WIFSIGNALED(run.status)) CHECK(WTERMSIG(run.status) == sig);
        CHECK(run.seconds_to_end < 5.0);   // not after the current batch of days
        CHECK(entries(dir.path).empty());  // neither the results file nor its temporary file
    }
}

TEST_CASE("output files: a second Ctrl-C stops a study at once and leaves no file", "[output][cli]") {
    const TempDir dir;
    const fs::path out = dir.path / "study.h5";
    // The first Ctrl-C asks the study to stop after its batch of days; should that batch end and the
    // file be written within the 50 ms before the second, the run tested nothing: run it again.
    Interrupted run;
    for (int attempt = 0; attempt < 3; ++attempt) {
        run = interrupt_knockon({"simulate", kDemo, "--replications", "10000000", "--out", out.string()}, out,
                                "/dev/null", "/dev/null", std::chrono::milliseconds(300), SIGINT, 2);
        if (!run.ended_early) break;
        fs::remove(out);
    }
    REQUIRE(run.started);
    REQUIRE_FALSE(run.ended_early);
    CHECK(WIFSIGNALED(run.status));
    if (WIFSIGNALED(run.status)) CHECK(WTERMSIG(run.status) == SIGINT);
    CHECK(run.seconds_to_end < 5.0);
    CHECK(entries(dir.path).empty());
}
