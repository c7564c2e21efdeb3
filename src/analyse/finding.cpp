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
