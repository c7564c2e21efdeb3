// The netlist reader's error catalogue: malformed decks, each with the code, file:line:column
// and message it must give; and mutated decks, which must give an InputError and nothing worse.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>
#include <vector>

#include <sys/stat.h>

#include "parsers/netlist/netlist.hpp"
#include "support/ngspice_run.hpp"

using mirrorcheck::InputError;

namespace {

struct Decks {
    std::filesystem::path dir = mirrorcheck::test::make_temp_dir("mirrorcheck-netlist-errors");
    ~Decks() {
        std::error_code ec;
        std::filesystem::remove_all(dir, ec);
    }
    std::filesystem::path write(const std::string& name, const std::string& text) const {
        auto path = dir / name;
        std::filesystem::create_directories(path.parent_path());
        mirrorcheck::test::write_text(path, text);
        return path;
    }
};

struct Malformed {
    const char* what;
    std::string deck;
    std::string code;
    std::size_t line;
    std::size_t column;  // 0: not checked (a whole-line error)
    std::string message;  // a part of the message
    std::string file = "deck.cir";
    std::vector<std::pair<std::string, std::string>> other_files = {};
};

const std::vector<Malformed> catalogue = {
    {"parameters defined through each other", "t\n.param a={b} b={c} c={a}\nR1 x 0 {a}\n", "netlist.parameter-cycle", 2,
     11, "defined through each other: a -> b -> c -> a"},
    {"a number too large for a double", "t\nR1 x 0 1e400\n", "netlist.not-finite", 2, 8, "`1e400` is infinite"},
    {"a division by zero", "t\n.param z=0\nR1 x 0 {1/z}\n", "netlist.not-finite", 3, 9, "`1/z` is infinite"},
    {"an infinite parameter of a subcircuit's line", "t\n.subckt s a\nR1 a 0 r=1e999\n.ends\nX1 x s\n",
     "netlist.not-finite", 3, 10, "`1e999` is infinite"},
    {"an infinite model parameter", "t\n.model d1 d is=1e400\nD1 a 0 d1\n", "netlist.not-finite", 2, 16,
     "`1e400` is infinite"},
    {"unclosed brace", "t\nR1 a b {1+2\n", "netlist.unbalanced", 2, 8, "`{` is never closed"},
    {"unclosed quote", "t\nR1 a b '1+2\n", "netlist.unbalanced", 2, 8, "`'` is never closed"},
    {"undefined parameter", "t\nR1 a b {x*2}\n", "netlist.undefined-parameter", 2, 9, "parameter `x` is not defined"},
    {"undefined parameter in a subcircuit", "t\n.subckt s a b w=1\nR1 a b {w*k}\n.ends\nX1 1 2 s\n",
     "netlist.undefined-parameter", 3, 11, "parameter `k` is not defined"},
    {"undefined parameter on an X line", "t\n.subckt s a b w=1\n.ends\nX1 1 2 s w={q}\n",
     "netlist.undefined-parameter", 4, 13, "parameter `q`"},
    {"incomplete expression", "t\n.param p={2*}\nR1 a b {p}\n", "netlist.bad-expression", 2, 13,
     "expected a value in the expression `2*`"},
    {"unknown function", "t\nR1 a b {foo(1)}\n", "netlist.unknown-function", 2, 9, "`foo` with 1 argument(s)"},
    {"unknown MOS model", "t\nM1 d g s b nosuch\n", "netlist.unknown-model", 2, 12, "no `.model nosuch`"},
    {"unknown diode model", "t\nD1 a b dx\n", "netlist.unknown-model", 2, 8, "no `.model dx`"},
    {"unknown subcircuit", "t\nX1 a b nothere\n", "netlist.unknown-subckt", 2, 8, "no `.subckt nothere`"},
    {"wrong node count on an X line", "t\n.subckt s a b\nR1 a b 1\n.ends\nX1 a s\n", "netlist.node-count", 5, 6,
     "connects 1 node(s) but its subcircuit has 2 port(s)"},
    {"element without its nodes", "t\nR1 a\n", "netlist.node-count", 2, 5, "`r1` is incomplete: expected two nodes"},
    {"controlled source without its gain", "t\nE1 a b c d\n", "netlist.node-count", 2, 11, "a gain"},
    {"recursive subcircuit", "t\n.subckt s a\nX1 a s\n.ends\nX0 n s\n", "netlist.recursive-subckt", 3, 6,
     "instantiates itself"},
    {"missing include", "t\n.include nofile.sp\n", "netlist.missing-include", 2, 1, "cannot read the included file"},
    {"include cycle", "t\n.include b.inc\n", "netlist.include-cycle", 1, 1, "the includes form a cycle", "b.inc",
     {{"b.inc", ".include b.inc\nR1 a 0 1\n"}}},
    {"missing library section", "t\n.lib 'l.lib' ff\n", "netlist.missing-lib-section", 2, 1, "no `.lib ff`",
     "deck.cir", {{"l.lib", ".lib tt\n.endl\n"}}},
    {"missing library file", "t\nR1 a 0 1\n.lib \"nolib.lib\" tt\n", "netlist.missing-library", 3, 1,
     "cannot read the library file"},
    {"missing include inside an included file", "t\n.include sub/a.inc\n", "netlist.missing-include", 3, 1,
     "cannot read the included file", "sub/a.inc", {{"sub/a.inc", "* models\n\n.include gone.inc\n"}}},
    {"a .lib inside an include is not looked for beside the include", "t\n.include sub/b.inc\n",
     "netlist.missing-library", 1, 1, "m.lib", "sub/b.inc",
     {{"sub/b.inc", ".lib m.lib tt\n"}, {"sub/m.lib", ".lib tt\n.endl\n"}}},
    {"subcircuit without .ends", "t\n.subckt s a\nR1 a 0 1\n", "netlist.unterminated", 2, 1, "expected `.ends`"},
    {".ends without .subckt", "t\n.ends\n", "netlist.stray-statement", 2, 1, "`.ends` has no matching"},
    {"continuation without a line", "t\n+ R1 a b 1\n", "netlist.stray-continuation", 2, 1, "must follow"},
    {"element of an unknown kind", "t\nP1 a b\n", "netlist.unsupported", 2, 1, "element `p1`"},
    {"device defined twice", "t\nR1 a b 1\nr1 c d 2\n", "netlist.duplicate-device", 3, 1, "`r1` is defined twice"},
    {"model without its type (a parameter in its place)", "t\n.model nch vto=0.5\nM1 d d 0 0 nch\n", "netlist.syntax", 2,
     12, "a model type"},
    {"line that is neither element nor statement", "t\n1R a b\n", "netlist.syntax", 2, 1, "an element name"},
    {".control without .endc", "t\n.control\nop\n", "netlist.unterminated", 2, 1, "expected `.endc`"},
    {"missing value after =", "t\nM1 d g s b nch w=\n.model nch nmos\n", "netlist.syntax", 2, 18, "a value after `w=`"},
    {"no bin for the geometry", "t\nM1 d g 0 0 n w=1u l=1u\n.model n.1 nmos level=54 lmin=2u lmax=3u wmin=1u wmax=2u\n",
     "netlist.no-model-bin", 2, 12, "none of the binned models `n.N`"},
    {".if without .endif", "t\n.param a=1\n.if (a == 1)\nR1 a 0 1\n", "netlist.unterminated", 3, 1, "expected `.endif`"},
    {".if on an undefined parameter", "t\n.if (nope == 1)\nR1 a 0 1\n.endif\n", "netlist.undefined-parameter", 2, 6,
     "`nope`"},
    {".endif without .if", "t\n.endif\n", "netlist.stray-statement", 2, 1, "`.endif` has no matching"},
    {"malformed poly", "t\nE1 a b poly 2 c d 1\n", "netlist.syntax", 2, 8, "`poly(n)`"},
    {"error on a continuation line", "t\nR1 a\n+ b {1+}\n", "netlist.bad-expression", 3, 8, "in the expression `1+`"},
    {"CR LF line endings keep columns", "t\r\nR1 a b {zz}\r\n", "netlist.undefined-parameter", 2, 9, "`zz`"},
    {"string where a number is needed", "t\nR1 a b \"text\"\n", "netlist.syntax", 2, 8, "a value"},
};

}  // namespace

TEST_CASE("malformed netlists give the catalogued error, with file:line:column") {
    for (const Malformed& m : catalogue) {
        SUBCASE(m.what) {
            Decks decks;
            for (const auto& [name, text] : m.other_files) decks.write(name, text);
            auto path = decks.write("deck.cir", m.deck);
            bool threw = false;
            try {
                mirrorcheck::netlist::read_netlist(path);
            } catch (const InputError& e) {
                threw = true;
                std::string error = e.what();
                CAPTURE(error);
                CHECK(e.code() == m.code);
                CHECK(e.where().file == (decks.dir / m.file).string());
                CHECK(e.where().line == m.line);
                if (m.column) CHECK(e.where().column == m.column);
                CHECK(e.message().find(m.message) != std::string::npos);
            }
            CHECK_MESSAGE(threw, "no error for: " << m.what);
        }
    }
    CHECK(catalogue.size() >= 15);
}

TEST_CASE("a netlist file beyond the reader's 4 GiB limit is refused before it is read") {
    // A sparse file: no disk space, no reading; the size alone decides.
    Decks decks;
    auto path = decks.write("huge.cir", "title\n");
    std::error_code ec;
    std::filesystem::resize_file(path, (std::uintmax_t{1} << 32) + 10, ec);
    if (ec) return;  // a file system without sparse files: nothing to check here
    try {
        mirrorcheck::netlist::read_netlist(path);
        FAIL("a 4 GiB netlist was read");
    } catch (const InputError& e) {
        CHECK(e.code() == "netlist.file-too-large");
        CHECK(e.message().find("4294967306 bytes") != std::string::npos);
    }
    std::filesystem::remove(path);
}

TEST_CASE("pathological nesting is refused, not a stack overflow") {
    Decks decks;
    std::string deep = "t\nR1 a 0 {" + std::string(100000, '(') + "1" + std::string(100000, ')') + "}\n";
    CHECK_THROWS_WITH_AS(mirrorcheck::netlist::read_netlist(decks.write("deep.cir", deep)),
                         doctest::Contains("nested less than 256 deep"), InputError);
    std::string minus = "t\nR1 a 0 {" + std::string(100000, '-') + "1}\n";
    CHECK_THROWS_AS(mirrorcheck::netlist::read_netlist(decks.write("minus.cir", minus)), InputError);
    std::string chain = "t\n";
    for (int i = 0; i < 2000; ++i)
        chain += ".subckt s" + std::to_string(i) + " a\nX1 a s" + std::to_string(i + 1) + "\n.ends\n";
    chain += ".subckt s2000 a\nR1 a 0 1\n.ends\nX0 n s0\n";
    try {
        mirrorcheck::netlist::read_netlist(decks.write("chain.cir", chain));
        FAIL("a 2000-level hierarchy was read");
    } catch (const InputError& e) {
        CHECK(e.code() == "netlist.too-deep");
    }
}

// Decks that are small on disk and huge or deep once read (found by a hostile probe): each
// must end in an InputError naming its limit, quickly, never a crash or gigabytes.
namespace {

// Each level instantiates the next twice: 2^levels resistors from levels + 1 short
// definitions, under `Xtop` on the last line.
std::string subcircuit_bomb(int levels) {
    std::string bomb = "bomb\n.subckt l" + std::to_string(levels) + " a\nR1 a 0 1\n.ends\n";
    for (int i = levels - 1; i >= 0; --i)
        bomb += ".subckt l" + std::to_string(i) + " a\nXa a l" + std::to_string(i + 1) + "\nXb a l" +
                std::to_string(i + 1) + "\n.ends\n";
    return bomb + "V1 a 0 1\nXtop a l0\n";
}

}  // namespace

TEST_CASE("a subcircuit bomb stops at the device limit, at the outermost X line") {
    Decks decks;
    // The probe's 823-byte deck flattened to 2^20 + 1 devices, just over the default limit.
    CHECK(mirrorcheck::netlist::ReadLimits{}.max_devices == (1u << 20));
    mirrorcheck::netlist::ReadLimits limits;
    limits.max_devices = 20'000;  // the same error sooner (this also runs under the sanitizers)
    try {
        mirrorcheck::netlist::read_netlist(decks.write("bomb.cir", subcircuit_bomb(20)), limits);
        FAIL("the bomb was read");
    } catch (const InputError& e) {
        CHECK(e.code() == "netlist.too-many-devices");
        CHECK(e.where().line == 86);  // `Xtop a l0`
        CHECK(e.message().find("past 20000 devices") != std::string::npos);
        CHECK(e.message().find("--max-devices") != std::string::npos);
    }
    // A smaller bomb under a raised limit is read whole.
    const auto small = decks.write("small.cir", subcircuit_bomb(14));
    limits.max_devices = (1u << 14);
    CHECK_THROWS_AS(mirrorcheck::netlist::read_netlist(small, limits), InputError);
    limits.max_devices = (1u << 14) + 1;
    CHECK(mirrorcheck::netlist::read_netlist(small, limits).devices.size() == (1u << 14) + 1);
}

TEST_CASE("30,000 nested definitions and an 8,000-file include chain are refused, not a stack overflow") {
    Decks decks;
    std::string nested = "nested\n";
    for (int i = 0; i < 30000; ++i) nested += ".subckt s" + std::to_string(i) + " a\n";
    try {
        mirrorcheck::netlist::read_netlist(decks.write("nested.cir", nested));
        FAIL("30,000 nested definitions were read");
    } catch (const InputError& e) {
        CHECK(e.code() == "netlist.too-deep");
        CHECK(e.where().line == 502);  // the 501st `.subckt`, inside 500
        CHECK(e.message().find("more than 500 levels") != std::string::npos);
    }
    for (int i = 0; i < 8000; ++i)
        decks.write("inc" + std::to_string(i) + ".sp", ".include inc" + std::to_string(i + 1) + ".sp\n");
    decks.write("inc8000.sp", "R1 a 0 1\n");
    try {
        mirrorcheck::netlist::read_netlist(decks.write("chain.cir", "chain\n.include inc0.sp\n"));
        FAIL("an 8,000-file include chain was read");
    } catch (const InputError& e) {
        CHECK(e.code() == "netlist.include-too-deep");
        // The deck and inc0 ... inc98 open: inc98's `.include` would be the 101st.
        CHECK(e.where().file.find("inc98.sp") != std::string::npos);
        CHECK(e.message().find("more than 100 levels") != std::string::npos);
    }
}

TEST_CASE("files that each include the next one twice stop long before 2^24 reads") {
    Decks decks;
    for (int i = 0; i < 25; ++i)
        decks.write("f" + std::to_string(i) + ".sp",
                    ".include f" + std::to_string(i + 1) + ".sp\n.include f" + std::to_string(i + 1) + ".sp\n");
    decks.write("f25.sp", ".param p=1\n");
    try {
        mirrorcheck::netlist::read_netlist(decks.write("twice.cir", "twice\n.include f0.sp\nR1 a 0 {p}\n"));
        FAIL("the include bomb was read");
    } catch (const InputError& e) {
        CHECK(e.code() == "netlist.included-too-often");
        CHECK(e.message().find("would be read 1001 times by here") != std::string::npos);
    }
}

TEST_CASE("mutated netlists never crash: they read, or give an InputError") {
    const std::vector<std::string> seeds = {
        "mutations\n.param w0=1u k={2*w0}\n.subckt cell d g s w=1u params: l=1u\nM1 d g s s nch w={w} l='l*2'\n"
        "R1 d x {k*1meg}\n.ends cell\nX1 out in 0 cell w=2u\nV1 in 0 dc 1 ac 1 sin(0 1 1k)\n"
        "E1 e 0 poly(1) in 0 0 1\nF1 f 0 V1 2\nK1 L1 L2 0.3\nL1 a 0 1u\nL2 b 0 1u\nB1 q 0 V=v(in)*2\n"
        ".model nch.1 nmos (level=54 lmin=0 lmax=1 wmin=0 wmax=1)\n.control\nop\n.endc\n.end\n",
        "lib\n.lib 'self.lib' tt\n.include \"inc.sp\"\nQ1 c b e qmod 2\nD1 a k dmod\n.global vdd\n"
        ".model qmod npn\n.model dmod d\nXa [ a b ] c\n",
    };
    Decks decks;
    decks.write("self.lib", ".lib tt\n.param p=1\n.endl\n");
    decks.write("inc.sp", "R9 a b {p}\n");
    std::size_t reads = 0, errors = 0;
    auto attempt = [&](const std::string& text) {
        auto path = decks.write("deck.cir", text);
        try {
            mirrorcheck::netlist::read_netlist(path);
        } catch (const InputError& e) {
            ++errors;
            CHECK(e.where().line > 0);
        }
        ++reads;
    };
    const std::string specials = "{}()'\"=+*;$\n.,[]";
    for (const std::string& seed : seeds) {
        for (std::size_t i = 0; i <= seed.size(); ++i) {
            attempt(seed.substr(0, i));
            if (i < seed.size()) attempt(seed.substr(0, i) + seed.substr(i + 1));
            attempt(seed.substr(0, i) + specials[i % specials.size()] + seed.substr(i));
        }
    }
    MESSAGE(reads << " mutated decks read, " << errors << " refused with an InputError");
    CHECK(errors > 0);
    CHECK(errors < reads);
}

TEST_CASE("an include of a named pipe is refused at once, not waited on for a writer") {
    // Found while preparing the fuzz targets: open() of a FIFO blocks until something
    // writes to it, so `.include pipe` hung the reader (and any CI job) forever.
    Decks decks;
    const auto pipe = decks.dir / "pipe";
    REQUIRE(::mkfifo(pipe.c_str(), 0600) == 0);
    try {
        mirrorcheck::netlist::read_netlist(decks.write("deck.cir", "t\n.include pipe\nR1 a 0 1\n"));
        FAIL("a FIFO was read as an include");
    } catch (const InputError& e) {
        CHECK(e.code() == "netlist.missing-include");
        CHECK(e.where().line == 2);
        CHECK(e.message().find("not a regular file") != std::string::npos);
    }
}

TEST_CASE("a subcircuit defined twice: the first definition counts, as in ngspice") {
    // ngspice (checked here by running it) warns "redefinition of .subckt s, ignored" and
    // simulates the first definition: 1 V across 1 kΩ, not 2 kΩ.
    const std::string deck = "t\n.subckt s a\nr1 a 0 1k\n.ends\n.subckt s a\nr1 a 0 2k\n.ends\nx1 n s\nv1 n 0 1\n";
    Decks decks;
    const auto netlist = mirrorcheck::netlist::read_netlist(decks.write("deck.cir", deck));
    const auto* r1 = &netlist.devices.front();
    for (const auto& d : netlist.devices)
        if (d.name == "r.x1.r1") r1 = &d;
    REQUIRE(r1->name == "r.x1.r1");
    REQUIRE(r1->value);
    CHECK(*r1->value == doctest::Approx(1e3));
    const auto run = mirrorcheck::test::run_ngspice(deck + ".control\nop\nprint i(v1)\nquit 0\n.endc\n.end\n");
    CAPTURE(run.output);
    CHECK(run.output.find("i(v1) = -1.00000e-03") != std::string::npos);
}
