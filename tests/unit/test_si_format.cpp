// SI formatting of values for people (DESIGN.md: every value shown carries its unit with
// an SI prefix, never a SPICE suffix).
#include <cmath>
#include <limits>

#include <doctest/doctest.h>

#include "parsers/common/si_format.hpp"

using mirrorcheck::format_si;

TEST_CASE("values get three significant digits and an SI prefix") {
    CHECK(format_si(2.448e7, "Ω") == "24.5 MΩ");
    CHECK(format_si(-0.012, "V") == "-12 mV");
    CHECK(format_si(4.58e-4, "S") == "458 µS");
    CHECK(format_si(1.2, "V") == "1.2 V");
    CHECK(format_si(0.0, "V") == "0 V");
    CHECK(format_si(999.96e-3, "V") == "1 V");  // rounding carries into the next prefix
    // Subnormal values (a raw file written by something else, found by fuzzing): no exception.
    CHECK(format_si(5e-324, "S") == "4.94e-309 fS");
    CHECK(format_si(-1.61856e-319, "V") == "-1.62e-304 fV");
    CHECK(format_si(3.3e-16, "A") == "0.33 fA");  // below the smallest prefix
    CHECK(format_si(std::numeric_limits<double>::infinity(), "Ω") == "inf Ω");
}
