// libFuzzer target: the waiver file reader, with the finding codes the review knows.
#include <cstddef>
#include <cstdint>

#include "parsers/common/input_error.hpp"
#include "parsers/waivers/waivers.hpp"
#include "src/analyse/finding.hpp"
#include "tests/fuzz/fuzz_files.hpp"

using namespace mirrorcheck;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    static const std::vector<std::string> codes = finding_code_names();
    try {
        (void)waivers::parse_waivers(fuzz::as_text(data, size), "waivers.txt", codes);
    } catch (const InputError&) {
    }
    return 0;
}
