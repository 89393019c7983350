#include "sim/sim_result.hpp"

namespace knockon {

const char* to_string(HoldCause::Kind k) {
    switch (k) {
        case HoldCause::Kind::none: return "none";
        case HoldCause::Kind::train: return "train";
        case HoldCause::Kind::disruption: return "disruption";
        case HoldCause::Kind::dispatch: return "dispatch";
        case HoldCause::Kind::link: return "link";
    }
    return "?";
}

}  // namespace knockon
