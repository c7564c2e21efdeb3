// Text for XML 1.0 documents (the JUnit back ends of `review` and `sweep`): every string from
// a netlist or a waiver file is escaped, bytes XML cannot carry (control characters, invalid
// UTF-8) become U+FFFD, and names keep their hierarchy with `/` where CI viewers would split
// dots into packages.
#pragma once

#include <string>
#include <string_view>

namespace mirrorcheck::report::xml {

// Escaped for a double-quoted attribute value (tab and line ends as character references).
std::string attr(std::string_view text);
// Escaped for element content.
std::string content(std::string_view text);
// `name` with its dots written as `/` (`x1.out` becomes `x1/out`).
std::string undotted(std::string_view name);

}  // namespace mirrorcheck::report::xml
