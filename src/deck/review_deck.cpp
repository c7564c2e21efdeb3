// The review deck: the derived copy of the user's deck (derived_deck.hpp), then
//   * what follows was appended by mirrorcheck ...
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
//   alter every probe's and every other independent source's acmag to 0: the deck's own
//     AC stimulus (an input source with `ac 1`) would otherwise add its response to the
//     probe's (a two-stage amplifier read 14.53 Ω against ngspice's 13.53 Ω)
//   per output: alter its probe's acmag to 1, ac dec ..., write RAW, alter back to 0;
//     injected mode also `tf v(N) imc_probe<k>`, write RAW (the DC value from ngspice's
//     own transfer-function analysis)
//   the testbench of every mirror alone, run after the circuit's (alone_deck.cpp): the op
//     voltages it needs kept right after the op, then each bench sourced, set to them and
//     measured with `.tf`, written to RAW
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

#include <algorithm>
#include <set>

#include <fmt/format.h>

#include "parsers/common/text.hpp"
#include "src/analyse/simulated_impedance.hpp"
#include "src/deck/deck_errors.hpp"
#include "src/deck/deck_names.hpp"
#include "src/model/op_point_build.hpp"
#include "src/output/write_file.hpp"

namespace mirrorcheck {
namespace {

namespace fs = std::filesystem;

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

std::size_t count_lines(const std::string& text) { return static_cast<std::size_t>(std::count(text.begin(), text.end(), '\n')); }

// The netlist's own independent sources with an AC value, but for the probes.
std::vector<std::string> ac_stimuli(const Circuit& circuit, const std::vector<DeckProbe>& probes) {
    std::vector<std::string> names;
    for (const Device& d : circuit.devices()) {
        if ((d.kind != DeviceKind::vsource && d.kind != DeviceKind::isource) || !d.parameters.count("acmag")) continue;
        const std::string name = to_lower(d.name);
        if (std::none_of(probes.begin(), probes.end(), [&](const DeckProbe& p) { return p.source == name; }))
            names.push_back(name);
    }
    return names;
}

void write_probes(std::string& out, const Circuit& circuit, const std::vector<Mirror>& mirrors,
                  const DeckOptions& options, std::vector<DeckProbe>& probes) {
    std::set<std::string> probed;
    for (const Mirror& m : mirrors)
        for (const MirrorOutput& o : m.outputs) {
            if (!probed.insert(to_lower(o.node)).second) continue;
            const std::size_t k = probes.size() + 1;
            DeckProbe p{o.node, m.id, {}, DeckProbe::Kind::injected, {}, {}, false, 0};
            if (const Device* own = netlist_probe(circuit, o.node)) {
                p.kind = own->kind == DeviceKind::vsource ? DeckProbe::Kind::own_source : DeckProbe::Kind::injected;
                p.source = to_lower(own->name);
                out += fmt::format("* probe {} for output {} of {}: the netlist's own {}\n", k, o.node, m.id, p.source);
            } else if (options.mode == ProbeMode::held) {
                out += fmt::format("* probe {} for output {} of {}\n", k, o.node, m.id);
                p.kind = DeckProbe::Kind::held;
                p.net = unique_name(circuit, fmt::format("mc_probe{}", k));
                p.source = unique_name(circuit, fmt::format("vmc_probe{}", k));
                p.coupling = unique_name(circuit, fmt::format("cmc_probe{}", k));
                p.added = true;
                p.line = count_lines(out) + 1;
                out += fmt::format("{} {} 0 dc 0 ac 0\n{} {} {} 1\n", p.source, p.net, p.coupling, p.net, o.node);
            } else {
                out += fmt::format("* probe {} for output {} of {}\n", k, o.node, m.id);
                p.source = unique_name(circuit, fmt::format("imc_probe{}", k));
                p.added = true;
                p.line = count_lines(out) + 1;
                out += fmt::format("{} 0 {} dc 0 ac 0\n", p.source, o.node);
            }
            probes.push_back(p);
        }
}

void write_control(std::string& out, const Circuit& circuit, const DeckOptions& options,
                   const std::vector<DeckProbe>& probes, const AloneBenches& alone) {
    out += ".control\nsave all\n";
    std::vector<std::string> saves;
    for (const Device& d : circuit.devices()) {
        if (d.kind != DeviceKind::mosfet && d.kind != DeviceKind::bjt) continue;
        SaveNames names = ngspice_save_names(d);
        for (const auto* list : {&names.required, &names.optional})
            for (const auto& n : *list) saves.push_back(fmt::format("@{}[{}]", to_lower(d.name), n));
    }
    for (const DeckProbe& p : probes) saves.push_back("@" + p.source + "[acmag]");
    write_saves(out, saves);
    const std::string raw = command_path(options.raw_path);
    out += fmt::format("op\nwrite {}\nset appendwrite\n", raw);
    out += keep_operating_voltages(alone);
    for (const DeckProbe& p : probes) out += fmt::format("alter @{}[acmag]=0\n", p.source);
    const auto stimuli = ac_stimuli(circuit, probes);
    if (!stimuli.empty()) out += "* the deck's own AC stimuli stay at zero in every probe run\n";
    for (const std::string& s : stimuli) out += fmt::format("alter @{}[acmag]=0\n", s);
    for (const DeckProbe& p : probes) {
        out += fmt::format("* output {} ({})\nalter @{}[acmag]=1\nac dec {} {:g} {:g}\nwrite {}\nalter @{}[acmag]=0\n",
                           p.node, p.mirror, p.source, options.points_per_decade, options.from, options.to, raw,
                           p.source);
        if (p.kind == DeckProbe::Kind::own_source)
            out += fmt::format("tf i({}) {}\nwrite {}\n", p.source, p.source, raw);
        else if (p.kind == DeckProbe::Kind::injected)
            out += fmt::format("tf v({}) {}\nwrite {}\n", p.node, p.source, raw);
    }
    out += run_alone_benches(alone, raw);
    out += "quit 0\n.endc\n.end\n";
}

Device source_device(DeviceKind kind, const std::string& name, const std::string& pos, const std::string& neg,
                     const SourceLine& where) {
    Device d;
    d.kind = kind;
    d.name = d.local_name = name;
    d.terminals = {{"pos", pos}, {"neg", neg}};
    d.value = 0;
    d.parameters = {{"dc", 0.0}, {"acmag", 0.0}};
    d.source = where;
    return d;
}

}  // namespace

ReviewDeck write_review_deck(const netlist::FlatNetlist& netlist, const Circuit& circuit,
                             const std::vector<Mirror>& mirrors, const DeckOptions& options) {
    ReviewDeck deck;
    deck.path = fs::absolute(options.deck_path).lexically_normal();
    for (const auto& f : netlist.files)
        if (f.role == netlist::ReadFile::Role::top) deck.run_folder = f.path.parent_path();
    DerivedDeck derived = derive_deck(netlist, deck.path.parent_path());
    deck.included = std::move(derived.included);
    deck.left_out = std::move(derived.left_out);

    std::string& out = deck.text;
    out = std::move(derived.top);
    out += fmt::format(
        "* ---- appended by mirrorcheck prepare: the review's probes and control block ({} probes). ----\n"
        "* The lines above are the deck's own: analyses, output requests and .control blocks left out,\n"
        "* file names made absolute. ngspice runs this deck in {}\n",
        options.mode == ProbeMode::held ? "held" : "injected", deck.run_folder.string());
    std::string appended;
    write_probes(appended, circuit, mirrors, options, deck.probes);
    const std::size_t before = count_lines(out);
    for (DeckProbe& p : deck.probes)
        if (p.added) p.line += before;
    out += appended;
    if (options.alone) deck.alone = write_alone_benches(netlist, circuit, mirrors, deck.path);
    write_control(out, circuit, options, deck.probes, deck.alone);
    deck.notes.insert(deck.notes.end(), deck.alone.notes.begin(), deck.alone.notes.end());

    if (deck.probes.empty()) deck.notes.push_back("no mirror outputs found: the deck only saves the operating point");
    return deck;
}

void save_review_deck(const ReviewDeck& deck) {
    auto write = [](const fs::path& path, const std::string& text) {
        if (auto failed = write_file_whole(path, text))
            throw errors::cannot_write(Location(path.string()), "the review deck", *failed);
    };
    std::error_code ec;
    fs::create_directories(deck.path.parent_path(), ec);
    write(deck.path, deck.text);
    for (const DerivedFile& f : deck.included) write(f.path, f.text);
    for (const AloneBench& b : deck.alone.benches) {
        write(b.path, b.text);
        for (const DerivedFile& f : b.included) write(f.path, f.text);
    }
}

void add_deck_probes(Circuit& circuit, const ReviewDeck& deck) {
    for (const DeckProbe& p : deck.probes) {
        const SourceLine where{deck.path.string(), p.line};
        if (!p.added) continue;
        if (p.kind == DeckProbe::Kind::injected) {
            circuit.add_device(source_device(DeviceKind::isource, p.source, "0", to_lower(p.node), where));
        } else if (p.kind == DeckProbe::Kind::held) {
            circuit.add_device(source_device(DeviceKind::vsource, p.source, p.net, "0", where));
            Device c;
            c.kind = DeviceKind::capacitor;
            c.name = c.local_name = p.coupling;
            c.terminals = {{"pos", p.net}, {"neg", to_lower(p.node)}};
            c.value = 1;
            c.source = {deck.path.string(), p.line + 1};
            circuit.add_device(std::move(c));
        }
    }
}

}  // namespace mirrorcheck
