// Reader for waiver files: plain text, one waiver a line, `SUBJECT CODE REASON...`.
//
//   # a comment; blank lines are ignored
//   nmos-cascode:m4  out-of-saturation  m4 leaves saturation only while the output is in reset
//   m.x1.m2          low-margin         40 mV is enough at this corner (checked in silicon)
//   *                body-effect        every cascode here has its bulk on the rail
//
// SUBJECT is a mirror id, a device name or an output node (any case), or `*` for any;
// CODE is one of the known codes the caller passes (the finding catalogue) or `*` for any; REASON is the
// rest of the line and is required. A `#` where a field would begin starts a comment; a `#`
// inside the reason is part of it ("see issue #12"). A file with no waiver lines waives nothing.
#pragma once

#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::waivers {

struct Waiver {
    std::string subject;  // lower case, or "*" for any subject
    std::string code;     // one of the known codes, or "*" for any code
    std::string reason;   // as written, without surrounding blanks
    Location where;       // the file and line of the waiver
};

// The waivers of one or more files, in the order they were written.
using Waivers = std::vector<Waiver>;

// Reads a waiver file; never modifies it. Throws InputError with the file, line and column:
// "input.cannot-open", "waiver.binary-data", "waiver.bad-subject", "waiver.missing-code",
// "waiver.unknown-code" (the message lists the known codes) or "waiver.missing-reason".
// `known_codes` are the finding codes a waiver may name (lower case); the reader does not
// know them itself, since they belong to the passes.
Waivers read_waivers(const std::filesystem::path& path, const std::vector<std::string>& known_codes);

// The same on text already in memory; `path` is used in error messages only.
Waivers parse_waivers(std::string_view text, const std::string& path, const std::vector<std::string>& known_codes);

}  // namespace mirrorcheck::waivers
