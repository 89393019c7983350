// knockon: command-line entry.  Each subcommand lives in its own file; this one dispatches and
// turns every failure into a message and an exit status (0 ok, 1 failure while running,
// 2 bad input or usage, 3 a simulated day, or days of a study or comparison, ended in deadlock and
// --allow-deadlock was not given; killed by a signal: see interrupt.hpp).
#include <cstdio>
#include <cstring>
#include <exception>
#include <string>
#include <vector>

#include "tools/io/output_file.hpp"
#include "tools/io/scenario_reader.hpp"
#include "tools/knockon/commands.hpp"
#include "tools/knockon/interrupt.hpp"

namespace {

void usage(std::FILE* to) {
    std::fprintf(to,
                 "usage: knockon <command> [options]\n"
                 "\n"
                 "commands:\n"
                 "  validate SCENARIO           check a scenario file and report every problem found\n"
                 "  plan SCENARIO [options]     running times, blocking times, headways, buffers,\n"
                 "                              conflicts and UIC 406 capacity consumption\n"
                 "  simulate SCENARIO [options] one day, event by event, with signals and interlocking\n"
                 "  report SCENARIO|RESULTS.h5 -o FILE\n"
                 "                              the report as one self-contained HTML page: the plan,\n"
                 "                              or the results of simulate --out / compare --out\n"
                 "  plot SCENARIO|RESULTS.h5 --chart NAME --svg FILE\n"
                 "                              one chart of the report as an SVG file\n"
                 "  compare SCENARIO [options]  Monte Carlo comparison of scenario variants with the same\n"
                 "                              primary delays (common random numbers)\n"
                 "  merge PART.h5... -o STUDY.h5 the shard files of a study (simulate --shard K/N) as the\n"
                 "                              study file one run would have written\n"
                 "\n"
                 "Run 'knockon <command> --help' for the options of a command.\n");
}

}  // namespace

int main(int argc, char** argv) {
    knockon::cli::install_signal_handlers();   // SIGINT/SIGTERM/SIGHUP leave no temporary file
    if (argc < 2) {
        usage(stderr);
        return 2;
    }
    const std::string command = argv[1];
    std::vector<std::string> args(argv + 2, argv + argc);
    try {
        if (command == "validate") return knockon::cli::validate(args);
        if (command == "plan") return knockon::cli::plan(args);
        if (command == "simulate") return knockon::cli::simulate(args);
        if (command == "report") return knockon::cli::report(args);
        if (command == "plot") return knockon::cli::plot(args);
        if (command == "compare") return knockon::cli::compare(args);
        if (command == "merge") return knockon::cli::merge(args);
        if (command == "--help" || command == "-h" || command == "help") {
            usage(stdout);
            return 0;
        }
        if (command == "--version") {
            std::printf("knockon %s\n", KNOCKON_VERSION);
            return 0;
        }
        std::fprintf(stderr, "knockon: unknown command '%s'\n", command.c_str());
        usage(stderr);
        return 2;
    } catch (const knockon::ScenarioError& e) {
        for (const std::string& m : e.messages) std::fprintf(stderr, "%s\n", m.c_str());
        std::fprintf(stderr, "knockon: %zu problem%s found; nothing was written\n", e.messages.size(),
                     e.messages.size() == 1 ? "" : "s");
        return 2;
    } catch (const knockon::cli::UsageError& e) {
        std::fprintf(stderr, "knockon %s: %s\n", command.c_str(), e.what());
        return 2;
    } catch (const knockon::OutputPathError& e) {   // an output path that must not be written
        std::fprintf(stderr, "knockon %s: %s\n", command.c_str(), e.what());
        return 2;
    } catch (const std::exception& e) {
        std::fprintf(stderr, "knockon %s: %s\n", command.c_str(), e.what());
        return 1;
    }
}
