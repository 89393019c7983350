#pragma once
// A plain result table: the one intermediate form from which CSV files and the readable text
// tables are both written, so every figure is formatted in one place.
#include <string>
#include <variant>
#include <vector>

namespace knockon {

enum class ColumnKind { text, time_of_day, duration, number, percent };

struct Column {
    std::string name;   // also the CSV header; SI units in the name where they apply (e.g. buffer_s)
    ColumnKind kind = ColumnKind::text;
};

using Cell = std::variant<std::string, double>;

struct Table {
    std::string name;   // file stem for CSV
    std::string title;  // heading in text output
    std::vector<Column> columns;
    std::vector<std::vector<Cell>> rows;
};

// CSV: numbers in SI (times as seconds after midnight), empty for NaN; RFC 4180 quoting.
std::string to_csv(const Table& t);
// Aligned text: times as HH:MM:SS, durations as seconds with one decimal, percentages as "62.5 %".
// At most max_rows rows (0 = all), saying how many were left out.
std::string to_text(const Table& t, std::size_t max_rows = 0);
// One cell as to_text writes it ("-" for NaN).
std::string text_cell(const Cell& c, ColumnKind kind);

}  // namespace knockon
