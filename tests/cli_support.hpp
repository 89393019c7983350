#pragma once
// Shared by the end-to-end tests: run the knockon program in a scratch directory and read what it
// printed and wrote.
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

namespace clitest {

namespace fs = std::filesystem;

inline const std::string kExe = KNOCKON_EXE;
inline const std::string kSource = KNOCKON_SOURCE_DIR;

// A fresh directory for one test's files, removed afterwards.
struct TempDir {
    fs::path path;
    TempDir() {
        std::string tmpl = (fs::temp_directory_path() / "knockon_cli_test_XXXXXX").string();
        REQUIRE(mkdtemp(tmpl.data()) != nullptr);
        path = tmpl;
    }
    ~TempDir() {
        std::error_code ec;
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

// Runs knockon with the given (already quoted) arguments, capturing stdout and stderr in files.
inline Result knockon(const std::string& args, const TempDir& dir) {
    const fs::path out = dir.path / "stdout.txt", err = dir.path / "stderr.txt";
    const std::string cmd = "'" + kExe + "' " + args + " >'" + out.string() + "' 2>'" + err.string() + "'";
    const int rc = std::system(cmd.c_str());
    Result r;
    r.status = (rc != -1 && WIFEXITED(rc)) ? WEXITSTATUS(rc) : -1;
    r.out = read_text(out);
    r.err = read_text(err);
    return r;
}

inline std::string q(const std::string& s) { return "'" + s + "'"; }
inline std::string q(const fs::path& p) { return q(p.string()); }

}  // namespace clitest
