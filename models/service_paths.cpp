#include "models/service_paths.hpp"

#include "models/line_paths.hpp"
#include "models/network/network_paths.hpp"
#include "models/scenario.hpp"

namespace knockon {

std::unique_ptr<ServicePaths> service_paths(const Scenario& scenario) {
    if (scenario.network) return std::make_unique<NetworkPaths>(scenario);
    return std::make_unique<LinePaths>(scenario.infrastructure);
}

}  // namespace knockon
