// Flattening: subcircuit expansion, element interpretation, model resolution (see flatten.hpp).
#include "parsers/netlist/flatten.hpp"

#include <algorithm>
#include <array>
#include <cctype>
#include <cmath>
#include <unordered_map>
#include <unordered_set>

#include "parsers/common/text.hpp"
#include "parsers/netlist/expression.hpp"
#include "parsers/common/id_table.hpp"
#include "parsers/netlist/netlist_errors.hpp"

namespace mirrorcheck::netlist::detail {

namespace {

// One level of the hierarchy being expanded.
struct Instance {
    const SubcktDef* def = nullptr;
    const Instance* caller = nullptr;
    Scope scope;
    std::string path;                                     // "x1.x2"; empty at the top
    // The path cut where a subcircuit defined inside another starts (ngspice expands those
    // first): {"x1001_t", "x1"} names a resistor `r.x1001_t.r.x1.r1`.
    std::vector<std::string> segments;
    std::unordered_map<std::string, std::string> ports;   // port name -> the caller's net
    // The net id of each of its definition's local nodes (see Definition), once resolved.
    mutable std::vector<std::uint32_t> nets;
    std::uint32_t id = no_index;  // its FlatInstance; no_index at the top
    const LogicalLine* line = nullptr;  // its X line; none at the top
    std::size_t depth = 0;        // X lines above it
    // The `m` ngspice 39 writes onto every device line of this instance (see flatten.hpp).
    std::optional<double> forced_m;
};

// What an element line is read into: its tokens, split into positional tokens and
// name=value pairs (pointing into the tokens), and its name in lower case.
struct ElementBuffers {
    std::vector<Token> tokens;
    LineParts parts;
    std::string name;
    // A subcircuit's line only: the definition's local node each positional token names,
    // once it has been used as a node.
    std::vector<std::uint32_t> local_nodes;
    // A subcircuit's line only: each name=value pair's value when written as a plain
    // number (filled at the line's first instance).
    std::vector<std::optional<double>> named_numbers;

    void read(const LogicalLine& line) {
        tokenize(line, tokens);
        split_parts(line, tokens, 1, false, parts);
        name = to_lower(tokens.at(0).text);
    }
};

// A subcircuit's lines, read once for all its instances, and its local nodes numbered in
// the order first used, so that an instance resolves each of its nets once rather than
// once per terminal.
struct Definition {
    std::vector<ElementBuffers> lines;
    std::unordered_map<std::string, std::uint32_t> local_nodes;  // lower-case node name -> number

    std::uint32_t local_node(ElementBuffers& line, std::size_t i, std::string_view text) {
        if (line.local_nodes.size() <= i) line.local_nodes.resize(line.parts.positional.size(), IdTable::none);
        std::uint32_t& local = line.local_nodes[i];
        if (local == IdTable::none)
            local = local_nodes.try_emplace(to_lower(text), static_cast<std::uint32_t>(local_nodes.size())).first->second;
        return local;
    }
};

// An element line, read.
struct Element {
    const LogicalLine* line;
    const std::vector<Token>& tokens;
    const LineParts& parts;
    const std::string& name;  // lower case
    char letter;
    Definition* definition = nullptr;  // a subcircuit's line: the definition and the line's
    ElementBuffers* memo = nullptr;    // buffers, which keep what its instances share

    Element(const LogicalLine* l, const ElementBuffers& b)
        : line(l), tokens(b.tokens), parts(b.parts), name(b.name), letter(b.name[0]) {}
    Element(const LogicalLine* l, ElementBuffers& b, Definition& d) : Element(l, b) {
        definition = &d;
        memo = &b;
    }
    Location at(const Token& t) const { return line->locate(t.offset); }
    Location end() const { return line->locate(line->text.size()); }
    std::size_t count() const { return parts.positional.size(); }
    const Token& positional(std::size_t i) const { return *parts.positional[i]; }
    bool is_word(std::size_t i, std::string_view lower) const {
        return i < count() && positional(i).kind == TokenKind::word && iequals(positional(i).text, lower);
    }
    const NamedValue* named(std::string_view key) const {
        for (const auto& nv : parts.named)
            if (nv.name == key) return &nv;
        return nullptr;
    }
    // The line's text after the given positional token.
    std::string text_after(std::size_t i) const {
        std::size_t from = i < count() ? positional(i).end : 0;
        std::string rest(line->text.substr(std::min(from, line->text.size())));
        auto first = rest.find_first_not_of(" \t");
        return first == std::string::npos ? std::string{} : rest.substr(first);
    }
};

// A few name -> value pairs, in the order first set; setting a name again replaces its value.
template <class V>
struct SmallMap {
    std::vector<std::pair<std::string, V>> items;

    V& operator[](std::string_view key) {
        if (V* v = find(key)) return *v;
        return items.emplace_back(std::string(key), V{}).second;
    }
    V* find(std::string_view key) {
        for (auto& [name, value] : items)
            if (name == key) return &value;
        return nullptr;
    }
    const V* find(std::string_view key) const { return const_cast<SmallMap*>(this)->find(key); }
};

// The device being built from its element line, before it goes into the netlist's tables.
struct Draft {
    ElementKind kind = ElementKind::other;
    std::string name;
    std::size_t local_length = 0;
    struct Terminal {
        std::uint32_t role = 0;  // into the netlist's words
        std::string owned;       // the net's name when made here, else
        std::string_view text;   // the net's name as written in the file (or "0")
        std::uint32_t hash = 0;            // of the net, for the netlist's net index
        std::uint32_t id = IdTable::none;  // the net's id when already known (then no name)

        std::string_view net() const { return owned.empty() ? text : std::string_view(owned); }
    };
    std::vector<Terminal> terminals;
    std::uint32_t name_hash = 0;  // for the device index
    SmallMap<double> parameters;
    SmallMap<std::string> text;
    std::optional<double> value;
    std::optional<std::size_t> model;

    char letter() const { return name[name.size() - local_length]; }
};

ValueText token_value(const LogicalLine& line, const Token& t) {
    bool wrapped = t.kind == TokenKind::braced || t.kind == TokenKind::quoted;
    return {std::string(t.text), &line, t.offset + (wrapped ? 1 : 0)};
}

InputError expression_error(const ExpressionError& e, const ValueText& v) {
    switch (e.kind) {
        case ExpressionError::Kind::undefined_name: return errors::undefined_parameter(v.where(e.offset), e.detail);
        case ExpressionError::Kind::unknown_function:
            return errors::unknown_function(v.where(e.offset), e.detail, e.arguments);
        case ExpressionError::Kind::syntax: break;
    }
    return errors::bad_expression(v.where(e.offset), e.detail, v.text);
}

// A value the circuit uses: infinity or NaN (`1e400`, `{1/z}` with z = 0) is an input error.
double finite(double value, const ValueText& v) {
    if (!std::isfinite(value)) throw errors::non_finite_value(v.where(), v.text, value);
    return value;
}

double evaluate(const ValueText& v, const Scope& scope) {
    try {
        return finite(evaluate_text(v.text, scope), v);
    } catch (const ExpressionError& e) {
        throw expression_error(e, v);
    }
}

// A value that is a string (`"0001"`) or names a string parameter, for XSPICE tables.
const std::string* string_value(const ValueText& v, const Scope& scope) {
    if (v.is_string) return &v.text;
    return scope.find_text(to_lower(v.text));
}

// `.param both=or{and}`: string parameters joined, each written bare or in braces.
std::optional<std::string> concatenate_strings(const std::string& text, const Scope& scope) {
    std::string out;
    std::size_t i = 0;
    while (i < text.size()) {
        bool braced = text[i] == '{';
        std::size_t start = i + (braced ? 1 : 0);
        std::size_t end = start;
        while (end < text.size() && (std::isalnum(static_cast<unsigned char>(text[end])) || text[end] == '_')) ++end;
        if (end == start || (braced && (end >= text.size() || text[end] != '}'))) return std::nullopt;
        const std::string* piece = scope.find_text(to_lower(text.substr(start, end - start)));
        if (!piece) return std::nullopt;
        out += *piece;
        i = end + (braced ? 1 : 0);
    }
    return out;
}

// Evaluates one assignment into `scope`; false when it names something not yet defined.
bool assign(const NamedValue& nv, Scope& scope, const Scope& from) {
    if (const std::string* text = string_value(nv.value, from)) {
        scope.set_text(nv.name, *text);
        return true;
    }
    try {
        scope.set(nv.name, evaluate_text(nv.value.text, from));
        return true;
    } catch (const ExpressionError& e) {
        if (e.kind == ExpressionError::Kind::syntax) {
            if (auto joined = concatenate_strings(nv.value.text, from)) {
                scope.set_text(nv.name, *joined);
                return true;
            }
        }
        if (e.kind != ExpressionError::Kind::undefined_name) throw expression_error(e, nv.value);
        return false;
    }
}

// Why none of the pending assignments can be evaluated: a name that is defined nowhere,
// or a cycle (`a={b} b={a}`), followed from the first of them.
InputError unresolved(const std::vector<const NamedValue*>& pending, const Scope& scope) {
    std::vector<const NamedValue*> chain{pending.front()};
    for (;;) {
        const NamedValue& nv = *chain.back();
        try {
            evaluate_text(nv.value.text, scope);
        } catch (const ExpressionError& e) {
            if (e.kind != ExpressionError::Kind::undefined_name) return expression_error(e, nv.value);
            auto next = std::find_if(pending.begin(), pending.end(), [&](const NamedValue* p) { return p->name == e.detail; });
            if (next == pending.end()) return expression_error(e, nv.value);
            auto seen = std::find(chain.begin(), chain.end(), *next);
            if (seen != chain.end()) {
                std::vector<std::string> names;
                for (auto it = seen; it != chain.end(); ++it) names.push_back((*it)->name);
                names.push_back((*seen)->name);
                return errors::parameter_cycle((*seen)->value.where(), names);
            }
            chain.push_back(*next);
            continue;
        }
        return errors::undefined_parameter(nv.value.where(), nv.name);  // evaluates after all: not reached
    }
}

// Evaluates the global `.param` assignments in order, into `scope`. An assignment that
// names a parameter defined further on is retried once the others are known.
void evaluate_params(const std::vector<NamedValue>& list, Scope& scope) {
    std::vector<const NamedValue*> pending;
    for (const NamedValue& nv : list) {
        if (assign(nv, scope, scope)) std::erase_if(pending, [&](const NamedValue* p) { return p->name == nv.name; });
        else pending.push_back(&nv);
    }
    while (!pending.empty()) {
        std::size_t before = pending.size();
        std::erase_if(pending, [&](const NamedValue* p) { return assign(*p, scope, scope); });
        if (pending.size() == before) throw unresolved(pending, scope);
    }
}

void define_functions(const std::vector<FunctionDef>& functions, Scope& scope) {
    for (const FunctionDef& f : functions) {
        auto function = std::make_shared<UserFunction>();
        function->parameters = f.parameters;
        try {
            function->body = Expression::compile(f.body.text);
        } catch (const ExpressionError& e) {
            throw expression_error(e, f.body);
        }
        scope.define(f.name, std::move(function));
    }
}

std::optional<double> parameter_of(const Draft& d, std::string_view name) {
    if (const double* v = d.parameters.find(name)) return *v;
    return std::nullopt;
}

std::optional<double> find_parameter(const std::vector<NamedValue>& list, std::string_view name, const Scope& scope) {
    for (const NamedValue& nv : list)
        if (nv.name == name) return evaluate(nv.value, scope);
    return std::nullopt;
}

// The names a value's text mentions (identifiers; numbers with their suffixes skipped).
std::unordered_set<std::string> mentioned_names(const std::string& text) {
    std::unordered_set<std::string> names;
    std::size_t i = 0;
    auto word_char = [&](std::size_t k) {
        return k < text.size() && (std::isalnum(static_cast<unsigned char>(text[k])) || text[k] == '_');
    };
    while (i < text.size()) {
        const unsigned char c = static_cast<unsigned char>(text[i]);
        if (std::isalpha(c) || c == '_') {
            std::size_t start = i;
            while (word_char(i)) ++i;
            names.insert(to_lower(text.substr(start, i - start)));
        } else if (std::isdigit(c) || c == '.') {
            while (word_char(i) || (i < text.size() && text[i] == '.')) ++i;
            if (i < text.size() && (text[i] == '+' || text[i] == '-') && (text[i - 1] == 'e' || text[i - 1] == 'E')) {
                ++i;
                while (word_char(i)) ++i;
            }
        } else {
            ++i;
        }
    }
    return names;
}

// A list of assignments in ngspice's order (inpcom.c, inp_sort_params): by dependency level
// (0 for a value that names no other of the list, else one more than the deepest it
// names), in the order written within a level; of two with the same name, the later.
std::vector<const NamedValue*> by_dependency(const std::vector<NamedValue>& list) {
    std::vector<const NamedValue*> kept;
    for (std::size_t i = 0; i < list.size(); ++i) {
        bool redefined = false;
        for (std::size_t j = i + 1; j < list.size() && !redefined; ++j) redefined = list[j].name == list[i].name;
        if (!redefined) kept.push_back(&list[i]);
    }
    std::vector<std::vector<std::size_t>> depends(kept.size());
    for (std::size_t i = 0; i < kept.size(); ++i) {
        auto names = mentioned_names(kept[i]->value.text);
        for (std::size_t j = 0; j < kept.size(); ++j)
            if (j != i && names.count(kept[j]->name)) depends[i].push_back(j);
    }
    std::vector<int> level(kept.size(), -1);
    // Levels by relaxation; a cycle stops at the list's length and is reported on evaluation.
    for (std::size_t round = 0; round <= kept.size(); ++round) {
        bool changed = false;
        for (std::size_t i = 0; i < kept.size(); ++i) {
            int l = 0;
            for (std::size_t j : depends[i]) l = std::max(l, level[j] + 1);
            if (l != level[i] && l <= static_cast<int>(kept.size())) {
                level[i] = l;
                changed = true;
            }
        }
        if (!changed) break;
    }
    std::vector<std::size_t> order(kept.size());
    for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return level[a] < level[b]; });
    std::vector<const NamedValue*> sorted;
    for (std::size_t i : order) sorted.push_back(kept[i]);
    return sorted;
}

class Flattener {
public:
    // Each level is one C++ stack frame; no real design comes near.
    static constexpr std::size_t max_depth = 500;

    Flattener(const Deck& deck, const ReadLimits& limits) : deck_(deck), limits_(limits) {}

    FlatNetlist run() {
        Instance top;
        top.def = &deck_.top;
        if (deck_.temperature) top.scope.set("temper", *deck_.temperature);
        define_functions(deck_.top.functions, top.scope);
        collect_multiplied(deck_.top);
        // Room for every device at once: a vector that grows by doubling copies all it holds
        // and touches twice the memory. Space reserved but never written costs no memory.
        const std::size_t devices = std::min(estimate_devices(deck_.top), max_reserved_devices);
        out_.devices.reserve(devices);
        out_.terminal_table.reserve(4 * devices);
        out_.parameter_table.reserve(2 * devices);
        // The indexes' slots are written when made: a small deck that claims many devices
        // (a subcircuit bomb) does not get them all up front.
        device_names_.reserve(std::min(devices, max_reserved_names));
        nets_.reserve(std::min(devices, max_reserved_names));
        evaluate_params(deck_.top.params, top.scope);
        expand(top);
        out_.title = deck_.title;
        out_.control_blocks = deck_.control_blocks;
        out_.cards = deck_.cards;
        out_.references = deck_.references;
        out_.files = deck_.read_files;
        return std::move(out_);
    }

private:
    const Deck& deck_;
    const ReadLimits limits_;
    FlatNetlist out_;
    IdTable device_names_;  // out_.devices by name
    IdTable nets_;          // out_.nets
    IdTable words_;         // out_.words
    std::unordered_map<const char*, std::uint32_t> literal_words_;  // role_word()'s
    std::unordered_map<const std::string*, std::uint32_t> source_files_;  // into out_.source_files
    Draft draft_;           // the device being built
    ElementBuffers line_;  // the top-level line being read
    std::unordered_map<const SubcktDef*, Definition> definitions_;  // each one's lines, read
    std::unordered_map<const SubcktDef*, std::size_t> estimates_;  // devices per definition
    std::unordered_map<std::string, std::size_t> models_;  // index into out_.models, by ngspice name
    struct LastModel {
        std::uint32_t instance;
        std::string name;
        std::size_t index;
    };
    std::optional<LastModel> last_model_;  // the model the last device line named
    std::unordered_set<std::string> multiplied_;  // subcircuits that some X line gives an m

    // A reservation for a deck that would flatten to more devices is not made up front.
    static constexpr std::size_t max_reserved_devices = std::size_t{1} << 24;
    static constexpr std::size_t max_reserved_names = std::size_t{1} << 21;

    // The devices a definition flattens to, as far as its X lines name subcircuits visible
    // from it (a guess for reserving room; the flattening itself decides).
    std::size_t estimate_devices(const SubcktDef& def) {
        if (auto it = estimates_.find(&def); it != estimates_.end()) return it->second;
        estimates_[&def] = 0;  // a recursive definition counts nothing for itself
        std::size_t count = 0;
        std::vector<Token> tokens;
        LineParts parts;
        for (const LogicalLine* line : def.elements) {
            if (line->text.empty() || (line->text[0] != 'x' && line->text[0] != 'X')) {
                ++count;
                continue;
            }
            tokenize(*line, tokens);
            split_parts(*line, tokens, 1, false, parts);
            if (parts.positional.empty()) continue;
            const std::string name = to_lower(parts.positional.back()->text);
            for (const SubcktDef* d = &def; d; d = d->parent)
                if (auto it = d->subckts.find(name); it != d->subckts.end()) {
                    count += estimate_devices(*it->second);
                    break;
                }
            count = std::min(count, max_reserved_devices);
        }
        estimates_[&def] = count;
        return count;
    }

    void collect_multiplied(const SubcktDef& def) {
        for (const LogicalLine* line : def.elements) {
            if (line->text.empty() || (line->text[0] != 'x' && line->text[0] != 'X')) continue;
            line_.read(*line);
            Element el(line, line_);
            if (el.named("m") && el.count() > 0) multiplied_.insert(to_lower(el.positional(el.count() - 1).text));
        }
        for (const auto& [name, child] : def.subckts) collect_multiplied(*child);
    }

    // A subcircuit's lines are read once, for its first instance; the top level's are read
    // one at a time into buffers that keep their storage, as each is visited once.
    Definition& read_definition(const SubcktDef& def) {
        auto [it, inserted] = definitions_.try_emplace(&def);
        if (inserted) {
            std::vector<ElementBuffers> lines(def.elements.size());
            for (std::size_t i = 0; i < lines.size(); ++i) lines[i].read(*def.elements[i]);
            it->second.lines = std::move(lines);
        }
        return it->second;
    }

    void expand(const Instance& inst) {
        if (inst.def != &deck_.top) {
            Definition& definition = read_definition(*inst.def);
            std::vector<ElementBuffers>& lines = definition.lines;
            for (std::size_t i = 0; i < lines.size(); ++i) {
                Element el(inst.def->elements[i], lines[i], definition);
                if (el.letter == 'x') instantiate(inst, el);
                else add(inst, el);
            }
            return;
        }
        for (const LogicalLine* line : inst.def->elements) {
            line_.read(*line);
            Element el(line, line_);
            if (el.letter == 'x') instantiate(inst, el);
            else add(inst, el);
        }
    }

    // ---- names -------------------------------------------------------------------------

    static std::string device_name(const Instance& inst, const std::string& local) {
        std::string name;
        for (const std::string& segment : inst.segments) {
            name += local[0];
            name += '.';
            name += segment;
            name += '.';
        }
        name += local;
        return name;
    }

    std::string net_name(const Instance& inst, const Token& t) const {
        std::string node = to_lower(t.text);
        const std::string_view n = node;
        if (n == "0" || n == "gnd") return "0";
        if (!deck_.globals.empty() && deck_.globals.count(node)) return node;
        if (auto it = inst.ports.find(node); it != inst.ports.end()) return it->second;
        if (inst.path.empty()) return node;
        std::string net;
        net.reserve(inst.path.size() + 1 + node.size());
        net += inst.path;
        net += '.';
        net += node;
        return net;
    }

    const Token& node_token(const Element& el, std::size_t i, std::string_view expected) const {
        if (i >= el.count()) throw errors::missing_nodes(el.end(), el.name, expected);
        const Token& t = el.positional(i);
        if (t.kind != TokenKind::word) throw errors::netlist_syntax(el.at(t), "a node name", t.text);
        return t;
    }

    // ---- subcircuits -------------------------------------------------------------------

    const SubcktDef* find_subckt(const Instance& inst, const std::string& name) const {
        for (const Instance* i = &inst; i; i = i->caller)
            if (auto it = i->def->subckts.find(name); it != i->def->subckts.end()) return it->second.get();
        return nullptr;
    }

    void instantiate(const Instance& inst, const Element& el) {
        if (el.count() < 1) throw errors::missing_nodes(el.end(), el.name, "nodes and a subcircuit name");
        const Token& name_token = el.positional(el.count() - 1);
        if (name_token.kind != TokenKind::word)
            throw errors::netlist_syntax(el.at(name_token), "a subcircuit name", name_token.text);
        std::string subckt = to_lower(name_token.text);
        const SubcktDef* def = find_subckt(inst, subckt);
        if (!def) throw errors::unknown_subckt(el.at(name_token), subckt);
        std::size_t nodes = el.count() - 1;
        if (nodes != def->ports.size()) throw errors::wrong_node_count(el.at(name_token), el.name, def->ports.size(), nodes);
        for (const Instance* i = &inst; i; i = i->caller)
            if (i->def == def) throw errors::recursive_subckt(el.at(name_token), subckt);
        if (inst.depth >= max_depth) throw errors::hierarchy_too_deep(el.at(name_token), max_depth);

        Instance child;
        child.def = def;
        child.caller = &inst;
        child.scope = Scope(&inst.scope);
        child.path = inst.path.empty() ? el.name : inst.path + "." + el.name;
        child.segments = inst.segments;
        if (child.segments.empty() || def->parent != &deck_.top) child.segments.push_back(el.name);
        else child.segments.back() += "." + el.name;
        child.depth = inst.depth + 1;
        child.line = el.line;
        child.id = static_cast<std::uint32_t>(out_.instances.size());
        out_.instances.push_back({el.name, subckt, {el.line->file(), el.line->first_line()}, inst.id});
        for (std::size_t i = 0; i < nodes; ++i) child.ports[def->ports[i]] = net_name(inst, node_token(el, i, ""));

        define_functions(def->functions, child.scope);
        assign_instance_parameters(inst, el, subckt, child);
        expand(child);
    }

    // The X line's parameters, as ngspice 39 assigns them (inpcom.c, numparam's
    // nupa_subcktcall; checked with decks of our own): the subcircuit's formal parameters
    // are the `.subckt` line's, then the body's `.param`s, each group ordered by dependency
    // (a parameter after those its default names); the X line's value replaces a formal's
    // default, and a name that is not a formal is dropped. Values that are plain numbers are
    // assigned first, then the others in that order, each evaluated in the new instance's
    // scope: an expression on the line sees the line's own numbers (`W/nf`), the formals
    // already assigned (a default not on the line, `nf=1`), and then the caller's scope.
    // A subcircuit that declares no `m` but that some X line gives one gets a formal `m=1`.
    void assign_instance_parameters(const Instance& inst, const Element& el, const std::string& subckt,
                                    Instance& child) const {
        const SubcktDef* def = child.def;
        std::vector<const NamedValue*> formals = by_dependency(def->defaults);
        for (const NamedValue* nv : by_dependency(def->params)) formals.push_back(nv);
        const bool declares_m =
            std::any_of(formals.begin(), formals.end(), [](const NamedValue* nv) { return nv->name == "m"; });
        static const NamedValue unit_m{"m", {"1", nullptr, 0, false}};
        const bool multiplied = !declares_m && multiplied_.count(subckt);
        if (multiplied) formals.push_back(&unit_m);
        std::vector<const NamedValue*> assignments;
        for (const NamedValue* formal : formals) {
            const NamedValue* given = formal;
            for (const NamedValue& nv : el.parts.named)
                if (nv.name == formal->name) given = &nv;
            assignments.push_back(given);
        }
        std::stable_partition(assignments.begin(), assignments.end(), [](const NamedValue* nv) {
            return !nv->value.is_string && parse_spice_number(nv->value.text).has_value();
        });
        for (const NamedValue* nv : assignments)
            if (!assign(*nv, child.scope, child.scope)) evaluate(nv->value, child.scope);  // throws its error
        if (multiplied) {
            // The caller's m is written after the line's own, and wins.
            child.forced_m = inst.forced_m ? inst.forced_m : child.scope.find("m");
        }
    }

    // ---- models ------------------------------------------------------------------------

    struct ModelHome {
        const Instance* owner = nullptr;
        const ModelCard* card = nullptr;
        const std::vector<std::string>* bins = nullptr;
    };

    ModelHome find_model(const Instance& inst, const std::string& name) const {
        for (const Instance* i = &inst; i; i = i->caller) {
            if (auto it = i->def->models.find(name); it != i->def->models.end()) return {i, &it->second, nullptr};
            if (auto it = i->def->bins.find(name); it != i->def->bins.end()) return {i, nullptr, &it->second};
        }
        return {};
    }

    bool names_model(const Instance& inst, const Token& t) const {
        return t.kind == TokenKind::word && find_model(inst, to_lower(t.text)).owner != nullptr;
    }

    std::size_t resolve_model(const Instance& inst, const Element& el, const Token& t, const Draft& device) {
        std::string name = to_lower(t.text);
        // Neighbouring lines mostly name the same model in the same instance.
        if (last_model_ && last_model_->instance == inst.id && last_model_->name == name) return last_model_->index;
        ModelHome home = find_model(inst, name);
        if (!home.owner) throw errors::unknown_model(el.at(t), name);
        if (home.bins) home.card = choose_bin(*home.owner, el, t, name, *home.bins, device);
        std::string ngspice_name;
        for (const std::string& segment : home.owner->segments) ngspice_name += segment + ":";
        ngspice_name += home.card->name;
        auto [it, inserted] = models_.try_emplace(ngspice_name, out_.models.size());
        if (inserted) out_.models.push_back(evaluate_model(*home.card, home.owner->scope, name, ngspice_name));
        if (home.bins) last_model_.reset();  // a binned model depends on the device's size
        else last_model_ = LastModel{inst.id, name, it->second};
        return it->second;
    }

    const ModelCard* choose_bin(const Instance& owner, const Element& el, const Token& t, const std::string& name,
                                const std::vector<std::string>& bins, const Draft& device) {
        auto l = parameter_of(device, "l");
        auto w = parameter_of(device, "w");
        if (!l || !w) throw errors::unknown_model(el.at(t), name);
        double width = *w;
        if (deck_.divide_width_by_nf)
            if (auto nf = parameter_of(device, "nf"); nf && *nf > 0) width /= *nf;
        // ngspice 39: the first bin, in the order of definition, whose closed ranges hold l
        // and w within 1 nm.
        constexpr double tolerance = 1e-9;
        for (const std::string& bin : bins) {
            const ModelCard& card = owner.def->models.at(bin);
            auto limit = [&](std::string_view key, double fallback) {
                return find_parameter(card.parameters, key, owner.scope).value_or(fallback);
            };
            auto inside = [&](double x, std::string_view low, std::string_view high) {
                return x >= limit(low, 0) - tolerance && x <= limit(high, 1e300) + tolerance;
            };
            if (inside(*l, "lmin", "lmax") && inside(width, "wmin", "wmax")) return &card;
        }
        throw errors::no_model_bin(el.at(t), name, *l, width);
    }

    static FlatModel evaluate_model(const ModelCard& card, const Scope& scope, const std::string& name,
                                    const std::string& ngspice_name) {
        FlatModel flat;
        FlatModel* model = &flat;
        model->name = name;
        model->ngspice_name = ngspice_name;
        model->type = card.type;
        model->source = {card.line->file(), card.line->first_line()};
        for (const NamedValue& nv : card.parameters) {
            if (const std::string* text = string_value(nv.value, scope)) {
                model->text[nv.name] = *text;
                continue;
            }
            try {
                model->parameters[nv.name] = finite(evaluate_text(nv.value.text, scope), nv.value);
            } catch (const ExpressionError& e) {
                // `version=4.8.2`, `type=n`: not numbers, kept as written.
                if (e.kind != ExpressionError::Kind::syntax) throw expression_error(e, nv.value);
                model->text[nv.name] = nv.value.text;
            }
        }
        if (auto it = model->parameters.find("level"); it != model->parameters.end()) model->level = it->second;
        if (auto it = model->parameters.find("version"); it != model->parameters.end()) model->version = it->second;
        if (auto it = model->text.find("version"); it != model->text.end())
            if (auto v = parse_spice_number(it->second.substr(0, it->second.find('.', it->second.find('.') + 1))))
                model->version = *v;
        return flat;
    }

    // ---- devices -----------------------------------------------------------------------

    Draft& start_device(const Instance& inst, const Element& el, ElementKind kind) {
        Draft& d = draft_;
        d.kind = kind;
        d.name = device_name(inst, el.name);
        d.name_hash = device_names_.prefetch(d.name);
        d.local_length = el.name.size();
        d.terminals.clear();
        d.parameters.items.clear();
        d.text.items.clear();
        d.value.reset();
        d.model.reset();
        return d;
    }

    // A terminal's role as a word of the netlist: most are written in this file, and those
    // are looked up by address.
    std::uint32_t role_word(const char* literal) {
        auto [it, inserted] = literal_words_.try_emplace(literal, 0);
        if (inserted) it->second = intern(words_, out_.words, literal);
        return it->second;
    }
    std::uint32_t role_word(const std::string& text) { return intern(words_, out_.words, text); }

    void add_terminal(Draft& d, std::uint32_t role, std::string net) const {
        const std::uint32_t hash = nets_.prefetch(net);
        d.terminals.push_back({role, std::move(net), {}, hash});
    }

    // A terminal on the net that the element's positional token `i` names. In a
    // subcircuit's line the net is the instance's for that local node, resolved the first
    // time the instance uses the node; a top-level line's nets are looked up at commit().
    void add_node(Draft& d, std::uint32_t role, const Instance& inst, const Element& el, std::size_t i,
                  std::string_view expected) {
        const Token& t = node_token(el, i, expected);
        if (!el.definition) {
            // A top-level node written in lower case is its net's name (see net_name()), and
            // the file's bytes outlive the flattening: no copy of it is made.
            const std::string_view text = t.text;
            if (inst.path.empty() && inst.ports.empty() && !has_upper(text)) {
                const std::string_view net = text == "gnd" ? std::string_view("0") : text;
                d.terminals.push_back({role, {}, net, nets_.prefetch(net)});
                return;
            }
            return add_terminal(d, role, net_name(inst, t));
        }
        const std::uint32_t local = el.definition->local_node(*el.memo, i, t.text);
        if (inst.nets.size() <= local) inst.nets.resize(local + 1, IdTable::none);
        std::uint32_t& id = inst.nets[local];
        if (id == IdTable::none) {
            const std::string net = net_name(inst, t);
            id = intern_net(net, nets_.prefetch(net));
        }
        d.terminals.push_back({role, {}, {}, 0, id});
    }

    void connect(const Instance& inst, const Element& el, Draft& d, std::size_t first,
                 std::initializer_list<const char*> roles, std::string_view expected) {
        std::size_t i = first;
        for (const char* role : roles) add_node(d, role_word(role), inst, el, i++, expected);
    }

    void connect_n(const Instance& inst, const Element& el, Draft& d, std::size_t count,
                   const std::array<const char*, 6>& roles) {
        for (std::size_t i = 0; i < count; ++i) add_node(d, role_word(roles[i]), inst, el, i, "");
    }

    double value_at(const Instance& inst, const Element& el, std::size_t i) const {
        const Token& t = el.positional(i);
        if (!t.is_value()) throw errors::netlist_syntax(el.at(t), "a value", t.text);
        return evaluate(token_value(*el.line, t), inst.scope);
    }

    void named_parameters(const Instance& inst, const Element& el, Draft& d) const {
        if (!el.memo) {
            for (const NamedValue& nv : el.parts.named) d.parameters[nv.name] = evaluate(nv.value, inst.scope);
            return;
        }
        // A subcircuit's line: a value written as a plain number is the same in every
        // instance, and is read once.
        std::vector<std::optional<double>>& numbers = el.memo->named_numbers;
        if (numbers.empty()) {
            for (const NamedValue& nv : el.parts.named) {
                numbers.push_back(parse_spice_number(nv.value.text));
                if (numbers.back()) finite(*numbers.back(), nv.value);
            }
        }
        for (std::size_t k = 0; k < el.parts.named.size(); ++k) {
            const NamedValue& nv = el.parts.named[k];
            d.parameters[nv.name] = numbers[k] ? *numbers[k] : evaluate(nv.value, inst.scope);
        }
    }

    static void apply_multiplier(const Instance& inst, Draft& d) {
        static constexpr std::string_view takes_m = "rcldqjigfm";
        if (inst.forced_m && takes_m.find(d.letter()) != std::string_view::npos) d.parameters["m"] = *inst.forced_m;
    }

    void add(const Instance& inst, const Element& el) {
        build(inst, el);
        apply_multiplier(inst, draft_);
        commit(inst, el, draft_);
    }

    std::uint32_t intern(IdTable& table, std::vector<std::string>& values, std::string_view text) {
        const auto next = static_cast<std::uint32_t>(values.size());
        const std::uint32_t id = table.insert(text, next, [&](std::uint32_t i) -> std::string_view { return values[i]; });
        if (id == next) values.emplace_back(text);
        return id;
    }

    std::uint32_t intern_net(std::string_view net, std::uint32_t hash) {
        const auto next = static_cast<std::uint32_t>(out_.nets.size());
        const std::uint32_t id =
            nets_.insert_hashed(net, hash, next, [&](std::uint32_t i) -> std::string_view { return out_.nets[i]; });
        if (id == next) out_.nets.emplace_back(net);
        return id;
    }

    std::uint32_t source_file(const std::string& file) {
        auto [it, inserted] = source_files_.try_emplace(&file, static_cast<std::uint32_t>(out_.source_files.size()));
        if (inserted) out_.source_files.push_back(file);
        return it->second;
    }

    // Moves the draft into the netlist's tables.
    void commit(const Instance& inst, const Element& el, Draft& d) {
        if (out_.devices.size() >= limits_.max_devices) {
            // Named at the outermost X line that leads here: the one to look at.
            const Instance* outer = &inst;
            while (outer->caller && outer->caller->caller) outer = outer->caller;
            const Location where = outer->line ? outer->line->locate(0) : el.line->locate(0);
            throw errors::too_many_devices(where, limits_.max_devices);
        }
        const auto index = static_cast<std::uint32_t>(out_.devices.size());
        if (device_names_.insert_hashed(d.name, d.name_hash, index,
                                        [&](std::uint32_t i) -> std::string_view { return out_.devices[i].name; }) != index)
            throw errors::duplicate_device(el.line->locate(0), d.name);
        FlatDevice& f = out_.devices.emplace_back();
        f.kind = d.kind;
        f.name = std::move(d.name);
        f.local_length = static_cast<std::uint32_t>(d.local_length);
        f.instance = inst.id;
        if (d.model) f.model = static_cast<std::uint32_t>(*d.model);
        f.file = source_file(el.line->file());
        f.line = static_cast<std::uint32_t>(el.line->first_line());
        f.value = d.value;
        f.terminals = {static_cast<std::uint32_t>(out_.terminal_table.size()), static_cast<std::uint32_t>(d.terminals.size())};
        for (const Draft::Terminal& t : d.terminals)
            out_.terminal_table.push_back(
                {t.role, t.id != IdTable::none ? t.id : intern_net(t.net(), t.hash)});
        f.parameters = {static_cast<std::uint32_t>(out_.parameter_table.size()),
                        static_cast<std::uint32_t>(d.parameters.items.size())};
        for (const auto& [name, value] : d.parameters.items)
            out_.parameter_table.push_back({intern(words_, out_.words, name), value});
        f.texts = {static_cast<std::uint32_t>(out_.text_table.size()), static_cast<std::uint32_t>(d.text.items.size())};
        for (auto& [key, text] : d.text.items) out_.text_table.push_back({key, std::move(text)});
    }

    void build(const Instance& inst, const Element& el) {
        switch (el.letter) {
            case 'r': return passive(inst, el, ElementKind::resistor, {"r", "resistance"});
            case 'c': return passive(inst, el, ElementKind::capacitor, {"c", "capacitance"});
            case 'l': return passive(inst, el, ElementKind::inductor, {"l", "inductance"});
            case 'v': return source(inst, el, ElementKind::vsource);
            case 'i': return source(inst, el, ElementKind::isource);
            case 'e': return voltage_controlled(inst, el, ElementKind::vcvs);
            case 'g': return voltage_controlled(inst, el, ElementKind::vccs);
            case 'f': return current_controlled(inst, el, ElementKind::cccs);
            case 'h': return current_controlled(inst, el, ElementKind::ccvs);
            case 'b': return behavioural(inst, el);
            case 'k': return coupling(inst, el);
            case 'd': return with_model(inst, el, ElementKind::diode, {"anode", "cathode"});
            case 'j': return with_model(inst, el, ElementKind::jfet, {"d", "g", "s"});
            case 'z': return with_model(inst, el, ElementKind::other, {"d", "g", "s"});
            case 's': return with_model(inst, el, ElementKind::other, {"pos", "neg", "cpos", "cneg"});
            case 'm': return transistor(inst, el, ElementKind::mosfet, {3, 4, 5, 6}, {"d", "g", "s", "b", "n5", "n6"});
            case 'q': return transistor(inst, el, ElementKind::bjt, {3, 4, 5}, {"c", "b", "e", "s", "t", ""});
            case 'n': return transistor(inst, el, ElementKind::other, {2, 3, 4, 5, 6}, {"n1", "n2", "n3", "n4", "n5", "n6"});
            case 'w': return current_switch(inst, el);
            case 't':
            case 'o':
            case 'y': return opaque(inst, el, {"pos1", "neg1", "pos2", "neg2"});
            case 'u': return opaque(inst, el, {"pos", "neg", "ref"});
            case 'a': return xspice(inst, el);
            default: throw errors::unsupported_element(el.line->locate(0), el.name);
        }
    }

    void passive(const Instance& inst, const Element& el, ElementKind kind, std::array<const char*, 2> value_keys) {
        Draft& d = start_device(inst, el, kind);
        connect(inst, el, d, 0, {"pos", "neg"}, "two nodes");
        std::size_t i = 2;
        if (i < el.count() && names_model(inst, el.positional(i))) {
            ++i;
        } else if (i < el.count() && el.positional(i).is_value()) {
            main_value(token_value(*el.line, el.positional(i++)), inst, d);
            if (i < el.count() && names_model(inst, el.positional(i))) ++i;
        } else if (i < el.count()) {
            throw errors::netlist_syntax(el.at(el.positional(i)), "a value or a model name", el.positional(i).text);
        }
        for (const NamedValue& nv : el.parts.named) {
            if (std::find(value_keys.begin(), value_keys.end(), nv.name) != value_keys.end()) main_value(nv.value, inst, d);
            else d.parameters[nv.name] = evaluate(nv.value, inst.scope);
        }
        for (std::size_t m = 2; m < i; ++m)
            if (names_model(inst, el.positional(m))) d.model = resolve_model(inst, el, el.positional(m), d);
    }

    // A value that reads node voltages or currents (`r={v(x)}`) makes the element nonlinear:
    // it is recorded as an expression, as for B sources.
    void main_value(const ValueText& v, const Instance& inst, Draft& d) const {
        try {
            Expression e = Expression::compile(v.text);
            if (e.reads_circuit()) d.text["expression"] = v.text;
            else d.value = finite(e.evaluate(inst.scope), v);
        } catch (const ExpressionError& e) {
            throw expression_error(e, v);
        }
    }

    static bool is_transient_function(std::string_view word) {
        static constexpr std::array<std::string_view, 10> names{"pulse", "sin", "exp", "pwl", "sffm", "am", "trnoise",
                                                                "trrandom", "distof1", "distof2"};
        return std::find(names.begin(), names.end(), word) != names.end();
    }

    void source(const Instance& inst, const Element& el, ElementKind kind) {
        Draft& d = start_device(inst, el, kind);
        connect(inst, el, d, 0, {"pos", "neg"}, "two nodes");
        std::size_t i = 2;
        auto is_value = [&](std::size_t k) { return k < el.count() && el.positional(k).is_value(); };
        while (i < el.count()) {
            const Token& t = el.positional(i);
            std::string word = t.kind == TokenKind::word ? to_lower(t.text) : std::string{};
            if (word == "dc") {
                if (!is_value(i + 1)) throw errors::netlist_syntax(el.end(), "a value after `dc`", "");
                d.value = value_at(inst, el, i + 1);
                i += 2;
            } else if (word == "ac") {
                d.parameters["acmag"] = is_value(i + 1) && !is_transient_function(to_lower(el.positional(i + 1).text))
                                            ? value_at(inst, el, ++i)
                                            : 1.0;
                ++i;
                if (is_value(i) && !is_transient_function(to_lower(el.positional(i).text)) &&
                    to_lower(el.positional(i).text) != "dc")
                    d.parameters["acphase"] = value_at(inst, el, i++);
            } else if (is_transient_function(word)) {
                std::size_t j = i + 1;
                if (j < el.count() && el.positional(j).is('(')) {
                    int depth = 0;
                    for (; j < el.count(); ++j) {
                        if (el.positional(j).is('(')) ++depth;
                        if (el.positional(j).is(')') && --depth == 0) break;
                    }
                    if (j == el.count()) throw errors::unbalanced(el.at(el.positional(i + 1)), '(');
                    ++j;
                } else {
                    while (j < el.count() && el.positional(j).is_value() && !el.is_word(j, "dc") && !el.is_word(j, "ac"))
                        ++j;
                }
                std::size_t begin = t.offset;
                std::size_t end = el.positional(j - 1).end;
                d.text["transient"] = el.line->text.substr(begin, end - begin);
                i = j;
            } else if (t.is_value() && !d.value) {
                d.value = value_at(inst, el, i++);
            } else {
                throw errors::netlist_syntax(el.at(t), "`dc`, `ac`, a value or a transient function", t.text);
            }
        }
        named_parameters(inst, el, d);
        if (const double* dc = d.parameters.find("dc"); dc && !d.value) d.value = *dc;
        if (d.value) d.parameters["dc"] = *d.value;
    }

    // Reads `poly ( n )` at positional i; returns n and moves i past it.
    std::size_t poly_dimension(const Instance& inst, const Element& el, std::size_t& i) const {
        if (i + 3 >= el.count() || !el.positional(i + 1).is('(') || !el.positional(i + 3).is(')'))
            throw errors::netlist_syntax(el.at(el.positional(i)), "`poly(n)`", el.positional(i).text);
        double n = value_at(inst, el, i + 2);
        if (n < 1 || n > 64 || n != static_cast<int>(n))
            throw errors::netlist_syntax(el.at(el.positional(i + 2)), "a whole number of dimensions in `poly(n)`",
                                         el.positional(i + 2).text);
        i += 4;
        return static_cast<std::size_t>(n);
    }

    void voltage_controlled(const Instance& inst, const Element& el, ElementKind kind) {
        Draft& d = start_device(inst, el, kind);
        connect(inst, el, d, 0, {"pos", "neg"}, "two output nodes");
        static const std::unordered_set<std::string> keywords{"value", "vol", "cur", "table", "laplace", "freq",
                                                              "and", "or", "nand", "nor"};
        std::size_t i = 2;
        std::string word = i < el.count() ? to_lower(el.positional(i).text) : std::string{};
        bool behavioural = el.named("value") || el.named("vol") || el.named("cur") ||
                           (i < el.count() && el.positional(i).kind == TokenKind::word && keywords.count(word));
        if (el.is_word(i, "poly")) {
            std::size_t n = poly_dimension(inst, el, i);
            for (std::size_t k = 0; k < n; ++k) {
                add_node(d, role_word("cpos" + std::to_string(k + 1)), inst, el, i++, "control nodes");
                add_node(d, role_word("cneg" + std::to_string(k + 1)), inst, el, i++, "control nodes");
            }
            d.text["polynomial"] = el.text_after(i - 1);
        } else if (behavioural) {
            d.text["expression"] = el.text_after(1);
        } else {
            connect(inst, el, d, 2, {"cpos", "cneg"}, "two output and two control nodes, then the gain");
            if (el.count() < 5) throw errors::missing_nodes(el.end(), el.name, "a gain after the four nodes");
            d.value = value_at(inst, el, 4);
            named_parameters(inst, el, d);
        }
    }

    void current_controlled(const Instance& inst, const Element& el, ElementKind kind) {
        Draft& d = start_device(inst, el, kind);
        connect(inst, el, d, 0, {"pos", "neg"}, "two output nodes");
        std::size_t i = 2;
        std::size_t controls = 1;
        bool poly = el.is_word(i, "poly");
        if (poly) controls = poly_dimension(inst, el, i);
        for (std::size_t k = 0; k < controls; ++k) {
            const Token& t = node_token(el, i++, "the controlling voltage source");
            std::string key = controls == 1 ? "control" : "control" + std::to_string(k + 1);
            d.text[key] = device_name(inst, to_lower(t.text));
        }
        if (poly) {
            d.text["polynomial"] = el.text_after(i - 1);
        } else {
            if (i >= el.count()) throw errors::missing_nodes(el.end(), el.name, "a gain after the controlling source");
            d.value = value_at(inst, el, i);
            named_parameters(inst, el, d);
        }
    }

    void behavioural(const Instance& inst, const Element& el) {
        Draft& d = start_device(inst, el, ElementKind::behavioural);
        connect(inst, el, d, 0, {"pos", "neg"}, "two nodes");
        d.text["expression"] = el.text_after(1);
    }

    void coupling(const Instance& inst, const Element& el) {
        Draft& d = start_device(inst, el, ElementKind::coupling);
        for (std::size_t k = 0; k < 2; ++k) {
            const Token& t = node_token(el, k, "two inductor names and a coupling factor");
            d.text["inductor" + std::to_string(k + 1)] = device_name(inst, to_lower(t.text));
        }
        if (el.count() < 3) throw errors::missing_nodes(el.end(), el.name, "a coupling factor after the inductors");
        d.value = value_at(inst, el, 2);
    }

    void with_model(const Instance& inst, const Element& el, ElementKind kind, std::initializer_list<const char*> roles) {
        Draft& d = start_device(inst, el, kind);
        connect(inst, el, d, 0, roles, "nodes and a model name");
        std::size_t i = roles.size();
        if (i >= el.count()) throw errors::missing_nodes(el.end(), el.name, "a model name after the nodes");
        const Token& model = el.positional(i);
        if (kind != ElementKind::other && i + 1 < el.count() && el.positional(i + 1).is_value() &&
            parse_spice_number(el.positional(i + 1).text))
            d.parameters["area"] = value_at(inst, el, i + 1);
        named_parameters(inst, el, d);
        d.model = resolve_model(inst, el, model, d);
    }

    void transistor(const Instance& inst, const Element& el, ElementKind kind, std::initializer_list<std::size_t> counts,
                      const std::array<const char*, 6>& roles) {
        Draft& d = start_device(inst, el, kind);
        std::size_t nodes = 0;
        for (std::size_t n : counts)
            if (n < el.count() && names_model(inst, el.positional(n))) {
                nodes = n;
                break;
            }
        if (nodes == 0) {
            std::size_t usual = *(counts.begin() + (kind == ElementKind::mosfet ? 1 : 0));
            if (usual >= el.count()) throw errors::missing_nodes(el.end(), el.name, "nodes and a model name");
            throw errors::unknown_model(el.at(el.positional(usual)), to_lower(el.positional(usual).text));
        }
        connect_n(inst, el, d, nodes, roles);
        if (nodes + 1 < el.count() && el.positional(nodes + 1).is_value() && parse_spice_number(el.positional(nodes + 1).text))
            d.parameters["area"] = value_at(inst, el, nodes + 1);
        named_parameters(inst, el, d);
        if (kind == ElementKind::mosfet) scale_geometry(d);
        d.model = resolve_model(inst, el, el.positional(nodes), d);
    }

    void scale_geometry(Draft& d) const {
        if (deck_.scale == 1) return;
        for (const char* key : {"w", "l", "pd", "ps"})
            if (double* v = d.parameters.find(key)) *v *= deck_.scale;
        for (const char* key : {"ad", "as"})
            if (double* v = d.parameters.find(key)) *v *= deck_.scale * deck_.scale;
    }

    void current_switch(const Instance& inst, const Element& el) {
        Draft& d = start_device(inst, el, ElementKind::other);
        connect(inst, el, d, 0, {"pos", "neg"}, "two nodes, the controlling source and a model");
        const Token& control = node_token(el, 2, "the controlling voltage source");
        d.text["control"] = device_name(inst, to_lower(control.text));
        if (el.count() < 4) throw errors::missing_nodes(el.end(), el.name, "a model name after the controlling source");
        d.model = resolve_model(inst, el, el.positional(3), d);
    }

    void opaque(const Instance& inst, const Element& el, std::initializer_list<const char*> roles) {
        Draft& d = start_device(inst, el, ElementKind::other);
        connect(inst, el, d, 0, roles, std::to_string(roles.size()) + " nodes");
        d.text["line"] = el.text_after(roles.size() - 1);
    }

    // XSPICE `A` devices: nodes (possibly in [ ] vectors, with %v %d ... modifiers) and a
    // model last. The nets are kept; the connection semantics are not interpreted.
    void xspice(const Instance& inst, const Element& el) {
        Draft& d = start_device(inst, el, ElementKind::other);
        if (el.count() < 2) throw errors::missing_nodes(el.end(), el.name, "connections and a model name");
        std::size_t port = 0;
        for (std::size_t i = 0; i + 1 < el.count(); ++i) {
            const Token& t = el.positional(i);
            if (t.kind != TokenKind::word || t.text[0] == '%' || t.text[0] == '~') continue;
            std::string node = to_lower(t.text);
            if (node == "null") continue;
            add_terminal(d, role_word("n" + std::to_string(++port)), net_name(inst, t));
        }
        const Token& model = el.positional(el.count() - 1);
        if (names_model(inst, model)) d.model = resolve_model(inst, el, model, d);
        d.text["line"] = el.text_after(0);
    }
};

}  // namespace

FlatNetlist flatten(const Deck& deck, const ReadLimits& limits) { return Flattener(deck, limits).run(); }

}  // namespace mirrorcheck::netlist::detail
