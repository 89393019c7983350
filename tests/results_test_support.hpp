#pragma once
// Shared by the tests of results files, reports and plots (test_comparison_hdf5.cpp,
// test_results_report.cpp, test_report_cli.cpp): the CLI runner, a copy of the study fixture
// tests/data/study/delayed_line.yaml (clitest::kDelayedLine) with a variant, and the counting of
// elements by CSS class.
#include <regex>
#include <sstream>
#include <string>

#include "cli_support.hpp"
#include "page_test_support.hpp"

namespace resultstest {

using namespace clitest;

// delayed_line.yaml with the variant `slow_release` (sections released 20 s after the tail clears
// them instead of 3 s: longer blocking times, so more knock-on), written into `dir`.
inline fs::path write_variant_fixture(const TempDir& dir) {
    const fs::path path = dir.path / "delayed_variants.yaml";
    std::ofstream out(path);
    out << read_text(kDelayedLine)
        << "\nvariants:\n"
           "  slow_release:\n"
           "    description: sections released 20 s after the tail clears them\n"
           "    infrastructure: {signalling: {interlocking: {release: 20 s}}}\n";
    return path;
}

// clitest::knockon under a name that does not clash with namespace knockon.
inline Result run_knockon(const std::string& args, const TempDir& dir) { return clitest::knockon(args, dir); }

using pagetest::check_self_contained;
using pagetest::count_class;

}  // namespace resultstest
