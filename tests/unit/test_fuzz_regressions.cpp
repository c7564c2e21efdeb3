// Inputs the fuzz targets (tests/fuzz) found a crash, hang or leak with, kept under
// tests/data/fuzz, each read the way its target read it, with the outcome it must have now.
#include <doctest/doctest.h>

#include <string>

#include "parsers/raw/raw.hpp"
#include "src/report/raw_dump.hpp"

namespace {
const std::string fuzz_data = std::string(MIRRORCHECK_TEST_DATA) + "/fuzz/";
}

TEST_CASE("fuzz_raw_binary: subnormal values in a vector dump (std::stod threw out_of_range)") {
    // An AC plot whose values include 5e-324 and 1.6e-319; `peek --vector` formats them with
    // SI prefixes, where the rounding check read "4.94e-309" back with std::stod.
    const auto file = mirrorcheck::raw::read_raw(fuzz_data + "raw_binary_subnormal.raw");
    REQUIRE(file.plots.size() == 1);
    std::string dump;
    CHECK_NOTHROW(dump = mirrorcheck::report::write_raw_vectors(file, {"i(vout)"}));
    CHECK(dump.find("i(vout)") != std::string::npos);
}
