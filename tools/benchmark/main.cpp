// knockon_benchmark: speed and memory of a Monte Carlo study of a scenario (default: the demo).
//
//   knockon_benchmark [SCENARIO] [--replications N] [--threads T] [--rounds R]
//
// Runs the same study on 1 thread and on T threads and prints replications per second, simulated
// train-km and block passages per CPU-second, events per second, the speed-up, and the peak
// resident memory.  Speed targets are checked here, never by timed unit tests.
//
// The machine's speed swings from minute to minute, so the whole measurement is made R times
// (default 3), each round printed, and the medians of the rounds close the report.
//
// On a shared machine one core may run markedly slower than another, and a single-thread run lands
// on either.  The T-thread run uses T cores, so the single-thread run is made once on each of the
// first T cores the process may use (pinned), each shown, and the speed-up compares with their
// mean.  With fewer cores allowed (under taskset, say) it runs once, unpinned.
#include <sched.h>
#include <sys/resource.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <ctime>
#include <algorithm>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "sim/delay_draws.hpp"
#include "sim/study.hpp"
#include "tools/read/scenario_reader.hpp"

namespace {

double cpu_seconds() {
    timespec ts{};
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return static_cast<double>(ts.tv_sec) + 1e-9 * static_cast<double>(ts.tv_nsec);
}

struct Measure {
    double wall = 0.0, cpu = 0.0;
    std::uint64_t events = 0, passages = 0;
    std::size_t replications = 0;
};

Measure run(const knockon::SimModel& model, const knockon::Scenario& sc, const std::vector<knockon::TrainPlan>& plan,
            std::uint32_t replications, unsigned threads) {
    knockon::StudyOptions opt;
    opt.replications = replications;
    opt.threads = threads;
    const knockon::DelayDrawer drawer(sc, plan);
    opt.draw = [&](std::uint32_t k) { return drawer.draw(1, k); };
    const double c0 = cpu_seconds();
    const auto w0 = std::chrono::steady_clock::now();
    knockon::StudyResult r = knockon::run_study(model, opt);
    Measure m;
    m.wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - w0).count();
    m.cpu = cpu_seconds() - c0;
    m.replications = r.replications.size();
    for (const auto& rep : r.replications) {
        m.events += rep.events;
        m.passages += rep.block_passages;
    }
    return m;
}

}  // namespace

int main(int argc, char** argv) {
    std::string file = KNOCKON_SOURCE_DIR "/scenarios/demo.yaml";
    std::uint32_t replications = 200;
    unsigned threads = 2;
    int rounds = 3;
    for (int i = 1; i < argc; ++i) {
        if (!std::strcmp(argv[i], "--replications") && i + 1 < argc) replications = std::atoi(argv[++i]);
        else if (!std::strcmp(argv[i], "--threads") && i + 1 < argc) threads = std::atoi(argv[++i]);
        else if (!std::strcmp(argv[i], "--rounds") && i + 1 < argc) rounds = std::atoi(argv[++i]);
        else if (argv[i][0] != '-') file = argv[i];
        else {
            std::fprintf(stderr, "usage: knockon_benchmark [SCENARIO] [--replications N] [--threads T] [--rounds R]\n");
            return 2;
        }
    }
    if (replications == 0 || threads == 0 || rounds <= 0) {
        std::fprintf(stderr, "knockon_benchmark: --replications, --threads and --rounds must be positive\n");
        return 2;
    }
    try {
        const knockon::Scenario sc = knockon::read_scenario(file);
        const std::vector<knockon::TrainPlan> plan = knockon::plan_trains(sc);
        const knockon::SimModel model(sc, plan);
        double train_km = 0.0;   // per simulated day
        for (const auto& tp : plan) train_km += tp.run.path.length / 1000.0;

        std::printf("knockon_benchmark: %s, %u replications, %zu trains, %.0f train-km per day\n", file.c_str(),
                    replications, plan.size(), train_km);
        auto report = [&](const char* label, const Measure& m) {
            std::printf("%-15s %8.1f replications/s  %10.0f train-km/CPU-s  %10.0f block passages/CPU-s  "
                        "%11.0f events/s  (wall %.2f s, CPU %.2f s)\n",
                        label, m.replications / m.wall, train_km * m.replications / m.cpu, m.passages / m.cpu,
                        m.events / m.wall, m.wall, m.cpu);
        };
        // Single thread: on each of the first `threads` allowed cores in turn, or once unpinned
        // (also for the rounds after one where pinning failed).
        cpu_set_t allowed;
        CPU_ZERO(&allowed);
        std::vector<int> cores;
        if (threads > 1 && sched_getaffinity(0, sizeof allowed, &allowed) == 0)
            for (int c = 0; c < CPU_SETSIZE && cores.size() < threads; ++c)
                if (CPU_ISSET(c, &allowed)) cores.push_back(c);
        if (cores.size() < 2) cores.clear();
        // Per round: block passages per CPU-second on 1 and on T threads, and the speed-up.
        std::vector<double> one_rate, many_rate, speed_up;
        for (int round = 1; round <= rounds; ++round) {
            if (rounds > 1) std::printf("round %d of %d\n", round, rounds);
            Measure one;
            bool pinned = !cores.empty();
            for (int c : cores) {
                cpu_set_t only;
                CPU_ZERO(&only);
                CPU_SET(c, &only);
                if (sched_setaffinity(0, sizeof only, &only) != 0) {
                    std::fprintf(stderr, "knockon_benchmark: cannot pin to cpu %d; the single-thread run is not pinned\n", c);
                    pinned = false;
                    break;
                }
                const Measure m = run(model, sc, plan, replications, 1);
                char label[32];
                std::snprintf(label, sizeof label, "1 thread, cpu %d", c);
                report(label, m);
                one.wall += m.wall;
                one.cpu += m.cpu;
                one.events += m.events;
                one.passages += m.passages;
                one.replications += m.replications;
            }
            if (!cores.empty()) sched_setaffinity(0, sizeof allowed, &allowed);
            if (!pinned) {
                cores.clear();
                one = run(model, sc, plan, replications, 1);
            }
            const Measure many = run(model, sc, plan, replications, threads);
            report("1 thread", one);
            char label[32];
            std::snprintf(label, sizeof label, "%u threads", threads);
            report(label, many);
            const double up = (one.wall / one.replications) / (many.wall / many.replications);
            std::printf("speed-up %u threads / 1 thread%s: %.2fx\n", threads, cores.empty() ? "" : " (mean over the cores)", up);
            one_rate.push_back(one.passages / one.cpu);
            many_rate.push_back(many.passages / many.cpu);
            speed_up.push_back(up);
        }
        auto median = [](std::vector<double> v) {
            std::sort(v.begin(), v.end());
            const std::size_t n = v.size();
            return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
        };
        std::printf("median of %d round%s: 1 thread %.0f, %u threads %.0f block passages/CPU-s; speed-up %.2fx\n",
                    rounds, rounds == 1 ? "" : "s", median(one_rate), threads, median(many_rate), median(speed_up));
        rusage ru{};
        getrusage(RUSAGE_SELF, &ru);
        std::printf("peak resident memory: %.1f MB\n", ru.ru_maxrss / 1024.0);
    } catch (const std::exception& e) {
        std::fprintf(stderr, "knockon_benchmark: %s\n", e.what());
        return 1;
    }
    return 0;
}
