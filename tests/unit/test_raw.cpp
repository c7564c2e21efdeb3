// Raw-file reader on checked-in fixtures: the ngspice-written three-plot files (binary
// and ASCII, made by tests/data/raw/make_fixtures.sh), the odd but valid cases, and the
// catalogue of corrupt files with the error each must give.
#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>

#include <doctest/doctest.h>

#include "parsers/common/input_error.hpp"
#include "parsers/raw/raw.hpp"

using namespace mirrorcheck;

namespace {

std::string fixture(const std::string& name) { return std::string(MIRRORCHECK_TEST_DATA) + "/raw/" + name; }

double value(const raw::Plot& plot, const std::string& name, std::size_t point = 0) {
    auto index = plot.find(name);
    REQUIRE_MESSAGE(index, "no vector " << name);
    return plot.complex ? plot.cplx[*index][point].real() : plot.real[*index][point];
}

}  // namespace

TEST_CASE("three plots in one binary file: op, tf and ac, in the order written") {
    raw::RawFile f = raw::read_raw(fixture("three_plots.raw"));
    REQUIRE(f.plots.size() == 3);
    CHECK(f.plots[0].kind() == "op");
    CHECK(f.plots[1].kind() == "tf");
    CHECK(f.plots[2].kind() == "ac");
    CHECK(f.plots[2].complex);
    CHECK(f.plots[2].point_count == 3);
    CHECK(f.plots[2].variables[0].extras == std::vector<std::string>{"grid=3"});
    // The supply is 1.8 V in the fixture deck and the AC frequencies are 1, 10, 100 Hz.
    CHECK(value(f.plots[0], "v(vdd)") == 1.8);
    CHECK(f.plots[2].cplx[0][2].real() == doctest::Approx(100.0));
    CHECK(f.plots[2].cplx[0][2].imag() == 0.0);
}

TEST_CASE("binary and ASCII versions of the same plots agree to ASCII's 15 significant digits") {
    raw::RawFile b = raw::read_raw(fixture("three_plots.raw"));
    raw::RawFile a = raw::read_raw(fixture("three_plots_ascii.raw"));
    REQUIRE(a.plots.size() == b.plots.size());
    for (std::size_t p = 0; p < a.plots.size(); ++p) {
        const auto& pa = a.plots[p];
        const auto& pb = b.plots[p];
        REQUIRE(pa.variables.size() == pb.variables.size());
        CHECK(pa.encoding == raw::Encoding::ascii);
        CHECK(pb.encoding == raw::Encoding::binary);
        for (std::size_t v = 0; v < pa.variables.size(); ++v) {
            CHECK(pa.variables[v].name == pb.variables[v].name);
            for (std::size_t i = 0; i < pa.point_count; ++i) {
                auto x = pa.complex ? pa.cplx[v][i] : std::complex<double>(pa.real[v][i]);
                auto y = pb.complex ? pb.cplx[v][i] : std::complex<double>(pb.real[v][i]);
                CHECK(std::abs(x - y) <= 1e-14 * std::abs(y) + 1e-300);
            }
        }
    }
}

TEST_CASE("vectors are found by every ngspice spelling, case-insensitive") {
    raw::RawFile f = raw::read_raw(fixture("three_plots.raw"));
    const auto& op = f.plots[0];
    CHECK(op.find("v(out)") == op.find("out"));
    CHECK(op.find("OUT") == op.find("v(out)"));
    CHECK(op.find("i(vout)") == op.find("vout#branch"));
    CHECK(op.find("i(@m2[id])") == op.find("@m2[id]"));
    CHECK(op.find("v(@m2[vds])") == op.find("@M2[VDS]"));
    CHECK(op.find("@m1[gm]").has_value());
    CHECK_FALSE(op.find("@m1[gds]").has_value());
    CHECK_FALSE(op.find("vout").has_value());  // a node `vout` is not the current i(vout)
    CHECK(raw::canonical_vector_name("i(@m.x1.m2[id])") == "@m.x1.m2[id]");
    CHECK(raw::canonical_vector_name("v(a,b)") == "v(a,b)");
}

TEST_CASE("only the selected plots are decoded; the others keep their headers") {
    raw::RawFile f = raw::read_raw(fixture("three_plots.raw"), {{"ac"}, false});
    REQUIRE(f.plots.size() == 3);
    CHECK_FALSE(f.plots[0].decoded);
    CHECK(f.plots[0].real.empty());
    CHECK(f.plots[2].decoded);
    raw::RawFile a = raw::read_raw(fixture("three_plots_ascii.raw"), {{"Transfer Function"}, false});
    CHECK(a.plots[1].decoded);
    CHECK_FALSE(a.plots[2].decoded);
    raw::RawFile h = raw::read_raw(fixture("three_plots_ascii.raw"), {{}, true});
    for (const auto& p : h.plots) CHECK_FALSE(p.decoded);
}

TEST_CASE("odd but valid files") {
    SUBCASE("No. Points padded with spaces") {
        raw::RawFile f = raw::read_raw(fixture("padded_points.raw"));
        CHECK(f.plots[2].point_count == 3);
    }
    SUBCASE("a complex plot alone, binary") {
        raw::RawFile f = raw::read_raw(fixture("complex_ac_binary.raw"));
        REQUIRE(f.plots.size() == 1);
        CHECK(f.plots[0].complex);
        CHECK(f.plots[0].cplx[0][1].real() == doctest::Approx(10.0));
    }
    SUBCASE("CRLF line endings read like LF") {
        raw::RawFile crlf = raw::read_raw(fixture("crlf.raw"));
        raw::RawFile lf = raw::read_raw(fixture("three_plots_ascii.raw"));
        REQUIRE(crlf.plots.size() == 3);
        CHECK(crlf.plots[2].name == lf.plots[2].name);
        CHECK(crlf.plots[2].cplx == lf.plots[2].cplx);
        CHECK(crlf.plots[0].real == lf.plots[0].real);
    }
    SUBCASE("a plot with zero points, ASCII and binary, followed by another plot") {
        for (const char* name : {"zero_points.raw", "zero_points_binary.raw"}) {
            raw::RawFile f = raw::read_raw(fixture(name));
            REQUIRE(f.plots.size() == 2);
            CHECK(f.plots[0].point_count == 0);
            CHECK(f.plots[0].decoded);
            CHECK(f.plots[0].real[0].empty());
            CHECK(f.plots[1].kind() == "tf");
        }
    }
    SUBCASE("NaN and Inf values, ASCII and binary") {
        for (const char* name : {"nan_inf.raw", "nan_inf_binary.raw"}) {
            raw::RawFile f = raw::read_raw(fixture(name));
            const auto& r = f.plots[0].real;
            CHECK(std::isnan(r[1][0]));
            CHECK(std::isinf(r[2][0]));
            CHECK(r[2][0] > 0);
            CHECK(std::isinf(r[3][0]));
            CHECK(r[3][0] < 0);
        }
    }
}

namespace {

struct CorruptCase {
    const char* file;
    const char* code;
    const char* where;  // the location prefix the message must start with
};

// The catalogue of corrupt files (made by make_odd_fixtures.py) and the error each gives.
const CorruptCase corrupt_cases[] = {
    {"empty.raw", "input.empty", "empty.raw"},
    {"truncated_binary.raw", "raw.truncated-data", "truncated_binary.raw: byte 353"},
    {"cut_mid_double.raw", "raw.truncated-data", "cut_mid_double.raw: byte"},
    {"points_too_large.raw", "raw.truncated-data", "points_too_large.raw: byte"},
    {"variables_billions.raw", "raw.too-many-variables", "variables_billions.raw:7"},
    {"missing_variables_line.raw", "raw.missing-header-field", "missing_variables_line.raw:7"},
    {"missing_binary_line.raw", "raw.missing-data-marker", "missing_binary_line.raw:17"},
    {"missing_values_line.raw", "raw.missing-data-marker", "missing_values_line.raw:17"},
    {"short_variable_table.raw", "raw.short-variable-table", "short_variable_table.raw:16"},
    {"non_numeric.raw", "raw.bad-number", "non_numeric.raw:18"},
    {"duplicate_variable.raw", "raw.duplicate-variable", "duplicate_variable.raw:13"},
    {"unknown_flags.raw", "raw.unknown-flag", "unknown_flags.raw:4"},
    {"random_bytes.raw", "raw.not-raw", "random_bytes.raw:1"},
    {"random_after_header.raw", "raw.truncated-data", "random_after_header.raw: byte"},
    {"ascii_truncated.raw", "raw.truncated-data", "ascii_truncated.raw:73"},
    {"bad_point_index.raw", "raw.bad-point-index", "bad_point_index.raw:"},
    {"bad_count.raw", "raw.bad-count", "bad_count.raw:6"},
    {"missing_flags.raw", "raw.missing-header-field", "missing_flags.raw:6"},
    {"extra_values.raw", "raw.trailing-data", "extra_values.raw:"},
    {"header_only.raw", "raw.missing-header-field", "header_only.raw:2"},
    {"complex_bad.raw", "raw.bad-number", "complex_bad.raw:"},
    {"duplicate_header.raw", "raw.duplicate-header-field", "duplicate_header.raw:7"},
    {"not_a_header.raw", "raw.bad-header-line", "not_a_header.raw:3"},
};

}  // namespace

TEST_CASE("every corrupt file gives its error, with file and line or byte offset") {
    for (const auto& c : corrupt_cases) {
        const std::string file = c.file;
        CAPTURE(file);
        std::string path = fixture(std::string("corrupt/") + c.file);
        try {
            raw::read_raw(path);
            FAIL("no error for " << c.file);
        } catch (const InputError& e) {
            CHECK(e.code() == std::string(c.code));
            std::string where = e.where().to_string();
            CHECK_MESSAGE(where.find(c.where) != std::string::npos, where << " does not contain " << std::string(c.where));
            CHECK(std::string(e.what()).find(e.message()) != std::string::npos);
        }
    }
}

TEST_CASE("mutated and cut copies of valid files give a result or an InputError, never a crash") {
    // A fixed seed keeps failures reproducible; the sanitizer build in CI catches memory errors.
    std::mt19937 rng(20261201);
    const char* sources[] = {"three_plots.raw", "three_plots_ascii.raw", "zero_points.raw"};
    auto dir = std::filesystem::temp_directory_path() / ("mc-mutate-" + std::to_string(rng()));
    std::filesystem::create_directories(dir);
    std::size_t errors = 0, total = 0;
    for (const char* source : sources) {
        std::ifstream in(fixture(source), std::ios::binary);
        const std::string original((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
        for (int i = 0; i < 300; ++i, ++total) {
            std::string bytes = original;
            if (i % 3 == 0) {
                bytes.resize(rng() % bytes.size());
            } else {
                for (int k = 0, n = 1 + static_cast<int>(rng() % 4); k < n; ++k)
                    bytes[rng() % bytes.size()] = static_cast<char>(rng() % 256);
            }
            auto path = dir / "mutant.raw";
            std::ofstream(path, std::ios::binary) << bytes;
            try {
                raw::read_raw(path);
            } catch (const InputError& e) {
                ++errors;
                CHECK(!e.code().empty());
            }
        }
    }
    std::filesystem::remove_all(dir);
    CHECK(errors > total / 4);  // most cuts and many byte flips must be caught
}

// From a hostile probe: `No. Points` of 2^61 times 8 bytes a point wrapped round to
// "needs 0 bytes" in the message.
TEST_CASE("a point count whose byte size passes 2^64 is reported as such, not wrapped round") {
    const auto path = std::filesystem::temp_directory_path() / "mc-points-2-61.raw";
    {
        std::ofstream out(path, std::ios::binary);
        out << "Title: t\nDate: d\nPlotname: Operating Point\nFlags: real\nNo. Variables: 1\n"
               "No. Points: 2305843009213693952\nVariables:\n\t0\tv(a)\tvoltage\nBinary:\n";
        out.write("\0\0\0\0\0\0\xf0\x3f", 8);
    }
    try {
        raw::read_raw(path.string());
        FAIL("read");
    } catch (const InputError& e) {
        CHECK(e.code() == "raw.truncated-data");
        CHECK(e.message().find("2305843009213693952 points needs at least 2^64 bytes, but only 8 remain") !=
              std::string::npos);
    }
    std::filesystem::remove(path);
}

TEST_CASE("data where the next plot's header belongs is refused at once, not scanned for a line end") {
    // Found by a hostile probe: a sparse 3 GB file (one point of data, then zeros) took 42 s
    // and 3 GB of mapped pages while the reader looked for the end of the "next header line".
    const auto path = std::filesystem::temp_directory_path() / "mc-sparse-tail.raw";
    const std::string header = "Title: t\nDate: d\nPlotname: Operating Point\nFlags: real\nNo. Variables: 2\n"
                               "No. Points: 1\nVariables:\n\t0\tv(a)\tvoltage\n\t1\tv(b)\tvoltage\nBinary:\n";
    {
        std::ofstream out(path, std::ios::binary);
        out << header;
        out.write("\0\0\0\0\0\0\xf0\x3f\0\0\0\0\0\0\xf0\x3f", 16);
    }
    std::error_code ec;
    std::filesystem::resize_file(path, std::uintmax_t{3} << 30, ec);
    if (!ec) {  // a file system with sparse files
        try {
            raw::read_raw(path.string());
            FAIL("read");
        } catch (const InputError& e) {
            CHECK(e.code() == "raw.line-too-long");
            CHECK(e.where().byte_offset == header.size() + 16);  // just after the point
            CHECK(e.message().find("1048576 bytes") != std::string::npos);
        }
    }
    std::filesystem::remove(path);
}
