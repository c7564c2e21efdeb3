// The raw reader against ngspice itself: small decks of our own (MOS level 1, BSIM3,
// BSIM4, Gummel-Poon bipolar) simulated in the test with op, tf, ac and tran, written as
// binary and ASCII raw files. Checks: binary and ASCII agree value by value; values agree
// with what ngspice's own `print` writes for the same vectors; device parameters saved
// with `save @dev[param]` (also inside subcircuits) are found by their ngspice names.
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include <doctest/doctest.h>

#include "parsers/common/input_error.hpp"
#include "parsers/raw/raw.hpp"
#include "support/ngspice_run.hpp"
#include "support/print_output.hpp"

using namespace mirrorcheck;

namespace {

struct Deck {
    const char* name;
    std::string circuit;                 // elements and models, no control block
    std::string saves;                   // device parameters to save
    std::vector<std::string> ac_vectors;    // compared with `print` in the AC plot
    std::vector<std::string> tran_vectors;  // and in the transient plot
    std::string tf;                      // the .tf arguments
};

const std::vector<std::string> plots = {"op1", "tf1", "ac1", "tran1"};

// Runs op, tf, ac and tran; writes all four plots to one binary and one ASCII file, and
// prints the chosen vectors of each plot to files of their own (ngspice's redirection).
std::string control_block(const Deck& d) {
    std::string c = ".control\nset numdgt=15\nsave all " + d.saves + "\nop\ntf " + d.tf +
                    "\nac dec 4 1k 1g\ntran 0.2n 10n\n";
    for (std::size_t i = 0; i < plots.size(); ++i)
        c += "setplot " + plots[i] + "\nwrite run.raw\n" + (i == 0 ? "set appendwrite\n" : "");
    c += "unset appendwrite\nset filetype=ascii\n";
    for (std::size_t i = 0; i < plots.size(); ++i)
        c += "setplot " + plots[i] + "\nwrite run_ascii.raw\n" + (i == 0 ? "set appendwrite\n" : "");
    c += "setplot op1\nprint all > print_op.txt\nsetplot tf1\nprint all > print_tf.txt\n";
    for (std::size_t i = 0; i < d.ac_vectors.size(); ++i)
        c += "setplot ac1\nprint " + d.ac_vectors[i] + " > print_ac_" + std::to_string(i) + ".txt\n";
    for (std::size_t i = 0; i < d.tran_vectors.size(); ++i)
        c += "setplot tran1\nprint " + d.tran_vectors[i] + " > print_tran_" + std::to_string(i) + ".txt\n";
    return c + "quit 0\n.endc\n.end\n";
}

bool close(std::complex<double> a, std::complex<double> b, double rel) {
    return std::abs(a - b) <= rel * std::max(std::abs(a), std::abs(b)) + 1e-300;
}

std::complex<double> at(const raw::Plot& plot, std::size_t var, std::size_t point) {
    return plot.complex ? plot.cplx[var][point] : std::complex<double>(plot.real[var][point]);
}

void check_binary_equals_ascii(const raw::RawFile& b, const raw::RawFile& a) {
    REQUIRE(a.plots.size() == b.plots.size());
    for (std::size_t p = 0; p < a.plots.size(); ++p) {
        const auto& pa = a.plots[p];
        const auto& pb = b.plots[p];
        CHECK(pa.name == pb.name);
        REQUIRE(pa.variables.size() == pb.variables.size());
        REQUIRE(pa.point_count == pb.point_count);
        std::size_t mismatches = 0;
        for (std::size_t v = 0; v < pa.variables.size(); ++v)
            for (std::size_t i = 0; i < pa.point_count; ++i)
                // ASCII carries %.15e: 16 significant digits.
                if (!close(at(pa, v, i), at(pb, v, i), 1e-15)) ++mismatches;
        CHECK_MESSAGE(mismatches == 0, pa.name << ": " << mismatches << " values differ");
    }
}

// Every vector that `print all` wrote for a one-point plot has the same value in the raw file.
void check_print_all(const raw::Plot& plot, const test::PrintedVectors& printed) {
    REQUIRE(!printed.empty());
    for (const auto& [name, values] : printed) {
        CAPTURE(name);
        auto index = plot.find(name);
        REQUIRE(index);
        CHECK(close(at(plot, *index, 0), values.at(0), 1e-14));
    }
}

void check_printed_vector(const raw::Plot& plot, const std::string& name, const test::PrintedVectors& printed) {
    CAPTURE(name);
    auto index = plot.find(name);
    REQUIRE(index);
    // ngspice prints `i(vout)` as `vout#branch`; our reader knows both spellings.
    auto it = printed.find(name);
    if (it == printed.end()) it = printed.find(raw::canonical_vector_name(name));
    REQUIRE(it != printed.end());
    REQUIRE(it->second.size() == plot.point_count);
    for (std::size_t i = 0; i < plot.point_count; ++i) CHECK(close(at(plot, *index, i), it->second[i], 1e-14));
}

void run_deck(const Deck& d) {
    auto run = test::run_ngspice(std::string("* ") + d.name + "\n" + d.circuit + control_block(d), "mc-raw");
    INFO("ngspice output:\n" << run.output);
    REQUIRE(run.status == 0);
    raw::RawFile b = raw::read_raw(run.file("run.raw"));
    raw::RawFile a = raw::read_raw(run.file("run_ascii.raw"));
    REQUIRE(b.plots.size() == 4);
    CHECK(b.plots[0].kind() == "op");
    CHECK(b.plots[1].kind() == "tf");
    CHECK(b.plots[2].kind() == "ac");
    CHECK(b.plots[3].kind() == "tran");
    check_binary_equals_ascii(b, a);
    check_print_all(b.plots[0], test::parse_print_output(test::read_text(run.file("print_op.txt"))));
    check_print_all(b.plots[1], test::parse_print_output(test::read_text(run.file("print_tf.txt"))));
    for (std::size_t i = 0; i < d.ac_vectors.size(); ++i)
        check_printed_vector(b.plots[2], d.ac_vectors[i],
                             test::parse_print_output(test::read_text(run.file("print_ac_" + std::to_string(i) + ".txt"))));
    for (std::size_t i = 0; i < d.tran_vectors.size(); ++i)
        check_printed_vector(
            b.plots[3], d.tran_vectors[i],
            test::parse_print_output(test::read_text(run.file("print_tran_" + std::to_string(i) + ".txt"))));
}

}  // namespace

TEST_CASE("MOS level 1 mirrors, one device inside a subcircuit") {
    run_deck({"level-1 nmos and pmos mirrors",
              ".model nlv nmos level=1 vto=0.55 kp=180u lambda=0.06 gamma=0.5 phi=0.7 cgso=2e-10 cgdo=2e-10\n"
              ".model plv pmos level=1 vto=-0.6 kp=70u lambda=0.08 gamma=0.4 phi=0.7 cgso=2e-10 cgdo=2e-10\n"
              ".subckt halfcell d g s b\nmo d g s b nlv w=6u l=1u\n.ends\n"
              "vdd vdd 0 2.5\niref vdd nref dc 30u\n"
              "m1 nref nref 0 0 nlv w=3u l=1u\nx1 pd nref 0 0 halfcell\n"
              "m3 pd pd vdd vdd plv w=12u l=1u\nm4 out pd vdd vdd plv w=12u l=1u m=2\n"
              "vout out 0 dc 1.2 ac 1 sin(1.2 0.1 100meg)\n",
              "@m1[gm] @m1[gds] @m1[id] @m1[vds] @m.x1.mo[gm] @m.x1.mo[gds] @m.x1.mo[vdsat] @m4[gm] @m4[id] @m4[gmbs]",
              {"v(out)", "i(vout)", "v(pd)", "@m.x1.mo[gm]"},
              {"v(out)", "i(vout)", "@m1[gm]"},
              "i(vout) vout"});
}

TEST_CASE("BSIM3 mirror") {
    run_deck({"bsim3 nmos mirror",
              ".model n3 nmos level=8 version=3.3.0\n.model p3 pmos level=8 version=3.3.0\n"
              "vdd vdd 0 1.8\niref vdd nref dc 20u\n"
              "m1 nref nref 0 0 n3 w=4u l=0.5u\nm2 out nref 0 0 n3 w=8u l=0.5u\n"
              "m3 x x vdd vdd p3 w=8u l=0.5u\nr3 x 0 50k\n"
              "vout out 0 dc 0.9 ac 1 pulse(0.8 1.0 1n 1n 1n 3n 8n)\n",
              "@m1[gm] @m1[gds] @m1[vth] @m1[vdsat] @m2[id] @m2[gm] @m2[gds] @m2[gmbs] @m3[vth]",
              {"i(vout)", "v(nref)"},
              {"i(vout)", "@m2[id]"},
              "i(vout) vout"});
}

TEST_CASE("BSIM4 mirror") {
    run_deck({"bsim4 nmos mirror",
              ".model n4 nmos level=14 version=4.8.0\n"
              "vdd vdd 0 1.2\niref vdd nref dc 15u\n"
              "m1 nref nref 0 0 n4 w=2u l=0.2u\nm2 out nref 0 0 n4 w=2u l=0.2u m=3\n"
              "vout out 0 dc 0.6 ac 1\n",
              "@m1[gm] @m1[gds] @m1[vth] @m1[vdsat] @m2[id] @m2[gm] @m2[gds]",
              {"i(vout)", "@m2[gds]"},
              {"v(nref)"},
              "v(nref) iref"});
}

TEST_CASE("Gummel-Poon bipolar mirrors, npn and pnp") {
    run_deck({"bipolar mirrors",
              ".model qn npn is=2e-16 bf=120 vaf=60 cje=0.2p cjc=0.1p tf=20p\n"
              ".model qp pnp is=1e-16 bf=60 vaf=40 cje=0.2p cjc=0.1p\n"
              "vcc vcc 0 5\niref vcc nref dc 100u\n"
              "q1 nref nref 0 qn\nq2 pd nref 0 qn area=2\n"
              "q3 pd pd vcc qp\nq4 out pd vcc qp\n"
              "vout out 0 dc 2.5 ac 1\n",
              "@q1[gm] @q1[gpi] @q1[go] @q2[ic] @q2[ib] @q4[gm] @q4[go] @q4[ic]",
              {"i(vout)", "v(pd)"},
              {"i(vout)"},
              "i(vout) vout"});
}

TEST_CASE("a raw file written during a batch run (`ngspice -b -r`) pads its point count") {
    auto dir = test::make_temp_dir("mc-raw-r");
    test::write_text(dir / "deck.cir", "* rc ladder\nvin in 0 dc 0 pulse(0 1 0 1n 1n 5n 20n)\nr1 in a 1k\nc1 a 0 1p\n"
                                       "r2 a b 1k\nc2 b 0 1p\n.tran 0.1n 20n\n.end\n");
    std::string cmd = "cd '" + dir.string() + "' && ngspice -b -r run.raw deck.cir > ngspice.log 2>&1";
    REQUIRE(std::system(cmd.c_str()) == 0);
    std::string text = test::read_text(dir / "run.raw");
    auto line = text.substr(text.find("No. Points:"), text.find('\n', text.find("No. Points:")) - text.find("No. Points:"));
    CHECK_MESSAGE(line.back() == ' ', "ngspice no longer pads: `" << line << "`");
    raw::RawFile f = raw::read_raw(dir / "run.raw");
    REQUIRE(f.plots.size() == 1);
    CHECK(f.plots[0].point_count > 100);
    CHECK(f.plots[0].real[0].back() == doctest::Approx(20e-9));
    std::filesystem::remove_all(dir);
}

TEST_CASE("files larger than the reader's 1 MiB text window, decoded on several cores: binary and ASCII agree") {
    auto run = test::run_ngspice("* rc ladder, many points\nvin in 0 dc 0 sin(0 1 1meg)\nr1 in a 1k\nc1 a 0 1p\n"
                                 "r2 a b 1k\nc2 b 0 1p\n.control\ntran 1n 100u 0 1n\nwrite big.raw\n"
                                 "set filetype=ascii\nwrite big_ascii.raw\nquit 0\n.endc\n.end\n",
                                 "mc-raw-big");
    REQUIRE_MESSAGE(run.status == 0, run.output);
    CHECK(std::filesystem::file_size(run.file("big_ascii.raw")) > (std::uintmax_t{3} << 20));
    raw::RawFile b = raw::read_raw(run.file("big.raw"));
    raw::RawFile a = raw::read_raw(run.file("big_ascii.raw"));
    REQUIRE(b.plots.size() == 1);
    CHECK(b.plots[0].point_count >= 100000);  // 5 vectors: above the parallel decoder's 2^18 values
    check_binary_equals_ascii(b, a);

    // A bad value late in the file still gets its exact line (the parallel parts fail and
    // the one-pass decoder reports it).
    std::string text = test::read_text(run.file("big_ascii.raw"));
    std::size_t at = text.find('\t', text.size() * 9 / 10) + 1;
    text.replace(at, 3, "x.y");
    test::write_text(run.file("bad_ascii.raw"), text);
    std::size_t line = 1 + static_cast<std::size_t>(std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(at), '\n'));
    try {
        raw::read_raw(run.file("bad_ascii.raw"));
        FAIL("no error");
    } catch (const InputError& e) {
        CHECK(e.code() == "raw.bad-number");
        CHECK(e.where().line == line);
    }
}
