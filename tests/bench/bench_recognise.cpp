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

#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace {

using mirrorcheck::Circuit;

struct Builder {
    Circuit circuit;
    std::shared_ptr<mirrorcheck::Model> nch = model("nch", "nmos");
    std::shared_ptr<mirrorcheck::Model> pch = model("pch", "pmos");

    static std::shared_ptr<mirrorcheck::Model> model(const std::string& name, const std::string& type) {
        auto m = std::make_shared<mirrorcheck::Model>();
        m->name = m->ngspice_name = name;
        m->type = type;
        return m;
    }

    void mos(const std::string& name, const std::string& d, const std::string& g, const std::string& s, bool p = false) {
        mirrorcheck::Device dev;
        dev.kind = mirrorcheck::DeviceKind::mosfet;
        dev.name = dev.local_name = name;
        dev.terminals = {{"d", d}, {"g", g}, {"s", s}, {"b", p ? "vdd" : "0"}};
        dev.parameters = {{"w", 10e-6}, {"l", 1e-6}};
        dev.model = p ? pch : nch;
        circuit.add_device(std::move(dev));
    }

    void block(std::size_t i) {
        std::string n = "_" + std::to_string(i);
        mos("mc1" + n, "cg" + n, "cg" + n, "0");  // standard cascode
        mos("mc3" + n, "cref" + n, "cref" + n, "cg" + n);
        mos("mc2" + n, "cmid" + n, "cg" + n, "0");
        mos("mc4" + n, "cout" + n, "cref" + n, "cmid" + n);
        mos("mw2" + n, "wg" + n, "wg" + n, "0");  // Wilson
        mos("mw1" + n, "wy" + n, "wg" + n, "0");
        mos("mw3" + n, "wout" + n, "wy" + n, "wg" + n);
        mos("ms1" + n, "sref" + n, "sref" + n, "0");  // simple, two outputs
        mos("ms2" + n, "so1" + n, "sref" + n, "0");
        mos("ms3" + n, "so2" + n, "sref" + n, "0");
        mos("mr1" + n, "rref" + n, "rref" + n, "0");  // regulated cascode
        mos("mr2" + n, "rs" + n, "rref" + n, "0");
        mos("mr4" + n, "rout" + n, "ra" + n, "rs" + n);
        mos("mr5" + n, "ra" + n, "rs" + n, "0");
        mos("mn" + n, "inv" + n, "in" + n, "0");  // inverter
        mos("mp" + n, "inv" + n, "in" + n, "vdd", true);
    }
};

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
    Builder b;
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
