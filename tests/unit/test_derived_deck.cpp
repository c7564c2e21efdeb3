// The derived copies of a designer's files (src/deck/derived_deck): line for line, the cards
// the review runs itself commented out, names made absolute, copies where a copy must name
// a copy; read back from the work folder, they describe the same circuit as the user's files.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "parsers/netlist/netlist.hpp"
#include "src/deck/derived_deck.hpp"
#include "src/model/circuit_build.hpp"
#include "support/circuit_devices.hpp"
#include "support/ngspice_run.hpp"

namespace fs = std::filesystem;

namespace {

struct Folders {
    fs::path user = mirrorcheck::test::make_temp_dir("mirrorcheck-derived-user");
    fs::path work = mirrorcheck::test::make_temp_dir("mirrorcheck-derived-work");
    ~Folders() {
        std::error_code ec;
        fs::remove_all(user, ec);
        fs::remove_all(work, ec);
    }
    fs::path write(const std::string& name, const std::string& text) const {
        fs::create_directories((user / name).parent_path());
        mirrorcheck::test::write_text(user / name, text);
        return user / name;
    }
};

// Writes the copies into the work folder, the top one as `deck.cir`.
void save(const mirrorcheck::DerivedDeck& d, const fs::path& work) {
    mirrorcheck::test::write_text(work / "deck.cir", d.top);
    for (const auto& f : d.included) mirrorcheck::test::write_text(f.path, f.text);
}


}  // namespace

TEST_CASE("derived copies: an include chain to a file with a control block is copied link by link") {
    Folders f;
    f.write("tb/a.inc", "* no cards here\n.include b.inc\nR1 1 2 1k\n");
    f.write("tb/b.inc", "R2 2 0 1k\n.control\nop\nquit 0\n.endc\n.OP\n");
    f.write("tb/c.inc", "R3 1 0 5k\n");
    const auto top = f.write("deck.cir", "title\nV1 1 0 1\n.include tb/a.inc\n.include tb/c.inc\n.tran 1n 1u\n.end\n");
    const auto netlist = mirrorcheck::netlist::read_netlist(top);
    const auto d = mirrorcheck::derive_deck(netlist, f.work);
    REQUIRE(d.included.size() == 2);  // a.inc to name b's copy, b.inc for its cards; not c.inc
    CHECK(d.included[0].original == f.user / "tb/a.inc");
    CHECK(d.included[0].path == f.work / "include1-a.inc");
    CHECK(d.included[1].original == f.user / "tb/b.inc");
    CHECK(d.included[0].text == "* no cards here\n.include \"" + (f.work / "include2-b.inc").string() + "\"\nR1 1 2 1k\n");
    CHECK(d.included[1].text ==
          "R2 2 0 1k\n*(left out for the review) .control\n*(left out for the review) op\n"
          "*(left out for the review) quit 0\n*(left out for the review) .endc\n*(left out for the review) .OP\n");
    CHECK(d.top == "title\nV1 1 0 1\n.include \"" + (f.work / "include1-a.inc").string() + "\"\n.include \"" +
                       (f.user / "tb/c.inc").string() + "\"\n*(left out for the review) .tran 1n 1u\n"
                       "*(the review's lines follow) .end\n");
    REQUIRE(d.left_out.size() == 3);
    CHECK(mirrorcheck::to_string(d.left_out[0]) == (f.user / "tb/b.inc").string() + ":2: .control ... .endc");
    CHECK(mirrorcheck::to_string(d.left_out[1]) == (f.user / "tb/b.inc").string() + ":6: .OP");
    CHECK(mirrorcheck::to_string(d.left_out[2]) == top.string() + ":5: .tran 1n 1u");
    // read back from the work folder: the same circuit, and nothing left to leave out
    save(d, f.work);
    const auto again = mirrorcheck::netlist::read_netlist(f.work / "deck.cir");
    CHECK(mirrorcheck::test::devices_without_sources(mirrorcheck::build_circuit(again)) == mirrorcheck::test::devices_without_sources(mirrorcheck::build_circuit(netlist)));
    for (const auto& card : again.cards) CHECK(card.kind == mirrorcheck::netlist::Card::Kind::end);
}

TEST_CASE("derived copies: names found through the deck's folder stay found from the work folder") {
    Folders f;
    // a .lib inside an include is named from the deck's folder; an include's ./ lookup too
    f.write("models/m.inc", ".lib corner.lib tt\n.include shared.inc\n.include own.inc\n");
    f.write("corner.lib", ".lib tt\nR1 1 0 1k\n.endl\n.lib common\nR2 1 0 2k\n.endl\n");
    f.write("shared.inc", "R3 1 0 3k\n");
    f.write("models/shared.inc", "R3 1 0 33k\n");
    f.write("models/own.inc", "R4 1 0 4k\n");
    const auto top = f.write("deck.cir", "title\r\nV1 1 0 1\r\n.include 'models/m.inc'\r\n.lib \"corner.lib\" common\r\n");
    const auto netlist = mirrorcheck::netlist::read_netlist(top);
    const auto d = mirrorcheck::derive_deck(netlist, f.work);
    REQUIRE(d.included.size() == 1);
    CHECK(d.included[0].text == ".lib \"" + (f.user / "corner.lib").string() + "\" tt\n.include \"" +
                                    (f.user / "shared.inc").string() + "\"\n.include \"" +
                                    (f.user / "models/own.inc").string() + "\"\n");
    CHECK(d.top == "title\r\nV1 1 0 1\r\n.include \"" + (f.work / "include1-m.inc").string() + "\"\r\n.lib \"" +
                       (f.user / "corner.lib").string() + "\" common\r\n");
    CHECK(d.left_out.empty());
    save(d, f.work);
    CHECK(mirrorcheck::test::devices_without_sources(mirrorcheck::read_circuit(f.work / "deck.cir")) == mirrorcheck::test::devices_without_sources(mirrorcheck::build_circuit(netlist)));
}

TEST_CASE("derived copies: a card to leave out inside a library section is refused with its line") {
    Folders f;
    f.write("lib.lib", ".lib tt\nR1 1 0 1k\n.control\nop\n.endc\n.endl\n");
    const auto top = f.write("deck.cir", "title\nV1 1 0 1\n.lib lib.lib tt\n");
    const auto netlist = mirrorcheck::netlist::read_netlist(top);
    try {
        mirrorcheck::derive_deck(netlist, f.work);
        FAIL("a control block inside a library was copied");
    } catch (const mirrorcheck::InputError& e) {
        CHECK(e.code() == "prepare.card-in-library");
        CHECK(e.where().file == (f.user / "lib.lib").string());
        CHECK(e.where().line == 3);
    }
}

TEST_CASE("derived copies for a testbench: element lines left out with their continuations, and .nodeset, .ic") {
    Folders f;
    f.write("parts.inc", "R9 9 0 1k\nR8 8 0\n* a comment between\n\n+ 2k\nR7 7 0 3k\n.nodeset v(7)=1\n");
    const auto top = f.write("deck.cir", "title\nV1 1 0 1\n.include parts.inc\n.IC v(1)=1\nR1 1 0\n+ 1k\n.end\n");
    const auto netlist = mirrorcheck::netlist::read_netlist(top);
    mirrorcheck::DeriveEdits edits;
    edits.elements_out = {{(f.user / "parts.inc").string(), 2}, {top.string(), 5}};
    edits.why = "*(out) ";
    edits.initial_conditions_out = true;
    edits.copy_prefix = "bench1-";
    const auto d = mirrorcheck::derive_deck(netlist, f.work, edits);
    REQUIRE(d.included.size() == 1);
    CHECK(d.included[0].path == f.work / "bench1-include1-parts.inc");
    CHECK(d.included[0].text ==
          "R9 9 0 1k\n*(out) R8 8 0\n*(out) * a comment between\n*(out) \n*(out) + 2k\nR7 7 0 3k\n*(out) .nodeset v(7)=1\n");
    CHECK(d.top == "title\nV1 1 0 1\n.include \"" + (f.work / "bench1-include1-parts.inc").string() +
                       "\"\n*(out) .IC v(1)=1\n*(out) R1 1 0\n*(out) + 1k\n*(the review's lines follow) .end\n");
}
