// Messages that echo input: well-formed UTF-8 passes, everything else is escaped.
// UTF-8's well-formed sequences: RFC 3629 (overlong forms and surrogates are not UTF-8).
#include <doctest/doctest.h>

#include <string>

#include "parsers/common/input_error.hpp"
#include "parsers/common/utf8.hpp"

using mirrorcheck::printable_text;

TEST_CASE("printable_text keeps UTF-8 and tabs, escapes control bytes and broken sequences") {
    CHECK(printable_text("plain `m1` 24.5 MΩ, 125 °C\t") == "plain `m1` 24.5 MΩ, 125 °C\t");
    CHECK(printable_text(std::string("a\0b", 3)) == "a\\x00b");
    CHECK(printable_text("\x1b[31mred") == "\\x1b[31mred");       // a terminal escape
    // A line feed is a message's own layout (the end of ngspice's log, one line each).
    CHECK(printable_text("line\nbreak\r") == "line\nbreak\\x0d");
    CHECK(printable_text("{a}\xDD") == "{a}\\xdd");                // a lead byte with nothing after it
    CHECK(printable_text("\xC0\xAF") == "\\xc0\\xaf");             // overlong `/` (RFC 3629)
    CHECK(printable_text("\xED\xA0\x80") == "\\xed\\xa0\\x80");   // a UTF-16 surrogate
    CHECK(printable_text("\xC2\x85") == "\\xc2\\x85");             // a C1 control (NEL)
    CHECK(printable_text("\xF0\x9F\x98\x80") == "\xF0\x9F\x98\x80");  // a 4-byte sequence
}

TEST_CASE("an InputError never carries raw bytes that would garble a terminal") {
    const mirrorcheck::InputError e("netlist.syntax", mirrorcheck::Location("deck\xff.cir", 3, 1),
                                    std::string("expected a node name, found `x\0y`", 33));
    CHECK(e.message() == "expected a node name, found `x\\x00y`");
    CHECK(std::string(e.what()) == "deck\\xff.cir:3:1: error: expected a node name, found `x\\x00y` [netlist.syntax]");
}
