#include "tools/knockon/options.hpp"

#include <iostream>

namespace knockon::cli {

bool parse_command_line(const std::string& command, const std::vector<std::string>& args,
                        po::options_description& options, po::variables_map& vm) {
    options.add_options()("help,h", "show this help")("scenario", po::value<std::string>(), "scenario file (YAML)");
    po::positional_options_description pos;
    pos.add("scenario", 1);
    try {
        po::store(po::command_line_parser(args).options(options).positional(pos).run(), vm);
        po::notify(vm);
    } catch (const po::error& e) {
        throw UsageError(e.what());
    }
    if (vm.count("help")) {
        std::cout << "usage: knockon " << command << " SCENARIO [options]\n" << options;
        return false;
    }
    if (!vm.count("scenario")) throw UsageError("a SCENARIO file is required");
    return true;
}

}  // namespace knockon::cli
