// libFuzzer target: the raw file reader (one source, two targets). FUZZ_RAW_ENCODING picks
// the inputs each keeps: "Binary:" for fuzz_raw_binary, "Values:" for fuzz_raw_ascii, so
// that each target's corpus grows towards its own half of the reader. An input is read
// whole, headers alone, and op plots alone (the three ways the commands read), then
// dumped as `peek` would; anything but an InputError is a finding.
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"
#include "parsers/raw/raw.hpp"
#include "src/report/json_text.hpp"
#include "src/report/raw_dump.hpp"
#include "tests/fuzz/fuzz_files.hpp"

using namespace mirrorcheck;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view bytes = fuzz::as_text(data, size);
    if (bytes.find(FUZZ_RAW_ENCODING) == std::string_view::npos) return -1;  // the other target's
    const auto path = fuzz::scratch().write("input.raw", bytes);
    try {
        (void)raw::read_raw(path, raw::Selection{{}, true});
        (void)raw::read_raw(path, raw::Selection{{"op"}, false});
        const raw::RawFile file = raw::read_raw(path);
        (void)report::write_raw_table(file);
        for (const auto& plot : file.plots) {
            for (std::size_t v = 0; v < plot.variables.size(); ++v) {
                const auto found = plot.find(plot.variables[v].name);
                if (!found) __builtin_trap();  // every variable must be found by its own name
                if (plot.decoded && plot.point_count > 0) (void)raw::value_location(file, plot, v, plot.point_count - 1);
            }
        }
        std::vector<std::string> vectors;
        if (!file.plots.empty() && !file.plots.front().variables.empty())
            vectors.push_back(file.plots.front().variables.back().name);
        (void)report::json_text(report::raw_to_json(file, vectors));
        (void)report::write_raw_vectors(file, vectors);
    } catch (const InputError&) {
    }
    return 0;
}
