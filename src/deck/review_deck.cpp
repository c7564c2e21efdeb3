// The review deck, in order:
//   * a title and what wrote it
//   .include "<netlist>"            the user's netlist, by absolute path, unchanged
//   probes, one per mirror output k (node N) that the netlist does not already probe (a
//   source that review would take as the probe, e.g. a testbench's voltage source holding
//   the output, serves as it is; simulated_impedance.cpp says which):
//     held:      vmc_probe<k> mc_probe<k> 0 dc 0 ac 0   and   cmc_probe<k> mc_probe<k> N 1
//     injected:  imc_probe<k> 0 N dc 0 ac 0
//   .control
//   save all, then `save @dev[param] ...` for every transistor: the parameters a review
//     needs and the optional capacitances (op_point_build.hpp), and each probe's acmag
//   op, write RAW                    the operating point; no probe carries DC current, so
//                                    the bias is the netlist's own
//   set appendwrite
//   per output: alter its probe's acmag to 1, ac dec ..., write RAW, alter back to 0;
//     injected mode also `tf v(N) imc_probe<k>`, write RAW (the DC value from ngspice's
//     own transfer-function analysis)
//   quit 0                           (a batch run otherwise exits 1, HANDCALC.md section 4)
//   .endc
//   .end
// The AC value of each probe is saved in every AC plot (`@probe[acmag]`), so the review
// pairs each output with the run that drives it (simulated_impedance.cpp).
//
// The coupling capacitor of a held probe (1 F) is open at DC and 0.16 Ω at 1 Hz; the
// review reads v(N) itself, not the source's voltage, so its value does not enter the
// measured impedance. A held probe cannot take the output's load away without editing the
// netlist: the load stays in parallel in both modes, and the two modes differ in what the
// OTHER outputs do during a run (held at AC ground, or left as they are).
#include "src/deck/review_deck.hpp"

#include "src/deck/deck_errors.hpp"

#include <set>

#include <fmt/format.h>

#include "parsers/common/input_error.hpp"
#include "parsers/common/text.hpp"
#include "src/analyse/simulated_impedance.hpp"
#include "src/model/op_point_build.hpp"

namespace mirrorcheck {
namespace {

// True when ngspice would take the line, as the first line of an included file, for
// something other than a comment or a dot command.
bool reads_as_element(const std::string& line) {
    std::size_t i = line.find_first_not_of(" \t\r");
    if (i == std::string::npos) return false;
    char c = line[i];
    return c != '*' && c != '.' && c != '#' && c != ';' && c != '$';
}

std::string quoted_path(const std::filesystem::path& p) {
    std::string s = p.string();
    return s.find_first_of(" \t") == std::string::npos ? s : "\"" + s + "\"";
}

// Appends `save` commands of at most about 200 characters each.
void write_saves(std::string& out, const std::vector<std::string>& vectors) {
    std::string line;
    for (const auto& v : vectors) {
        if (!line.empty() && line.size() + v.size() > 200) {
            out += "save" + line + "\n";
            line.clear();
        }
        line += " " + v;
    }
    if (!line.empty()) out += "save" + line + "\n";
}

std::string unique_name(const Circuit& circuit, const std::string& wanted) {
    std::string name = wanted;
    for (int k = 2; circuit.find_device(name) || circuit.find_net(name); ++k) name = fmt::format("{}_{}", wanted, k);
    return name;
}

}  // namespace

ReviewDeck write_review_deck(const std::filesystem::path& netlist, const Circuit& circuit,
                             const std::vector<Mirror>& mirrors, const DeckOptions& options) {
    const std::filesystem::path absolute = std::filesystem::absolute(netlist).lexically_normal();
    if (const std::string& line = circuit.title; reads_as_element(line))
        throw errors::title_line(netlist.string(), line);
    ReviewDeck deck;
    std::string& out = deck.text;
    out += fmt::format("* mirrorcheck review deck for {}\n", absolute.filename().string());
    out += fmt::format("* Written by `mirrorcheck prepare`: the operating point with every transistor's parameters,\n"
                       "* then one AC run per mirror output ({} probes). The netlist is included unchanged.\n",
                       options.mode == ProbeMode::held ? "held" : "injected");
    out += ".include " + quoted_path(absolute) + "\n\n";

    std::set<std::string> probed;
    std::vector<std::string> acmag_saves;
    for (const Mirror& m : mirrors)
        for (const MirrorOutput& o : m.outputs) {
            if (!probed.insert(to_lower(o.node)).second) continue;
            const std::size_t k = deck.probes.size() + 1;
            DeckProbe p{o.node, m.id, {}, DeckProbe::Kind::injected};
            if (const Device* own = netlist_probe(circuit, o.node)) {
                p.kind = own->kind == DeviceKind::vsource ? DeckProbe::Kind::own_source : DeckProbe::Kind::injected;
                p.source = to_lower(own->name);
                out += fmt::format("* probe {} for output {} of {}: the netlist's own {}\n", k, o.node, m.id, p.source);
            } else if (options.mode == ProbeMode::held) {
                out += fmt::format("* probe {} for output {} of {}\n", k, o.node, m.id);
                const std::string net = unique_name(circuit, fmt::format("mc_probe{}", k));
                p.kind = DeckProbe::Kind::held;
                p.source = unique_name(circuit, fmt::format("vmc_probe{}", k));
                out += fmt::format("{} {} 0 dc 0 ac 0\n{} {} {} 1\n", p.source, net,
                                   unique_name(circuit, fmt::format("cmc_probe{}", k)), net, o.node);
            } else {
                out += fmt::format("* probe {} for output {} of {}\n", k, o.node, m.id);
                p.source = unique_name(circuit, fmt::format("imc_probe{}", k));
                out += fmt::format("{} 0 {} dc 0 ac 0\n", p.source, o.node);
            }
            acmag_saves.push_back("@" + p.source + "[acmag]");
            deck.probes.push_back(p);
        }

    out += "\n.control\nsave all\n";
    std::vector<std::string> saves;
    for (const Device& d : circuit.devices()) {
        if (d.kind != DeviceKind::mosfet && d.kind != DeviceKind::bjt) continue;
        SaveNames names = ngspice_save_names(d);
        for (const auto* list : {&names.required, &names.optional})
            for (const auto& n : *list) saves.push_back(fmt::format("@{}[{}]", to_lower(d.name), n));
    }
    saves.insert(saves.end(), acmag_saves.begin(), acmag_saves.end());
    write_saves(out, saves);
    out += fmt::format("op\nwrite {}\nset appendwrite\n", options.raw_name);
    for (const DeckProbe& p : deck.probes) out += fmt::format("alter @{}[acmag]=0\n", p.source);
    for (const DeckProbe& p : deck.probes) {
        out += fmt::format("* output {} ({})\nalter @{}[acmag]=1\nac dec {} {:g} {:g}\nwrite {}\nalter @{}[acmag]=0\n",
                           p.node, p.mirror, p.source, options.points_per_decade, options.from, options.to,
                           options.raw_name, p.source);
        if (p.kind == DeckProbe::Kind::own_source)
            out += fmt::format("tf i({}) {}\nwrite {}\n", p.source, p.source, options.raw_name);
        else if (p.kind == DeckProbe::Kind::injected)
            out += fmt::format("tf v({}) {}\nwrite {}\n", p.node, p.source, options.raw_name);
    }
    out += "quit 0\n.endc\n.end\n";

    if (!circuit.control_blocks.empty())
        deck.notes.push_back(fmt::format("{} has its own .control block; ngspice runs it before the review's",
                                         absolute.filename().string()));
    if (deck.probes.empty()) deck.notes.push_back("no mirror outputs found: the deck only saves the operating point");
    return deck;
}

}  // namespace mirrorcheck
