#pragma once
// Deep merge of one YAML document onto another, for scenario variants (README, "Variants and
// `compare`"): maps merge key by key, recursively; any other value (a scalar, a list, null)
// replaces the base value whole.
//
// The merge works on the base tree in place rather than building a new one, because yaml-cpp
// gives a node its mark (file position) only when it parses it: a map made afresh, or by
// YAML::Clone, has none.  Merging in place keeps the base maps and their marks, and every value
// or key taken over from the overlay is the overlay's own node, so an error found later in the
// merged document points at the line where its text was written, in the base or in the overlay.
// One consequence: a base map written once and used again through a YAML alias (*name) is one
// node, so an overlay that changes it changes it everywhere it is used.
#include <string>

#include <yaml-cpp/yaml.h>

namespace knockon::yamlio {

// Merges `overlay` (a map) into `base` (a map), changing `base`.  For each key of the overlay:
// when both values are maps, merge them recursively; otherwise every base entry with that key is
// dropped and the overlay's entry (its key and value nodes) added.  Keys that are not plain
// scalars, and keys given twice in the overlay, are carried over as they are, for the usual map
// checks of the reader to report at the overlay's line.
void merge_into(YAML::Node base, const YAML::Node& overlay);

}  // namespace knockon::yamlio
