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

// The number at the start of `text` and what follows it, trimmed.
std::optional<std::pair<double, std::string_view>> number_and_rest(std::string_view text) {
    text = trim(text);
    double value = 0;
    auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    if (ec != std::errc{}) return std::nullopt;
    return std::pair{value, trim(text.substr(static_cast<std::size_t>(end - text.data())))};
}

}  // namespace

std::optional<double> parse_quantity(std::string_view text, std::string_view unit) {
    auto read = number_and_rest(text);
    if (!read) return std::nullopt;
    auto [value, rest] = *read;
    if (unit == "%") return rest == "%" ? std::optional<double>(value / 100.0) : std::nullopt;
    if (iequals(rest, unit)) return value;
    auto [scale, length] = prefix(rest);
    rest.remove_prefix(length);
    if (length == 0 || !iequals(rest, unit)) return std::nullopt;
    return value * scale;
}

bool lacks_unit(std::string_view text) {
    auto read = number_and_rest(text);
    if (!read) return false;
    auto [scale, length] = prefix(read->second);
    return read->second.size() == length;
}

}  // namespace mirrorcheck
