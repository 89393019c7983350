#include "tools/read/scenario_hash.hpp"

#include <cstdint>
#include <cstdio>

namespace knockon {

namespace {

// FNV-1a, 64 bits (offset basis and prime as published by Fowler, Noll and Vo).
std::uint64_t fnv1a(std::uint64_t h, const std::string& bytes) {
    for (unsigned char c : bytes) {
        h ^= c;
        h *= 0x100000001b3ULL;
    }
    return h;
}

}  // namespace

std::string scenario_hash(const std::string& scenario_text, const std::string& variant) {
    std::uint64_t h = 0xcbf29ce484222325ULL;
    h = fnv1a(h, variant.empty() ? std::string("base") : variant);
    h = fnv1a(h, std::string(1, '\0'));
    h = fnv1a(h, scenario_text);
    char buf[32];
    std::snprintf(buf, sizeof buf, "fnv1a64:%016llx", static_cast<unsigned long long>(h));
    return buf;
}

}  // namespace knockon
