// Option values as people type them (DESIGN.md: values accept SI prefixes and units;
// M is mega here, as in SI, not milli as in SPICE).
#include <doctest/doctest.h>

#include "parsers/common/quantity.hpp"

using mirrorcheck::parse_quantity;

TEST_CASE("numbers with SI prefixes and units") {
    CHECK(*parse_quantity("100mV", "V") == doctest::Approx(0.1));
    CHECK(*parse_quantity("0.2 V", "V") == doctest::Approx(0.2));
    CHECK(*parse_quantity("0.2", "V") == doctest::Approx(0.2));
    CHECK(*parse_quantity("50m", "V") == doctest::Approx(0.05));
    CHECK(*parse_quantity("1.5k", "Hz") == doctest::Approx(1500));
    CHECK(*parse_quantity("2M", "Ω") == doctest::Approx(2e6));
    CHECK(*parse_quantity("5%", "%") == doctest::Approx(0.05));
    CHECK(*parse_quantity("0.05", "%") == doctest::Approx(0.05));
    CHECK(*parse_quantity("20µA", "A") == doctest::Approx(20e-6));
}

TEST_CASE("text that is not a quantity of that unit") {
    CHECK_FALSE(parse_quantity("", "V"));
    CHECK_FALSE(parse_quantity("abc", "V"));
    CHECK_FALSE(parse_quantity("100mA", "V"));
    CHECK_FALSE(parse_quantity("5 percent", "%"));
    CHECK_FALSE(parse_quantity("1x", "V"));
}
