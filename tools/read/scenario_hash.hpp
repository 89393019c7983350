#pragma once
// A fingerprint of the scenario a results file came from: the scenario text as read and the
// variant applied.  A merge of study shards compares them, so that shards of different scenarios
// (an edited file, another variant) are never folded into one study.  It detects accidents, not
// forgery: 64-bit FNV-1a, no cryptographic claim.
#include <string>

namespace knockon {

// "fnv1a64:" and 16 lower-case hex digits, of the variant name ("base" for the scenario as
// written), a NUL byte, then the text.
std::string scenario_hash(const std::string& scenario_text, const std::string& variant);

}  // namespace knockon
