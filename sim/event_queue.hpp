#pragma once
// The discrete-event kernel: a priority queue of small tagged events in a total, deterministic
// order, plus lazy cancellation by per-entity generation numbers. It knows nothing of what the
// events mean; the driver loop pops them and dispatches on `kind`.
//
// Why this shape (see sim/ENGINEERING.md, "Event kernel"): a 4-ary implicit heap over plain structs
// is several times faster than node-based heaps, and cancelling by bumping a generation (and
// dropping stale entries when they surface) is cheaper than handle-based erase.  Events that a
// driver schedules in order anyway (a constant delay after the current time, say) may go to a
// first-in-first-out lane instead: the queue takes the earliest of the heap's top and the
// lanes' fronts, so the order is the same, without the heap's work for them.
#include <array>
#include <cstddef>
#include <cstdint>
#include <stdexcept>
#include <string>
#include <vector>

#include <boost/heap/d_ary_heap.hpp>

#include "sim/sim_time.hpp"

namespace knockon {

// An entity id that no generation applies to: its events are never stale. For events that do
// not belong to anything cancellable (e.g. periodic sampling).
inline constexpr std::uint32_t no_entity = UINT32_MAX;

// One scheduled happening. Only the queue creates events (it assigns `seq`), and it hands them
// out by value or const reference, so once scheduled an event does not change.
struct Event {
    SimTime time;              // when
    std::uint8_t phase = 0;    // order among events at the same time; lower first
    std::uint64_t seq = 0;     // push counter: equal (time, phase) come out in push order
    std::uint32_t kind = 0;    // what happens; meaning belongs to the driver
    std::uint32_t entity = 0;  // whom it concerns (index into the GenerationTable), or no_entity
    std::uint32_t generation = 0;  // entity's generation when scheduled; stale once bumped
    std::uint32_t payload = 0;     // one free word for the driver (e.g. a block or stop index)
};

// The total order (time, phase, seq). seq is unique per queue, so no two events tie, and the
// order never depends on addresses or on the heap's internal layout.
constexpr bool earlier(const Event& a, const Event& b) {
    if (a.time != b.time) return a.time < b.time;
    if (a.phase != b.phase) return a.phase < b.phase;
    return a.seq < b.seq;
}

// Per-entity generation numbers for lazy cancellation: bump(entity) makes every event already
// scheduled for it stale; events scheduled afterwards carry the new generation. Entities are
// dense indices; the table grows on demand. A generation would wrap only after 2^32 bumps of
// one entity, which no scenario comes near.
class GenerationTable {
public:
    explicit GenerationTable(std::size_t entities = 0) : gen_(entities, 0) {}

    std::uint32_t current(std::uint32_t entity) const {
        return entity < gen_.size() ? gen_[entity] : 0;
    }
    // Returns the new generation, to stamp on the entity's next events.
    std::uint32_t bump(std::uint32_t entity) {
        if (entity == no_entity)
            throw std::logic_error("GenerationTable::bump: no_entity cannot be cancelled");
        if (entity >= gen_.size()) gen_.resize(std::size_t{entity} + 1, 0);
        return ++gen_[entity];
    }
    bool is_current(std::uint32_t entity, std::uint32_t generation) const {
        return entity == no_entity || current(entity) == generation;
    }
    std::size_t size() const { return gen_.size(); }

private:
    std::vector<std::uint32_t> gen_;
};

class EventQueue {
public:
    // Events earlier than `start` are refused, as later on events earlier than now().
    explicit EventQueue(SimTime start = SimTime{}) : now_(start) {}

    // Schedules an event and returns its sequence number. Scheduling earlier than now() is a
    // bug in the caller (it would rewrite the past), so it throws std::logic_error. An event at
    // exactly now() is fine, whatever its phase: it comes out after the one being handled.
    std::uint64_t push(SimTime time, std::uint8_t phase, std::uint32_t kind, std::uint32_t entity,
                       std::uint32_t generation, std::uint32_t payload = 0) {
        const Event e = make(time, phase, kind, entity, generation, payload);
        heap_.push(e);
        return e.seq;
    }

    // The same, into FIFO lane `lane` (< kLanes) when the event comes no earlier than the last
    // one there (else into the heap: the order stays right either way).
    static constexpr std::size_t kLanes = 2;
    std::uint64_t push_in_order(std::size_t lane, SimTime time, std::uint8_t phase, std::uint32_t kind,
                                std::uint32_t entity, std::uint32_t generation, std::uint32_t payload = 0) {
        const Event e = make(time, phase, kind, entity, generation, payload);
        Lane& l = lanes_.at(lane);
        if (l.empty() || !earlier(e, l.events.back())) l.events.push_back(e);
        else heap_.push(e);
        return e.seq;
    }

    bool empty() const { return size() == 0; }
    // Pending events, stale ones included (they leave only when they reach the top).
    std::size_t size() const {
        std::size_t n = heap_.size();
        for (const Lane& l : lanes_) n += l.size();
        return n;
    }
    void reserve(std::size_t n) { heap_.reserve(n); }

    // The earliest pending event, stale or not.
    const Event& top() const {
        const int from = earliest();
        if (from == kNone) throw std::logic_error("EventQueue::top on an empty queue");
        return from == kHeap ? heap_.top() : lanes_[from].front();
    }

    // Removes and returns the earliest pending event, stale or not, and advances now().
    Event pop() {
        const int from = earliest();
        if (from == kNone) throw std::logic_error("EventQueue::pop on an empty queue");
        Event e = take(from);
        now_ = e.time;
        return e;
    }

    // Pops the earliest event that is still current in `generations` into `out`, dropping
    // stale ones on the way; false when the queue ran empty. Dropped events do not advance
    // now(): it stays the time of the last event actually delivered.
    bool pop_current(Event& out, const GenerationTable& generations) {
        for (int from = earliest(); from != kNone; from = earliest()) {
            out = take(from);
            if (generations.is_current(out.entity, out.generation)) {
                now_ = out.time;
                return true;
            }
            ++stale_dropped_;
        }
        return false;
    }

    // Time of the last popped (delivered) event; the start time before the first.
    SimTime now() const { return now_; }
    // Events pushed so far (= the next sequence number).
    std::uint64_t pushed() const { return next_seq_; }
    // Stale events dropped by pop_current so far.
    std::uint64_t stale_dropped() const { return stale_dropped_; }

private:
    // boost::heap keeps the "largest" on top; ordering by "later than" puts the earliest there.
    struct Later {
        bool operator()(const Event& a, const Event& b) const { return earlier(b, a); }
    };
    // A FIFO over a vector: taken from `head`, emptied (capacity kept) once all are taken.
    struct Lane {
        std::vector<Event> events;
        std::size_t head = 0;
        bool empty() const { return head == events.size(); }
        std::size_t size() const { return events.size() - head; }
        const Event& front() const { return events[head]; }
    };
    static constexpr int kNone = -2, kHeap = -1;

    Event make(SimTime time, std::uint8_t phase, std::uint32_t kind, std::uint32_t entity, std::uint32_t generation,
               std::uint32_t payload) {
        if (time < now_)
            throw std::logic_error("EventQueue: event of kind " + std::to_string(kind) +
                                   " for entity " + std::to_string(entity) + " scheduled at " +
                                   to_string(time) + ", before the current time " +
                                   to_string(now_));
        return Event{time, phase, next_seq_++, kind, entity, generation, payload};
    }
    // Where the earliest pending event is: kHeap, a lane's index, or kNone.
    int earliest() const {
        int from = heap_.empty() ? kNone : kHeap;
        const Event* best = heap_.empty() ? nullptr : &heap_.top();
        for (std::size_t i = 0; i < kLanes; ++i) {
            const Lane& l = lanes_[i];
            if (!l.empty() && (best == nullptr || earlier(l.front(), *best))) {
                best = &l.front();
                from = static_cast<int>(i);
            }
        }
        return from;
    }
    Event take(int from) {
        if (from == kHeap) {
            Event e = heap_.top();
            heap_.pop();
            return e;
        }
        Lane& l = lanes_[static_cast<std::size_t>(from)];
        Event e = l.front();
        if (++l.head == l.events.size()) {
            l.events.clear();
            l.head = 0;
        }
        return e;
    }

    boost::heap::d_ary_heap<Event, boost::heap::arity<4>, boost::heap::compare<Later>> heap_;
    std::array<Lane, kLanes> lanes_;
    SimTime now_;
    std::uint64_t next_seq_ = 0;
    std::uint64_t stale_dropped_ = 0;
};

}  // namespace knockon
