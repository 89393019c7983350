#include "tools/read/yaml_merge.hpp"

#include <set>

namespace knockon::yamlio {

void merge_into(YAML::Node base, const YAML::Node& overlay) {
    if (!base.IsMap() || !overlay.IsMap()) return;   // callers merge maps only
    std::set<std::string> taken;   // overlay keys already merged: a second one is a duplicate
    for (auto it = overlay.begin(); it != overlay.end(); ++it) {
        const YAML::Node key = it->first;
        const YAML::Node value = it->second;
        if (!key.IsScalar() || !taken.insert(key.Scalar()).second) {
            // Left for MapFields to report ("keys must be plain words", "duplicate key").
            base.force_insert(key, value);
            continue;
        }
        const std::string name = key.Scalar();
        // Look the key up without creating it (operator[] on a non-const node would add it).
        const YAML::Node& cbase = base;
        YAML::Node old = cbase[name];
        if (old.IsDefined() && old.IsMap() && value.IsMap()) {
            merge_into(old, value);
            continue;
        }
        while (base.remove(name)) {
        }
        base.force_insert(key, value);
    }
}

}  // namespace knockon::yamlio
