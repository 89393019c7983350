#pragma once
// The YAML document of a scenario or network file with one of its variants merged in (README,
// "Variants and `compare`"): the `variants:` map checked, the chosen overlay merged onto the
// base document, so that every error still points where its text stands.  One function for both
// formats.
#include <string>

#include <yaml-cpp/yaml.h>

#include "tools/read/yaml_fields.hpp"

namespace knockon::yamlio {

// Empty or "base": the document as written.  Problems of `variants:` are recorded in `errors`;
// an unknown variant name throws ScenarioError naming the known ones.  The returned document
// still holds `variants`, for the caller's map of allowed keys.
YAML::Node variant_document(const std::string& yaml_text, const std::string& variant, ErrorList& errors);

// Whether `variant` names the base scenario.
bool is_base_variant(const std::string& variant);

}  // namespace knockon::yamlio
