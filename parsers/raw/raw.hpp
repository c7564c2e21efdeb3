// Reader for ngspice raw files (binary and ASCII, real and complex, several plots).
#pragma once

#include <complex>
#include <cstdint>
#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/column_allocator.hpp"
#include "parsers/common/input_error.hpp"
#include "parsers/common/id_table.hpp"

namespace mirrorcheck::raw {

// One vector's values over the points of a plot.
using RealColumn = std::vector<double, ColumnAllocator<double>>;
using ComplexColumn = std::vector<std::complex<double>, ColumnAllocator<std::complex<double>>>;

enum class Encoding { binary, ascii };

// One entry of a plot's Variables table, e.g. `1  @m1[gm]  admittance`
// or `0  frequency  frequency grid=3`.
struct Variable {
    std::string name;                 // as written in the file
    std::string type;                 // voltage, current, admittance, time, frequency, ...
    std::vector<std::string> extras;  // further tokens such as "grid=3"
};

struct Plot {
    std::string title;
    std::string date;
    std::string name;                 // the Plotname line, e.g. "AC Analysis"
    std::vector<std::string> flags;   // e.g. {"complex"}
    bool complex = false;
    std::size_t point_count = 0;
    std::optional<std::string> dimensions, command, option;
    std::vector<Variable> variables;
    Encoding encoding = Encoding::binary;
    std::uint64_t data_offset = 0;    // byte offset of the first value
    bool decoded = false;             // false for plots that were skipped

    // Values per variable (column-major), filled only when decoded.
    // Real plots fill `real`, complex plots fill `cplx`.
    std::vector<RealColumn> real;
    std::vector<ComplexColumn> cplx;

    // Index of a variable by any of ngspice's spellings, case-insensitive:
    // `v(out)` or `out`; `i(vdd)` or `vdd#branch`; `i(@m1[id])` or `@m1[id]`;
    // `v(@m1[vds])` or `@m1[vds]`; `@m.x1.m2[gm]`.
    std::optional<std::size_t> find(std::string_view name) const;

    // The short kind of analysis: "op", "ac", "tf", "dc", "tran", "noise", "sens", "pz" or "".
    std::string kind() const;

    // Variables by canonical name (the keys are computed from `variables`, not stored).
    IdTable index_;
};

// Which plots to decode. A plot is selected when `plots` is empty or when one entry
// equals its kind ("op", "ac", ...) or its Plotname (case-insensitive). Plots that are
// not selected still appear with their header, but their data is skipped undecoded.
struct Selection {
    std::vector<std::string> plots;
    bool headers_only = false;  // decode no data at all
};

struct RawFile {
    std::string path;
    std::vector<Plot> plots;
};

// Reads a raw file; throws mirrorcheck::InputError with file and line (ASCII header and
// values) or byte offset (binary data) on anything it cannot read.
RawFile read_raw(const std::filesystem::path& path, const Selection& selection = {});

// Where a decoded value came from, for a message about it: the byte offset of a binary
// plot's value; for an ASCII plot the file alone (its values' lines are not kept).
Location value_location(const RawFile& file, const Plot& plot, std::size_t variable, std::size_t point);

// The canonical spelling that Plot::find compares: lower case, `v(...)` unwrapped,
// `i(x)` written as `x#branch`, `i(@dev[p])` as `@dev[p]`.
std::string canonical_vector_name(std::string_view name);

// True when the text starts like a raw file (its first line begins with "Title:").
bool looks_like_raw(std::string_view text);

}  // namespace mirrorcheck::raw
