#include "tools/results/table.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "models/units.hpp"

namespace knockon {
namespace {

std::string number(double v, int decimals) {
    if (std::isnan(v)) return "";
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
    return buf;
}

std::string csv_cell(const Cell& c, ColumnKind kind) {
    if (auto s = std::get_if<std::string>(&c)) {
        if (s->find_first_of(",\"\n") == std::string::npos) return *s;
        std::string q = "\"";
        for (char ch : *s) q += ch == '"' ? std::string("\"\"") : std::string(1, ch);
        return q + "\"";
    }
    double v = std::get<double>(c);
    return number(v, kind == ColumnKind::percent ? 4 : 3);
}

}  // namespace

std::string text_cell(const Cell& c, ColumnKind kind) {
    if (auto s = std::get_if<std::string>(&c)) return *s;
    double v = std::get<double>(c);
    if (std::isnan(v)) return "-";
    switch (kind) {
        case ColumnKind::time_of_day: return format_time_of_day(v);
        case ColumnKind::duration: return number(v, 1);
        case ColumnKind::percent: return number(100.0 * v, 1) + " %";
        default: return number(v, 2);
    }
}

std::string to_csv(const Table& t) {
    std::string out;
    for (std::size_t i = 0; i < t.columns.size(); ++i) out += (i ? "," : "") + t.columns[i].name;
    out += "\n";
    for (const auto& row : t.rows) {
        for (std::size_t i = 0; i < row.size(); ++i) out += (i ? "," : "") + csv_cell(row[i], t.columns[i].kind);
        out += "\n";
    }
    return out;
}

std::string to_text(const Table& t, std::size_t max_rows) {
    const std::size_t n = max_rows ? std::min(max_rows, t.rows.size()) : t.rows.size();
    std::vector<std::vector<std::string>> cells;
    std::vector<std::size_t> width(t.columns.size());
    for (std::size_t i = 0; i < t.columns.size(); ++i) width[i] = t.columns[i].name.size();
    for (std::size_t r = 0; r < n; ++r) {
        std::vector<std::string> line;
        for (std::size_t i = 0; i < t.columns.size(); ++i) {
            line.push_back(text_cell(t.rows[r][i], t.columns[i].kind));
            width[i] = std::max(width[i], line.back().size());
        }
        cells.push_back(std::move(line));
    }
    std::string out = t.title + "\n";
    auto emit = [&](const std::vector<std::string>& line) {
        std::string s = " ";
        for (std::size_t i = 0; i < line.size(); ++i) {
            bool right = t.columns[i].kind != ColumnKind::text;
            std::string pad(width[i] - line[i].size(), ' ');
            s += " " + (right ? pad + line[i] : line[i] + pad);
        }
        while (!s.empty() && s.back() == ' ') s.pop_back();
        out += s + "\n";
    };
    std::vector<std::string> head;
    for (const Column& c : t.columns) head.push_back(c.name);
    emit(head);
    for (const auto& line : cells) emit(line);
    if (n < t.rows.size()) out += "  ... " + std::to_string(t.rows.size() - n) + " more rows (see --csv or --json)\n";
    if (t.rows.empty()) out += "  (none)\n";
    return out;
}

}  // namespace knockon
