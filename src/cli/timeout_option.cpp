#include "src/cli/timeout_option.hpp"

#include <cmath>

#include <fmt/format.h>

#include "src/cli/usage_errors.hpp"

namespace mirrorcheck::cli {

void add_timeout_option(CLI::App& cmd, double& seconds, const std::string& ended) {
    cmd.add_option("--timeout", seconds,
                   fmt::format("end ngspice when one run takes longer than this many seconds; {} (default {}; 0: no "
                               "limit)",
                               ended, default_timeout_seconds));
}

std::chrono::seconds timeout_seconds(double seconds) {
    if (!std::isfinite(seconds) || seconds < 0 || seconds > 1e9) throw usage::bad_timeout(seconds);
    return std::chrono::seconds(static_cast<long long>(std::ceil(seconds)));
}

}  // namespace mirrorcheck::cli
