#include "src/cli/prepare_command.hpp"

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <memory>

#include <fmt/format.h>
#include <unistd.h>

#include "src/model/circuit_build.hpp"
#include "parsers/raw/raw.hpp"
#include "src/cli/review_command.hpp"
#include "src/deck/ngspice_runner.hpp"
#include "src/deck/review_deck.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck::cli {
namespace {

namespace fs = std::filesystem;

struct DeckRequest {
    std::string netlist;
    std::string mode = "injected";
    std::string from = "1Hz", to = "1GHz";
    int points_per_decade = 10;
};

void add_deck_options(CLI::App& cmd, DeckRequest& r) {
    cmd.add_option("NETLIST", r.netlist, "ngspice netlist (included unchanged)")->required()->check(CLI::ExistingFile);
    cmd.add_option("--mode", r.mode,
                   "probe mode: injected (an AC current into each output as the circuit has it) or held (an AC "
                   "voltage through a coupling capacitor, the other outputs held at AC ground) (default injected)")
        ->check(CLI::IsMember({"held", "injected"}));
    cmd.add_option("--from", r.from, "first AC frequency (default 1Hz)");
    cmd.add_option("--to", r.to, "last AC frequency (default 1GHz)");
    cmd.add_option("--points-per-decade", r.points_per_decade, "AC points per decade (default 10)")
        ->check(CLI::Range(1, 1000));
}

ReviewDeck make_deck(const DeckRequest& r, const std::string& raw_name) {
    DeckOptions options;
    options.mode = r.mode == "held" ? ProbeMode::held : ProbeMode::injected;
    options.from = quantity("--from", r.from, "Hz");
    options.to = quantity("--to", r.to, "Hz");
    if (!(options.from > 0) || !(options.to > options.from))
        throw InputError("usage.bad-quantity", Location("--from"),
                         fmt::format("the AC sweep must run from a positive frequency up: --from {} --to {}", r.from,
                                     r.to));
    options.points_per_decade = r.points_per_decade;
    options.raw_name = raw_name;
    Circuit circuit = read_circuit(r.netlist);
    return write_review_deck(r.netlist, circuit, find_mirrors(circuit), options);
}

// prepare ---------------------------------------------------------------------------

struct PrepareRequest {
    DeckRequest deck;
    std::string output;
};

int run_prepare(const PrepareRequest& r) {
    const fs::path deck_path = fs::absolute(r.output);
    const std::string raw_name = deck_path.stem().string() + ".raw";
    ReviewDeck deck = make_deck(r.deck, raw_name);
    if (fs::exists(deck_path) && fs::equivalent(deck_path, fs::absolute(r.deck.netlist)))
        throw InputError("usage.output", Location(r.output), "the deck would overwrite the netlist; choose another -o");
    std::ofstream out(deck_path, std::ios::binary);
    out << deck.text;
    if (!out) throw InputError("usage.output", Location(r.output), "cannot write the deck here");
    const fs::path folder = deck_path.parent_path();
    std::cout << fmt::format("wrote {} with {} probe{}:\n", r.output, deck.probes.size(),
                             deck.probes.size() == 1 ? "" : "s");
    for (const auto& p : deck.probes) std::cout << fmt::format("  {:<14} {} ({})\n", p.source, p.node, p.mirror);
    for (const auto& n : deck.notes) std::cout << "note: " << n << "\n";
    std::cout << fmt::format("\nrun ngspice in {} (it writes {} there):\n  cd {} && ngspice -b {}\n", folder.string(),
                             raw_name, folder.string(), deck_path.filename().string());
    std::cout << fmt::format("then review the deck (it holds the probes) against its results:\n"
                             "  mirrorcheck review {} --op {}\n",
                             deck_path.string(), (folder / raw_name).string());
    return 0;
}

// run -------------------------------------------------------------------------------

struct RunRequest {
    DeckRequest deck;
    ReviewOptions review;
    std::string ngspice = "ngspice";
    std::string keep;
};

// A fresh folder under the system's temporary folder.
fs::path temporary_folder() {
    std::string pattern = (fs::temp_directory_path() / "mirrorcheck-run-XXXXXX").string();
    if (!mkdtemp(pattern.data()))
        throw InputError("usage.output", Location(fs::temp_directory_path().string()), "cannot create a temporary folder");
    return pattern;
}

int run_run(RunRequest r) {
    const bool keep = !r.keep.empty();
    const fs::path folder = keep ? fs::absolute(r.keep) : temporary_folder();
    if (keep) fs::create_directories(folder);
    struct Cleanup {
        fs::path folder;
        bool keep;
        ~Cleanup() {
            std::error_code ec;
            if (!keep) fs::remove_all(folder, ec);
        }
    } cleanup{folder, keep};

    NgspiceCall call;
    call.executable = r.ngspice;
    call.folder = folder;
    ReviewDeck deck = make_deck(r.deck, "review.raw");
    run_ngspice_batch(call, deck.text);
    const fs::path raw = folder / "review.raw";
    if (!fs::exists(raw)) throw ngspice_failure(call, "wrote no results");
    {
        auto headers = raw::read_raw(raw, raw::Selection{{}, true});
        bool has_op = false;
        for (const auto& p : headers.plots) has_op = has_op || p.kind() == "op";
        if (!has_op) throw ngspice_failure(call, "wrote no operating point");
    }
    for (const auto& n : deck.notes) std::cerr << "note: " << n << "\n";
    r.review.netlist = (folder / call.deck_name).string();
    r.review.op = raw.string();
    int status = review_and_report(r.review);
    if (keep) std::cerr << fmt::format("kept the deck, ngspice's log and results in {}\n", folder.string());
    return status;
}

}  // namespace

void add_prepare_command(CLI::App& app, int& status) {
    auto r = std::make_shared<PrepareRequest>();
    CLI::App* cmd = app.add_subcommand("prepare", "Write an ngspice deck that produces everything a review needs");
    cmd->footer(
        "The deck includes the netlist unchanged, saves every transistor's operating-point\n"
        "parameters, and measures each mirror output's impedance in an AC run of its own,\n"
        "through a probe that carries no DC current (so no bias point moves). It writes\n"
        "DECK-STEM.raw beside the deck; `review DECK --op DECK-STEM.raw` reads it.\n\n"
        "Examples:\n"
        "  mirrorcheck prepare samples/tamarack/bias.cir -o /tmp/bias_review.cir\n"
        "  mirrorcheck prepare amp.cir -o amp_review.cir --mode held --from 10Hz --to 100MHz");
    add_deck_options(*cmd, r->deck);
    cmd->add_option("-o,--output", r->output, "the deck to write")->required();
    cmd->callback([r, &status] { status = run_prepare(*r); });
}

void add_run_command(CLI::App& app, int& status) {
    auto r = std::make_shared<RunRequest>();
    CLI::App* cmd = app.add_subcommand("run", "Prepare the deck, simulate it with ngspice, and review the results");
    cmd->footer(
        "prepare, then ngspice in batch mode in a temporary folder, then review. The exit\n"
        "status is the review's (0 or 1), or 2 when ngspice is missing, fails or does not\n"
        "converge; then the end of its log is printed.\n\n"
        "Examples:\n"
        "  mirrorcheck run samples/tamarack/bias.cir\n"
        "  mirrorcheck run amp.cir --keep amp_review --format json --ngspice /opt/ngspice/bin/ngspice");
    add_deck_options(*cmd, r->deck);
    cmd->add_option("--ngspice", r->ngspice, "the ngspice executable (default: ngspice on PATH)");
    cmd->add_option("--keep", r->keep, "keep the deck, log and results in this folder");
    add_judgement_options(*cmd, r->review);
    cmd->callback([r, &status] { status = run_run(*r); });
}

}  // namespace mirrorcheck::cli
