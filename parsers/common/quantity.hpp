// Option values with SI prefixes and units, as people type them: "100mV", "0.2 V", "5%",
// "1.5kHz". Prefixes are SI (m milli, M mega, u or µ micro), not SPICE's. The unit is
// required: a bare "100" for a voltage (100 V? 100 mV?) or "10" for a tolerance (10 %? 1000
// %?) is not read at all.
#pragma once

#include <optional>
#include <string_view>

namespace mirrorcheck {

// The value in base units, or nullopt when the text is not a number, an optional SI prefix
// and `unit` (case-insensitive; `%` divides by 100 and takes no prefix).
std::optional<double> parse_quantity(std::string_view text, std::string_view unit);

// True when the text is a number with at most an SI prefix, and no unit: what
// parse_quantity refuses because the unit is missing.
bool lacks_unit(std::string_view text);

}  // namespace mirrorcheck
