// Parameter expressions: compile with the X3 grammar, evaluate the stack program.
#include "parsers/netlist/expression.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <numbers>

#include "parsers/netlist/netlist_grammar.hpp"

namespace mirrorcheck::netlist::detail {

std::optional<double> Scope::find(const std::string& name) const {
    for (const Scope* s = this; s; s = s->parent_) {
        auto it = s->values_.find(name);
        if (it != s->values_.end()) return it->second;
    }
    return std::nullopt;
}

const std::string* Scope::find_text(const std::string& name) const {
    for (const Scope* s = this; s; s = s->parent_) {
        auto it = s->texts_.find(name);
        if (it != s->texts_.end()) return &it->second;
    }
    return nullptr;
}

const UserFunction* Scope::find_function(const std::string& name) const {
    for (const Scope* s = this; s; s = s->parent_) {
        auto it = s->functions_.find(name);
        if (it != s->functions_.end()) return it->second.get();
    }
    return nullptr;
}

namespace {

namespace x3 = boost::spirit::x3;

std::string describe(const std::string& which) {
    if (which.size() == 3 && which.front() == '\'' && which.back() == '\'') return "`" + which.substr(1, 1) + "`";
    return which;
}

double nominal_or(const std::vector<double>& a, std::size_t count, double fallback) {
    return a.size() >= count ? a[0] : fallback;
}

// Returns nullopt for a name/arity this evaluator does not know.
std::optional<double> call_function(const std::string& name, const std::vector<double>& a) {
    const std::size_t n = a.size();
    if (n == 1) {
        double x = a[0];
        if (name == "sqrt") return std::sqrt(x);
        if (name == "exp") return std::exp(x);
        if (name == "log" || name == "ln") return std::log(x);
        if (name == "log10") return std::log10(x);
        if (name == "abs") return std::fabs(x);
        if (name == "sin") return std::sin(x);
        if (name == "cos") return std::cos(x);
        if (name == "tan") return std::tan(x);
        if (name == "asin") return std::asin(x);
        if (name == "acos") return std::acos(x);
        if (name == "atan" || name == "arctan") return std::atan(x);
        if (name == "asinh") return std::asinh(x);
        if (name == "acosh") return std::acosh(x);
        if (name == "atanh") return std::atanh(x);
        if (name == "sqr") return x * x;
        if (name == "sinh") return std::sinh(x);
        if (name == "cosh") return std::cosh(x);
        if (name == "tanh") return std::tanh(x);
        if (name == "floor") return std::floor(x);
        if (name == "ceil") return std::ceil(x);
        if (name == "int") return std::trunc(x);
        if (name == "nint" || name == "round") return std::round(x);
        if (name == "sgn" || name == "sign") return static_cast<double>((x > 0) - (x < 0));
        if (name == "u" || name == "stp") return x > 0 ? 1.0 : 0.0;
    }
    if (n == 2) {
        if (name == "min") return std::fmin(a[0], a[1]);
        if (name == "max") return std::fmax(a[0], a[1]);
        if (name == "pow" || name == "pwr") return std::pow(a[0], a[1]);
        if (name == "atan2") return std::atan2(a[0], a[1]);
        if (name == "unif" || name == "aunif") return a[0];
    }
    if (n == 3) {
        if (name == "limit") return std::fmin(std::fmax(a[0], std::fmin(a[1], a[2])), std::fmax(a[1], a[2]));
        if (name == "ternary_fcn") return a[0] != 0 ? a[1] : a[2];
    }
    // Monte Carlo functions: the nominal value (their first argument).
    if (name == "agauss" || name == "gauss") return nominal_or(a, 2, 0);
    if (name == "aunif" || name == "unif") return nominal_or(a, 2, 0);
    return std::nullopt;
}

}  // namespace

Expression Expression::compile(std::string_view text) {
    // The grammar recurses once per open parenthesis, prefix operator, `^` and `?`; bound
    // that so that no input can exhaust the stack.
    constexpr int max_nesting = 256;
    int parentheses = 0, chained = 0;
    bool after_operand = false;
    for (std::size_t i = 0; i < text.size(); ++i) {
        char c = text[i];
        if (c == '(') ++parentheses;
        if (c == ')') --parentheses;
        if (c == '^' || c == '?' || (!after_operand && (c == '-' || c == '+' || c == '!'))) ++chained;
        if (std::isalnum(static_cast<unsigned char>(c)) || c == ')' || c == '_' || c == '.') after_operand = true;
        else if (!std::isspace(static_cast<unsigned char>(c))) after_operand = false;
        if (parentheses + chained > max_nesting)
            throw ExpressionError(ExpressionError::Kind::syntax, i, "an expression nested less than 256 deep");
    }
    grammar::ProgramBuilder builder;
    builder.begin = text.data();
    auto first = text.begin();
    auto last = text.end();
    try {
        auto parser = x3::with<grammar::builder_tag>(std::ref(builder))[grammar::expression];
        bool ok = x3::phrase_parse(first, last, parser, x3::space);
        if (!ok) throw ExpressionError(ExpressionError::Kind::syntax, 0, "a number, a name or `(`");
        if (first != last)
            throw ExpressionError(ExpressionError::Kind::syntax, static_cast<std::size_t>(first - text.begin()),
                                  "an operator or the end of the expression");
    } catch (const x3::expectation_failure<std::string_view::const_iterator>& e) {
        throw ExpressionError(ExpressionError::Kind::syntax, static_cast<std::size_t>(e.where() - text.begin()),
                              describe(e.which()));
    }
    Expression expression;
    expression.operations = std::move(builder.ops);
    return expression;
}

std::optional<double> Expression::constant() const {
    if (operations.size() == 1 && operations[0].code == Operation::Code::number) return operations[0].value;
    return std::nullopt;
}

bool Expression::reads_circuit() const {
    return std::any_of(operations.begin(), operations.end(), [](const Operation& op) {
        return op.code == Operation::Code::call && (op.name == "v" || op.name == "i");
    });
}

double Expression::evaluate(const Scope& scope, int depth) const {
    // A `.func` that calls itself would never end; no real deck nests this deep.
    constexpr int max_depth = 64;
    using Code = Operation::Code;
    std::vector<double> stack;
    stack.reserve(operations.size());
    auto pop = [&] {
        double v = stack.back();
        stack.pop_back();
        return v;
    };
    for (const Operation& op : operations) {
        switch (op.code) {
            case Code::number: stack.push_back(op.value); break;
            case Code::load: {
                if (auto v = scope.find(op.name)) stack.push_back(*v);
                else if (op.name == "pi") stack.push_back(std::numbers::pi);
                else if (op.name == "temper") stack.push_back(scope.find("temper").value_or(27.0));
                else throw ExpressionError(ExpressionError::Kind::undefined_name, op.offset, op.name);
                break;
            }
            case Code::call: {
                std::vector<double> args(stack.end() - static_cast<long>(op.arguments), stack.end());
                stack.resize(stack.size() - op.arguments);
                if (const UserFunction* f = scope.find_function(op.name); f && f->parameters.size() == args.size()) {
                    if (depth >= max_depth)
                        throw ExpressionError(ExpressionError::Kind::syntax, op.offset,
                                              "a `.func` that does not call itself without end");
                    Scope call_scope(&scope);
                    for (std::size_t k = 0; k < args.size(); ++k) call_scope.set(f->parameters[k], args[k]);
                    stack.push_back(f->body.evaluate(call_scope, depth + 1));
                    break;
                }
                auto v = call_function(op.name, args);
                if (!v) throw ExpressionError(ExpressionError::Kind::unknown_function, op.offset, op.name, op.arguments);
                stack.push_back(*v);
                break;
            }
            case Code::negate: stack.back() = -stack.back(); break;
            case Code::logical_not: stack.back() = stack.back() == 0 ? 1 : 0; break;
            case Code::select: {
                double otherwise = pop();
                double then = pop();
                double condition = pop();
                stack.push_back(condition != 0 ? then : otherwise);
                break;
            }
            default: {
                double b = pop();
                double a = pop();
                double r = 0;
                switch (op.code) {
                    case Code::add: r = a + b; break;
                    case Code::subtract: r = a - b; break;
                    case Code::multiply: r = a * b; break;
                    case Code::divide: r = a / b; break;
                    case Code::power: r = std::pow(a, b); break;
                    case Code::less: r = a < b; break;
                    case Code::less_equal: r = a <= b; break;
                    case Code::greater: r = a > b; break;
                    case Code::greater_equal: r = a >= b; break;
                    case Code::equal: r = a == b; break;
                    case Code::not_equal: r = a != b; break;
                    case Code::logical_and: r = (a != 0) && (b != 0); break;
                    case Code::logical_or: r = (a != 0) || (b != 0); break;
                    default: break;
                }
                stack.push_back(r);
            }
        }
    }
    return stack.empty() ? 0.0 : stack.back();
}

std::optional<double> parse_spice_number(std::string_view text) {
    double value = 0;
    auto first = text.begin();
    bool ok = x3::parse(first, text.end(), grammar::number, value);
    if (!ok || first != text.end()) return std::nullopt;
    return value;
}

double evaluate_text(std::string_view text, const Scope& scope) {
    if (auto v = parse_spice_number(text)) return *v;
    return Expression::compile(text).evaluate(scope);
}

}  // namespace mirrorcheck::netlist::detail
