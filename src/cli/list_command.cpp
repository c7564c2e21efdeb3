#include "src/cli/list_command.hpp"

#include <iostream>
#include <memory>

#include "src/cli/netlist_limits_option.hpp"
#include "src/model/circuit_build.hpp"
#include "src/report/json_text.hpp"
#include "src/recognise/find_mirrors.hpp"
#include "src/report/mirror_list.hpp"
#include "src/report/text_layout.hpp"

namespace mirrorcheck::cli {
namespace {

struct ListOptions {
    std::string netlist;
    std::string format = "table";
    netlist::ReadLimits limits;
};

int run_list(const ListOptions& o) {
    Circuit circuit = read_circuit(o.netlist, o.limits);
    std::vector<Mirror> mirrors = find_mirrors(circuit);
    if (o.format == "json") std::cout << report::json_text(report::mirrors_to_json(circuit, mirrors)) << "\n";
    else std::cout << report::terminal_text(report::write_mirror_table(circuit, mirrors), false);
    return 0;
}

}  // namespace

void add_list_command(CLI::App& app, int& status) {
    auto options = std::make_shared<ListOptions>();
    CLI::App* cmd = app.add_subcommand("list", "List the current mirrors and current sources of a netlist");
    cmd->footer(
        "Reads the netlist only (no simulation results): each mirror's family, reference\n"
        "devices and node, and each output's devices from the rail up, with the design\n"
        "current ratio from the devices' sizes.\n\n"
        "Examples:\n"
        "  mirrorcheck list samples/tamarack/bias.cir\n"
        "  mirrorcheck list amp.cir --format json");
    cmd->add_option("NETLIST", options->netlist, "ngspice netlist")->required()->check(CLI::ExistingFile);
    cmd->add_option("--format", options->format, "output format")->check(CLI::IsMember({"table", "json"}));
    add_netlist_limit_options(*cmd, options->limits);
    cmd->callback([options, &status] { status = run_list(*options); });
}

}  // namespace mirrorcheck::cli
