// Option values as people type them (DESIGN.md: values accept SI prefixes and units;
// M is mega here, as in SI, not milli as in SPICE). The unit is part of the value: a bare
// number is refused, since `--margin 100` once read as 100 V and `--tolerance 10` as 1000 %.
#include <doctest/doctest.h>

#include "parsers/common/quantity.hpp"

using mirrorcheck::lacks_unit;
using mirrorcheck::parse_quantity;

TEST_CASE("numbers with SI prefixes and units") {
    CHECK(*parse_quantity("100mV", "V") == doctest::Approx(0.1));
    CHECK(*parse_quantity("0.2 V", "V") == doctest::Approx(0.2));
    CHECK(*parse_quantity("0.1v", "V") == doctest::Approx(0.1));
    CHECK(*parse_quantity("1.5kHz", "Hz") == doctest::Approx(1500));
    CHECK(*parse_quantity("1MHz", "Hz") == doctest::Approx(1e6));  // SI mega, not SPICE milli
    CHECK(*parse_quantity("2MΩ", "Ω") == doctest::Approx(2e6));
    CHECK(*parse_quantity("5%", "%") == doctest::Approx(0.05));
    CHECK(*parse_quantity("10 %", "%") == doctest::Approx(0.10));
    CHECK(*parse_quantity("20µA", "A") == doctest::Approx(20e-6));
    CHECK(*parse_quantity("-50mV", "V") == doctest::Approx(-0.05));  // the sign is the caller's to judge
}

TEST_CASE("a bare number, or a prefix without its unit, is refused and recognised as such") {
    for (const char* text : {"100", "0.2", "50m", "1k", "10"}) {
        CAPTURE(text);
        CHECK_FALSE(parse_quantity(text, "V"));
        CHECK_FALSE(parse_quantity(text, "%"));
        CHECK(lacks_unit(text));
    }
    CHECK_FALSE(lacks_unit("100mV"));
    CHECK_FALSE(lacks_unit("100mA"));
    CHECK_FALSE(lacks_unit("abc"));
}

TEST_CASE("text that is not a quantity of that unit") {
    CHECK_FALSE(parse_quantity("", "V"));
    CHECK_FALSE(parse_quantity("abc", "V"));
    CHECK_FALSE(parse_quantity("100mA", "V"));
    CHECK_FALSE(parse_quantity("5 percent", "%"));
    CHECK_FALSE(parse_quantity("5m%", "%"));
    CHECK_FALSE(parse_quantity("1x", "V"));
}
