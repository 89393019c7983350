#pragma once
// Primary delays for one simulated day, by train (the index in the plan's train list).  The
// simulation applies them; where they come from (a what-if on the command line, or random draws)
// is decided elsewhere.
#include <cstddef>
#include <vector>

namespace knockon {

struct InjectedDelays {
    std::vector<double> entry;                  // [train] late start at origin / late entry [s]
    std::vector<std::vector<double>> dwell;     // [train][call] extra dwell at that call [s]
    std::vector<std::vector<double>> running;   // [train][call] extra running time on the run
                                                // from that call to the next timing point [s]
    bool empty() const;
};

}  // namespace knockon
