// knockon: command-line entry.  Each subcommand lives in its own file; this one dispatches and
// turns every failure into a message and an exit status (0 ok, 1 failure while running,
// 2 bad input or usage, 3 a simulated day, or days of a study or comparison, ended in deadlock and
// --allow-deadlock was not given; killed by a signal: see interrupt.hpp).  Under an MPI launcher
// (tools/knockon/ranks.hpp) a failure on any rank ends every rank with its status.
#include <cstdio>
#include <cstring>
#include <exception>
#include <string>
#include <vector>

#include "tools/results/output_file.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/knockon/commands.hpp"
#include "tools/knockon/interrupt.hpp"
#include "tools/knockon/ranks.hpp"

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
                 "  merge PART.h5... -o OUT.h5   the shard files of a study or comparison (simulate or\n"
                 "                              compare --shard K/N) as the file one run would have written\n"
                 "\n"
                 "Run 'knockon <command> --help' for the options of a command.\n");
}

int run(const std::string& command, const std::vector<std::string>& args) {
    const bool one_process_command = command == "validate" || command == "plan" || command == "report" ||
                                     command == "plot" || command == "merge";
    if (knockon::cli::spread_over_ranks() && one_process_command)
        throw knockon::cli::UsageError("runs in one process: start it without mpirun (under mpirun only "
                                       "'simulate --replications' and 'compare' spread their days over the processes)");
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
}

// What main prints for the exception being handled, and the exit status that goes with it.
struct Failure {
    int status = 1;
    std::string message;
};

Failure current_failure(const std::string& command) {
    try {
        throw;
    } catch (const knockon::ScenarioError& e) {
        std::string text;
        for (const std::string& m : e.messages) text += m + "\n";
        return {2, text + "knockon: " + std::to_string(e.messages.size()) + " problem" +
                       (e.messages.size() == 1 ? "" : "s") + " found; nothing was written"};
    } catch (const knockon::cli::UsageError& e) {
        return {2, "knockon " + command + ": " + e.what()};
    } catch (const knockon::OutputPathError& e) {   // an output path that must not be written
        return {2, "knockon " + command + ": " + e.what()};
    } catch (const std::exception& e) {
        return {1, "knockon " + command + ": " + e.what()};
    }
}

}  // namespace

int main(int argc, char** argv) {
    knockon::cli::install_signal_handlers();   // SIGINT/SIGTERM/SIGHUP leave no temporary file
    knockon::cli::start_ranks(argc, argv);     // MPI, only under an MPI launcher
    if (argc < 2) {
        usage(stderr);
        knockon::cli::fail_all_ranks(2, "", "no command given");
        return 2;
    }
    const std::string command = argv[1];
    const std::vector<std::string> args(argv + 2, argv + argc);
    int status = 0;
    try {
        status = run(command, args);
    } catch (...) {
        const Failure f = current_failure(command);
        std::fprintf(stderr, "%s\n", f.message.c_str());
        knockon::cli::fail_all_ranks(f.status, command, f.message);   // returns in one process only
        return f.status;
    }
    knockon::cli::end_ranks();
    return status;
}
