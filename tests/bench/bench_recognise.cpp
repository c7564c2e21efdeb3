// bench_recognise [BLOCKS] [--runs N]
//
// Times mirrorcheck::find_mirrors on a flat circuit built in memory from BLOCKS (default
// 625) copies of one 16-transistor block: a standard cascode mirror (4), a Wilson mirror
// (3), a simple mirror with two outputs (3), a regulated cascode mirror (4) and a CMOS
// inverter (2). 625 blocks are 10,000 transistors. Prints the median wall time of N runs
// (default 5) and the number of mirrors found (4 per block), and exits 1 if that count is
// wrong. The last line is meant for scripts:
//   RESULT transistors=<n> mirrors=<n> median_s=<s> min_s=<s> max_s=<s>
// Not a test: built only on request (`cmake --build B --target bench_recognise`).
#include <algorithm>
#include <chrono>
#include <cstdlib>
#include <memory>
#include <string>
#include <vector>

#include <fmt/core.h>

#include "src/recognise/find_mirrors.hpp"
#include "support/mirror_blocks.hpp"

namespace {

double seconds_since(std::chrono::steady_clock::time_point start) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

}  // namespace

int main(int argc, char** argv) {
    std::size_t blocks = 625;
    int runs = 5;
    for (int i = 1; i < argc; ++i) {
        std::string arg = argv[i];
        if (arg == "--runs" && i + 1 < argc) runs = std::max(1, std::atoi(argv[++i]));
        else blocks = std::strtoul(argv[i], nullptr, 10);
    }
    mirrorcheck::test::BlockBuilder b;
    for (std::size_t i = 0; i < blocks; ++i) b.block(i);
    std::vector<double> times;
    std::size_t found = 0;
    for (int r = 0; r < runs; ++r) {
        auto start = std::chrono::steady_clock::now();
        found = mirrorcheck::find_mirrors(b.circuit).size();
        times.push_back(seconds_since(start));
        fmt::print("run {}: {:.4f} s\n", r + 1, times.back());
    }
    std::sort(times.begin(), times.end());
    fmt::print("RESULT transistors={} mirrors={} median_s={:.4f} min_s={:.4f} max_s={:.4f}\n",
               b.circuit.devices().size(), found, times[times.size() / 2], times.front(), times.back());
    return found == 4 * blocks ? 0 : 1;
}
