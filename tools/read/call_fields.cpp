#include "tools/read/call_fields.hpp"

#include <string>

namespace knockon::yamlio {

bool read_call(const MapFields& c, Call& call) {
    bool ok = true;
    if (auto s = c.text("station", true))
        call.station = *s;
    else
        ok = false;
    if (c.has("pass")) {
        call.stops = false;
        auto p = c.text("pass", true);
        if (!p) {
            ok = false;
        } else if (*p != "auto") {
            if (auto t = c.time_of_day("pass", true))
                call.departure = *t;
            else
                ok = false;
        }
        for (std::string_view k : {"arr", "dep", "min_dwell"})
            if (c.has(k)) {
                c.error(k, "a passing call (pass given) has no " + std::string(k) + "; drop one or the other");
                ok = false;
            }
    } else {
        if (c.has("arr")) {
            if (auto t = c.time_of_day("arr", true))
                call.arrival = *t;
            else
                ok = false;
        }
        if (c.has("dep")) {
            if (auto t = c.time_of_day("dep", true))
                call.departure = *t;
            else
                ok = false;
        }
        if (c.has("min_dwell")) {
            if (auto v = ranged(c, "min_dwell", Input::min_dwell, true))
                call.min_dwell = *v;
            else
                ok = false;
        }
    }
    if (c.has("track")) {
        if (auto t = c.text("track", true))
            call.track = *t;
        else
            ok = false;
    }
    return ok;
}

}  // namespace knockon::yamlio
