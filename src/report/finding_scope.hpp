// Which findings concern which mirror output: the one rule every back end uses to place a
// finding under an output.
#pragma once

#include "src/analyse/finding.hpp"
#include "src/model/circuit.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck::report {

// True when the finding belongs to this mirror and names this output's node or one of its
// devices, or names no particular output of the mirror (a reference-side or helper device,
// the reference node, the mirror itself): those concern every output. Names compare without
// case. A finding of no mirror (empty Finding::mirror) concerns no output.
bool finding_concerns_output(const Finding& finding, const Circuit& circuit, const Mirror& mirror,
                             const MirrorOutput& output);

}  // namespace mirrorcheck::report
