// bench_raw FILE [--runs N] [--reuse-memory]
//
// Times mirrorcheck::raw::read_raw on one raw file, decoding every vector of every plot,
// N times (default 5), and prints the median wall time, the throughput in MB/s (file
// bytes / median time, 1 MB = 10^6 bytes) and a checksum of all decoded values, so that
// no run can be skipped and two builds can be checked to decode the same numbers.
//
// Only the call to read_raw is timed: mapping the file, parsing the headers, allocating
// and filling the columns, and unmapping. Freeing the result and summing it are not.
// As a baseline it also times allocating columns of the same sizes with the reader's own
// allocator and writing every value once (`alloc`), the part no reader can avoid.
// By default every run decodes into new memory from the kernel, as a one-shot
// `mirrorcheck` process does; --reuse-memory lets runs after the first reuse the
// first run's (already faulted-in) heap pages instead, which leaves the reader's own work
// (parsing, transposing, converting) with little of the memory's first-touch cost.
// The last line is meant for scripts:
//   RESULT median_s=<s> min_s=<s> max_s=<s> mb_per_s=<x> bytes=<n> alloc_s=<s> checksum=<x>
// Not a test: built only on request (`cmake --build B --target bench_raw`), run by
// tests/bench/run_raw_bench.sh.
#include <algorithm>
#include <charconv>
#include <chrono>
#include <climits>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include <fmt/core.h>

#ifdef __GLIBC__
#include <malloc.h>
#endif

#include "parsers/raw/raw.hpp"

namespace {

namespace raw = mirrorcheck::raw;

struct Options {
    std::string file;
    int runs = 5;
    bool reuse_memory = false;
};

constexpr std::string_view usage_line = "usage: bench_raw FILE [--runs N] [--reuse-memory]\n";

[[noreturn]] void usage(std::string_view why) {
    fmt::print(stderr, "bench_raw: {}\n{}", why, usage_line);
    std::exit(2);
}

Options parse_args(int argc, char** argv) {
    Options o;
    for (int i = 1; i < argc; ++i) {
        std::string_view a = argv[i];
        if (a == "--runs") {
            if (i + 1 >= argc) usage("--runs needs a number");
            std::string_view n = argv[++i];
            auto [end, ec] = std::from_chars(n.data(), n.data() + n.size(), o.runs);
            if (ec != std::errc{} || end != n.data() + n.size() || o.runs < 1) usage("--runs needs a positive number");
        } else if (a == "--reuse-memory") {
            o.reuse_memory = true;
        } else if (a == "-h" || a == "--help") {
            fmt::print("{}", usage_line);
            std::exit(0);
        } else if (!a.empty() && a.front() == '-') {
            usage(fmt::format("unknown option {}", a));
        } else if (o.file.empty()) {
            o.file = std::string(a);
        } else {
            usage("only one FILE");
        }
    }
    if (o.file.empty()) usage("no FILE");
    return o;
}

struct Summary {
    double checksum = 0;
    std::size_t plots = 0, vectors = 0, values = 0;
};

// Sums every decoded value (both parts of complex ones) and counts what was decoded.
Summary summarise(const raw::RawFile& f) {
    Summary s;
    for (const raw::Plot& p : f.plots) {
        ++s.plots;
        if (!p.decoded) continue;
        for (const auto& col : p.real) {
            ++s.vectors;
            s.values += col.size();
            for (double x : col) s.checksum += x;
        }
        for (const auto& col : p.cplx) {
            ++s.vectors;
            s.values += col.size();
            for (const auto& z : col) s.checksum += z.real() + z.imag();
        }
    }
    return s;
}

// The length in doubles of every decoded column (a complex column holds two per point).
std::vector<std::size_t> column_sizes(const raw::RawFile& f) {
    std::vector<std::size_t> sizes;
    for (const raw::Plot& p : f.plots) {
        for (const auto& col : p.real) sizes.push_back(col.size());
        for (const auto& col : p.cplx) sizes.push_back(2 * col.size());
    }
    return sizes;
}

// Allocates columns of the given lengths with the reader's allocator and writes every
// value once, as the reader does, then frees them. Returns what it read back, so that
// nothing can be left out.
double allocate_like(const std::vector<std::size_t>& sizes) {
    std::vector<raw::RealColumn> cols(sizes.size());
    double sink = 0;
    for (std::size_t i = 0; i < sizes.size(); ++i) {
        cols[i].resize(sizes[i]);
        std::fill(cols[i].begin(), cols[i].end(), 0.0);
        if (!cols[i].empty()) sink += cols[i][cols[i].size() / 2];
    }
    return sink;
}

double median_of(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    return n % 2 ? v[n / 2] : (v[n / 2 - 1] + v[n / 2]) / 2;
}

}  // namespace

int main(int argc, char** argv) {
    const Options opt = parse_args(argc, argv);
#ifdef __GLIBC__
    if (!opt.reuse_memory) {
        // glibc raises its mmap threshold after the first large block is freed, so from
        // the second run on columns could come from heap pages faulted in by the first
        // run. Fixing the threshold (at glibc's default) keeps every run like the first in
        // a fresh process: each large column is new, zero-filled memory from the kernel.
        mallopt(M_MMAP_THRESHOLD, 128 * 1024);
    } else {
        // Every block from the heap, and the heap never given back: runs after the first
        // find their columns' pages already mapped.
        mallopt(M_MMAP_MAX, 0);
        mallopt(M_TRIM_THRESHOLD, INT_MAX);
    }
#else
    if (opt.reuse_memory) fmt::print(stderr, "bench_raw: --reuse-memory needs glibc; ignored\n");
#endif
    std::uintmax_t bytes = 0;
    try {
        bytes = std::filesystem::file_size(opt.file);
    } catch (const std::exception& e) {
        fmt::print(stderr, "bench_raw: {}\n", e.what());
        return 2;
    }

    using clock = std::chrono::steady_clock;
    std::vector<double> seconds;
    Summary first;
    std::vector<std::size_t> shapes;
    try {
        for (int r = 0; r < opt.runs; ++r) {
            const auto t0 = clock::now();
            raw::RawFile f = raw::read_raw(opt.file);  // every plot selected
            const auto t1 = clock::now();
            seconds.push_back(std::chrono::duration<double>(t1 - t0).count());
            Summary s = summarise(f);
            if (r == 0) {
                first = s;
                shapes = column_sizes(f);
            } else if (s.checksum != first.checksum || s.values != first.values) {
                fmt::print(stderr, "bench_raw: run {} decoded different values than run 1\n", r + 1);
                return 1;
            }
        }
    } catch (const std::exception& e) {  // InputError for unreadable files, bad_alloc, ...
        fmt::print(stderr, "bench_raw: {}\n", e.what());
        return 1;
    }

    // Baseline: only allocating and writing columns of the decoded shape, as the reader
    // must. On machines where first-touching new memory is slow (some VMs) this is a
    // large part of the decode time; the difference is the reader's own work.
    std::vector<double> alloc_seconds;
    for (int r = 0; r < opt.runs; ++r) {
        const auto t0 = clock::now();
        const double zero = allocate_like(shapes);
        const auto t1 = clock::now();
        if (zero != 0) return 1;  // cannot happen; uses the result
        alloc_seconds.push_back(std::chrono::duration<double>(t1 - t0).count());
    }

    std::vector<double> sorted = seconds;
    std::sort(sorted.begin(), sorted.end());
    const std::size_t n = sorted.size();
    const double median = median_of(seconds);
    const double alloc_median = median_of(alloc_seconds);
    const double mb_per_s = static_cast<double>(bytes) / 1e6 / median;

    fmt::print("file      {}\n", opt.file);
    fmt::print("memory    {}\n", opt.reuse_memory ? "reused between runs (--reuse-memory)" : "new for every run");
    fmt::print("size      {:.1f} MB ({} bytes)\n", static_cast<double>(bytes) / 1e6, bytes);
    fmt::print("decoded   {} plot(s), {} vector(s), {} value(s)\n", first.plots, first.vectors, first.values);
    fmt::print("runs      {}:", n);
    for (double s : seconds) fmt::print(" {:.4f}", s);
    fmt::print(" s\n");
    fmt::print("median    {:.4f} s  ({:.1f} MB/s)\n", median, mb_per_s);
    std::size_t doubles = 0;
    for (std::size_t c : shapes) doubles += c;
    fmt::print("alloc     {:.4f} s  median time to allocate and write the output columns alone ({:.1f} MB)\n",
               alloc_median, static_cast<double>(doubles) * 8 / 1e6);
    fmt::print("checksum  {:.17g}\n", first.checksum);
    fmt::print("RESULT median_s={:.6f} min_s={:.6f} max_s={:.6f} mb_per_s={:.1f} bytes={} alloc_s={:.6f} checksum={:.17g}\n",
               median, sorted.front(), sorted.back(), mb_per_s, bytes, alloc_median, first.checksum);
    return 0;
}
