#include "parsers/waivers/waiver_errors.hpp"

#include <string>

#include <fmt/format.h>


namespace mirrorcheck::errors {
namespace {

constexpr std::string_view line_shape = "expected `SUBJECT CODE REASON`";

std::string listed(const std::vector<std::string>& codes) {
    std::string list;
    for (const auto& c : codes) list += (list.empty() ? "" : ", ") + c;
    return list;
}

}  // namespace

InputError waiver_binary_data(const Location& where, unsigned char byte) {
    return {"waiver.binary-data", where,
            fmt::format("byte 0x{:02x} is not text; expected a plain-text waiver file, one `SUBJECT CODE REASON` "
                        "a line",
                        byte)};
}

InputError waiver_bad_subject(const Location& where, std::string_view subject) {
    return {"waiver.bad-subject", where,
            fmt::format("`{}` is not a subject; expected a mirror id, a device name or an output node, or `*` "
                        "alone for any subject (there are no partial patterns)",
                        subject)};
}

InputError waiver_missing_code(const Location& where, std::string_view subject, const std::vector<std::string>& known) {
    return {"waiver.missing-code", where,
            fmt::format("the waiver for `{}` ends after its subject; {}, with CODE one of: *, {}", subject,
                        line_shape, listed(known))};
}

InputError waiver_unknown_code(const Location& where, std::string_view code, const std::vector<std::string>& known) {
    return {"waiver.unknown-code", where,
            fmt::format("`{}` is not a finding code; expected `*` or one of: {}", code, listed(known))};
}

InputError waiver_missing_reason(const Location& where, std::string_view subject, std::string_view code) {
    return {"waiver.missing-reason", where,
            fmt::format("the waiver `{} {}` gives no reason; {}: say after the code why the finding is "
                        "acceptable, for whoever reads the review next",
                        subject, code, line_shape)};
}

}  // namespace mirrorcheck::errors
