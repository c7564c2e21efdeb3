// Reads the command line's outline from CLI11's own definitions. The values an option
// accepts come from its validators' descriptions as CLI11 writes them for --help: a
// membership check reads "{a,b,c}", a file check "FILE".
#include "src/cli/cli_outline.hpp"

#include <cstddef>

namespace mirrorcheck::cli {
namespace {

// The parts of a type name such as "TEXT:{table,json}" or "TEXT:FILE".
std::vector<std::string> type_parts(const std::string& type_name) {
    std::vector<std::string> parts;
    std::size_t start = 0;
    int depth = 0;
    for (std::size_t i = 0; i <= type_name.size(); ++i) {
        const char c = i < type_name.size() ? type_name[i] : ':';
        if (c == '{') ++depth;
        if (c == '}') --depth;
        if (c == ':' && depth == 0) {
            parts.push_back(type_name.substr(start, i - start));
            start = i + 1;
        }
    }
    return parts;
}

std::vector<std::string> set_items(const std::string& part) {
    std::vector<std::string> items;
    std::string item;
    for (std::size_t i = 1; i + 1 < part.size(); ++i) {
        if (part[i] == ',') {
            items.push_back(item);
            item.clear();
        } else {
            item += part[i];
        }
    }
    if (!item.empty()) items.push_back(item);
    return items;
}

CliOption outline_option(const CLI::Option& opt) {
    CliOption o;
    for (const auto& s : opt.get_snames()) o.names.push_back("-" + s);
    for (const auto& l : opt.get_lnames()) o.names.push_back("--" + l);
    if (o.names.empty()) o.positional = opt.get_name(true);
    o.description = opt.get_description();
    o.takes_value = opt.get_items_expected_max() > 0;
    o.required = opt.get_required();
    o.repeatable = opt.get_expected_max() > 1;
    if (!o.takes_value) return o;
    o.value_name = "VALUE";
    for (const auto& part : type_parts(opt.get_type_name())) {
        if (part.size() >= 2 && part.front() == '{' && part.back() == '}') {
            o.choices = set_items(part);
        } else if (part == "FILE" || part == "DIR" || part == "INT") {
            o.value_name = part == "INT" ? "N" : part;
        }
    }
    if (!o.choices.empty()) {
        o.value_name.clear();
        for (const auto& c : o.choices) o.value_name += (o.value_name.empty() ? "" : "|") + c;
    }
    return o;
}

CliCommand outline_command(const CLI::App& app) {
    CliCommand c;
    c.name = app.get_parent() ? app.get_name() : "";
    c.description = app.get_description();
    c.footer = app.get_footer();
    for (const CLI::Option* opt : app.get_options()) c.options.push_back(outline_option(*opt));
    return c;
}

}  // namespace

CliOutline outline_command_line(const CLI::App& app) {
    CliOutline outline;
    outline.program = outline_command(app);
    for (const CLI::App* sub : app.get_subcommands([](const CLI::App* s) { return !s->get_group().empty(); }))
        outline.commands.push_back(outline_command(*sub));
    return outline;
}

}  // namespace mirrorcheck::cli
