#include "tools/results/replication_bytes.hpp"

#include <cstdint>
#include <cstring>
#include <type_traits>

namespace knockon {
namespace {

// Plain values as their bytes; counts and string lengths as u64 ahead of their elements.
template <class T>
void put(std::string& out, T value) {
    static_assert(std::is_trivially_copyable_v<T>);
    char raw[sizeof(T)];
    std::memcpy(raw, &value, sizeof(T));
    out.append(raw, sizeof(T));
}

void put_text(std::string& out, const std::string& text) {
    put<std::uint64_t>(out, text.size());
    out += text;
}

template <class T>
void put_all(std::string& out, const std::vector<T>& values) {
    put<std::uint64_t>(out, values.size());
    for (const T& v : values) put(out, v);
}

class Reader {
public:
    Reader(const std::string& bytes, std::size_t& at) : bytes_(bytes), at_(at) {}

    template <class T>
    T get() {
        need(sizeof(T), 1);
        T value;
        std::memcpy(&value, bytes_.data() + at_, sizeof(T));
        at_ += sizeof(T);
        return value;
    }
    std::size_t count(std::size_t element_size) {
        const auto n = get<std::uint64_t>();
        need(element_size, n);
        return static_cast<std::size_t>(n);
    }
    std::string text() {
        const std::size_t n = count(1);
        std::string s = bytes_.substr(at_, n);
        at_ += n;
        return s;
    }
    template <class T>
    std::vector<T> all() {
        std::vector<T> v(count(sizeof(T)));
        for (T& x : v) x = get<T>();
        return v;
    }

private:
    // At least n elements of `size` bytes left; a count beyond the bytes is refused before any
    // allocation is made for it.
    void need(std::size_t size, std::uint64_t n) {
        const std::size_t left = bytes_.size() - at_;
        if (n > left / size)
            throw ReplicationBytesError("a simulated day's figures end early: " + std::to_string(left) +
                                        " bytes left where " + std::to_string(n) + " x " + std::to_string(size) +
                                        " are needed");
    }
    const std::string& bytes_;
    std::size_t& at_;
};

}  // namespace

void append_day_bytes(std::string& out, const ReplicationFigures& day) {
    const ReplicationStats& s = day.stats;
    put<std::uint32_t>(out, s.replication);
    put<std::uint8_t>(out, s.deadlocked ? 1 : 0);
    put<std::uint64_t>(out, s.events);
    put<std::uint64_t>(out, s.block_passages);
    put<double>(out, s.total_primary);
    put<double>(out, s.total_knock_on);
    put<double>(out, s.mean_arrival_delay);
    put<std::uint32_t>(out, s.moved_crossings);
    put<std::uint32_t>(out, s.changed_orders);
    put<std::uint32_t>(out, s.missed_connections);
    put_all(out, s.punctuality);
    put<std::uint8_t>(out, day.deadlock.deadlocked ? 1 : 0);
    put<double>(out, day.deadlock.time);
    put_text(out, day.deadlock.cause);
    put_text(out, day.deadlock.description);
    put_all(out, day.arrival_delay);
    put_all(out, day.knock_on);
    put_all(out, day.train_primary);
    put_all(out, day.train_knock_on);
    put_all(out, day.train_final_delay);
    put<std::uint64_t>(out, day.held.size());
    for (const auto& [signal, seconds] : day.held) {
        put_text(out, signal);
        put<double>(out, seconds);
    }
    put_all(out, day.section_blocked);
    put_all(out, day.buffer);
    const AttributionLayout& l = day.attribution_layout;
    for (std::uint32_t n : {l.records, l.trains, l.sections, l.links, l.pairs, l.places}) put<std::uint32_t>(out, n);
    put_all(out, day.attribution);
}

ReplicationFigures read_day_bytes(const std::string& bytes, std::size_t& at) {
    Reader in(bytes, at);
    ReplicationFigures day;
    ReplicationStats& s = day.stats;
    s.replication = in.get<std::uint32_t>();
    s.deadlocked = in.get<std::uint8_t>() != 0;
    s.events = in.get<std::uint64_t>();
    s.block_passages = in.get<std::uint64_t>();
    s.total_primary = in.get<double>();
    s.total_knock_on = in.get<double>();
    s.mean_arrival_delay = in.get<double>();
    s.moved_crossings = in.get<std::uint32_t>();
    s.changed_orders = in.get<std::uint32_t>();
    s.missed_connections = in.get<std::uint32_t>();
    s.punctuality = in.all<double>();
    day.deadlock.deadlocked = in.get<std::uint8_t>() != 0;
    day.deadlock.time = in.get<double>();
    day.deadlock.cause = in.text();
    day.deadlock.description = in.text();
    day.arrival_delay = in.all<float>();
    day.knock_on = in.all<float>();
    day.train_primary = in.all<float>();
    day.train_knock_on = in.all<float>();
    day.train_final_delay = in.all<float>();
    // Each signal takes at least its length and its seconds: 16 bytes.
    for (std::size_t n = in.count(16); n > 0; --n) {
        std::string signal = in.text();
        day.held[std::move(signal)] = in.get<double>();
    }
    day.section_blocked = in.all<float>();
    day.buffer = in.all<float>();
    AttributionLayout& l = day.attribution_layout;
    for (std::uint32_t* n : {&l.records, &l.trains, &l.sections, &l.links, &l.pairs, &l.places}) *n = in.get<std::uint32_t>();
    day.attribution = in.all<float>();
    if (day.attribution.size() != l.width())
        throw ReplicationBytesError("a simulated day's attribution figures hold " + std::to_string(day.attribution.size()) +
                                    " values where their layout has " + std::to_string(l.width()));
    return day;
}

}  // namespace knockon
