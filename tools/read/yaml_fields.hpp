#pragma once
// Typed, checked access to YAML maps, collecting located errors instead of stopping at the first.
//
// yaml-cpp 0.7 accepts duplicate keys silently, ignores keys nobody asks for, reads 010 as octal
// and yes as true.  So every map is checked against its allowed keys and for duplicates, every
// scalar is read as text and converted by models/units (std::from_chars), and each problem is
// recorded as "file:line:col: path.to.field: message" (yaml-cpp marks are 0-based: printed +1).
#include <cstddef>
#include <initializer_list>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <yaml-cpp/yaml.h>

#include "models/input_ranges.hpp"
#include "models/units.hpp"

namespace knockon::yamlio {

// "file:line:col: path" (yaml-cpp marks are 0-based: printed +1); without line and column
// when the mark is null, without the path when it is empty.
std::string location(const std::string& file, const YAML::Mark& mark, const std::string& path);

// Collected errors of one file.
class ErrorList {
public:
    explicit ErrorList(std::string file) : file_(std::move(file)) {}

    void add(const YAML::Mark& mark, const std::string& path, const std::string& message);
    void add(const YAML::Node& at, const std::string& path, const std::string& message) {
        add(at.Mark(), path, message);
    }
    bool empty() const { return entries_.empty(); }
    std::size_t size() const { return entries_.size(); }
    // In file order (line, column), then in the order found.
    std::vector<std::string> messages() const;
    const std::string& file() const { return file_; }

private:
    struct Entry {
        int line;
        int column;
        std::size_t seq;
        std::string text;
    };
    std::string file_;
    std::vector<Entry> entries_;
};

// "a.b" from ("a", "b"); the top level has an empty path.
std::string join(const std::string& path, std::string_view key);
// "a.b[3]"
std::string item(const std::string& path, std::size_t index);
// 1-based line of a node, for "first at line N" remarks.
int line_of(const YAML::Node& n);

// Field access within one YAML map.  Each reader reports its own problems; an empty optional
// means "absent or wrong" (and in the wrong case an error has been recorded).
class MapFields {
public:
    // Records an error unless `node` is a map; checks keys against `allowed` and for duplicates.
    MapFields(ErrorList& errors, const YAML::Node& node, std::string path,
              std::initializer_list<std::string_view> allowed);

    bool ok() const { return ok_; }
    const YAML::Node& node() const { return node_; }
    const std::string& path() const { return path_; }
    std::string path_of(std::string_view key) const { return join(path_, key); }

    bool has(std::string_view key) const;
    // The value node (undefined when absent or when this is not a map).
    YAML::Node get(std::string_view key) const;
    // Records "missing required key" at this map's mark when absent; returns has(key).
    bool require(std::string_view key) const;
    // Where to point for a key's value: the value's mark, or the map's mark when absent.
    YAML::Mark mark_of(std::string_view key) const;

    std::optional<std::string> text(std::string_view key, bool required) const;
    std::optional<double> quantity(std::string_view key, Quantity q, bool required) const;
    // "HH:MM" or "HH:MM:SS" within the day's range of times (models/input_ranges).
    std::optional<double> time_of_day(std::string_view key, bool required) const;
    // One of `choices`, spelled exactly.
    std::optional<std::string> choice(std::string_view key,
                                      std::initializer_list<std::string_view> choices,
                                      bool required) const;
    // Only "true" or "false": YAML 1.1 spellings such as yes/no/on are refused, being easy to
    // write by mistake for something else.
    std::optional<bool> boolean(std::string_view key, bool required) const;
    // A sequence node, or nothing.
    std::optional<YAML::Node> sequence(std::string_view key, bool required) const;

    // Records `message` against the value of `key` (or the map when it is absent).
    void error(std::string_view key, const std::string& message) const;

private:
    std::optional<std::string> scalar_text(std::string_view key, bool required) const;

    ErrorList& errors_;
    YAML::Node node_;
    std::string path_;
    bool ok_ = false;
};

// A scalar node's text, or nothing (error recorded) when it is null, a list or a map.
std::optional<std::string> scalar_text(ErrorList& errors, const YAML::Node& n,
                                       const std::string& path);
// A quantity read from a node directly (table cells).
std::optional<double> quantity_of(ErrorList& errors, const YAML::Node& n, const std::string& path,
                                  Quantity q);

// The YAML document of a scenario file; a syntax error or an empty file throws ScenarioError
// with the located message.
YAML::Node load_document(const std::string& yaml_text, ErrorList& errors);

// A field read as its kind of input and held to that input's plausible range (models/input_ranges):
// out of range is an error at the field and nothing is returned.
std::optional<double> ranged(const MapFields& f, std::string_view key, Input which, bool required);
// The same for a node read directly (a table cell, a map's value).
std::optional<double> ranged_cell(ErrorList& errors, const YAML::Node& n, const std::string& path, Input which);

// Chainage, speed and time texts for messages: "14.1 km", "120 km/h", "06:15:30".
std::string km(double metres);
std::string kmh(double metres_per_second);

}  // namespace knockon::yamlio
