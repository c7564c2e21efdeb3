// Case folding the way ngspice does it: ASCII only, names compared without case.
#pragma once

#include <algorithm>
#include <string>
#include <string_view>

namespace mirrorcheck {

// Without a branch (the compiler vectorises to_lower's loop): 'A'..'Z' gain 32.
inline char ascii_lower(char c) {
    return static_cast<char>(c + (static_cast<unsigned char>(c - 'A') < 26 ? 32 : 0));
}

inline bool has_upper(std::string_view text) {
    return std::any_of(text.begin(), text.end(), [](char c) { return static_cast<unsigned char>(c - 'A') < 26; });
}

inline std::string to_lower(std::string_view text) {
    std::string out(text);
    for (char& c : out) c = ascii_lower(c);
    return out;
}

inline bool iequals(std::string_view a, std::string_view b) {
    return a.size() == b.size() &&
           std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) { return ascii_lower(x) == ascii_lower(y); });
}

}  // namespace mirrorcheck
