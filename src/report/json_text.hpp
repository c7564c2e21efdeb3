// A JSON report as text: indented by two, bytes that are not UTF-8 (a name from a file
// written in another encoding) replaced by U+FFFD rather than ending in an exception.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

namespace mirrorcheck::report {

inline std::string json_text(const nlohmann::json& j) { return j.dump(2, ' ', false, nlohmann::json::error_handler_t::replace); }

}  // namespace mirrorcheck::report
