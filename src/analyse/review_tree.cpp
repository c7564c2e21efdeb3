// The review tree's own small helpers; build_review_tree.cpp builds it.
#include "src/analyse/review_tree.hpp"

#include "mirrorcheck_revision.hpp"  // generated at build time: MIRRORCHECK_REVISION

namespace mirrorcheck {

ToolInfo this_tool() {
    ToolInfo t;
    t.version = MIRRORCHECK_VERSION;
    t.revision = MIRRORCHECK_REVISION;
    return t;
}

std::string_view to_string(OutputStatus status) { return status == OutputStatus::fail ? "fail" : "pass"; }

const std::string& ReviewTree::display_name(const std::string& name) const {
    auto it = display_names.find(name);
    return it == display_names.end() ? name : it->second;
}

}  // namespace mirrorcheck
