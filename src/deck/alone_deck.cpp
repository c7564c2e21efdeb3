// A testbench of one mirror alone: the derived copy of the designer's deck (derived_deck.hpp)
// in which every element line that is not part of the mirror is a comment line
// ("*(not part of MIRROR) "), and so are `.save`, `.nodeset` and `.ic` (they may name nets
// that are gone, and ngspice 39 crashes in `.tf` with a `.nodeset`); models, libraries,
// parameters and options stay. An X line stays when every device under it is part of the
// mirror, or when the subcircuit is a kit's (a wrapped transistor); an instance that holds
// the mirror and more is replaced by one of a copy of its subcircuit that keeps only the
// mirror's devices (part_of_deck.hpp). Then it appends:
//   vmc_hold<j> NET 0 dc 0            for every net the mirror alone holds (mirror_alone.hpp)
//   vmc_fix<j> mc_fix<j> 0 dc 0       for every net it leaves free: a voltage source through
//   lmc_fix<j> mc_fix<j> NET 1e18     an inductor, a short at DC (the net sits at the
//                                     circuit's voltage) and open in AC (6e15 Ω at 1 mHz)
//   vmc_own<k> OUT 0 dc 0 ac 0        for every output: the measuring source
// The review deck's control block keeps every such net's voltage from the circuit's op
// (`let mc_op<i> = v(NET)`, in the op plot, named by `$curplot`) and, at its end, runs
// every bench:
//   source BENCH                      the bench becomes the current circuit
//   setplot $mc_op                    the circuit's op plot, where the voltages are
//   alter vmc_hold<j> dc = mc_op<i>   every held net, free net and output at its voltage
//   alter @vmc_own<k>[acmag]=1        per output, the others held by their sources: one AC
//   ac lin 1 1m 1m, write RAW         point at 1 mHz (a DC value: the phase of 300 GΩ with
//   alter @vmc_own<k>[acmag]=0        10 fF is 1e-3°), written to RAW
// Every terminal of the mirror's devices then sits at the circuit's operating voltage, so
// their small-signal values are the circuit's, and v(OUT)/(-i(vmc_own<k>)) is the mirror's
// own output resistance at OUT, every free net open: the same small-signal network as the
// exact solve of the mirror alone (own_resistance.cpp). Free nets are pinned rather than fed
// their operating current: an op solved again from a current reaches another point within
// ngspice's tolerances (a PNP mirror's reference, fed the current ngspice's own op had
// drawn, settled 83 µV away, and its output resistance 0.3 % lower). AC, not `.tf`, because
// the inductors must be open, and the circuit's own probes are read from AC runs too.
#include "src/deck/alone_deck.hpp"

#include <algorithm>
#include <map>
#include <set>

#include <fmt/format.h>

#include "parsers/common/text.hpp"
#include "src/analyse/mirror_alone.hpp"
#include "src/analyse/simulated_own.hpp"
#include "src/deck/deck_names.hpp"
#include "src/deck/part_of_deck.hpp"

namespace mirrorcheck {
namespace {

namespace fs = std::filesystem;

// A net name that ngspice's control language reads as one name inside v(...).
bool plain_net(const std::string& net) {
    return !net.empty() && std::all_of(net.begin(), net.end(), [](char c) {
        return std::isalnum(static_cast<unsigned char>(c)) || std::string_view("_.:$#+-!|&%").find(c) != std::string_view::npos;
    });
}

class Writer {
public:
    Writer(const netlist::FlatNetlist& netlist, const Circuit& circuit, const std::vector<Mirror>& mirrors,
           const fs::path& deck_path)
        : netlist_(netlist), circuit_(circuit), mirrors_(mirrors), deck_path_(deck_path) {
        for (const netlist::Card& card : netlist.cards)
            if (card.kind == netlist::Card::Kind::output && card.keyword == ".save") saves_.push_back(card.first);
    }

    AloneBenches run() {
        const std::vector<MirrorAlone> alone = describe_mirrors_alone(circuit_, mirrors_, source_held_nets(circuit_));
        std::size_t k = 0;
        for (std::size_t m = 0; m < mirrors_.size(); ++m) {
            const std::size_t first = k + 1;
            k += mirrors_[m].outputs.size();
            write_bench(mirrors_[m], alone[m], first);
        }
        return std::move(out_);
    }

private:
    const std::string& voltage_of(const std::string& net) {
        auto [it, added] = voltages_.try_emplace(net, fmt::format("mc_op{}", voltages_.size() + 1));
        if (added) out_.voltages.emplace_back(net, it->second);
        return it->second;
    }

    void write_bench(const Mirror& mirror, const MirrorAlone& alone, std::size_t first_output) {
        auto refuse = [&](const std::string& why) {
            out_.notes.push_back(fmt::format("no testbench of {} alone: {}", mirror.id, why));
        };
        for (const auto* nets : {&alone.held, &alone.free_nets, &alone.outputs})
            for (const std::string& net : *nets)
                if (!plain_net(net)) return refuse(fmt::format("the net name {} cannot be written in a control command", net));
        const std::size_t n = out_.benches.size() + 1;
        const std::set<std::size_t> members(alone.devices.begin(), alone.devices.end());
        DeriveEdits edits;
        edits.why = fmt::format("*(not part of {}) ", mirror.id);
        edits.initial_conditions_out = true;
        const DeckPart part = part_of_deck(netlist_, circuit_, members, fmt::format("mc_alone{}_", n), edits.why);
        if (!part.refusal.empty()) return refuse(part.refusal);
        edits.elements_out = part.left_out;
        edits.elements_out.insert(edits.elements_out.end(), saves_.begin(), saves_.end());

        AloneBench bench;
        bench.mirror = mirror.id;
        const std::string stem = deck_path_.stem().string();
        bench.path = deck_path_.parent_path() / fmt::format("{}.alone{}.cir", stem, n);
        edits.copy_prefix = fmt::format("{}.alone{}-", stem, n);
        DerivedDeck derived = derive_deck(netlist_, deck_path_.parent_path(), edits);
        bench.included = std::move(derived.included);
        std::string& text = bench.text;
        text = std::move(derived.top);
        text += fmt::format(
            "* ---- appended by mirrorcheck: the testbench of {} alone ----\n"
            "* Every element above that is not part of the mirror is left out. The review deck's control\n"
            "* block sets the sources below to the circuit's operating point and measures each output.\n",
            mirror.id);
        text += part.appended;
        for (std::size_t j = 0; j < alone.held.size(); ++j) {
            AloneBench::Net h{alone.held[j], unique_name(circuit_, fmt::format("vmc_hold{}", j + 1)),
                              voltage_of(alone.held[j]), {}};
            text += fmt::format("{} {} 0 dc 0\n", h.source, h.net);
            bench.held.push_back(std::move(h));
        }
        for (std::size_t j = 0; j < alone.free_nets.size(); ++j) {
            AloneBench::Net f{alone.free_nets[j], unique_name(circuit_, fmt::format("vmc_fix{}", j + 1)),
                              voltage_of(alone.free_nets[j]), unique_name(circuit_, fmt::format("lmc_fix{}", j + 1))};
            const std::string inner = unique_name(circuit_, fmt::format("mc_fix{}", j + 1));
            text += fmt::format("{} {} 0 dc 0\n{} {} {} 1e18\n", f.source, inner, f.inductor, inner, f.net);
            bench.free_nets.push_back(std::move(f));
        }
        std::size_t k = first_output;
        std::set<std::string> measured;
        for (const MirrorOutput& o : mirror.outputs) {
            const std::string node = to_lower(o.node);
            const std::string source = own_probe_name(k++);
            if (!measured.insert(node).second) continue;
            text += fmt::format("{} {} 0 dc 0 ac 0\n", source, node);
            bench.outputs.push_back({node, source, voltage_of(node)});
        }
        text += ".end\n";
        out_.benches.push_back(std::move(bench));
    }

    const netlist::FlatNetlist& netlist_;
    const Circuit& circuit_;
    const std::vector<Mirror>& mirrors_;
    fs::path deck_path_;
    std::vector<netlist::FileLine> saves_;
    std::map<std::string, std::string> voltages_;
    AloneBenches out_;
};

}  // namespace

AloneBenches write_alone_benches(const netlist::FlatNetlist& netlist, const Circuit& circuit,
                                 const std::vector<Mirror>& mirrors, const std::filesystem::path& deck_path) {
    return Writer(netlist, circuit, mirrors, deck_path).run();
}

std::string keep_operating_voltages(const AloneBenches& benches) {
    if (benches.benches.empty()) return {};
    std::string out = "* the operating voltages the testbenches of the mirrors alone are set to\nset mc_op = $curplot\n";
    for (const auto& [net, vector] : benches.voltages) out += fmt::format("let {} = v({})\n", vector, net);
    return out;
}

std::string run_alone_benches(const AloneBenches& benches, const std::string& raw) {
    std::string out;
    for (const AloneBench& b : benches.benches) {
        out += fmt::format("* the mirror alone: {}\nsource {}\nsetplot $mc_op\n", b.mirror, command_path(b.path));
        for (const auto* nets : {&b.held, &b.free_nets})
            for (const auto& n : *nets) out += fmt::format("alter {} dc = {}\n", n.source, n.voltage);
        for (const auto& o : b.outputs) out += fmt::format("alter {} dc = {}\n", o.source, o.voltage);
        for (const auto& o : b.outputs)
            out += fmt::format("alter @{}[acmag]=1\nac lin 1 1m 1m\nwrite {}\nalter @{}[acmag]=0\n", o.source, raw,
                               o.source);
    }
    return out;
}

}  // namespace mirrorcheck
