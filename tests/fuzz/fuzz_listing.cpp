// libFuzzer target: the reader of ngspice's `show` listing, then the operating point built
// from it for the sample's circuit (the values' checks: finite, present, of a device the
// netlist has) and the listing dumped as `peek` would. Anything but an InputError is a finding.
#include <cstddef>
#include <cstdint>
#include <string>

#include "parsers/common/input_error.hpp"
#include "parsers/listing/listing.hpp"
#include "src/model/circuit_build.hpp"
#include "src/model/op_point_build.hpp"
#include "src/report/json_text.hpp"
#include "src/report/listing_dump.hpp"
#include "tests/fuzz/fuzz_files.hpp"

using namespace mirrorcheck;

namespace {
const Circuit& sample_circuit() {
    static const Circuit circuit = read_circuit(MIRRORCHECK_SOURCE_DIR "/samples/tamarack/bias.cir");
    return circuit;
}
}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const Circuit& circuit = sample_circuit();
    try {
        const listing::Listing l = listing::parse_listing(fuzz::as_text(data, size), "input.txt");
        (void)report::write_listing_table(l);
        (void)report::json_text(report::listing_to_json(l));
        (void)build_op_point(circuit, l);
    } catch (const InputError&) {
    }
    return 0;
}
