// Option values with SI prefixes and units, as people type them: "100mV", "0.2 V",
// "5%", "1.5k". Prefixes are SI (m milli, M mega, u or µ micro), not SPICE's.
#pragma once

#include <optional>
#include <string_view>

namespace mirrorcheck {

// The value in base units, or nullopt when the text is not a number with an optional SI
// prefix and an optional unit equal to `unit` (case-insensitive). A trailing `%` divides
// by 100 when `unit` is "%".
std::optional<double> parse_quantity(std::string_view text, std::string_view unit);

}  // namespace mirrorcheck
