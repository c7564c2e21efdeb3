// Applies waivers to the findings of a review. A waiver names a subject (mirror id, device
// or node) and a code, either of which may be `*`; names compare without case, as ngspice's
// do. The first waiver in file order that matches a finding takes it, so a broad waiver
// written after a narrow one does not steal the narrow one's findings. A waiver that takes
// no finding is stale (the circuit changed, or an earlier line covers it) and is reported,
// so waiver files do not silently accumulate lines that hide nothing.
#include "src/analyse/apply_waivers.hpp"

#include <cstddef>

#include <fmt/format.h>

#include "parsers/common/text.hpp"

namespace mirrorcheck {
namespace {

bool matches(const waivers::Waiver& w, const Finding& f) {
    const bool subject = w.subject == "*" || iequals(w.subject, f.mirror) || iequals(w.subject, f.subject);
    return subject && (w.code == "*" || w.code == f.code);
}

// The index of the first waiver that matches, or waivers.size().
std::size_t first_match(const waivers::Waivers& waivers, const Finding& f) {
    std::size_t k = 0;
    while (k < waivers.size() && !matches(waivers[k], f)) ++k;
    return k;
}

Finding unused_waiver(const waivers::Waiver& w) {
    const std::string where = fmt::format("{}:{}", w.where.file, w.where.line);
    return make_finding(Severity::info, "waiver-unused", "", where,
                        fmt::format("The waiver at {} (`{} {}`) waives no finding: nothing matches it, or an earlier "
                                    "waiver already covers what it matches.",
                                    where, w.subject, w.code));
}

}  // namespace

void apply_waivers(std::vector<Finding>& findings, const waivers::Waivers& waivers) {
    std::vector<bool> used(waivers.size(), false);
    for (Finding& f : findings) {
        if (f.waived || f.code == "waiver-unused") continue;
        const std::size_t k = first_match(waivers, f);
        if (k == waivers.size()) continue;
        f.waived = true;
        f.waiver = waivers[k].reason;
        used[k] = true;
    }
    for (std::size_t k = 0; k < waivers.size(); ++k)
        if (!used[k]) findings.push_back(unused_waiver(waivers[k]));
}

}  // namespace mirrorcheck
