#include "parsers/common/quantity.hpp"

#include <charconv>
#include <string>

#include "parsers/common/text.hpp"

namespace mirrorcheck {
namespace {

std::string_view trim(std::string_view s) {
    while (!s.empty() && s.front() == ' ') s.remove_prefix(1);
    while (!s.empty() && s.back() == ' ') s.remove_suffix(1);
    return s;
}

// The SI prefix at the start of `rest`, with its length; 1 and 0 when there is none.
std::pair<double, std::size_t> prefix(std::string_view rest) {
    static const std::pair<std::string_view, double> prefixes[] = {
        {"µ", 1e-6}, {"f", 1e-15}, {"p", 1e-12}, {"n", 1e-9}, {"u", 1e-6},
        {"m", 1e-3}, {"k", 1e3},   {"M", 1e6},   {"G", 1e9},  {"T", 1e12}};
    for (auto [p, scale] : prefixes)
        if (rest.starts_with(p)) return {scale, p.size()};
    return {1.0, 0};
}

}  // namespace

std::optional<double> parse_quantity(std::string_view text, std::string_view unit) {
    text = trim(text);
    double value = 0;
    auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    if (ec != std::errc{}) return std::nullopt;
    std::string_view rest = trim(text.substr(static_cast<std::size_t>(end - text.data())));
    if (unit == "%") {
        if (rest == "%") return value / 100.0;
        return rest.empty() ? std::optional<double>(value) : std::nullopt;
    }
    if (rest.empty() || iequals(rest, unit)) return value;
    auto [scale, length] = prefix(rest);
    rest.remove_prefix(length);
    if (length == 0 || !(rest.empty() || iequals(rest, unit))) return std::nullopt;
    return value * scale;
}

}  // namespace mirrorcheck
