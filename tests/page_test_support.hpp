#pragma once
// Shared by the tests of HTML reports and SVG charts: counting elements by CSS class, and the
// rule that a report page stands alone (no scripts, nothing fetched from elsewhere).
#include <catch2/catch.hpp>

#include <cstddef>
#include <regex>
#include <sstream>
#include <string>

namespace pagetest {

// Elements whose class attribute holds `cls` as one whole token.
inline std::size_t count_class(const std::string& markup, const std::string& cls) {
    static const std::regex attr(R"rx(class="([^"]*)")rx");
    std::size_t n = 0;
    for (auto it = std::sregex_iterator(markup.begin(), markup.end(), attr); it != std::sregex_iterator(); ++it) {
        std::istringstream tokens((*it)[1].str());
        std::string t;
        while (tokens >> t) n += t == cls;
    }
    return n;
}

// The page holds no scripts and refers to nothing outside itself: the only address in it is the
// SVG namespace name.
inline void check_self_contained(const std::string& page) {
    CHECK(page.rfind("<!DOCTYPE html>", 0) == 0);
    CHECK(page.find("<script") == std::string::npos);
    std::string rest = page;
    const std::string ns = "http://www.w3.org/2000/svg";
    for (std::size_t p; (p = rest.find(ns)) != std::string::npos;) rest.erase(p, ns.size());
    CHECK(rest.find("http://") == std::string::npos);
    CHECK(rest.find("https://") == std::string::npos);
    CHECK(rest.find("src=") == std::string::npos);
    CHECK(rest.find("<link") == std::string::npos);
    CHECK(rest.find("@import") == std::string::npos);
}

}  // namespace pagetest
