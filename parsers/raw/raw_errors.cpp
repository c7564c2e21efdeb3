#include "parsers/raw/raw_errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::errors {
namespace {

// Error messages quote input; keep a corrupt line from flooding the terminal.
std::string quote(std::string_view text) {
    std::string out;
    for (char c : text.substr(0, 60)) {
        unsigned char u = static_cast<unsigned char>(c);
        out += (u >= 0x20 && u < 0x7f) ? std::string(1, c) : fmt::format("\\x{:02x}", u);
    }
    if (text.size() > 60) out += "...";
    return "`" + out + "`";
}

}  // namespace

InputError raw_not_a_raw_file(const Location& where) {
    return {"raw.not-raw", where, "expected an ngspice raw file starting with `Title:`"};
}

InputError raw_line_too_long(const Location& where, std::size_t limit) {
    return {"raw.line-too-long", where,
            fmt::format("no line end within {} bytes where a header line belongs (Title:, Plotname:, ... of a next "
                        "plot); the file holds more data than its `No. Points` says, or is not a raw file from here on",
                        limit)};
}

InputError raw_bad_header_line(const Location& where, std::string_view line) {
    return {"raw.bad-header-line", where,
            fmt::format("unexpected header line {}; expected one of Title:, Date:, Plotname:, Flags:, "
                        "No. Variables:, No. Points:, Dimensions:, Command:, Option:, Variables:",
                        quote(line))};
}

InputError raw_missing_header_field(const Location& where, std::string_view field) {
    return {"raw.missing-header-field", where,
            fmt::format("the plot header has no `{}` line before its variable table", field)};
}

InputError raw_duplicate_header_field(const Location& where, std::string_view field) {
    return {"raw.duplicate-header-field", where, fmt::format("`{}` appears twice in one plot header", field)};
}

InputError raw_bad_count(const Location& where, std::string_view field, std::string_view text) {
    return {"raw.bad-count", where,
            fmt::format("`{}` must be followed by a whole number, found {}", field, quote(text))};
}

InputError raw_unknown_flag(const Location& where, std::string_view flag) {
    return {"raw.unknown-flag", where,
            fmt::format("unknown flag {}; expected real or complex (optionally forward, log, padded, unpadded)",
                        quote(flag))};
}

InputError raw_no_real_or_complex(const Location& where) {
    return {"raw.no-real-or-complex", where, "the Flags line says neither `real` nor `complex`"};
}

InputError raw_no_variables(const Location& where) {
    return {"raw.no-variables", where, "`No. Variables` is 0; a plot needs at least its scale variable"};
}

InputError raw_too_many_variables(const Location& where, std::uint64_t announced, std::uint64_t room) {
    return {"raw.too-many-variables", where,
            fmt::format("`No. Variables` announces {} variables, but the rest of the file has room for at "
                        "most {} table lines",
                        announced, room)};
}

InputError raw_bad_variable_line(const Location& where, std::size_t expected_index, std::string_view line) {
    return {"raw.bad-variable-line", where,
            fmt::format("expected variable {} as `<index> <name> <type>`, found {}", expected_index, quote(line))};
}

InputError raw_short_variable_table(const Location& where, std::size_t found, std::size_t announced) {
    return {"raw.short-variable-table", where,
            fmt::format("the variable table has {} entries but `No. Variables` announces {}", found, announced)};
}

InputError raw_duplicate_variable(const Location& where, std::string_view name, std::string_view first) {
    return {"raw.duplicate-variable", where,
            fmt::format("variable `{}` names the same vector as `{}` earlier in this plot", name, first)};
}

InputError raw_missing_data_marker(const Location& where, std::string_view found) {
    return {"raw.missing-data-marker", where,
            fmt::format("expected `Binary:` or `Values:` after the variable table, found {}",
                        found.empty() ? std::string("the end of the file") : quote(found))};
}

InputError raw_truncated_binary(const Location& where, std::uint64_t points, std::uint64_t row_bytes,
                                std::uint64_t available) {
    std::uint64_t needed = 0;
    const bool beyond = __builtin_mul_overflow(points, row_bytes, &needed);
    return {"raw.truncated-data", where,
            fmt::format("binary data for {} point{} needs {} bytes, but only {} remain in the file; "
                        "the file is cut short or `No. Points` is wrong",
                        points, points == 1 ? "" : "s", beyond ? "at least 2^64" : std::to_string(needed), available)};
}

InputError raw_too_many_points(const Location& where, std::uint64_t points, std::uint64_t room) {
    return {"raw.truncated-data", where,
            fmt::format("`No. Points` announces {} points, but the rest of the file has room for at most {}",
                        points, room)};
}

InputError raw_truncated_values(const Location& where, std::uint64_t point, std::uint64_t points) {
    return {"raw.truncated-data", where,
            fmt::format("the values end inside point {} of {}; the file is cut short or `No. Points` is wrong",
                        point, points)};
}

InputError raw_bad_point_index(const Location& where, std::uint64_t expected) {
    return {"raw.bad-point-index", where, fmt::format("expected point index {} at the start of a point", expected)};
}

InputError raw_bad_number(const Location& where, std::string_view text, bool complex) {
    return {"raw.bad-number", where,
            fmt::format("expected {}, found {}", complex ? "a complex value `re,im`" : "a number", quote(text))};
}

InputError raw_trailing_data(const Location& where, std::uint64_t points) {
    return {"raw.trailing-data", where,
            fmt::format("more values follow the {} point{} that `No. Points` announces; expected a new plot "
                        "(`Title:`) or the end of the file",
                        points, points == 1 ? "" : "s")};
}

}  // namespace mirrorcheck::errors
