// A finding: one thing a designer should read, with its severity, a stable code and one
// sentence saying what and why. Every pass that judges the circuit returns these.
#pragma once

#include <string>
#include <string_view>
#include <vector>

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

// One entry of the catalogue of finding codes: what the code means and what a designer
// usually does about it. Every code a pass emits is here; waiver files are checked
// against it and the README lists it.
struct FindingCode {
    std::string_view code;
    std::string_view meaning;
    std::string_view action;
};
const std::vector<FindingCode>& finding_codes();
const FindingCode* find_finding_code(std::string_view code);
// The codes alone, for readers that check names against the catalogue (waiver files).
std::vector<std::string> finding_code_names();

Finding make_finding(Severity severity, std::string code, std::string mirror, std::string subject,
                     std::string message);

// True when the finding fails a review: error severity and not waived.
bool fails_review(const Finding& finding);

}  // namespace mirrorcheck
