// The command line as plain data, read from the CLI11 definitions themselves (the same App
// that parses): commands, their options, what each takes. The man page and the bash
// completion are written from it, so they list exactly what `--help` lists.
#pragma once

#include <string>
#include <vector>

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

struct CliOption {
    std::vector<std::string> names;   // "-o", "--output"; empty for a positional
    std::string positional;           // "NETLIST"; empty for an option
    std::string description;
    bool takes_value = false;         // false: a flag
    bool required = false;
    bool repeatable = false;
    std::vector<std::string> choices;  // the values it accepts, when it lists them
    std::string value_name;           // what to write for its value: FILE, N, VALUE, or the choices
};

struct CliCommand {
    std::string name;  // empty for the program itself
    std::string description;
    std::string footer;
    std::vector<CliOption> options;  // positionals among them, in definition order
};

struct CliOutline {
    CliCommand program;                // the program's own options (--help, --version)
    std::vector<CliCommand> commands;  // the subcommands --help shows, in definition order
};

// The outline of `app`; subcommands in no group (hidden from --help) are left out.
CliOutline outline_command_line(const CLI::App& app);

}  // namespace mirrorcheck::cli
