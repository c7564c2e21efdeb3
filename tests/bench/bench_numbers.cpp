// bench_numbers ASCII_RAW BINARY_RAW
//
// Chooses the number conversion for the ASCII raw reader by measurement: converts every
// value token of an ASCII raw file with std::from_chars, Spirit X3's double_ and strtod,
// (and fast_float where its Debian package is installed), times each (median of 5), and
// counts how many results differ bit for bit from strtod's (the C library's correctly
// rounded conversion) and from the binary raw file's values of the same plot.
// Run by hand after run_raw_bench.sh has made the files:
//   build-bench/tests/bench/bench_numbers tests/bench/work/rc_ladder_ascii.raw tests/bench/work/rc_ladder_bin.raw
#include <algorithm>
#include <charconv>
#include <chrono>
#include <cstdlib>
#include <cstring>
#include <string>
#include <string_view>
#include <vector>

#include <boost/spirit/home/x3.hpp>
#if __has_include(<fast_float/fast_float.h>)
#include <fast_float/fast_float.h>
#define HAVE_FAST_FLOAT 1
#endif
#include <fmt/core.h>

#include "parsers/common/mapped_file.hpp"
#include "parsers/raw/raw.hpp"

namespace {

// The value tokens of the first plot, in file order (point-major), without point indices.
std::vector<std::string_view> value_tokens(std::string_view text, std::size_t variables) {
    std::vector<std::string_view> out;
    std::size_t pos = text.find("\nValues:\n") + 9;
    std::size_t column = 0;
    while (pos < text.size() && text.compare(pos, 6, "Title:") != 0) {
        while (pos < text.size() && (text[pos] == ' ' || text[pos] == '\t' || text[pos] == '\n')) ++pos;
        std::size_t end = pos;
        while (end < text.size() && text[end] != ' ' && text[end] != '\t' && text[end] != '\n') ++end;
        if (end == pos) break;
        bool is_index = column == 0 && text[end] == '\t';
        if (!is_index) {
            out.push_back(text.substr(pos, end - pos));
            column = (column + 1) % variables;
        }
        pos = end;
    }
    return out;
}

template <typename Convert>
double time_it(const std::vector<std::string_view>& tokens, std::vector<double>& out, Convert convert) {
    std::vector<double> runs;
    for (int r = 0; r < 5; ++r) {
        auto t0 = std::chrono::steady_clock::now();
        for (std::size_t i = 0; i < tokens.size(); ++i) out[i] = convert(tokens[i]);
        runs.push_back(std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
    }
    std::sort(runs.begin(), runs.end());
    return runs[2];
}

std::size_t differences(const std::vector<double>& got, const std::vector<double>& reference) {
    std::size_t bad = 0;
    for (std::size_t i = 0; i < got.size(); ++i)
        if (std::memcmp(&got[i], &reference[i], sizeof(double)) != 0) ++bad;
    return bad;
}

std::vector<double> binary_values(const mirrorcheck::raw::Plot& plot) {
    std::vector<double> out;
    for (std::size_t p = 0; p < plot.point_count; ++p)
        for (std::size_t v = 0; v < plot.variables.size(); ++v) out.push_back(plot.real[v][p]);
    return out;
}

void report(const char* name, double t, std::size_t n, const std::vector<double>& got, const std::vector<double>& strtod_values,
            const std::vector<double>& binary) {
    fmt::print("{:<16} {:.3f} s  {:5.1f} ns/value  {:>9} differ from strtod  {:>9} from binary\n", name, t,
               t / static_cast<double>(n) * 1e9, differences(got, strtod_values), differences(got, binary));
}

}  // namespace

int main(int argc, char** argv) {
    if (argc != 3) {
        fmt::print(stderr, "usage: bench_numbers ASCII_RAW BINARY_RAW\n");
        return 2;
    }
    mirrorcheck::MappedFile ascii(argv[1]);
    auto binary = mirrorcheck::raw::read_raw(argv[2]);
    const auto& plot = binary.plots.at(0);
    auto tokens = value_tokens(ascii.bytes(), plot.variables.size());
    if (tokens.size() != plot.variables.size() * plot.point_count) {
        fmt::print(stderr, "bench_numbers: {} tokens, expected {}\n", tokens.size(), plot.variables.size() * plot.point_count);
        return 1;
    }
    std::vector<double> out(tokens.size()), reference(tokens.size());
    const std::vector<double> binary_ref = binary_values(plot);
    fmt::print("{} values; strtod is the correctly rounded reference; ngspice's %.15e text (16 digits)\n"
               "cannot give back every binary double, so `from binary` counts are expected\n",
               tokens.size());

    double t = time_it(tokens, reference, [](std::string_view s) {
        std::string copy(s);
        return std::strtod(copy.c_str(), nullptr);
    });
    report("strtod", t, tokens.size(), reference, reference, binary_ref);

    t = time_it(tokens, out, [](std::string_view s) {
        double x = 0;
        std::from_chars(s.data(), s.data() + s.size(), x);
        return x;
    });
    report("std::from_chars", t, tokens.size(), out, reference, binary_ref);

    t = time_it(tokens, out, [](std::string_view s) {
        double x = 0;
        auto first = s.begin();
        boost::spirit::x3::parse(first, s.end(), boost::spirit::x3::double_, x);
        return x;
    });
    report("x3::double_", t, tokens.size(), out, reference, binary_ref);
#ifdef HAVE_FAST_FLOAT
    t = time_it(tokens, out, [](std::string_view s) {
        double x = 0;
        fast_float::from_chars(s.data(), s.data() + s.size(), x);
        return x;
    });
    report("fast_float", t, tokens.size(), out, reference, binary_ref);
#endif
    return 0;
}
