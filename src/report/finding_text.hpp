// Findings for people: the one place a finding record becomes a sentence.
#pragma once

#include <string>

#include "src/analyse/review_tree.hpp"

namespace mirrorcheck::report {

// The finding's catalogue template with its values filled in: numbers with an SI prefix and
// their unit ("86.5 mV", "6.39 kΩ"), percentages, relations ("163 times"), devices by the
// designer's names (`names`: ReviewTree::display_names), and its cause's own sentence in
// place of {cause}. A clause in <angle brackets> is left out when one of its values is
// absent. Throws std::logic_error when the finding lacks a value its template needs (a bug
// in the pass that made it).
std::string finding_sentence(const Finding& finding, const std::map<std::string, std::string>& names);

// One value as the sentence shows it.
std::string value_text(const FindingValue& value, const std::map<std::string, std::string>& names);

}  // namespace mirrorcheck::report
