// A finding names its mirror and a subject: a device or a node. Output devices and output
// nodes belong to one output; everything else of the mirror (reference devices, helpers,
// the reference node) sets the current or the bias of every output, so a finding about it
// is shown under each of them.
#include "src/report/finding_scope.hpp"

#include <algorithm>

#include "parsers/common/text.hpp"

namespace mirrorcheck::report {
namespace {

bool names_output(const std::string& subject, const Circuit& circuit, const MirrorOutput& output) {
    return iequals(subject, output.node) || std::any_of(output.devices.begin(), output.devices.end(), [&](std::size_t i) {
               return iequals(subject, circuit.devices()[i].name);
           });
}

}  // namespace

bool finding_concerns_output(const Finding& finding, const Circuit& circuit, const Mirror& mirror,
                             const MirrorOutput& output) {
    if (finding.mirror.empty() || !iequals(finding.mirror, mirror.id)) return false;
    if (names_output(finding.subject, circuit, output)) return true;
    return std::none_of(mirror.outputs.begin(), mirror.outputs.end(),
                        [&](const MirrorOutput& other) { return names_output(finding.subject, circuit, other); });
}

}  // namespace mirrorcheck::report
