// Numbers for people: a value with an SI prefix and its unit ("24.5 MΩ", "12 mV").
// Never a SPICE suffix, where M means milli.
#pragma once

#include <string>
#include <string_view>

namespace mirrorcheck {

// Three significant digits, an SI prefix from f to T, then the unit: format_si(2.448e7, "Ω")
// gives "24.5 MΩ", format_si(-0.012, "V") gives "-12 mV". Zero prints as "0 V"; NaN and
// infinities print as "nan", "inf" and "-inf" with the unit.
std::string format_si(double value, std::string_view unit);

}  // namespace mirrorcheck
