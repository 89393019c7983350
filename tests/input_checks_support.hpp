#pragma once
// Shared by the input-check tests (tests/test_input_checks.cpp, tests/test_validate_cli.cpp): the
// fixtures of tests/data/checks, copies of them with one value changed, and where in such a
// text a located message must point.
#include <catch2/catch.hpp>

#include <algorithm>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

namespace inputcheck {

inline const std::string kChecks = std::string(KNOCKON_SOURCE_DIR) + "/tests/data/checks/";

inline std::string fixture_path(const std::string& name) { return kChecks + name; }

inline std::string fixture(const std::string& name) {
    std::ifstream in(fixture_path(name), std::ios::binary);
    REQUIRE(in);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

// `text` with the first `from` (which must be there) replaced by `to`.
inline std::string changed(std::string text, const std::string& from, const std::string& to) {
    const auto pos = text.find(from);
    REQUIRE(pos != std::string::npos);
    text.replace(pos, from.size(), to);
    return text;
}

// "line:col" (1-based) of the first `needle` after the first `anchor` (the start when empty):
// where a message about the value written there must point.
inline std::string where(const std::string& text, const std::string& needle, const std::string& anchor = "") {
    const std::size_t a = anchor.empty() ? 0 : text.find(anchor);
    REQUIRE(a != std::string::npos);
    const std::size_t pos = text.find(needle, a);
    REQUIRE(pos != std::string::npos);
    const std::string upto = text.substr(0, pos);
    const auto line = 1 + std::count(upto.begin(), upto.end(), '\n');
    const auto nl = upto.rfind('\n');
    const auto col = nl == std::string::npos ? pos + 1 : pos - nl;
    return std::to_string(line) + ":" + std::to_string(col);
}

// Whether one of `messages` starts with "file:where: path: " and holds `what`.
inline bool reported(const std::vector<std::string>& messages, const std::string& file, const std::string& at,
                     const std::string& path, const std::string& what) {
    const std::string head = file + ":" + at + ": " + path + ": ";
    for (const std::string& m : messages)
        if (m.rfind(head, 0) == 0 && m.find(what) != std::string::npos) return true;
    return false;
}

inline std::string joined(const std::vector<std::string>& messages) {
    std::string out;
    for (const std::string& m : messages) out += m + "\n";
    return out;
}

}  // namespace inputcheck
