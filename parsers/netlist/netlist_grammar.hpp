// Private to the netlist reader: Spirit X3 rules for SPICE numbers and parameter expressions.
//
// Precedence, loosest first: `?:`, `||`, `&&`, `== !=`, `< <= > >=`, `+ -`, `* /`, unary
// `- + !`, `^ **` (right-associative; `-2^2` is -4), then numbers, names, calls and
// parentheses. The rules do not build a tree: their semantic actions append operations to
// a stack program held in the parse context (ProgramBuilder), in evaluation order. Every
// operator is followed by an expectation point, so no action ever runs on a branch that is
// later abandoned.
#pragma once

#include <cctype>
#include <charconv>
#include <cstdlib>
#include <system_error>
#include <string>
#include <string_view>
#include <vector>

#include <boost/spirit/home/x3.hpp>

#include "parsers/netlist/expression.hpp"

namespace mirrorcheck::netlist::detail::grammar {

namespace x3 = boost::spirit::x3;

// The scale of a SPICE suffix and unit tail (`meg`, `uF`, `kOhm`, `V`): 1 when none applies.
inline double suffix_scale(std::string_view letters) {
    auto lower = [&](std::size_t i) { return static_cast<char>(std::tolower(static_cast<unsigned char>(letters[i]))); };
    if (letters.empty()) return 1;
    if (letters.size() >= 3 && lower(0) == 'm' && lower(1) == 'e' && lower(2) == 'g') return 1e6;
    if (letters.size() >= 3 && lower(0) == 'm' && lower(1) == 'i' && lower(2) == 'l') return 25.4e-6;
    switch (lower(0)) {
        case 't': return 1e12;
        case 'g': return 1e9;
        case 'k': return 1e3;
        case 'm': return 1e-3;
        case 'u': return 1e-6;
        case 'n': return 1e-9;
        case 'p': return 1e-12;
        case 'f': return 1e-15;
        case 'a': return 1e-18;
        default: return 1;
    }
}

// `digits[.digits][e[+-]digits]` followed by letters: the mantissa then the suffix.
inline double spice_value(std::string_view text) {
    std::size_t i = 0;
    while (i < text.size() && (std::isdigit(static_cast<unsigned char>(text[i])) || text[i] == '.')) ++i;
    if (i < text.size() && (text[i] == 'e' || text[i] == 'E')) {
        std::size_t j = i + 1;
        if (j < text.size() && (text[j] == '+' || text[j] == '-')) ++j;
        if (j < text.size() && std::isdigit(static_cast<unsigned char>(text[j]))) {
            while (j < text.size() && std::isdigit(static_cast<unsigned char>(text[j]))) ++j;
            i = j;
        }
    }
    double mantissa = 0;
    if (std::from_chars(text.data(), text.data() + i, mantissa).ec == std::errc::result_out_of_range) {
        // from_chars leaves the value alone then: strtod says which way it went (infinity for
        // `1e400`, which the reader then refuses; zero or a denormal for `1e-400`).
        mantissa = std::strtod(std::string(text.substr(0, i)).c_str(), nullptr);
    }
    return mantissa * suffix_scale(text.substr(i));
}

struct OpenCall {
    std::string name;
    std::size_t offset = 0;
    std::size_t arguments = 0;
};

struct ProgramBuilder {
    std::vector<Operation> ops;
    std::vector<OpenCall> calls;  // calls whose `)` is still to come, innermost last
    const char* begin = nullptr;  // of the text, for offsets
};
struct builder_tag;

template <typename Context>
ProgramBuilder& builder(const Context& ctx) {
    return x3::get<builder_tag>(ctx).get();
}

inline auto emit(Operation::Code code) {
    return [code](auto& ctx) { builder(ctx).ops.push_back({code, 0, {}, 0, 0}); };
}

inline const auto push_number = [](auto& ctx) {
    builder(ctx).ops.push_back({Operation::Code::number, x3::_attr(ctx), {}, 0, 0});
};

inline std::string lower_copy(const std::string& s) {
    std::string out = s;
    for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return out;
}

// Names are matched with raw[] so that their own position is known.
template <typename Context, typename Range>
std::pair<std::string, std::size_t> name_at(const Context& ctx, const Range& range) {
    std::string name(range.begin(), range.end());
    return {lower_copy(name), static_cast<std::size_t>(range.begin() - builder(ctx).begin)};
}

inline const auto push_load = [](auto& ctx) {
    auto [name, at] = name_at(ctx, x3::_attr(ctx));
    builder(ctx).ops.push_back({Operation::Code::load, 0, std::move(name), 0, at});
};
inline const auto begin_call = [](auto& ctx) {
    auto [name, at] = name_at(ctx, x3::_attr(ctx));
    builder(ctx).calls.push_back({std::move(name), at, 0});
};
inline const auto count_argument = [](auto& ctx) { ++builder(ctx).calls.back().arguments; };
inline const auto end_call = [](auto& ctx) {
    ProgramBuilder& b = builder(ctx);
    OpenCall call = std::move(b.calls.back());
    b.calls.pop_back();
    b.ops.push_back({Operation::Code::call, 0, std::move(call.name), call.arguments, call.offset});
};

using Code = Operation::Code;

inline const auto mantissa =
    (+x3::digit >> -('.' >> *x3::digit) | '.' >> +x3::digit) >>
    -(x3::no_case['e'] >> -x3::char_("+-") >> +x3::digit);

inline const x3::rule<struct number_tag, double> number = "number";
inline const auto number_def = x3::raw[x3::lexeme[mantissa >> *x3::alpha]][(
    [](auto& ctx) {
        auto range = x3::_attr(ctx);
        x3::_val(ctx) = spice_value(std::string_view(&*range.begin(), static_cast<std::size_t>(range.size())));
    })];

inline const x3::rule<struct identifier_tag, std::string> identifier = "name";
inline const auto identifier_def = x3::lexeme[(x3::alpha | x3::char_('_')) >> *(x3::alnum | x3::char_('_'))];

inline const x3::rule<struct expression_tag> expression = "expression";
inline const x3::rule<struct ternary_tag> ternary = "expression";
inline const x3::rule<struct logical_or_tag> logical_or = "expression";
inline const x3::rule<struct logical_and_tag> logical_and = "expression";
inline const x3::rule<struct equality_tag> equality = "expression";
inline const x3::rule<struct relational_tag> relational = "expression";
inline const x3::rule<struct additive_tag> additive = "expression";
inline const x3::rule<struct multiplicative_tag> multiplicative = "expression";
inline const x3::rule<struct unary_tag> unary = "a value";
inline const x3::rule<struct power_tag> power = "a value";
inline const x3::rule<struct primary_tag> primary = "a number, a name, a function call or `(`";
inline const x3::rule<struct call_tag> call = "a function call";

inline const auto expression_def = ternary;
inline const auto ternary_def = logical_or >> -((x3::lit('?') > ternary > ':' > ternary)[emit(Code::select)]);
inline const auto logical_or_def = logical_and >> *((x3::lit("||") > logical_and)[emit(Code::logical_or)]);
inline const auto logical_and_def = equality >> *((x3::lit("&&") > equality)[emit(Code::logical_and)]);
inline const auto equality_def = relational >> *((x3::lit("==") > relational)[emit(Code::equal)] |
                                                 (x3::lit("!=") > relational)[emit(Code::not_equal)]);
inline const auto relational_def = additive >> *((x3::lit("<=") > additive)[emit(Code::less_equal)] |
                                                 (x3::lit(">=") > additive)[emit(Code::greater_equal)] |
                                                 (x3::lit('<') > additive)[emit(Code::less)] |
                                                 (x3::lit('>') > additive)[emit(Code::greater)]);
inline const auto additive_def = multiplicative >> *((x3::lit('+') > multiplicative)[emit(Code::add)] |
                                                     (x3::lit('-') > multiplicative)[emit(Code::subtract)]);
inline const auto multiplicative_def =
    unary >> *(((x3::lit('*') >> !x3::lit('*')) > unary)[emit(Code::multiply)] |
               (x3::lit('/') > unary)[emit(Code::divide)]);
inline const auto unary_def = (x3::lit('-') > unary)[emit(Code::negate)] | (x3::lit('+') > unary) |
                              (x3::lit('!') > unary)[emit(Code::logical_not)] | power;
inline const auto power_def = primary >> -(((x3::lit("**") | x3::lit('^')) > unary)[emit(Code::power)]);
inline const auto call_def = (x3::raw[identifier] >> x3::lit('('))[begin_call] > -(expression[count_argument] % ',') > x3::lit(')')[end_call];
inline const auto primary_def =
    number[push_number] | call | x3::raw[identifier][push_load] | (x3::lit('(') > expression > ')');

BOOST_SPIRIT_DEFINE(number, identifier, expression, ternary, logical_or, logical_and, equality, relational, additive,
                    multiplicative, unary, power, call, primary)

}  // namespace mirrorcheck::netlist::detail::grammar
