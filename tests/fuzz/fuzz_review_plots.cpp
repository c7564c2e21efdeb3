// libFuzzer target: a whole review of the sample's circuit from one raw file, the way
// `review NETLIST --op FILE` reads it: the op plot (else the first AC plot), every AC and
// .tf plot paired with the mirror outputs and the probes, the findings, and all three
// back ends. This is where plots of the wrong length, missing vectors, zero or repeated
// frequencies and odd names meet the passes. Anything but an InputError is a finding.
#include <cstddef>
#include <cstdint>
#include <sstream>

#include "parsers/common/input_error.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/model/op_point_build.hpp"
#include "src/model/simulation_plots_build.hpp"
#include "src/report/review_report.hpp"
#include "tests/fuzz/fuzz_files.hpp"
#include "tests/fuzz/sample_circuit.hpp"

using namespace mirrorcheck;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const Circuit& circuit = fuzz::sample_circuit();
    const auto path = fuzz::scratch().write("input.raw", fuzz::as_text(data, size));
    try {
        raw::RawFile file = raw::read_raw(path, raw::Selection{{"op", "ac", "tf"}, false});
        const raw::Plot* op_plot = nullptr;
        for (const char* kind : {"op", "ac"})
            for (const auto& plot : file.plots)
                if (!op_plot && plot.kind() == kind && plot.decoded && plot.point_count > 0) op_plot = &plot;
        if (!op_plot) return 0;
        OpPoint op = build_op_point(circuit, file, *op_plot);
        const ReviewSettings settings;
        ReviewTree tree = run_review(circuit, std::move(op), simulation_plots_from_raw(file), settings);
        for (auto format : {report::Format::table, report::Format::json, report::Format::junit}) {
            std::ostringstream out;
            report::write_review(format, tree, out);
        }
    } catch (const InputError&) {
    }
    return 0;
}
