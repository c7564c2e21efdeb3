// The raw reader's plot headers: `Key: value` lines (Spirit X3 rules in
// raw_header_grammar.hpp), the variable table, and the `Binary:`/`Values:` marker.
// Counts are checked against the bytes left in the file before anything is sized by them.
#include <algorithm>

#include "parsers/common/text.hpp"
#include "parsers/raw/raw_cursor.hpp"
#include "parsers/raw/raw_errors.hpp"
#include "parsers/raw/raw_header_grammar.hpp"

namespace mirrorcheck::raw::detail {
namespace {

std::string trim(std::string_view s) {
    auto b = s.find_first_not_of(" \t");
    if (b == std::string_view::npos) return {};
    auto e = s.find_last_not_of(" \t");
    return std::string(s.substr(b, e - b + 1));
}

struct HeaderFields {
    bool title = false, date = false, plotname = false, flags = false;
    std::optional<std::uint64_t> variables, points;
};

void set_once(bool& seen, const Cursor& c, std::string_view field) {
    if (seen) throw errors::raw_duplicate_header_field(c.here(), field);
    seen = true;
}

std::uint64_t read_count(const Cursor& c, std::optional<std::uint64_t>& slot, std::string_view field,
                         std::string_view text) {
    if (slot) throw errors::raw_duplicate_header_field(c.here(), field);
    auto n = detail::parse_count(text);
    if (!n) throw errors::raw_bad_count(c.here(), field, text);
    slot = *n;
    return *n;
}

void read_flags(const Cursor& c, Plot& plot, std::string_view text) {
    static constexpr std::string_view known[] = {"real", "complex", "forward", "log", "padded", "unpadded", "double"};
    bool real = false;
    std::size_t i = 0;
    while (i < text.size()) {
        i = text.find_first_not_of(" \t", i);
        if (i == std::string_view::npos) break;
        std::size_t e = std::min(text.find_first_of(" \t", i), text.size());
        std::string flag = trim(text.substr(i, e - i));
        std::transform(flag.begin(), flag.end(), flag.begin(), [](unsigned char ch) { return std::tolower(ch); });
        if (std::find(std::begin(known), std::end(known), flag) == std::end(known))
            throw errors::raw_unknown_flag(c.here(), flag);
        real = real || flag == "real";
        plot.complex = plot.complex || flag == "complex";
        plot.flags.push_back(flag);
        i = e;
    }
    if (real == plot.complex) throw errors::raw_no_real_or_complex(c.here());
}

void append_text(std::optional<std::string>& slot, std::string_view text) {
    slot = slot ? *slot + "\n" + trim(text) : trim(text);
}

// Reads `Key: value` lines up to and including `Variables:`.
void read_header_fields(Cursor& c, Plot& plot) {
    HeaderFields seen;
    for (;;) {
        if (c.at_end()) throw errors::raw_missing_header_field(c.value_here(), "Variables:");
        std::string_view line = c.next_line();
        auto parsed = detail::parse_header_line(line);
        if (!parsed && detail::parse_variable_line(line))
            throw errors::raw_missing_header_field(c.here(), "Variables:");
        if (!parsed) throw errors::raw_bad_header_line(c.here(), line);
        auto [key, text] = *parsed;
        switch (key) {
            case HeaderKey::title: set_once(seen.title, c, "Title:"); plot.title = trim(text); break;
            case HeaderKey::date: set_once(seen.date, c, "Date:"); plot.date = trim(text); break;
            case HeaderKey::plotname: set_once(seen.plotname, c, "Plotname:"); plot.name = trim(text); break;
            case HeaderKey::flags: set_once(seen.flags, c, "Flags:"); read_flags(c, plot, text); break;
            case HeaderKey::no_variables: read_count(c, seen.variables, "No. Variables:", text); break;
            case HeaderKey::no_points: plot.point_count = read_count(c, seen.points, "No. Points:", text); break;
            case HeaderKey::dimensions: append_text(plot.dimensions, text); break;
            case HeaderKey::command: append_text(plot.command, text); break;
            case HeaderKey::option: append_text(plot.option, text); break;
            case HeaderKey::binary:
            case HeaderKey::values: throw errors::raw_missing_header_field(c.here(), "Variables:");
            case HeaderKey::variables:
                if (!seen.plotname) throw errors::raw_missing_header_field(c.here(), "Plotname:");
                if (!seen.flags) throw errors::raw_missing_header_field(c.here(), "Flags:");
                if (!seen.variables) throw errors::raw_missing_header_field(c.here(), "No. Variables:");
                if (!seen.points) throw errors::raw_missing_header_field(c.here(), "No. Points:");
                if (*seen.variables == 0) throw errors::raw_no_variables(c.here());
                // A table line takes at least 6 bytes (`0 a b` and a newline); the index
                // holds 32-bit ids.
                const std::size_t most = std::min<std::size_t>(c.remaining() / 6, IdTable::none - 1);
                if (*seen.variables > most) throw errors::raw_too_many_variables(c.here(), *seen.variables, most);
                plot.variables.reserve(*seen.variables);
                plot.index_.reserve(*seen.variables);
                plot.variables.resize(*seen.variables);
                return;
        }
    }
}

void add_to_index(const Cursor& c, Plot& plot, std::size_t i) {
    const auto id = static_cast<std::uint32_t>(i);
    const std::uint32_t stored = plot.index_.insert(canonical_vector_name(plot.variables[i].name), id, [&](std::uint32_t k) {
        return canonical_vector_name(plot.variables[k].name);
    });
    if (stored != id) throw errors::raw_duplicate_variable(c.here(), plot.variables[i].name, plot.variables[stored].name);
}

void read_variable_table(Cursor& c, Plot& plot) {
    for (std::size_t i = 0; i < plot.variables.size(); ++i) {
        if (c.at_end()) throw errors::raw_short_variable_table(c.value_here(), i, plot.variables.size());
        std::string_view line = c.next_line();
        auto v = detail::parse_variable_line(line);
        if (!v) {
            if (detail::parse_header_line(line))
                throw errors::raw_short_variable_table(c.here(), i, plot.variables.size());
            throw errors::raw_bad_variable_line(c.here(), i, line);
        }
        if (v->index != i) throw errors::raw_bad_variable_line(c.here(), i, line);
        plot.variables[i] = Variable{std::move(v->name), std::move(v->type), std::move(v->extras)};
        add_to_index(c, plot, i);
    }
}

void read_data_marker(Cursor& c, Plot& plot) {
    std::string_view line = c.at_end() ? std::string_view{} : c.next_line();
    auto parsed = detail::parse_header_line(line);
    if (parsed && trim(parsed->second).empty() && parsed->first == HeaderKey::binary) {
        plot.encoding = Encoding::binary;
    } else if (parsed && trim(parsed->second).empty() && parsed->first == HeaderKey::values) {
        plot.encoding = Encoding::ascii;
    } else {
        throw errors::raw_missing_data_marker(c.here(), line);
    }
    plot.data_offset = c.pos;
}

}  // namespace

Plot read_plot_header(Cursor& c) {
    Plot plot;
    read_header_fields(c, plot);
    read_variable_table(c, plot);
    read_data_marker(c, plot);
    return plot;
}

}  // namespace mirrorcheck::raw::detail
