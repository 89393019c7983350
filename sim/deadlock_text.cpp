#include "sim/deadlock_text.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>

#include "models/links.hpp"
#include "models/units.hpp"

namespace knockon {

namespace {

using Names = std::vector<std::string>;

std::string name_of(const Names& names, std::uint32_t i) {
    if (i < names.size()) return names[i];
    std::string unnamed = "#";   // (not "#" + ...: GCC 12 warns wrongly of overlapping copies there)
    unnamed += std::to_string(i);
    return unnamed;
}

// "15.3 km": metres along the line, in km with at most three decimals.
std::string km(double metres) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3f", metres / 1000.0);
    std::string s = buf;
    while (!s.empty() && s.back() == '0') s.pop_back();
    if (!s.empty() && s.back() == '.') s.pop_back();
    return s + " km";
}

std::string block_text(const DeadlockBlock& b, const Names& trains, const Names& sections) {
    const std::string section = "section " + name_of(sections, b.section);
    switch (b.by) {
        case DeadlockBlock::By::held: return section + " held by " + name_of(trains, b.train);
        case DeadlockBlock::By::promised:
            return section + " free but promised to " + name_of(trains, b.train) + ", planned to use it first";
        case DeadlockBlock::By::disruption: return section + " out of use (disruption)";
    }
    return section;
}

std::string blocks_text(const DeadlockWait& w, const Names& trains, const Names& sections) {
    std::string out;
    for (const DeadlockBlock& b : w.blocks) out += (out.empty() ? "" : "; ") + block_text(b, trains, sections);
    return out;
}

}  // namespace

std::string where_it_stands(const DeadlockWait& w) {
    if (std::isnan(w.chainage)) return "outside the line";
    if (!w.station.empty()) return "at " + w.station + " (" + km(w.chainage) + ")";
    if (!w.signal.empty() && (w.waits_for == DeadlockWait::For::route || w.waits_for == DeadlockWait::For::view))
        return "at signal " + w.signal + " (" + km(w.chainage) + ")";
    return "at " + km(w.chainage);
}

namespace {

// "for its crew from UP1 (crew link)": a link wait, with the earlier train named.
std::string link_text(const DeadlockWait& w, const Names& trains) {
    const std::string from = name_of(trains, w.link_from);
    switch (w.link_kind) {
        case LinkKind::turnaround: return "for its set from " + from + " (turnaround)";
        case LinkKind::connection: return "for passengers from " + from + " (connection)";
        case LinkKind::crew: return "for its crew from " + from + " (crew link)";
    }
    return "for " + from;
}

}  // namespace

std::string what_it_waits_for(const DeadlockWait& w, const Names& trains) {
    switch (w.waits_for) {
        case DeadlockWait::For::appear: return "to appear at " + (w.station.empty() ? "its origin" : w.station);
        case DeadlockWait::For::enter: return "to enter the line (route from " + w.signal + ")";
        case DeadlockWait::For::entry_view: return "to see signal " + w.signal + " before entering the line";
        case DeadlockWait::For::route: return "for the route from " + w.signal;
        case DeadlockWait::For::view: return "to see signal " + w.signal;
        case DeadlockWait::For::request: return "for the route from " + w.signal + " to be asked for";
        case DeadlockWait::For::link: return link_text(w, trains);
        case DeadlockWait::For::other: break;
    }
    return "with no event left";
}

namespace {

// The train a wait names first as keeping it (holder or promised), if any.
const DeadlockBlock* first_train_block(const DeadlockWait& w) {
    if (w.waits_for == DeadlockWait::For::link) return nullptr;
    for (const DeadlockBlock& b : w.blocks)
        if (b.by != DeadlockBlock::By::disruption) return &b;
    return nullptr;
}

// The train that keeps a wait: the earlier train of a link, else the first block's train.
std::optional<std::uint32_t> keeping_train(const DeadlockWait& w) {
    if (w.waits_for == DeadlockWait::For::link) return w.link_from;
    if (const DeadlockBlock* b = first_train_block(w)) return b->train;
    return std::nullopt;
}

constexpr DeadlockWait::For kWaits[] = {DeadlockWait::For::appear, DeadlockWait::For::enter,
                                        DeadlockWait::For::entry_view, DeadlockWait::For::route,
                                        DeadlockWait::For::view, DeadlockWait::For::request,
                                        DeadlockWait::For::link, DeadlockWait::For::other};
constexpr DeadlockBlock::By kBlocks[] = {DeadlockBlock::By::held, DeadlockBlock::By::promised,
                                         DeadlockBlock::By::disruption};

}  // namespace

const char* wait_name(DeadlockWait::For kind) {
    switch (kind) {
        case DeadlockWait::For::appear: return "appear";
        case DeadlockWait::For::enter: return "enter";
        case DeadlockWait::For::entry_view: return "entry_view";
        case DeadlockWait::For::route: return "route";
        case DeadlockWait::For::view: return "view";
        case DeadlockWait::For::request: return "request";
        case DeadlockWait::For::link: return "link";
        case DeadlockWait::For::other: break;
    }
    return "other";
}

std::optional<DeadlockWait::For> wait_from_name(const std::string& name) {
    for (DeadlockWait::For k : kWaits)
        if (name == wait_name(k)) return k;
    return std::nullopt;
}

const char* block_name(DeadlockBlock::By by) {
    switch (by) {
        case DeadlockBlock::By::held: return "held";
        case DeadlockBlock::By::promised: return "promised";
        case DeadlockBlock::By::disruption: break;
    }
    return "disruption";
}

std::optional<DeadlockBlock::By> block_from_name(const std::string& name) {
    for (DeadlockBlock::By b : kBlocks)
        if (name == block_name(b)) return b;
    return std::nullopt;
}

std::string describe_wait(const DeadlockWait& w, const Names& trains, const Names& sections) {
    const std::string id = name_of(trains, w.train);
    const std::string blocks = blocks_text(w, trains, sections);
    const std::string since = format_time_of_day(w.since);
    switch (w.waits_for) {
        case DeadlockWait::For::appear:
            return id + " cannot appear at " + (w.station.empty() ? "its origin" : w.station) + " (due " + since +
                   ")" + (blocks.empty() ? "" : ": " + blocks);
        case DeadlockWait::For::enter:
            return id + " cannot enter the line (due " + since + "): the route from " + w.signal + " is not granted" +
                   (blocks.empty() ? "" : ": " + blocks);
        case DeadlockWait::For::entry_view:
            return id + " cannot enter the line (due " + since + "): the route from " + w.signal + " was set at " +
                   format_time_of_day(w.route_set) + ", but signal " + w.signal + " comes into view only at " +
                   km(w.read_from) + ", inside the line";
        case DeadlockWait::For::route:
            return id + " stands " + where_it_stands(w) +
                   (w.station.empty() ? " since " : ", ready to leave since ") + since +
                   ", waiting for the route from " + w.signal + (blocks.empty() ? "" : ": " + blocks);
        case DeadlockWait::For::view:
            return id + " stands " + where_it_stands(w) + " since " + since + ": the route from " + w.signal +
                   " was set at " + format_time_of_day(w.route_set) + ", but signal " + w.signal +
                   " is not in view from there (it comes into view at " + km(w.read_from) + ")";
        case DeadlockWait::For::request:
            return id + " stands " + where_it_stands(w) + " since " + since + ": the route from " + w.signal +
                   " was never asked for";
        case DeadlockWait::For::link:
            if (std::isnan(w.chainage))
                return id + " cannot appear at " + (w.station.empty() ? "its origin" : w.station) + " (due " + since +
                       "): it waits " + link_text(w, trains) + ", which has not arrived";
            return id + " stands " + where_it_stands(w) + ", ready to leave since " + since + ", waiting " +
                   link_text(w, trains) + ", which has not arrived";
        case DeadlockWait::For::other: break;
    }
    return id + (std::isnan(w.chainage) ? " waits outside the line" : " stands " + where_it_stands(w)) +
           " with no event left (an engine fault: please report the scenario)";
}

std::string deadlock_cause(const std::vector<DeadlockWait>& waiting, const Names& trains, const Names& sections) {
    if (waiting.empty()) return "";
    std::map<std::uint32_t, std::size_t> at;   // train -> its wait
    for (std::size_t i = 0; i < waiting.size(); ++i) at.emplace(waiting[i].train, i);
    // Each waiting train points at the first train that keeps it; follow the pointers from each
    // waiting train in turn until they close a circle or end.
    auto chain_from = [&](std::size_t start, bool& circle) {
        std::vector<std::size_t> chain;
        std::map<std::size_t, std::size_t> seen;   // wait -> position in chain
        circle = false;
        for (std::size_t i = start;;) {
            if (const auto it = seen.find(i); it != seen.end()) {
                chain.erase(chain.begin(), chain.begin() + static_cast<long>(it->second));
                circle = true;
                return chain;
            }
            seen.emplace(i, chain.size());
            chain.push_back(i);
            const std::optional<std::uint32_t> keeper = keeping_train(waiting[i]);
            if (!keeper) return chain;
            const auto next = at.find(*keeper);
            if (next == at.end()) return chain;
            i = next->second;
        }
    };
    bool circle = false;
    std::vector<std::size_t> chain;
    for (std::size_t s = 0; s < waiting.size() && !circle; ++s) chain = chain_from(s, circle);
    if (!circle) chain = chain_from(0, circle);

    // "A for the route from U05 (section S:1-2 held by B)"
    auto step = [&](const DeadlockWait& w, const char* verb) {
        std::string out = name_of(trains, w.train) + verb + what_it_waits_for(w, trains);
        if (const DeadlockBlock* b = first_train_block(w)) out += " (" + block_text(*b, trains, sections) + ")";
        return out;
    };
    std::string out;
    if (circle) {
        for (std::size_t k = 0; k < chain.size(); ++k) {
            if (k) out += k + 1 == chain.size() ? " and " : ", ";
            out += name_of(trains, waiting[chain[k]].train);
        }
        out += chain.size() == 1 ? " waits for itself" : chain.size() == 2 ? " wait for each other"
                                                                               : " wait for each other in a circle";
        // The circle closed when the last of them began to wait (the day may run on for hours
        // while other trains finish).
        double closed = -std::numeric_limits<double>::infinity();
        for (std::size_t i : chain) closed = std::max(closed, waiting[i].since);
        if (std::isfinite(closed)) out += " (since " + format_time_of_day(closed) + ")";
        out += ": ";
        for (std::size_t k = 0; k < chain.size(); ++k) out += (k ? ", " : "") + step(waiting[chain[k]], " ");
    } else {
        // The chain down to the train that keeps the others, told last in full.
        for (std::size_t k = 0; k + 1 < chain.size(); ++k) out += step(waiting[chain[k]], " waits ") + "; ";
        const DeadlockWait& last = waiting[chain.back()];
        out += describe_wait(last, trains, sections);
        if (const auto keeper = keeping_train(last); keeper && !at.count(*keeper))
            out += " (" + name_of(trains, *keeper) + " is not waiting)";
    }
    const std::size_t others = waiting.size() - chain.size();
    if (others > 0)
        out += "; " + std::to_string(others) + (others == 1 ? " other train waits" : " other trains wait") +
               " behind";
    return out;
}

void put_deadlock_into_words(DeadlockReport& report, const Names& trains, const Names& sections) {
    report.cause = deadlock_cause(report.waiting, trains, sections);
    report.description.clear();
    for (const DeadlockWait& w : report.waiting) report.description += describe_wait(w, trains, sections) + "\n";
}

}  // namespace knockon
