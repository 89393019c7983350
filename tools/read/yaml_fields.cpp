#include "tools/read/yaml_fields.hpp"

#include <algorithm>
#include <cstdio>
#include <map>

#include "models/input_ranges.hpp"
#include "models/scenario_error.hpp"

namespace knockon::yamlio {

std::string location(const std::string& file, const YAML::Mark& mark, const std::string& path) {
    std::string text = file;
    if (!mark.is_null()) text += ":" + std::to_string(mark.line + 1) + ":" + std::to_string(mark.column + 1);
    if (!path.empty()) text += ": " + path;
    return text;
}

void ErrorList::add(const YAML::Mark& mark, const std::string& path, const std::string& message) {
    std::string text = location(file_, mark, path) + ": " + message;
    // Errors without a place sort last.
    const int line = mark.is_null() ? 1 << 30 : mark.line;
    const int column = mark.is_null() ? 0 : mark.column;
    entries_.push_back({line, column, entries_.size(), std::move(text)});
}

std::vector<std::string> ErrorList::messages() const {
    auto sorted = entries_;
    std::stable_sort(sorted.begin(), sorted.end(), [](const Entry& a, const Entry& b) {
        if (a.line != b.line) return a.line < b.line;
        return a.column < b.column;
    });
    std::vector<std::string> out;
    out.reserve(sorted.size());
    for (auto& e : sorted) out.push_back(e.text);
    return out;
}

std::string join(const std::string& path, std::string_view key) {
    if (path.empty()) return std::string(key);
    return path + "." + std::string(key);
}

std::string item(const std::string& path, std::size_t index) {
    return path + "[" + std::to_string(index) + "]";
}

int line_of(const YAML::Node& n) {
    const auto m = n.Mark();
    return m.is_null() ? 0 : m.line + 1;
}

namespace {

std::string list(std::initializer_list<std::string_view> words) {
    std::string out;
    for (auto w : words) {
        if (!out.empty()) out += ", ";
        out += w;
    }
    return out;
}

const char* kind_of(const YAML::Node& n) {
    if (n.IsSequence()) return "a list";
    if (n.IsMap()) return "a map";
    if (n.IsNull()) return "nothing";
    return "a single value";
}

}  // namespace

std::optional<std::string> scalar_text(ErrorList& errors, const YAML::Node& n,
                                       const std::string& path) {
    if (n.IsNull()) {
        errors.add(n, path, "no value given");
        return std::nullopt;
    }
    if (!n.IsScalar()) {
        errors.add(n, path, std::string("expected a single value, found ") + kind_of(n));
        return std::nullopt;
    }
    return n.Scalar();
}

std::optional<double> quantity_of(ErrorList& errors, const YAML::Node& n, const std::string& path,
                                  Quantity q) {
    auto t = scalar_text(errors, n, path);
    if (!t) return std::nullopt;
    try {
        return parse_quantity(*t, q);
    } catch (const UnitError& e) {
        errors.add(n, path, e.what());
        return std::nullopt;
    }
}

MapFields::MapFields(ErrorList& errors, const YAML::Node& node, std::string path,
                     std::initializer_list<std::string_view> allowed)
    : errors_(errors), node_(node), path_(std::move(path)) {
    if (!node_.IsMap()) {
        errors_.add(node_, path_, std::string("expected a map of keys and values, found ") + kind_of(node_));
        return;
    }
    ok_ = true;
    std::map<std::string, int> seen;  // key -> line of first use
    for (auto it = node_.begin(); it != node_.end(); ++it) {
        const YAML::Node key = it->first;
        if (!key.IsScalar()) {
            errors_.add(key, path_, "keys must be plain words");
            continue;
        }
        const std::string name = key.Scalar();
        if (std::find(allowed.begin(), allowed.end(), name) == allowed.end()) {
            errors_.add(key, join(path_, name),
                        "unknown key \"" + name + "\"; allowed here: " + list(allowed));
        }
        auto [pos, inserted] = seen.emplace(name, line_of(key));
        if (!inserted) {
            errors_.add(key, join(path_, name),
                        "duplicate key \"" + name + "\" (first given at line " +
                            std::to_string(pos->second) + ")");
        }
    }
}

bool MapFields::has(std::string_view key) const {
    if (!ok_) return false;
    return node_[std::string(key)].IsDefined();
}

YAML::Node MapFields::get(std::string_view key) const {
    if (!ok_) return YAML::Node(YAML::NodeType::Undefined);
    return node_[std::string(key)];
}

bool MapFields::require(std::string_view key) const {
    if (!ok_) return false;
    if (has(key)) return true;
    errors_.add(node_, path_of(key), "missing required key \"" + std::string(key) + "\"");
    return false;
}

YAML::Mark MapFields::mark_of(std::string_view key) const {
    if (has(key)) return get(key).Mark();
    return node_.Mark();
}

void MapFields::error(std::string_view key, const std::string& message) const {
    errors_.add(mark_of(key), path_of(key), message);
}

std::optional<std::string> MapFields::scalar_text(std::string_view key, bool required) const {
    if (!ok_) return std::nullopt;
    if (!has(key)) {
        if (required) require(key);
        return std::nullopt;
    }
    return yamlio::scalar_text(errors_, get(key), path_of(key));
}

std::optional<std::string> MapFields::text(std::string_view key, bool required) const {
    auto t = scalar_text(key, required);
    if (t && t->empty()) {
        error(key, "must not be empty");
        return std::nullopt;
    }
    return t;
}

std::optional<double> MapFields::quantity(std::string_view key, Quantity q, bool required) const {
    if (!ok_) return std::nullopt;
    if (!has(key)) {
        if (required) require(key);
        return std::nullopt;
    }
    return quantity_of(errors_, get(key), path_of(key), q);
}

std::optional<double> MapFields::time_of_day(std::string_view key, bool required) const {
    auto t = scalar_text(key, required);
    if (!t) return std::nullopt;
    try {
        const double v = parse_time_of_day(*t);
        if (auto problem = range_problem(Input::time_of_day, v)) {
            error(key, *problem);
            return std::nullopt;
        }
        return v;
    } catch (const UnitError& e) {
        error(key, e.what());
        return std::nullopt;
    }
}

std::optional<std::string> MapFields::choice(std::string_view key,
                                             std::initializer_list<std::string_view> choices,
                                             bool required) const {
    auto t = scalar_text(key, required);
    if (!t) return std::nullopt;
    if (std::find(choices.begin(), choices.end(), *t) == choices.end()) {
        error(key, "\"" + *t + "\" is not one of: " + list(choices));
        return std::nullopt;
    }
    return t;
}

std::optional<bool> MapFields::boolean(std::string_view key, bool required) const {
    auto t = scalar_text(key, required);
    if (!t) return std::nullopt;
    if (*t == "true") return true;
    if (*t == "false") return false;
    error(key, "\"" + *t + "\" is not true or false");
    return std::nullopt;
}

std::optional<YAML::Node> MapFields::sequence(std::string_view key, bool required) const {
    if (!ok_) return std::nullopt;
    if (!has(key)) {
        if (required) require(key);
        return std::nullopt;
    }
    YAML::Node n = get(key);
    if (!n.IsSequence()) {
        error(key, std::string("expected a list, found ") + kind_of(n));
        return std::nullopt;
    }
    return n;
}

std::string km(double metres) { return format_km(metres); }

YAML::Node load_document(const std::string& yaml_text, ErrorList& errors) {
    YAML::Node root;
    try {
        root = YAML::Load(yaml_text);
    } catch (const YAML::Exception& e) {
        errors.add(e.mark, "", "YAML syntax error: " + e.msg);
        throw ScenarioError(errors.messages());
    }
    if (!root.IsDefined() || root.IsNull()) {
        errors.add(YAML::Mark(), "", "the file holds no scenario; it should start with knockon: 1");
        throw ScenarioError(errors.messages());
    }
    return root;
}

std::optional<double> ranged(const MapFields& f, std::string_view key, Input which, bool required) {
    auto v = f.quantity(key, input_range(which).quantity, required);
    if (v) {
        if (auto problem = range_problem(which, *v)) {
            f.error(key, *problem);
            return std::nullopt;
        }
    }
    return v;
}

std::optional<double> ranged_cell(ErrorList& errors, const YAML::Node& n, const std::string& path, Input which) {
    auto v = quantity_of(errors, n, path, input_range(which).quantity);
    if (v) {
        if (auto problem = range_problem(which, *v)) {
            errors.add(n, path, *problem);
            return std::nullopt;
        }
    }
    return v;
}

std::string kmh(double metres_per_second) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.4g km/h", metres_per_second * 3.6);
    return buf;
}

}  // namespace knockon::yamlio
