#include "src/analyse/finding.hpp"

#include <utility>

namespace mirrorcheck {

std::string_view to_string(Severity severity) {
    switch (severity) {
        case Severity::error:
            return "error";
        case Severity::warning:
            return "warning";
        case Severity::info:
            return "info";
    }
    return "";
}

const std::vector<FindingCode>& finding_codes() {
    static const std::vector<FindingCode> codes = {
        {"cutoff", "a transistor of the mirror carries no current",
         "check the reference current and the bias of the gate or base"},
        {"out-of-saturation", "a transistor is in triode (bipolar: saturation), so its ro collapses",
         "raise the output voltage, lower Vdsat (wider device, less current), or drop a cascode level"},
        {"low-margin", "a transistor is saturated by less than the margin asked for",
         "check the margin across corners; consider more headroom"},
        {"ratio-error", "the output current differs from the design ratio by more than the tolerance",
         "match Vds of reference and output (cascode), check base current, check geometry"},
        {"low-intrinsic-gain", "a cascode device has a small gm·ro, so the hand formula is weak",
         "read the linearised value rather than the formula"},
        {"body-effect", "body effect changes the output resistance noticeably",
         "none needed; the value with body effect is the one to use"},
        {"gmb-missing", "the op data has no gmb for some MOS devices, so body effect is neglected everywhere",
         "save @m[gmbs] for every transistor, or write the `show all` listing"},
        {"inspection-vs-linearised", "the hand formula and the exact small-signal solve disagree",
         "read the cause in the message: a loaded output, a reference that is not AC ground, or the formula's "
         "approximation"},
        {"linearised-vs-simulated", "the exact small-signal solve and the simulated impedance disagree",
         "read the cause in the message: frequency too high, a parameter missing, or a probe on the wrong node"},
        {"inspection-vs-simulated", "the hand formula and the simulated impedance disagree (no linearised value)",
         "check the topology and the probe"},
        {"not-linearised", "the exact small-signal solve could not be done for the whole circuit",
         "save the missing parameters (see the message) or accept the fallback"},
        {"not-simulated", "no probe measured this output's impedance in the simulation data",
         "add a probe source on the output (see `mirrorcheck prepare`) or name one with --probe"},
        {"waiver-unused", "a line of the waiver file matched no finding", "remove the stale waiver"},
    };
    return codes;
}

const FindingCode* find_finding_code(std::string_view code) {
    for (const auto& c : finding_codes())
        if (c.code == code) return &c;
    return nullptr;
}

std::vector<std::string> finding_code_names() {
    std::vector<std::string> names;
    for (const auto& c : finding_codes()) names.emplace_back(c.code);
    return names;
}

Finding make_finding(Severity severity, std::string code, std::string mirror, std::string subject,
                     std::string message) {
    Finding f;
    f.severity = severity;
    f.code = std::move(code);
    f.mirror = std::move(mirror);
    f.subject = std::move(subject);
    f.message = std::move(message);
    return f;
}

bool fails_review(const Finding& finding) { return finding.severity == Severity::error && !finding.waived; }

}  // namespace mirrorcheck
