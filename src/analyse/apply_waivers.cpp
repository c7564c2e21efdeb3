// Applies waivers to the findings of a review. A waiver names a subject (mirror id, device
// or node) and a code, either of which may be `*`; names compare without case, as ngspice's
// do, and a device or mirror also answers to the designer's name for it (`xm2` for the
// process kit's `m.xm2.msky130_fd_pr__nfet_01v8`). The first waiver in file order that
// matches a finding takes it, so a broad waiver written after a narrow one does not steal
// the narrow one's findings. A waiver that takes
// no finding is stale (the circuit changed, or an earlier line covers it) and is reported,
// so waiver files do not silently accumulate lines that hide nothing.
#include "src/analyse/apply_waivers.hpp"

#include <cstddef>

#include <fmt/format.h>

#include "parsers/common/text.hpp"

namespace mirrorcheck {
namespace {

bool names_match(const std::string& pattern, const std::string& name, const DesignerNames& names) {
    return !name.empty() && (iequals(pattern, name) || iequals(pattern, designer_name(names, name)));
}

bool matches(const waivers::Waiver& w, const Finding& f, const DesignerNames& names) {
    const bool subject = w.subject == "*" || names_match(w.subject, f.mirror, names) ||
                         names_match(w.subject, f.subject, names);
    return subject && (w.code == "*" || w.code == to_string(f.code));
}

// The index of the first waiver that matches, or waivers.size().
std::size_t first_match(const waivers::Waivers& waivers, const Finding& f, const DesignerNames& names) {
    std::size_t k = 0;
    while (k < waivers.size() && !matches(waivers[k], f, names)) ++k;
    return k;
}

Finding unused_waiver(const waivers::Waiver& w) {
    const std::string where = fmt::format("{}:{}", w.where.file, w.where.line);
    return make_finding(FindingCode::waiver_unused, "", where,
                        {FindingValue::words("place", where), FindingValue::words("waiver", w.subject + " " + w.code)});
}

}  // namespace

void apply_waivers(std::vector<Finding>& findings, const waivers::Waivers& waivers, const DesignerNames& names) {
    std::vector<bool> used(waivers.size(), false);
    for (Finding& f : findings) {
        if (f.waived || f.code == FindingCode::waiver_unused) continue;
        const std::size_t k = first_match(waivers, f, names);
        if (k == waivers.size()) continue;
        f.waived = true;
        f.waiver = waivers[k].reason;
        used[k] = true;
    }
    for (std::size_t k = 0; k < waivers.size(); ++k)
        if (!used[k]) findings.push_back(unused_waiver(waivers[k]));
}

}  // namespace mirrorcheck
