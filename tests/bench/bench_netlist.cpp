// bench_netlist NETLIST [--runs N]
//
// Times mirrorcheck::netlist::read_netlist (read, expand includes, flatten) on NETLIST and
// prints each run's wall time, then one line for scripts:
//   RESULT devices=<n> models=<n> median_s=<s> min_s=<s> max_s=<s>
// Peak memory is measured from outside (run_netlist_bench.sh runs this under
// /usr/bin/time with --runs 1). Not a test: built only on request
// (`cmake --build B --target bench_netlist`).
#include <algorithm>
#include <chrono>
#include <cstdlib>
#include <exception>
#include <string>
#include <vector>

#include <fmt/core.h>

#include "parsers/netlist/netlist.hpp"

int main(int argc, char** argv) {
    std::string path;
    int runs = 3;
    for (int i = 1; i < argc; ++i) {
        std::string arg = argv[i];
        if (arg == "--runs" && i + 1 < argc) runs = std::max(1, std::atoi(argv[++i]));
        else path = arg;
    }
    if (path.empty()) {
        fmt::print(stderr, "usage: bench_netlist NETLIST [--runs N]\n");
        return 2;
    }
    std::vector<double> times;
    std::size_t devices = 0, models = 0;
    try {
        for (int r = 0; r < runs; ++r) {
            auto start = std::chrono::steady_clock::now();
            auto netlist = mirrorcheck::netlist::read_netlist(path);
            times.push_back(std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count());
            devices = netlist.devices.size();
            models = netlist.models.size();
            fmt::print("run {}: {:.4f} s\n", r + 1, times.back());
        }
    } catch (const std::exception& e) {
        fmt::print(stderr, "bench_netlist: {}\n", e.what());
        return 2;
    }
    std::sort(times.begin(), times.end());
    fmt::print("RESULT devices={} models={} median_s={:.4f} min_s={:.4f} max_s={:.4f}\n", devices, models,
               times[times.size() / 2], times.front(), times.back());
    return 0;
}
