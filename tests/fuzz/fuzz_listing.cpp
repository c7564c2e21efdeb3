// libFuzzer target: the reader of ngspice's `show` listing, then the operating point built
// from it for the sample's circuit (the values' checks: finite, present, of a device the
// netlist has) and the listing dumped as `peek` would. Anything but an InputError is a finding.
#include <cstddef>
#include <cstdint>
#include <string>

#include "parsers/common/input_error.hpp"
#include "parsers/listing/listing.hpp"
#include "src/model/op_point_build.hpp"
#include "src/report/json_text.hpp"
#include "src/report/listing_dump.hpp"
#include "tests/fuzz/fuzz_files.hpp"
#include "tests/fuzz/sample_circuit.hpp"

using namespace mirrorcheck;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const Circuit& circuit = fuzz::sample_circuit();
    try {
        const listing::Listing l = listing::parse_listing(fuzz::as_text(data, size), "input.txt");
        (void)report::write_listing_table(l);
        (void)report::json_text(report::listing_to_json(l));
        (void)build_op_point(circuit, l);
    } catch (const InputError&) {
    }
    return 0;
}
