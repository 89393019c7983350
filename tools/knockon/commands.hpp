#pragma once
// The subcommands of the knockon program; each returns the process exit status.
#include <stdexcept>
#include <string>
#include <vector>

namespace knockon::cli {

struct UsageError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

int validate(const std::vector<std::string>& args);
int plan(const std::vector<std::string>& args);
int simulate(const std::vector<std::string>& args);
int report(const std::vector<std::string>& args);
int plot(const std::vector<std::string>& args);
int compare(const std::vector<std::string>& args);
int merge(const std::vector<std::string>& args);

}  // namespace knockon::cli
