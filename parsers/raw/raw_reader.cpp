// Reads ngspice raw files: a text header per plot, then its values, binary or text.
// Plots follow each other in any order; those not selected keep their header and are
// skipped undecoded. The pieces: raw_header.cpp (headers), raw_values.cpp (values).
#include <algorithm>

#include "parsers/common/errors.hpp"
#include "parsers/common/mapped_file.hpp"
#include "parsers/common/text.hpp"
#include "parsers/raw/raw.hpp"
#include "parsers/raw/raw_cursor.hpp"
#include "parsers/raw/raw_errors.hpp"

namespace mirrorcheck::raw {
namespace {

using detail::Cursor;

bool is_selected(const Plot& plot, const Selection& selection) {
    if (selection.headers_only) return false;
    if (selection.plots.empty()) return true;
    const std::string kind = plot.kind();
    return std::any_of(selection.plots.begin(), selection.plots.end(),
                       [&](const std::string& s) { return iequals(s, kind) || iequals(s, plot.name); });
}

// Blank lines may stand between plots in text files.
void skip_blank_lines(Cursor& c) {
    while (!c.at_end()) {
        std::string_view l = c.peek_line();
        if (l.find_first_not_of(" \t") != std::string_view::npos) return;
        c.next_line();
    }
}

}  // namespace

bool looks_like_raw(std::string_view text) {
    return text.size() >= 6 && iequals(text.substr(0, 6), "Title:");
}

RawFile read_raw(const std::filesystem::path& path, const Selection& selection) {
    MappedFile file(path);
    if (file.bytes().empty()) throw errors::empty_file(file.path());
    if (!looks_like_raw(file.bytes())) throw errors::raw_not_a_raw_file(Location(file.path(), 1));
    RawFile out{file.path(), {}};
    Cursor c{file.bytes(), file.path()};
    c.file = &file;
    while (!c.at_end()) {
        Plot plot = detail::read_plot_header(c);
        const bool wanted = is_selected(plot, selection);
        if (plot.encoding == Encoding::binary) detail::read_binary(c, plot, wanted);
        else detail::read_ascii(c, plot, wanted);
        out.plots.push_back(std::move(plot));
        skip_blank_lines(c);
    }
    return out;
}

}  // namespace mirrorcheck::raw
