// Numbers for people: a value with an SI prefix and its unit ("24.5 MΩ", "12 mV"), plain
// numbers and percentages. Never a SPICE suffix, where M means milli; never an exponent
// where a person reads a ratio.
#pragma once

#include <string>
#include <string_view>

namespace mirrorcheck {

// Three significant digits, an SI prefix from f to T, then the unit: format_si(2.448e7, "Ω")
// gives "24.5 MΩ", format_si(-0.012, "V") gives "-12 mV". Zero prints as "0 V"; NaN and
// infinities print as "nan", "inf" and "-inf" with the unit.
std::string format_si(double value, std::string_view unit);

// `digits` significant digits without an exponent from 1e-4 up: format_plain(1.9986, 4) is
// "1.999", format_plain(17123.4, 3) is "17100".
std::string format_plain(double value, int digits);

// A fraction as a percentage, three significant digits (none after the point from 100 %):
// 0.1127 -> "11.3 %", 0.1 -> "10 %", 12.3 -> "1230 %".
std::string format_percent(double fraction);

}  // namespace mirrorcheck
