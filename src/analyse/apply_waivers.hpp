// Waivers: findings a designer has read and accepted, each with the reason written in a
// waiver file (parsers/waivers/waivers.hpp). A waived finding stays in the review, marked,
// and no longer fails it.
#pragma once

#include <vector>

#include "parsers/waivers/waivers.hpp"
#include "src/analyse/designer_names.hpp"
#include "src/analyse/finding.hpp"

namespace mirrorcheck {

// Marks every finding that a waiver matches as waived, with that waiver's reason; the first
// matching waiver wins. A waiver matches a finding when its subject is `*` or equals the
// finding's mirror id or subject, or the designer's name for either in `names` (any case),
// and its code is `*` or the finding's code. Then appends one info finding "waiver-unused"
// per waiver that waived nothing, naming its file and line. Findings waived before the
// call are left as they are.
void apply_waivers(std::vector<Finding>& findings, const waivers::Waivers& waivers, const DesignerNames& names = {});

}  // namespace mirrorcheck
