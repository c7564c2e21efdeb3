// Fills a catalogue template ({name} placeholders, <optional clauses>) with a finding's
// values. Every number goes through parsers/common/si_format, so a finding says "86.5 mV"
// where the table says -86.5 mV.
#include "src/report/finding_text.hpp"

#include <cmath>
#include <stdexcept>

#include <fmt/format.h>

#include "parsers/common/si_format.hpp"

namespace mirrorcheck::report {
namespace {

using Names = std::map<std::string, std::string>;

const std::string& shown(const Names& names, const std::string& name) {
    auto it = names.find(name);
    return it == names.end() ? name : it->second;
}

std::string listed(const std::vector<std::string>& devices, const Names& names) {
    constexpr std::size_t most = 6;
    std::string s;
    const std::size_t n = std::min(devices.size(), most);
    for (std::size_t k = 0; k < n; ++k)
        s += (k == 0 ? "" : (k + 1 == n && devices.size() <= most) ? " and " : ", ") + shown(names, devices[k]);
    if (devices.size() > most) s += fmt::format(" and {} more", devices.size() - most);
    return s;
}

// "12 % above", "8 % below", "163 times", "1/40 of": how a value stands against the one it
// is compared with, given first/second - 1.
std::string relation(double difference) {
    if (!std::isfinite(difference)) return "unbounded against";
    if (difference > 1.0) return format_plain(difference + 1.0, 3) + " times";
    if (difference < -0.5) return "1/" + format_plain(1.0 / (difference + 1.0), 3) + " of";
    return format_percent(std::abs(difference)) + (difference >= 0 ? " above" : " below");
}

std::string number_text(double x, Unit unit) {
    switch (unit) {
        case Unit::volt:
        case Unit::ohm:
        case Unit::hertz:
            return format_si(x, to_string(unit));
        case Unit::degree:
            return fmt::format("{:.0f}°", x);
        case Unit::percent:
            return format_percent(x);
        case Unit::relation:
            return relation(x);
        case Unit::none:
            return format_plain(x, 4);
    }
    return format_plain(x, 4);
}

// Looks `name` up in the finding's values (and "cause" as the cause's sentence).
struct Filler {
    const std::vector<FindingValue>& values;
    const std::optional<Cause>* cause;
    const Names& names;

    std::optional<std::string> operator()(std::string_view name) const {
        if (name == "cause" && cause && *cause) {
            const Cause& c = **cause;
            return fill(catalogue_row(c.code).message, Filler{c.values, nullptr, names});
        }
        for (const auto& v : values)
            if (v.name == name) return value_text(v, names);
        return std::nullopt;
    }

    // `template_text` with its placeholders filled; nullopt when a value is absent.
    static std::optional<std::string> fill_optional(std::string_view template_text, const Filler& filler) {
        std::string out;
        for (std::size_t k = 0; k < template_text.size(); ++k) {
            const char c = template_text[k];
            if (c == '<') {
                const std::size_t end = template_text.find('>', k);
                if (end == std::string_view::npos) throw std::logic_error("an unclosed clause in a finding template");
                if (auto clause = fill_optional(template_text.substr(k + 1, end - k - 1), filler)) out += *clause;
                k = end;
            } else if (c == '{') {
                const std::size_t end = template_text.find('}', k);
                if (end == std::string_view::npos) throw std::logic_error("an unclosed placeholder in a finding template");
                auto value = filler(template_text.substr(k + 1, end - k - 1));
                if (!value) return std::nullopt;
                out += *value;
                k = end;
            } else {
                out += c;
            }
        }
        return out;
    }

    static std::string fill(std::string_view template_text, const Filler& filler) {
        if (auto text = fill_optional(template_text, filler)) return *text;
        throw std::logic_error(fmt::format("a finding lacks a value of its template `{}`", template_text));
    }
};

}  // namespace

std::string value_text(const FindingValue& value, const Names& names) {
    switch (value.kind) {
        case FindingValue::Kind::number:
            return number_text(value.number, value.unit);
        case FindingValue::Kind::text:
            return value.text;
        case FindingValue::Kind::devices:
            return listed(value.devices, names);
    }
    return {};
}

std::string finding_sentence(const Finding& finding, const Names& names) {
    return Filler::fill(catalogue_row(finding.code).message, Filler{finding.values, &finding.cause, names});
}

}  // namespace mirrorcheck::report
