#pragma once
// Primary delays for one simulated day, by train (the index in the plan's train list).  The
// simulation applies them; where they come from (a what-if on the command line, or random draws)
// is decided elsewhere.
#include <cstddef>
#include <string>
#include <vector>

namespace knockon {

struct InjectedDelays {
    std::vector<double> entry;                  // [train] late start at origin / late entry [s]
    std::vector<std::vector<double>> dwell;     // [train][call] extra dwell at that call [s]
    std::vector<std::vector<double>> running;   // [train][call] extra running time on the run
                                                // from that call to the next timing point [s]
    // Disruptions: a train-detection section (by its id, see section_id()) out of use over
    // [from, to) seconds after midnight, as if held by an invisible train.
    struct SectionBlock {
        std::string section;
        double from = 0.0, to = 0.0;
    };
    std::vector<SectionBlock> blocked;

    bool empty() const;
};

}  // namespace knockon
