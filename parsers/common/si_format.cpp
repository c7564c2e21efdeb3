#include "parsers/common/si_format.hpp"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <string>

#include <fmt/format.h>

namespace mirrorcheck {

std::string format_si(double value, std::string_view unit) {
    if (!std::isfinite(value)) return fmt::format("{} {}", value, unit);
    if (value == 0.0) return fmt::format("0 {}", unit);
    static const char* prefixes[] = {"f", "p", "n", "µ", "m", "", "k", "M", "G", "T"};
    int exponent = static_cast<int>(std::floor(std::log10(std::fabs(value)) / 3.0));
    exponent = std::clamp(exponent, -5, 4);
    double scaled = value / std::pow(10.0, 3 * exponent);
    // Rounding to three digits can carry into the next prefix (999.7 m -> 1 unit). strtod,
    // not stod: a subnormal value (below 1e-308 after scaling) is no error (found by fuzzing).
    const std::string rounded = fmt::format("{:.3g}", scaled);
    if (std::fabs(std::strtod(rounded.c_str(), nullptr)) >= 1000.0 && exponent < 4) {
        ++exponent;
        scaled /= 1000.0;
    }
    return fmt::format("{:.3g} {}{}", scaled, prefixes[exponent + 5], unit);
}

std::string format_plain(double value, int digits) {
    if (!std::isfinite(value)) return fmt::format("{}", value);
    if (value == 0.0) return "0";
    const int exponent = static_cast<int>(std::floor(std::log10(std::fabs(value))));
    if (exponent >= digits) {
        const double unit = std::pow(10.0, exponent - digits + 1);
        return fmt::format("{:.0f}", std::round(value / unit) * unit);
    }
    return fmt::format("{:.{}g}", value, digits);
}

std::string format_percent(double fraction) {
    const double percent = 100.0 * fraction;
    if (std::isfinite(percent) && std::fabs(percent) >= 99.95) return fmt::format("{:.0f} %", percent);
    return fmt::format("{:.3g} %", percent);
}

}  // namespace mirrorcheck
