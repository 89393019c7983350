#pragma once
// Shared command-line parsing: Boost.Program_options with one positional SCENARIO, turning
// every parse error into a UsageError.
#include <boost/program_options.hpp>
#include <string>
#include <vector>

#include "tools/knockon/commands.hpp"

namespace knockon::cli {

namespace po = boost::program_options;

// Parses args against `options` plus a positional "scenario"; returns false when --help was asked
// (help text printed to stdout).
bool parse_command_line(const std::string& command, const std::vector<std::string>& args,
                        po::options_description& options, po::variables_map& vm);

}  // namespace knockon::cli
