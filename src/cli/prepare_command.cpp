#include "src/cli/prepare_command.hpp"

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <memory>

#include <fmt/format.h>

#include "parsers/netlist/netlist.hpp"
#include "parsers/raw/raw.hpp"
#include "src/cli/netlist_limits_option.hpp"
#include "src/cli/review_command.hpp"
#include "src/cli/timeout_option.hpp"
#include "src/cli/usage_errors.hpp"
#include "src/cli/work_folder.hpp"
#include "src/deck/child_process.hpp"
#include "src/deck/ngspice_runner.hpp"
#include "src/deck/review_deck.hpp"
#include "src/model/circuit_build.hpp"
#include "src/recognise/find_mirrors.hpp"

namespace mirrorcheck::cli {
namespace {

namespace fs = std::filesystem;

struct DeckRequest {
    std::string netlist;
    std::string mode = "injected";
    std::string from = "1Hz", to = "1GHz";
    int points_per_decade = 10;
    bool no_alone = false;
    netlist::ReadLimits limits;
};

void add_deck_options(CLI::App& cmd, DeckRequest& r) {
    cmd.add_option("NETLIST", r.netlist, "ngspice netlist, as it is (never edited)")->required()->check(CLI::ExistingFile);
    cmd.add_option("--mode", r.mode,
                   "probe mode: injected (an AC current into each output as the circuit has it) or held (an AC "
                   "voltage through a coupling capacitor, the other outputs held at AC ground) (default injected)")
        ->check(CLI::IsMember({"held", "injected"}));
    cmd.add_option("--from", r.from, "first AC frequency (default 1Hz)");
    cmd.add_option("--to", r.to, "last AC frequency (default 1GHz)");
    cmd.add_option("--points-per-decade", r.points_per_decade, "AC points per decade (default 10)")
        ->check(CLI::Range(1, 1000));
    cmd.add_flag("--no-alone", r.no_alone,
                 "do not measure each mirror alone (by default the deck also runs, for every mirror, a testbench "
                 "of the mirror by itself at the circuit's operating point)");
    add_netlist_limit_options(cmd, r.limits);
}

DeckOptions deck_options(const DeckRequest& r) {
    DeckOptions options;
    options.mode = r.mode == "held" ? ProbeMode::held : ProbeMode::injected;
    options.from = quantity("--from", r.from, "Hz");
    options.to = quantity("--to", r.to, "Hz");
    if (!(options.from > 0) || !(options.to > options.from))
        throw usage::sweep_not_upwards(r.from, r.to);
    options.points_per_decade = r.points_per_decade;
    options.alone = !r.no_alone;
    return options;
}

// The designer's netlist as read, its Circuit, and the review deck around it.
struct Prepared {
    Circuit circuit;
    ReviewDeck deck;
};

Prepared prepare_deck(const DeckRequest& r, DeckOptions options, const fs::path& deck_path, const fs::path& raw_path) {
    options.deck_path = deck_path;
    options.raw_path = raw_path;
    const netlist::FlatNetlist netlist = netlist::read_netlist(r.netlist, r.limits);
    Prepared p{build_circuit(netlist), {}};
    p.deck = write_review_deck(netlist, p.circuit, find_mirrors(p.circuit), options);
    // Never write over a file the deck reads.
    for (const auto& f : netlist.files)
        for (const fs::path& written : {p.deck.path, fs::path(raw_path)})
            if (fs::exists(written) && fs::equivalent(written, f.path))
                throw usage::would_overwrite_input(written.string(), f.path.string());
    std::vector<fs::path> written;
    for (const auto& copy : p.deck.included) written.push_back(copy.path);
    for (const auto& bench : p.deck.alone.benches) {
        written.push_back(bench.path);
        for (const auto& copy : bench.included) written.push_back(copy.path);
    }
    for (const auto& path : written)
        for (const auto& f : netlist.files)
            if (fs::exists(path) && fs::equivalent(path, f.path)) throw usage::copy_would_overwrite_input(path.string());
    save_review_deck(p.deck);
    return p;
}

std::vector<std::string> left_out_lines(const ReviewDeck& deck) {
    std::vector<std::string> lines;
    for (const auto& card : deck.left_out) lines.push_back(to_string(card));
    return lines;
}

// prepare ---------------------------------------------------------------------------

struct PrepareRequest {
    DeckRequest deck;
    std::string output;
};

std::string shell_word(const fs::path& p) {
    std::string s = p.string();
    return s.find_first_of(" \t'\"$") == std::string::npos ? s : "'" + s + "'";
}

int run_prepare(const PrepareRequest& r) {
    const fs::path deck_path = fs::absolute(r.output).lexically_normal();
    const fs::path raw_path = deck_path.parent_path() / (deck_path.stem().string() + ".raw");
    Prepared p = prepare_deck(r.deck, deck_options(r.deck), deck_path, raw_path);
    const ReviewDeck& deck = p.deck;
    std::cout << fmt::format("wrote {} with {} probe{}:\n", r.output, deck.probes.size(),
                             deck.probes.size() == 1 ? "" : "s");
    for (const auto& pr : deck.probes) std::cout << fmt::format("  {:<14} {} ({})\n", pr.source, pr.node, pr.mirror);
    for (const auto& copy : deck.included)
        std::cout << fmt::format("also a derived copy of {}: {}\n", copy.original.string(), copy.path.string());
    if (!deck.alone.benches.empty())
        std::cout << "and the testbenches of the mirrors alone, which the deck runs after the circuit:\n";
    for (const auto& bench : deck.alone.benches) {
        std::cout << fmt::format("  {} ({})\n", bench.path.string(), bench.mirror);
        for (const auto& copy : bench.included)
            std::cout << fmt::format("    with a derived copy of {}: {}\n", copy.original.string(), copy.path.string());
    }
    if (!deck.left_out.empty()) {
        std::cout << "left out of the review deck (the review runs its own analyses):\n";
        for (const auto& line : left_out_lines(deck)) std::cout << "  " << line << "\n";
    }
    for (const auto& n : deck.notes) std::cout << "note: " << n << "\n";
    std::cout << fmt::format("\nrun ngspice in the netlist's folder, where its relative paths resolve (it writes {}):\n"
                             "  cd {} && ngspice -b {}\n",
                             raw_path.string(), shell_word(deck.run_folder), shell_word(deck_path));
    std::cout << fmt::format("then review the deck (it holds the probes) against its results:\n"
                             "  mirrorcheck review {} --op {}\n",
                             shell_word(deck_path), shell_word(raw_path));
    return 0;
}

// run -------------------------------------------------------------------------------

struct RunRequest {
    DeckRequest deck;
    ReviewOptions review;
    std::string ngspice = "ngspice";
    std::string keep;
    double timeout = default_timeout_seconds;  // seconds; 0: no limit
};

int run_run(RunRequest r) {
    const DeckOptions options = deck_options(r.deck);
    const std::chrono::seconds timeout = timeout_seconds(r.timeout);
    const bool keep = !r.keep.empty();
    // From here SIGINT, SIGTERM and SIGHUP end ngspice and unwind through the clean-up.
    const StopSignals stop_guard;
    const fs::path folder = claim_work_folder(r.keep, "run");
    struct Cleanup {
        fs::path folder;
        bool keep;
        ~Cleanup() {
            std::error_code ec;
            if (!keep) fs::remove_all(folder, ec);
        }
    } cleanup{folder, keep};

    const fs::path raw = folder / "review.raw";
    Prepared p = prepare_deck(r.deck, options, folder / "review.cir", raw);
    NgspiceCall call;
    call.executable = r.ngspice;
    call.deck = p.deck.path;
    call.log = folder / "ngspice.log";
    call.run_folder = p.deck.run_folder;
    call.timeout = timeout;
    std::error_code ec;
    fs::remove(raw, ec);  // a kept folder's results of an earlier run
    run_ngspice_batch(call);
    if (stop_signal() != 0) throw NgspiceStopped{stop_signal()};
    if (!fs::exists(raw)) throw ngspice_failure(call, "wrote no results");
    {
        auto headers = raw::read_raw(raw, raw::Selection{{}, true});
        bool has_op = false;
        for (const auto& plot : headers.plots) has_op = has_op || plot.kind() == "op";
        if (!has_op) throw ngspice_failure(call, "wrote no operating point");
    }
    for (const auto& n : p.deck.notes) std::cerr << "note: " << n << "\n";
    for (const auto& line : left_out_lines(p.deck)) std::cerr << "note: left out of the review deck: " << line << "\n";
    add_deck_probes(p.circuit, p.deck);
    r.review.netlist = r.deck.netlist;
    r.review.op = raw.string();
    if (!keep) r.review.op_name = "ngspice run (not kept)";
    int status = review_circuit_and_report(r.review, p.circuit, left_out_lines(p.deck));
    if (keep) std::cerr << fmt::format("kept the deck, ngspice's log and results in {}\n", folder.string());
    return status;
}

}  // namespace

void add_prepare_command(CLI::App& app, int& status) {
    auto r = std::make_shared<PrepareRequest>();
    CLI::App* cmd = app.add_subcommand("prepare", "Write an ngspice deck that produces everything a review needs");
    cmd->footer(
        "The deck is a derived copy of the netlist, line for line: its own .control blocks,\n"
        "analyses and output requests (but .save) become comment lines, relative file names\n"
        "become absolute; then it saves every transistor's operating-point parameters and\n"
        "measures each mirror output's impedance in an AC run of its own, through a probe\n"
        "that carries no DC current (so no bias point moves), with the netlist's own AC\n"
        "sources at zero. Then, for every mirror, it runs a testbench of the mirror alone\n"
        "(DECK-STEM.aloneN.cir, written beside the deck: the deck with every element not part\n"
        "of the mirror left out, each net the mirror touches held at its operating voltage or\n"
        "fed its operating current) and measures each output's own resistance with .tf.\n"
        "It lists what it left out. Run ngspice in the netlist's folder;\n"
        "it writes DECK-STEM.raw beside the deck; `review DECK --op DECK-STEM.raw` reads it.\n\n"
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
        "prepare (the deck and its results in a temporary folder), then ngspice in batch mode\n"
        "in the netlist's own folder (where its relative paths resolve), then the review of the\n"
        "netlist with the deck's probes. The exit status is the review's (0 or 1), or 2 when\n"
        "ngspice is missing, fails, does not converge or runs past --timeout; then the end of\n"
        "its log is printed. Ctrl-C, SIGTERM or SIGHUP end ngspice and remove the temporary\n"
        "folder (the status is then 128 + the signal). A --keep folder must be new, empty, or\n"
        "one an earlier `run --keep` wrote: nothing in it that mirrorcheck did not write is replaced.\n\n"
        "Examples:\n"
        "  mirrorcheck run samples/tamarack/bias.cir\n"
        "  mirrorcheck run amp.cir --keep amp_review --format json --ngspice /opt/ngspice/bin/ngspice");
    add_deck_options(*cmd, r->deck);
    cmd->add_option("--ngspice", r->ngspice, "the ngspice executable (default: ngspice on PATH)");
    cmd->add_option("--keep", r->keep,
                    "keep the deck, log and results in this folder (a new or empty one, or one an earlier run "
                    "--keep wrote)");
    add_timeout_option(*cmd, r->timeout, "the run stops with status 2");
    add_judgement_options(*cmd, r->review);
    cmd->callback([r, &status] { status = run_run(*r); });
}

}  // namespace mirrorcheck::cli
