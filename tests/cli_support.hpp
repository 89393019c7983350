#pragma once
// Shared by the end-to-end tests: run the knockon program in a scratch directory and read what it
// printed and wrote.
#include <catch2/catch.hpp>

#include <signal.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <thread>
#include <vector>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

namespace clitest {

namespace fs = std::filesystem;

inline const std::string kExe = KNOCKON_EXE;
inline const std::string kSource = KNOCKON_SOURCE_DIR;

// Scenarios the end-to-end tests run.
inline const std::string kTwoTrains = kSource + "/tests/data/two_trains.yaml";
inline const std::string kTwoSpeed = kSource + "/tests/data/plan/two_speed_line.yaml";
inline const std::string kDemo = kSource + "/scenarios/demo.yaml";
// 16 stopping trains with drawn primary delays, so that days differ.
inline const std::string kDelayedLine = kSource + "/tests/data/study/delayed_line.yaml";

// A fresh directory for one test's files, removed afterwards.
struct TempDir {
    fs::path path;
    TempDir() {
        std::string tmpl = (fs::temp_directory_path() / "knockon_cli_test_XXXXXX").string();
        REQUIRE(mkdtemp(tmpl.data()) != nullptr);
        path = tmpl;
    }
    ~TempDir() {
        // Tests may have made the directory or its entries read-only (unwritable outputs).
        std::error_code ec;
        fs::permissions(path, fs::perms::owner_all, fs::perm_options::add, ec);
        for (const auto& e : fs::directory_iterator(path, ec))
            fs::permissions(e.path(), fs::perms::owner_all, fs::perm_options::add, ec);
        fs::remove_all(path, ec);
    }
    TempDir(const TempDir&) = delete;
    TempDir& operator=(const TempDir&) = delete;
};

inline std::string read_text(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

struct Result {
    int status = -1;   // exit status, -1 when killed by a signal
    std::string out, err;
};

// Runs knockon with the given (already quoted) arguments, capturing stdout and stderr in files;
// with timeout_s > 0 the run is killed after that long (a guard against a hang: status -1 or 124).
inline Result knockon(const std::string& args, const TempDir& dir, int timeout_s = 0) {
    const fs::path out = dir.path / "stdout.txt", err = dir.path / "stderr.txt";
    const std::string guard = timeout_s > 0 ? "timeout " + std::to_string(timeout_s) + " " : "";
    const std::string cmd = guard + "'" + kExe + "' " + args + " >'" + out.string() + "' 2>'" + err.string() + "'";
    const int rc = std::system(cmd.c_str());
    Result r;
    r.status = (rc != -1 && WIFEXITED(rc)) ? WEXITSTATUS(rc) : -1;
    r.out = read_text(out);
    r.err = read_text(err);
    return r;
}

// The temporary file of output `out` written by process `pid` ("<out>.partial-<pid>-<random>",
// tools/results/output_file.hpp), or an empty path while there is none.
inline fs::path temporary_of(const fs::path& out, pid_t pid) {
    const std::string prefix = out.filename().string() + ".partial-" + std::to_string(pid) + "-";
    std::error_code ec;
    for (const auto& e : fs::directory_iterator(out.parent_path(), ec))
        if (e.path().filename().string().rfind(prefix, 0) == 0) return e.path();
    return {};
}

// A signal in the middle of a command: runs knockon with `args` in a child process (stdout and
// stderr to the given files), waits until the results file's temporary copy (temporary_of) exists
// (the command is under way, its signal handlers in place), lets it run `run_for` longer, then
// sends `signal`, `repeat` times 50 ms apart.  `started` says whether the temporary file showed
// up within a minute.
struct Interrupted {
    int status = 0;   // as from waitpid
    bool started = false;
    bool ended_early = false;      // gone before the last signal was sent (the run tested nothing)
    fs::path temporary;
    double seconds_to_end = 0.0;   // from the (first) signal to the end of the process
};
inline Interrupted interrupt_knockon(const std::vector<std::string>& args, const fs::path& out,
                                     const fs::path& stdout_file, const fs::path& stderr_file,
                                     std::chrono::milliseconds run_for = std::chrono::milliseconds(300),
                                     int signal = SIGINT, int repeat = 1) {
    std::vector<char*> argv;
    std::vector<std::string> all = {kExe};
    all.insert(all.end(), args.begin(), args.end());
    for (std::string& a : all) argv.push_back(a.data());
    argv.push_back(nullptr);
    const pid_t pid = ::fork();
    REQUIRE(pid >= 0);
    if (pid == 0) {
        // A test runner started in the background may ignore SIGINT; the program would inherit that.
        ::signal(SIGINT, SIG_DFL);
        ::signal(SIGTERM, SIG_DFL);
        ::signal(SIGHUP, SIG_DFL);
        std::freopen(stdout_file.c_str(), "w", stdout);
        std::freopen(stderr_file.c_str(), "w", stderr);
        ::execv(kExe.c_str(), argv.data());
        ::_exit(127);
    }
    Interrupted r;
    const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(60);
    while ((r.temporary = temporary_of(out, pid)).empty() && std::chrono::steady_clock::now() < deadline)
        std::this_thread::sleep_for(std::chrono::milliseconds(10));
    r.started = !r.temporary.empty();
    std::this_thread::sleep_for(run_for);
    const auto sent = std::chrono::steady_clock::now();
    bool reaped = false;
    for (int i = 0; i < repeat; ++i) {
        if (i > 0) {
            std::this_thread::sleep_for(std::chrono::milliseconds(50));
            if (::waitpid(pid, &r.status, WNOHANG) == pid) {
                r.ended_early = reaped = true;
                break;
            }
        }
        ::kill(pid, signal);
    }
    if (!reaped) ::waitpid(pid, &r.status, 0);
    r.seconds_to_end = std::chrono::duration<double>(std::chrono::steady_clock::now() - sent).count();
    return r;
}

// A run of knockon under limits, for inputs that once crashed, hung or ate memory: at most
// `cpu_seconds` of CPU time (then SIGXCPU ends it) and, where no sanitizer reserves address space
// of its own, at most 4 GB of it; the peak resident memory is measured (wait4).
struct LimitedRun {
    int status = -1;        // exit status, -1 when ended by a signal
    int signal = 0;         // the signal that ended it, else 0
    long max_rss_kb = 0;
    std::string err;
};
#if defined(__SANITIZE_ADDRESS__)
inline constexpr bool kSanitizedBuild = true;
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
inline constexpr bool kSanitizedBuild = true;
#else
inline constexpr bool kSanitizedBuild = false;
#endif
#else
inline constexpr bool kSanitizedBuild = false;
#endif
inline LimitedRun knockon_limited(const std::vector<std::string>& args, const fs::path& stderr_file,
                                  int cpu_seconds = 60) {
    std::vector<std::string> all = {kExe};
    all.insert(all.end(), args.begin(), args.end());
    std::vector<char*> argv;
    for (std::string& a : all) argv.push_back(a.data());
    argv.push_back(nullptr);
    const pid_t pid = ::fork();
    REQUIRE(pid >= 0);
    if (pid == 0) {
        const rlimit cpu{static_cast<rlim_t>(cpu_seconds), static_cast<rlim_t>(cpu_seconds)};
        ::setrlimit(RLIMIT_CPU, &cpu);
        if (!kSanitizedBuild) {
            const rlimit as{4ull << 30, 4ull << 30};
            ::setrlimit(RLIMIT_AS, &as);
        }
        std::freopen("/dev/null", "w", stdout);
        std::freopen(stderr_file.c_str(), "w", stderr);
        ::execv(kExe.c_str(), argv.data());
        ::_exit(127);
    }
    int status = 0;
    rusage usage{};
    ::wait4(pid, &status, 0, &usage);
    LimitedRun r;
    if (WIFEXITED(status)) r.status = WEXITSTATUS(status);
    if (WIFSIGNALED(status)) r.signal = WTERMSIG(status);
    r.max_rss_kb = usage.ru_maxrss;
    r.err = read_text(stderr_file);
    return r;
}

// A python3 with h5py and numpy (Debian's python3-h5py, which tools/setup.sh installs), or "".
inline std::string python_with_h5py() {
    for (const char* candidate : {"python3", "/usr/bin/python3"}) {
        const std::string probe = std::string(candidate) + " -c 'import h5py, numpy' >/dev/null 2>&1";
        if (std::system(probe.c_str()) == 0) return candidate;
    }
    return "";
}

inline std::string q(const std::string& s) { return "'" + s + "'"; }
inline std::string q(const fs::path& p) { return q(p.string()); }

// Runs tools/read_results_example.py with `python` (from python_with_h5py()) on `results`, its
// output and errors to `log`; returns the status std::system gives.
inline int run_read_results_example(const std::string& python, const fs::path& results, const fs::path& log) {
    const std::string cmd =
        python + " " + kSource + "/tools/read_results_example.py " + q(results) + " >" + q(log) + " 2>&1";
    return std::system(cmd.c_str());
}

// The JSON a run printed; the run must have succeeded (its stderr shown where it did not).
inline nlohmann::json json_of(const Result& r) {
    INFO(r.err);
    REQUIRE(r.status == 0);
    return nlohmann::json::parse(r.out);
}

}  // namespace clitest
