#pragma once
// Reads a scenario file (README, "Scenario file") into the SI model structs.  Every problem found
// is collected and reported at once, each as "file:line:col: path.to.field: message".
#include <string>
#include <vector>

#include "models/scenario.hpp"
#include "models/scenario_error.hpp"

namespace knockon {

// Reads and checks the file; throws ScenarioError (also when the file cannot be opened).  The
// scenario keeps where each service and train type stands in the file (Scenario::sources), so
// that problems found later, while planning, are located too.
// `variant` names one of the file's variants (README, "Variants and `compare`"): its overlay is
// merged onto the document before it is read, so that every error still points at the line
// where the offending text stands, in the overlay or in the base.  Empty or "base": the
// scenario as written.  An unknown name is an error naming the known ones.
Scenario read_scenario(const std::string& path, const std::string& variant = "");

// The text of a scenario file, as read_scenario reads it (ScenarioError naming the file if it
// cannot): for a caller that also keeps or hashes the text it ran.
std::string read_scenario_text(const std::string& path);

// Same from text already in memory; `file_name` is used in messages and as source_file.  A
// network file (`knockon: 2`) is read by tools/read/network_reader, a line scenario by
// parse_line_scenario (tools/read/scenario_file.cpp chooses).
Scenario parse_scenario(const std::string& yaml_text, const std::string& file_name,
                        const std::string& variant = "");
Scenario parse_line_scenario(const std::string& yaml_text, const std::string& file_name,
                             const std::string& variant = "");

// The variants a file defines, in file order.  Checks only the `variants:` map itself (its
// shape, the names, the descriptions); throws ScenarioError on those problems or when the file
// cannot be read as YAML.
struct VariantInfo {
    std::string name;
    std::string description;   // empty when not given
};
std::vector<VariantInfo> read_variants(const std::string& path);
std::vector<std::string> variant_names(const std::string& path);

}  // namespace knockon
