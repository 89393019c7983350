// libFuzzer target of the scenario readers (tools/read/scenario_reader, tools/read/network_reader): the
// input is a scenario file, read as `knockon validate` reads it, the base and its first variants,
// and as a network file where it says knockon: 2.  A ScenarioError is the
// expected answer to bad input; a crash, a sanitizer report, a hang, a huge allocation or any other
// exception (which the program would turn into exit status 1 without a location) is a finding.
// Built and run by tools/ci_fuzz.sh; DEVELOPERS.md, "Fuzzing", says how to run it longer.
#include <unistd.h>

#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <fstream>
#include <string>

#include "tools/read/network_reader.hpp"
#include "tools/read/scenario_reader.hpp"

namespace {

// The reader takes a path (variants are listed from the file): one scratch file per process,
// removed when the run ends.
struct Scratch {
    std::string path = "/tmp/knockon-fuzz-scenario-" + std::to_string(::getpid()) + ".yaml";
    ~Scratch() { ::unlink(path.c_str()); }
};
const std::string& scratch() {
    static const Scratch file;
    return file.path;
}

[[noreturn]] void finding(const char* what) {
    std::fprintf(stderr, "fuzz_scenario_reader: not a ScenarioError: %s\n", what);
    std::abort();
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    {
        std::ofstream out(scratch(), std::ios::binary | std::ios::trunc);
        out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
    }
    try {
        if (knockon::is_network_text(std::string(reinterpret_cast<const char*>(data), size))) {
            try {
                knockon::read_network(scratch());
            } catch (const knockon::ScenarioError&) {
            }
        }
        try {
            knockon::read_scenario(scratch());
        } catch (const knockon::ScenarioError&) {
        }
        std::vector<knockon::VariantInfo> variants;
        try {
            variants = knockon::read_variants(scratch());
        } catch (const knockon::ScenarioError&) {
        }
        for (std::size_t i = 0; i < variants.size() && i < 3; ++i) {
            try {
                knockon::read_scenario(scratch(), variants[i].name);
            } catch (const knockon::ScenarioError&) {
            }
        }
    } catch (const std::exception& e) {
        finding(e.what());
    }
    return 0;
}
