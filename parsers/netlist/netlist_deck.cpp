// Reading a deck: files, includes, library sections and definitions (see netlist_deck.hpp).
#include "parsers/netlist/netlist_deck.hpp"

#include <algorithm>
#include <cctype>
#include <optional>
#include <set>
#include <system_error>

#include "parsers/common/mapped_file.hpp"
#include "parsers/netlist/expression.hpp"
#include "parsers/netlist/netlist_errors.hpp"
#include "parsers/common/text.hpp"

namespace mirrorcheck::netlist::detail {

namespace {

bool is_bin_suffix(std::string_view s) {
    return !s.empty() && std::all_of(s.begin(), s.end(), [](char c) { return std::isdigit(static_cast<unsigned char>(c)); });
}

bool starts_named_value(const std::vector<Token>& tokens, std::size_t i) {
    return i + 1 < tokens.size() && tokens[i].kind == TokenKind::word && tokens[i + 1].is('=');
}

bool is_params_keyword(const Token& t) { return t.kind == TokenKind::word && iequals(t.text, "params:"); }

ValueText value_of(const LogicalLine& line, const std::vector<Token>& tokens, std::size_t first, std::size_t last) {
    if (last == first + 1 && tokens[first].kind != TokenKind::word && tokens[first].kind != TokenKind::punct)
        return {std::string(tokens[first].text), &line, tokens[first].offset + 1, tokens[first].kind == TokenKind::string};
    while (last > first + 1 && tokens[last - 1].is(',')) --last;
    std::size_t begin = tokens[first].offset;
    std::size_t end = tokens[last - 1].end;
    std::string text(line.text.substr(begin, end - begin));
    // A `.model name type (a=1 b=2)` card leaves the closing parenthesis on the last value.
    long depth = 0;
    for (char c : text) depth += c == '(' ? 1 : c == ')' ? -1 : 0;
    while (depth < 0 && !text.empty() && text.back() == ')') {
        text.pop_back();
        while (!text.empty() && std::isspace(static_cast<unsigned char>(text.back()))) text.pop_back();
        ++depth;
    }
    return {text, &line, begin, false};
}

std::size_t last_physical_line(const LogicalLine& line) { return line.last_line(); }

FileLine file_line(const LogicalLine& line) { return {line.file(), line.first_line()}; }

std::filesystem::path absolute_normal(const std::filesystem::path& p) {
    std::error_code ec;
    auto a = std::filesystem::absolute(p, ec);
    return (ec ? p : a).lexically_normal();
}

bool is_file(const std::filesystem::path& p) {
    std::error_code ec;
    return std::filesystem::is_regular_file(p, ec);
}

// Statements that describe no part of the circuit.
std::optional<Card::Kind> card_kind(std::string_view head) {
    static const std::set<std::string, std::less<>> analyses{".op", ".ac", ".dc", ".tran", ".tf", ".noise", ".pz",
                                                            ".sens", ".disto", ".pss", ".sp"};
    static const std::set<std::string, std::less<>> outputs{".save", ".probe", ".print", ".plot", ".meas",
                                                           ".measure", ".four", ".width"};
    if (analyses.count(head)) return Card::Kind::analysis;
    if (outputs.count(head)) return Card::Kind::output;
    if (head == ".end") return Card::Kind::end;
    return std::nullopt;
}

class DeckReader {
public:
    explicit DeckReader(Deck& deck) : deck_(deck) { stack_.push_back(&deck_.top); }

    void read_top(const std::filesystem::path& path) {
        const std::filesystem::path top = absolute_normal(path);
        working_folder_ = top.parent_path();
        const SplitFile& file = load(path, nullptr, true, ReadFile::Role::top);
        deck_.title = file.title;
        active_.push_back(canonical_key(path, ""));
        run(file, path, "", Context{ReadFile::Role::top, {}});
        active_.pop_back();
        if (control_) throw errors::unterminated_block(control_where_, ".control", ".endc");
        if (!conditionals_.empty()) throw errors::unterminated_block(conditionals_.back().where, ".if", ".endif");
        if (stack_.size() > 1)
            throw errors::unterminated_block(stack_.back()->line->locate(0), ".subckt " + stack_.back()->name, ".ends");
    }

private:
    // How the lines being read were reached: from the top file through `.include`s, or
    // through a library (whose own `.lib` references resolve against its folder).
    struct Context {
        ReadFile::Role role = ReadFile::Role::top;
        std::filesystem::path library_folder;  // for Role::library
    };

    Deck& deck_;
    std::filesystem::path working_folder_;  // the top file's folder, where ngspice runs the deck
    std::vector<SubcktDef*> stack_;
    std::vector<std::string> active_;  // files and sections being read, for cycles
    std::unordered_map<std::string, std::size_t> reads_;  // times each file and section was read
    static constexpr std::size_t max_include_depth = 100;
    static constexpr std::size_t max_reads_per_file = 1000;
    // As deep as the flattener instantiates (its max_depth); the definitions' own walks recurse.
    static constexpr std::size_t max_subckt_nesting = 500;
    // `.if` blocks: for each open one, whether a branch was taken and whether lines are read.
    struct Conditional {
        bool taken = false;
        bool reading = false;
        Location where;
    };
    std::vector<Conditional> conditionals_;
    bool control_ = false;
    Location control_where_;
    const LogicalLine* control_line_ = nullptr;
    std::string control_text_;

    static std::string canonical_key(const std::filesystem::path& path, const std::string& section) {
        std::error_code ec;
        auto canonical = std::filesystem::weakly_canonical(path, ec);
        return (ec ? path : canonical).string() + "\n" + section;
    }

    // Reads and splits a file once; the top file is split apart, its first line a title.
    const SplitFile& load(const std::filesystem::path& path, const Location* from, bool title, ReadFile::Role role,
                          bool library = false) {
        std::string key = canonical_key(path, title ? "title" : "");
        auto it = deck_.files.find(key);
        if (it != deck_.files.end()) return *it->second;
        std::unique_ptr<MappedFile> mapped;
        try {
            mapped = std::make_unique<MappedFile>(path);
        } catch (const InputError& e) {
            if (!from) throw;
            if (library) throw errors::missing_library(*from, path.string(), e.message());
            throw errors::missing_include(*from, path.string(), e.message());
        }
        const std::size_t size = mapped->bytes().size();
        if (size > max_netlist_file_bytes)
            throw errors::file_too_large(from ? *from : Location{path.string()}, path.string(), size,
                                         max_netlist_file_bytes);
        // Copied out with pread(): faster than faulting the mapping's pages in (see MappedFile).
        auto bytes = std::make_unique_for_overwrite<char[]>(size);
        mapped->copy_out(0, size, bytes.get());
        mapped.reset();
        deck_.file_names.push_back(path.string());
        deck_.read_files.push_back({absolute_normal(path), role});
        auto split = split_lines(std::move(bytes), size, &deck_.file_names.back(), title);
        return *deck_.files.emplace(key, std::move(split)).first->second;
    }

    // Reads a file's lines; with a section, only the lines of its `.lib section` block.
    // Returns false when the section is not in the file.
    bool run(const SplitFile& file, const std::filesystem::path& path, const std::string& section,
             const Context& context) {
        bool in_section = section.empty();
        bool found = section.empty();
        std::string skipping;  // a `.lib name` block being skipped
        for (const LogicalLine& line : file.lines) {
            if (control_) {
                control_line(line);
                continue;
            }
            // Most lines are elements: they need no word of their own lowered and compared.
            if (const std::string_view text = line.text; !text.empty() && text[0] != '.') {
                if (!in_section || !skipping.empty() || !reading()) continue;
                if (is_space(text[0])) continue;  // no first word: nothing (as in statement())
                if (!std::isalpha(static_cast<unsigned char>(text[0])))
                    throw errors::netlist_syntax(line.locate(0), "an element name (a letter first) or a `.` statement",
                                                 first_word(line));
                current().elements.push_back(&line);
                continue;
            }
            const std::string head = first_word(line);
            if (head == ".lib" || head == ".endl") {
                std::vector<Token> tokens = tokenize(line);
                if (head == ".lib" && tokens.size() == 2) {
                    std::string name = to_lower(tokens[1].text);
                    if (!section.empty() && name == section && !in_section) {
                        in_section = found = true;
                    } else if (skipping.empty() && in_section) {
                        skipping = name;
                    }
                    continue;
                }
                if (head == ".endl") {
                    if (!skipping.empty()) skipping.clear();
                    else if (!section.empty() && in_section) return true;
                    continue;
                }
            }
            if (!in_section || !skipping.empty()) continue;
            if (conditional(line, head)) continue;
            statement(line, head, path, context);
        }
        return found;
    }

    static bool is_space(char c) { return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' || c == '\v'; }

    static std::string first_word(const LogicalLine& line) {
        std::size_t end = 0;
        const std::string_view text = line.text;
        while (end < text.size() && !is_space(text[end])) ++end;
        return to_lower(text.substr(0, end));
    }

    void control_line(const LogicalLine& line) {
        if (first_word(line) == ".endc") {
            control_ = false;
            deck_.control_blocks.push_back(std::move(control_text_));
            control_text_.clear();
            deck_.cards.push_back({Card::Kind::control_block, ".control", file_line(*control_line_),
                                   last_physical_line(line), ".control"});
            return;
        }
        control_text_ += line.text;
        control_text_ += '\n';
    }

    SubcktDef& current() { return *stack_.back(); }

    bool reading() const { return conditionals_.empty() || conditionals_.back().reading; }

    // `.if (cond)` / `.elseif (cond)` / `.else` / `.endif`, conditions on the global
    // parameters read so far (ngspice also accepts `=` for `==`). Returns whether the line
    // was consumed: a conditional, or a line inside a branch that is not taken.
    bool conditional(const LogicalLine& line, const std::string& head) {
        bool outer = conditionals_.size() < 2 || conditionals_[conditionals_.size() - 2].reading;
        if (head == ".if") {
            bool enclosing = reading();
            Conditional c{false, false, line.locate(0)};
            if (enclosing) c.taken = c.reading = condition(line, head.size());
            conditionals_.push_back(c);
            return true;
        }
        if (head == ".elseif" || head == ".else" || head == ".endif") {
            if (conditionals_.empty()) throw errors::stray_statement(line.locate(0), head);
            Conditional& c = conditionals_.back();
            if (head == ".endif") {
                conditionals_.pop_back();
            } else if (c.taken || !outer) {
                c.reading = false;
            } else {
                c.taken = c.reading = head == ".else" || condition(line, head.size());
            }
            return true;
        }
        return !reading();
    }

    bool condition(const LogicalLine& line, std::size_t after) {
        std::string text(line.text.substr(after));
        for (std::size_t i = 0; i < text.size(); ++i) {
            bool lone = text[i] == '=' && (i == 0 || std::string_view("=<>!").find(text[i - 1]) == std::string_view::npos) &&
                        (i + 1 == text.size() || text[i + 1] != '=');
            if (lone) text.insert(i++, 1, '=');
        }
        Scope globals;
        for (const NamedValue& nv : deck_.top.params) {
            try {
                globals.set(nv.name, evaluate_text(nv.value.text, globals));
            } catch (const ExpressionError&) {
                // Not a number (or not yet known): a condition that uses it will say so.
            }
        }
        try {
            return evaluate_text(text, globals) != 0;
        } catch (const ExpressionError& e) {
            Location where = line.locate(after + e.offset);
            if (e.kind == ExpressionError::Kind::undefined_name) throw errors::undefined_parameter(where, e.detail);
            throw errors::bad_expression(where, e.detail, text);
        }
    }

    void statement(const LogicalLine& line, const std::string& head, const std::filesystem::path& path,
                   const Context& context) {
        if (head.empty()) return;
        if (head[0] != '.') {
            if (!std::isalpha(static_cast<unsigned char>(head[0])))
                throw errors::netlist_syntax(line.locate(0), "an element name (a letter first) or a `.` statement",
                                             head);
            current().elements.push_back(&line);
            return;
        }
        if (head == ".control") {
            control_ = true;
            control_where_ = line.locate(0);
            control_line_ = &line;
            return;
        }
        if (auto kind = card_kind(head)) {
            deck_.cards.push_back({*kind, head, file_line(line), last_physical_line(line), std::string(line.text)});
            return;
        }
        if (head == ".endc") throw errors::stray_statement(line.locate(0), ".endc");
        std::vector<Token> tokens = tokenize(line);
        if (head == ".subckt") return open_subckt(line, tokens);
        if (head == ".ends") return close_subckt(line);
        if (head == ".model") return model(line, tokens);
        if (head == ".param") return param(line, tokens);
        if (head == ".func") return function(line, tokens);
        if (head == ".include" || head == ".inc") return include(line, tokens, path, context);
        if (head == ".lib") return library(line, tokens, context);
        if (head == ".global") return global(tokens);
        if (head == ".option" || head == ".options" || head == ".opt") return option(line, tokens);
        if (head == ".temp" && tokens.size() >= 2) {
            if (auto t = parse_spice_number(tokens[1].text)) deck_.temperature = *t;
            return;
        }
        // Analyses, outputs and the rest (.tran, .op, .save, .meas, .func, ...) do not change the circuit.
    }

    void open_subckt(const LogicalLine& line, const std::vector<Token>& tokens) {
        if (tokens.size() < 2 || tokens[1].kind != TokenKind::word)
            throw errors::netlist_syntax(line.locate(line.text.size()), "a subcircuit name after `.subckt`",
                                         tokens.size() > 1 ? tokens[1].text : "");
        if (stack_.size() > max_subckt_nesting)
            throw errors::subckt_nesting_too_deep(line.locate(0), max_subckt_nesting);
        auto def = std::make_unique<SubcktDef>();
        def->name = to_lower(tokens[1].text);
        def->parent = &current();
        def->line = &line;
        std::size_t i = 2;
        for (; i < tokens.size() && !starts_named_value(tokens, i) && !is_params_keyword(tokens[i]); ++i) {
            if (tokens[i].kind != TokenKind::word)
                throw errors::netlist_syntax(line.locate(tokens[i].offset), "a port name or `name=value`",
                                             tokens[i].text);
            def->ports.push_back(to_lower(tokens[i].text));
        }
        def->defaults = split_parts(line, tokens, i).named;
        SubcktDef* raw = def.get();
        SubcktDef& scope = current();
        if (scope.subckts.count(raw->name)) scope.ignored_subckts.push_back(std::move(def));
        else scope.subckts[raw->name] = std::move(def);
        stack_.push_back(raw);
    }

    void close_subckt(const LogicalLine& line) {
        if (stack_.size() == 1) throw errors::stray_statement(line.locate(0), ".ends");
        stack_.pop_back();
    }

    void model(const LogicalLine& line, const std::vector<Token>& tokens) {
        if (tokens.size() < 3 || tokens[1].kind != TokenKind::word || tokens[2].kind != TokenKind::word)
            throw errors::netlist_syntax(line.locate(tokens.size() > 1 ? tokens.back().end : line.text.size()),
                                         "`.model name type (parameters)`", "");
        // `.model nch vto=0.5`: a parameter where the type belongs (ngspice: "Unknown model
        // type vto - ignored", and every device of the model then fails).
        if (tokens.size() > 3 && tokens[3].is('='))
            throw errors::netlist_syntax(line.locate(tokens[2].offset),
                                         "a model type (nmos, pmos, npn, pnp, d, ...) after the model name",
                                         std::string(tokens[2].text) + "=");
        ModelCard card;
        card.name = to_lower(tokens[1].text);
        card.type = to_lower(tokens[2].text);
        card.line = &line;
        card.parameters = split_parts(line, tokens, 3).named;
        auto dot = card.name.rfind('.');
        if (dot != std::string::npos && dot > 0 && is_bin_suffix(std::string_view(card.name).substr(dot + 1))) {
            auto& bins = current().bins[card.name.substr(0, dot)];
            if (std::find(bins.begin(), bins.end(), card.name) == bins.end()) bins.push_back(card.name);
        }
        current().models[card.name] = std::move(card);
    }

    void param(const LogicalLine& line, const std::vector<Token>& tokens) {
        LineParts parts = split_parts(line, tokens, 1, true);
        if (!parts.positional.empty())
            throw errors::netlist_syntax(line.locate(parts.positional.front()->offset), "`name=value`",
                                         parts.positional.front()->text);
        for (auto& nv : parts.named) current().params.push_back(std::move(nv));
    }

    // `.func name(a, b) {expression}`, also with `=` before the body or a bare body.
    void function(const LogicalLine& line, const std::vector<Token>& tokens) {
        if (tokens.size() < 4 || tokens[1].kind != TokenKind::word || !tokens[2].is('('))
            throw errors::netlist_syntax(line.locate(tokens.size() > 1 ? tokens[1].offset : line.text.size()),
                                         "`.func name(arguments) {expression}`", tokens.size() > 1 ? tokens[1].text : "");
        FunctionDef f;
        f.name = to_lower(tokens[1].text);
        std::size_t i = 3;
        for (; i < tokens.size() && !tokens[i].is(')'); ++i) {
            if (tokens[i].is(',')) continue;
            if (tokens[i].kind != TokenKind::word)
                throw errors::netlist_syntax(line.locate(tokens[i].offset), "an argument name", tokens[i].text);
            f.parameters.push_back(to_lower(tokens[i].text));
        }
        ++i;
        if (i < tokens.size() && tokens[i].is('=')) ++i;
        if (i >= tokens.size())
            throw errors::netlist_syntax(line.locate(line.text.size()), "the function's expression", "");
        f.body = value_of(line, tokens, i, tokens.size());
        current().functions.push_back(std::move(f));
    }

    static std::string path_argument(const LogicalLine& line, const std::vector<Token>& tokens, std::size_t i,
                                     std::string_view what) {
        if (i >= tokens.size()) throw errors::netlist_syntax(line.locate(line.text.size()), what, "");
        if (tokens[i].kind == TokenKind::punct) throw errors::netlist_syntax(line.locate(tokens[i].offset), what, tokens[i].text);
        return std::string(tokens[i].text);
    }

    // ngspice's search for a relative name: the working folder first, then `own_folder`.
    FileReference resolve(const LogicalLine& line, const Token& name_token, const std::filesystem::path& own_folder,
                          bool library, bool folder_is_top) const {
        FileReference ref;
        ref.where = file_line(line);
        Location at = line.locate(name_token.offset);
        ref.column = at.column;
        ref.length = name_token.end - name_token.offset;
        ref.written = std::string(name_token.text);
        ref.library = library;
        const std::filesystem::path name(name_token.text);
        if (name.is_absolute()) {
            ref.resolved = name.lexically_normal();
            return ref;
        }
        const std::filesystem::path in_working = (working_folder_ / name).lexically_normal();
        const std::filesystem::path in_own = absolute_normal(own_folder / name);
        ref.resolved = is_file(in_working) ? in_working : in_own;
        // Read from another folder, a copy of the naming file would look elsewhere.
        ref.via_working_folder = folder_is_top || (ref.resolved == in_working && in_working != in_own);
        return ref;
    }

    void include(const LogicalLine& line, const std::vector<Token>& tokens, const std::filesystem::path& from,
                 const Context& context) {
        path_argument(line, tokens, 1, "a file name after `.include`");
        FileReference ref = resolve(line, tokens[1], absolute_normal(from).parent_path(), false,
                                    context.role == ReadFile::Role::top);
        if (context.role == ReadFile::Role::library) ref.via_working_folder = false;
        deck_.references.push_back(ref);
        Context inner = context;
        if (inner.role == ReadFile::Role::top) inner.role = ReadFile::Role::included;
        read_file(line, ref.resolved, "", inner, false);
    }

    void library(const LogicalLine& line, const std::vector<Token>& tokens, const Context& context) {
        // `.lib name` (a section start) is handled by run(); here `.lib file section`.
        path_argument(line, tokens, 1, "a file name after `.lib`");
        if (tokens.size() < 3)
            throw errors::netlist_syntax(line.locate(line.text.size()), "a section name after `.lib file`", "");
        const bool in_library = context.role == ReadFile::Role::library;
        FileReference ref = resolve(line, tokens[1], in_library ? context.library_folder : working_folder_, true,
                                    !in_library);
        deck_.references.push_back(ref);
        // A library is read from its real path (ngspice: realpath), and its own names
        // resolve against that folder.
        std::error_code ec;
        auto real = std::filesystem::canonical(ref.resolved, ec);
        const std::filesystem::path library = ec ? ref.resolved : real;
        Context inner{ReadFile::Role::library, library.parent_path()};
        read_file(line, library, to_lower(tokens[2].text), inner, true);
    }

    void read_file(const LogicalLine& line, const std::filesystem::path& path, const std::string& section,
                   const Context& context, bool library) {
        Location where = line.locate(0);
        std::string key = canonical_key(path, section);
        const std::string named = section.empty() ? path.string() : path.string() + " " + section;
        if (std::find(active_.begin(), active_.end(), key) != active_.end()) throw errors::include_cycle(where, named);
        // Each level is a few C++ stack frames.
        if (active_.size() >= max_include_depth) throw errors::include_too_deep(where, max_include_depth);
        if (++reads_[key] > max_reads_per_file) throw errors::included_too_often(where, named, reads_[key]);
        const SplitFile& file = load(path, &where, false, context.role, library);
        active_.push_back(key);
        if (!run(file, path, section, context)) throw errors::missing_lib_section(where, path.string(), section);
        active_.pop_back();
    }

    void global(const std::vector<Token>& tokens) {
        for (std::size_t i = 1; i < tokens.size(); ++i)
            if (tokens[i].kind == TokenKind::word) deck_.globals.insert(to_lower(tokens[i].text));
    }

    void option(const LogicalLine& line, const std::vector<Token>& tokens) {
        for (const NamedValue& nv : split_parts(line, tokens, 1).named) {
            if (nv.name == "scale") {
                auto scale = parse_spice_number(nv.value.text);
                if (!scale || *scale <= 0)
                    throw errors::netlist_syntax(nv.value.where(), "a positive number for `scale`", nv.value.text);
                deck_.scale = *scale;
            } else if (nv.name == "wnflag") {
                deck_.divide_width_by_nf = parse_spice_number(nv.value.text).value_or(0) != 0;
            }
        }
    }
};

}  // namespace

LineParts split_parts(const LogicalLine& line, const std::vector<Token>& tokens, std::size_t first, bool greedy) {
    LineParts parts;
    split_parts(line, tokens, first, greedy, parts);
    return parts;
}

void split_parts(const LogicalLine& line, const std::vector<Token>& tokens, std::size_t first, bool greedy,
                 LineParts& parts) {
    parts.positional.clear();
    parts.named.clear();
    std::size_t i = first;
    auto value_continues = [&](std::size_t k, int depth) {
        if (starts_named_value(tokens, k) || is_params_keyword(tokens[k])) return false;
        return greedy || depth > 0 || tokens[k].offset == tokens[k - 1].end;
    };
    while (i < tokens.size()) {
        if (is_params_keyword(tokens[i])) {
            ++i;
            continue;
        }
        if (!starts_named_value(tokens, i)) {
            parts.positional.push_back(&tokens[i]);
            ++i;
            continue;
        }
        std::size_t value_begin = i + 2;
        if (value_begin >= tokens.size() || starts_named_value(tokens, value_begin) || tokens[value_begin].is(')'))
            throw errors::netlist_syntax(line.locate(tokens[i + 1].end), "a value after `" + std::string(tokens[i].text) + "=`",
                                         value_begin < tokens.size() ? tokens[value_begin].text : "");
        std::size_t value_end = value_begin + 1;
        int depth = tokens[value_begin].is('(') ? 1 : 0;
        while (value_end < tokens.size() && value_continues(value_end, depth)) {
            depth += tokens[value_end].is('(') ? 1 : tokens[value_end].is(')') ? -1 : 0;
            ++value_end;
        }
        parts.named.push_back({to_lower(tokens[i].text), value_of(line, tokens, value_begin, value_end)});
        i = value_end;
    }
}

std::unique_ptr<Deck> read_deck(const std::filesystem::path& path) {
    auto deck = std::make_unique<Deck>();
    DeckReader reader(*deck);
    reader.read_top(path);
    return deck;
}

}  // namespace mirrorcheck::netlist::detail
