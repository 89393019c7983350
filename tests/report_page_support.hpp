#pragma once
// Reading a report page in tests: one section's markup, the text of its tables' cells.
#include <regex>
#include <string>
#include <utility>
#include <vector>

namespace reportpage {

// The markup of <section id="ID"> up to its end ("" when there is none).
inline std::string section_of(const std::string& page, const std::string& id) {
    const std::size_t a = page.find("<section id=\"" + id + "\"");
    if (a == std::string::npos) return "";
    return page.substr(a, page.find("</section>", a) - a);
}

inline std::string unescape(std::string s) {
    const std::pair<const char*, const char*> entities[] = {
        {"&lt;", "<"}, {"&gt;", ">"}, {"&quot;", "\""}, {"&#39;", "'"}, {"&amp;", "&"}};
    for (const auto& [from, to] : entities)
        for (std::size_t p; (p = s.find(from)) != std::string::npos;) s.replace(p, std::string(from).size(), to);
    return s;
}

// The rows of every table in `html`, each as its cells' text.
inline std::vector<std::vector<std::string>> rows_of(const std::string& html) {
    static const std::regex row(R"(<tr[^>]*>(.*?)</tr>)"), cell(R"(<t[dh][^>]*>(.*?)</t[dh]>)");
    std::vector<std::vector<std::string>> out;
    for (auto r = std::sregex_iterator(html.begin(), html.end(), row); r != std::sregex_iterator(); ++r) {
        const std::string inner = (*r)[1].str();
        std::vector<std::string> cells;
        for (auto c = std::sregex_iterator(inner.begin(), inner.end(), cell); c != std::sregex_iterator(); ++c)
            cells.push_back(unescape((*c)[1].str()));
        out.push_back(std::move(cells));
    }
    return out;
}

}  // namespace reportpage
