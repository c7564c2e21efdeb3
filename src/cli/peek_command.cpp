#include "src/cli/peek_command.hpp"

#include <iostream>
#include <memory>

#include "parsers/common/input_kind.hpp"
#include "parsers/listing/listing.hpp"
#include "src/model/circuit_build.hpp"
#include "src/report/json_text.hpp"
#include "parsers/raw/raw.hpp"
#include "src/cli/netlist_limits_option.hpp"
#include "src/cli/usage_errors.hpp"
#include "src/report/circuit_dump.hpp"
#include "src/report/listing_dump.hpp"
#include "src/report/raw_dump.hpp"
#include "src/report/text_layout.hpp"

namespace mirrorcheck::cli {
namespace {

struct PeekOptions {
    std::string file;
    std::vector<std::string> vectors;
    std::vector<std::string> plots;
    std::string format = "table";
    netlist::ReadLimits limits;  // a netlist's
};

void check_vectors_exist(const raw::RawFile& raw, const std::vector<std::string>& vectors) {
    for (const auto& name : vectors) {
        bool found = false;
        for (const auto& plot : raw.plots) found = found || (plot.decoded && plot.find(name));
        if (!found) throw usage::missing_vector(raw.path, name);
    }
}

void peek_raw(const PeekOptions& o) {
    raw::Selection selection{o.plots, false};
    raw::RawFile file = raw::read_raw(o.file, selection);
    check_vectors_exist(file, o.vectors);
    if (o.format == "json") std::cout << report::json_text(report::raw_to_json(file, o.vectors)) << "\n";
    else if (!o.vectors.empty()) std::cout << report::terminal_text(report::write_raw_vectors(file, o.vectors), false);
    else std::cout << report::terminal_text(report::write_raw_table(file, o.plots), false);
}

void peek_listing(const PeekOptions& o) {
    if (!o.vectors.empty() || !o.plots.empty()) throw usage::option_needs_raw(o.file);
    listing::Listing l = listing::read_listing(o.file);
    if (o.format == "json") std::cout << report::json_text(report::listing_to_json(l)) << "\n";
    else std::cout << report::terminal_text(report::write_listing_table(l), false);
}

void peek_netlist(const PeekOptions& o) {
    if (!o.vectors.empty() || !o.plots.empty()) throw usage::option_needs_raw(o.file);
    Circuit circuit = read_circuit(o.file, o.limits);
    if (o.format == "json") std::cout << report::json_text(report::circuit_to_json(circuit)) << "\n";
    else std::cout << report::terminal_text(report::write_circuit_table(circuit), false);
}

int run_peek(const PeekOptions& o) {
    switch (detect_input_kind(o.file)) {
        case InputKind::raw: peek_raw(o); break;
        case InputKind::listing: peek_listing(o); break;
        case InputKind::netlist: peek_netlist(o); break;
    }
    return 0;
}

}  // namespace

void add_peek_command(CLI::App& app, int& status) {
    auto options = std::make_shared<PeekOptions>();
    CLI::App* cmd = app.add_subcommand("peek", "Show what a raw file, `show` listing or netlist holds");
    cmd->footer(
        "Examples:\n"
        "  mirrorcheck peek run.raw                       one line per plot: kind, points, variables\n"
        "  mirrorcheck peek run.raw --plot op             the op plot's variables\n"
        "  mirrorcheck peek run.raw --plot op --vector @m2[gm]   the value alone, with its unit\n"
        "  mirrorcheck peek run.raw --plot ac --format json      everything, full precision\n"
        "  mirrorcheck peek show.txt                      devices and their parameters\n"
        "  mirrorcheck peek amp.cir                       the flattened devices, named as ngspice names them");
    cmd->add_option("FILE", options->file, "ngspice raw file (binary or ASCII), `show` listing, or netlist")
        ->required()
        ->check(CLI::ExistingFile);
    cmd->add_option("--vector", options->vectors,
                    "print only this vector's values, with unit and SI prefix (ngspice names: v(out), i(vdd), @m1[gm], "
                    "...); repeatable");
    cmd->add_option("--plot", options->plots,
                    "only these plots, by kind (op, ac, tf, dc, tran) or Plotname: their variables, or with --vector "
                    "their values; repeatable");
    cmd->add_option("--format", options->format, "output format")
        ->check(CLI::IsMember({"table", "json"}));
    add_netlist_limit_options(*cmd, options->limits);
    cmd->callback([options, &status] { status = run_peek(*options); });
}

}  // namespace mirrorcheck::cli
