// Private to the netlist reader: parameter expressions and SPICE numbers.
//
// An expression (`{...}`, `'...'` or a bare value) is compiled once into a small stack
// program and evaluated against a chain of parameter scopes. Numbers take SPICE scale
// suffixes (f p n u m k meg g t mil a, any case; `M` is milli) and ignore trailing unit
// letters (`10uF`, `1kOhm`, `3.3V`). Statistical functions (agauss, gauss, aunif, unif)
// return their nominal value: a reader wants the nominal circuit.
#pragma once

#include <cstddef>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

namespace mirrorcheck::netlist::detail {

struct UserFunction;

// A parameter scope: a subcircuit instance's parameters, or the global ones at the root.
// Besides numbers it holds string parameters (`.param name="text"`, for XSPICE tables)
// and `.func` definitions.
class Scope {
public:
    explicit Scope(const Scope* parent = nullptr) : parent_(parent) {}
    void set(const std::string& name, double value) { values_[name] = value; }
    void set_text(const std::string& name, std::string text) { texts_[name] = std::move(text); }
    void define(const std::string& name, std::shared_ptr<const UserFunction> function) {
        functions_[name] = std::move(function);
    }
    std::optional<double> find(const std::string& name) const;
    const std::string* find_text(const std::string& name) const;
    const UserFunction* find_function(const std::string& name) const;
    const Scope* parent() const { return parent_; }

private:
    const Scope* parent_;
    std::unordered_map<std::string, double> values_;
    std::unordered_map<std::string, std::string> texts_;
    std::unordered_map<std::string, std::shared_ptr<const UserFunction>> functions_;
};

// Why an expression failed; `offset` is within the expression's text.
struct ExpressionError : std::runtime_error {
    enum class Kind { syntax, undefined_name, unknown_function };
    ExpressionError(Kind k, std::size_t at, std::string what_, std::size_t args = 0)
        : std::runtime_error(what_), kind(k), offset(at), detail(std::move(what_)), arguments(args) {}
    Kind kind;
    std::size_t offset;
    std::string detail;  // what was expected (syntax) or the name
    std::size_t arguments;
};

struct Operation {
    enum class Code {
        number, load, call, negate, logical_not, add, subtract, multiply, divide, power,
        less, less_equal, greater, greater_equal, equal, not_equal, logical_and, logical_or, select
    };
    Code code;
    double value = 0;
    std::string name;        // load, call: lower case
    std::size_t arguments = 0;
    std::size_t offset = 0;  // load, call: where the name starts in the expression's text
};

class Expression {
public:
    // Compiles `text`; throws ExpressionError (syntax) when it is not a whole expression.
    static Expression compile(std::string_view text);
    // Throws ExpressionError (undefined_name, unknown_function).
    double evaluate(const Scope& scope) const { return evaluate(scope, 0); }
    double evaluate(const Scope& scope, int depth) const;
    // Whether it reads node voltages or branch currents (`v(a)`, `i(vdd)`): a nonlinear value.
    bool reads_circuit() const;
    // The value when the expression is a plain number.
    std::optional<double> constant() const;

    std::vector<Operation> operations;
};

// A `.func name(a, b) {expression}` definition.
struct UserFunction {
    std::vector<std::string> parameters;
    Expression body;
};

// Parses a whole token as a SPICE number (`10u`, `1e-6`, `2MEG`, `3.3V`); nullopt otherwise.
std::optional<double> parse_spice_number(std::string_view text);

// Compiles and evaluates in one step, with a fast path for plain numbers.
double evaluate_text(std::string_view text, const Scope& scope);

}  // namespace mirrorcheck::netlist::detail
