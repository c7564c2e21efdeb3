// Private to the raw reader: Spirit X3 rules for one line of a raw file's header.
//
// A header line is `Key: text`; the keys are ngspice's (Title, Date, Plotname, Flags,
// No. Variables, No. Points, Dimensions, Command, Option) plus the section markers
// Variables:, Binary:, Values:. A variable line is `<index> <name> <type> [extras...]`,
// separated by tabs or spaces; extras are tokens such as `grid=3`.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <boost/fusion/include/adapt_struct.hpp>
#include <boost/spirit/home/x3.hpp>

namespace mirrorcheck::raw::detail {

enum class HeaderKey {
    title, date, plotname, flags, no_variables, no_points, dimensions, command, option,
    variables, binary, values
};

struct VariableLine {
    std::uint64_t index = 0;
    std::string name;
    std::string type;
    std::vector<std::string> extras;
};

}  // namespace mirrorcheck::raw::detail

BOOST_FUSION_ADAPT_STRUCT(mirrorcheck::raw::detail::VariableLine, index, name, type, extras)

namespace mirrorcheck::raw::detail {

namespace x3 = boost::spirit::x3;

struct HeaderKeys : x3::symbols<HeaderKey> {
    HeaderKeys() {
        add("title", HeaderKey::title)("date", HeaderKey::date)("plotname", HeaderKey::plotname)(
            "flags", HeaderKey::flags)("no. variables", HeaderKey::no_variables)("no. points", HeaderKey::no_points)(
            "dimensions", HeaderKey::dimensions)("command", HeaderKey::command)("option", HeaderKey::option)(
            "options", HeaderKey::option)("variables", HeaderKey::variables)("binary", HeaderKey::binary)(
            "values", HeaderKey::values);
    }
};

inline const HeaderKeys header_keys;

inline const auto blank = x3::omit[x3::char_(" \t")];
inline const auto token = x3::lexeme[+(x3::char_ - x3::char_(" \t"))];

// `No. Points:      11   `: ngspice pads the count with spaces.
inline const auto count_value = *blank >> x3::uint64 >> *blank;

inline const auto variable_line = x3::rule<struct variable_line_tag, VariableLine>{"variable line"} =
    *blank >> x3::uint64 >> +blank >> token >> +blank >> token >> *(+blank >> token) >> *blank;

// Parses a whole line as `Key: text`. Returns the key and the text (trailing spaces kept).
inline std::optional<std::pair<HeaderKey, std::string_view>> parse_header_line(std::string_view line) {
    auto first = line.begin();
    HeaderKey key{};
    auto parser = x3::no_case[header_keys] >> x3::lit(':') >> *blank;
    if (!x3::parse(first, line.end(), parser, key)) return std::nullopt;
    return std::pair{key, line.substr(static_cast<std::size_t>(first - line.begin()))};
}

inline std::optional<std::uint64_t> parse_count(std::string_view text) {
    auto first = text.begin();
    std::uint64_t n = 0;
    if (!x3::parse(first, text.end(), count_value, n) || first != text.end()) return std::nullopt;
    return n;
}

inline std::optional<VariableLine> parse_variable_line(std::string_view line) {
    auto first = line.begin();
    VariableLine v;
    if (!x3::parse(first, line.end(), variable_line, v) || first != line.end()) return std::nullopt;
    return v;
}

}  // namespace mirrorcheck::raw::detail
