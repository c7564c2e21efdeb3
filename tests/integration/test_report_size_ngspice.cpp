// The report's size per output does not grow with the circuit: the same block (an NMOS
// standard cascode mirror, its reference an ideal current, its output held by a voltage
// source) 10 and 1,000 times, its operating point from ngspice's `show` listing (gm, gds,
// gmbs and the voltages, no capacitances: the solve then notes what it leaves out, a note
// that concerns every transistor). A message about many devices must say how many and name
// a few; the JSON may carry the full list once, where a script reads it, but no output may
// repeat it. Sizes, not times: the timing belongs to tests/bench.
#include <string>

#include <doctest/doctest.h>
#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "support/ngspice_run.hpp"
#include "support/run_cli.hpp"

namespace {

using nlohmann::json;

std::string blocks(int n) {
    std::string deck = fmt::format("* {} cascode mirror blocks\n", n);
    deck += ".model nch nmos level=1 vto=0.5 kp=200u lambda=0.05 gamma=0.4 phi=0.7\nvdd vdd 0 1.8\n";
    for (int i = 0; i < n; ++i)
        deck += fmt::format(
            "iref{0} vdd t{0} 20u\nm{0}c t{0} t{0} r{0} 0 nch w=4u l=1u\nm{0}a r{0} r{0} 0 0 nch w=4u l=1u\n"
            "m{0}b x{0} r{0} 0 0 nch w=4u l=1u\nm{0}d o{0} t{0} x{0} 0 nch w=4u l=1u\nvo{0} o{0} 0 1.5\n",
            i);
    return deck;
}

struct Sizes {
    double json_per_output = 0, table_per_output = 0;
    std::size_t outputs = 0;
};

Sizes review_sizes(int n) {
    const std::string netlist = blocks(n);
    auto run = mirrorcheck::test::run_ngspice(
        netlist + ".control\nop\nshow m : id vgs vds vbs von vdsat gm gds gmbs\nquit 0\n.endc\n.end\n", "mc-size");
    REQUIRE_MESSAGE(run.status == 0, run.output.substr(0, 2000));
    mirrorcheck::test::write_text(run.dir / "blocks.cir", netlist + ".end\n");
    const auto j = mirrorcheck::test::run_cli("review blocks.cir --op ngspice.log --format json", run.dir);
    REQUIRE_MESSAGE(j.status == 0, j.err.substr(0, 2000));
    const auto t = mirrorcheck::test::run_cli("review blocks.cir --op ngspice.log", run.dir);
    REQUIRE_MESSAGE(t.status == 0, t.err.substr(0, 2000));
    Sizes s;
    const json report = json::parse(j.out);
    s.outputs = report["summary"]["outputs"].get<std::size_t>();
    CHECK(report["linearised_notes"].size() > 0);  // the solve did note what it left out
    s.json_per_output = static_cast<double>(j.out.size()) / static_cast<double>(s.outputs);
    s.table_per_output = static_cast<double>(t.out.size()) / static_cast<double>(s.outputs);
    return s;
}

}  // namespace

TEST_CASE("the report's size per output is the same for 10 and for 1,000 blocks") {
    const Sizes small = review_sizes(10), large = review_sizes(1000);
    CHECK(small.outputs == 10);
    CHECK(large.outputs == 1000);
    MESSAGE("JSON per output: " << small.json_per_output << " B (10 blocks), " << large.json_per_output
                                << " B (1,000 blocks); table: " << small.table_per_output << " B, "
                                << large.table_per_output << " B");
    // Longer names (m999a against m9a) and the one full device list of a circuit-level note
    // (about 10 bytes per device, 40 per output) are all that may grow.
    CHECK(large.json_per_output < small.json_per_output * 1.15 + 60);
    CHECK(large.table_per_output < small.table_per_output * 1.15);
}
