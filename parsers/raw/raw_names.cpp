// ngspice's spellings of one vector: node voltages with or without `v(...)`, branch
// currents as `i(vsrc)` (raw files) or `vsrc#branch` (print), device parameters with or
// without the unit wrapper (`i(@m1[id])`, `v(@m1[vds])`, `@m1[gm]`), all case-insensitive.
#include <algorithm>
#include <cctype>

#include "parsers/common/text.hpp"
#include "parsers/raw/raw.hpp"

namespace mirrorcheck::raw {
namespace {

// `v(x)` -> `x`; returns nullopt when `s` is not wrapped as `<letter>(...)`. A wrapper
// with a comma (`v(a,b)`, a differential voltage) is not unwrapped.
std::optional<std::string> unwrap(const std::string& s, char letter) {
    if (s.size() < 4 || s[0] != letter || s[1] != '(' || s.back() != ')') return std::nullopt;
    std::string inner = s.substr(2, s.size() - 3);
    if (inner.find(',') != std::string::npos) return std::nullopt;
    return inner;
}

}  // namespace

std::string canonical_vector_name(std::string_view name) {
    std::string s = to_lower(name);
    if (auto inner = unwrap(s, 'v')) return *inner;
    if (auto inner = unwrap(s, 'i')) return (*inner)[0] == '@' ? *inner : *inner + "#branch";
    return s;
}

std::optional<std::size_t> Plot::find(std::string_view name) const {
    const std::uint32_t i = index_.find(canonical_vector_name(name), [&](std::uint32_t k) {
        return canonical_vector_name(variables[k].name);
    });
    if (i == IdTable::none) return std::nullopt;
    return i;
}

Location value_location(const RawFile& file, const Plot& plot, std::size_t variable, std::size_t point) {
    if (plot.encoding == Encoding::ascii) return Location(file.path);
    const std::uint64_t size = plot.complex ? 16 : 8;
    return Location::at_byte(file.path, plot.data_offset + (point * plot.variables.size() + variable) * size);
}

std::string Plot::kind() const {
    static const std::pair<std::string_view, std::string_view> kinds[] = {
        {"operating point", "op"}, {"ac analysis", "ac"},    {"transfer function", "tf"},
        {"dc transfer", "dc"},     {"transient", "tran"},    {"noise", "noise"},
        {"integrated noise", "noise"}, {"sensitivity", "sens"}, {"ac sensitivity", "sens"},
        {"pole-zero", "pz"}};
    const std::string n = to_lower(name);
    for (auto [prefix, kind] : kinds)
        if (n.starts_with(prefix)) return std::string(kind);
    return {};
}

}  // namespace mirrorcheck::raw
