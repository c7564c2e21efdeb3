// A finding: one thing a designer should read, with its severity, a stable code and one
// sentence saying what and why. Every pass that judges the circuit returns these.
#pragma once

#include <string>
#include <string_view>

namespace mirrorcheck {

enum class Severity { error, warning, info };

// "error", "warning", "info".
std::string_view to_string(Severity severity);

struct Finding {
    Severity severity = Severity::info;
    std::string code;     // stable, e.g. out-of-saturation, low-margin, rout-disagrees (README lists them all)
    std::string mirror;   // Mirror::id
    std::string subject;  // the device or output node concerned
    std::string message;  // one sentence: what, the values behind it, and the likely cause
    bool waived = false;  // accepted by a waiver file; then it never fails a review
    std::string waiver;   // the waiver's reason, as written
};

Finding make_finding(Severity severity, std::string code, std::string mirror, std::string subject,
                     std::string message);

// True when the finding fails a review: error severity and not waived.
bool fails_review(const Finding& finding);

}  // namespace mirrorcheck
