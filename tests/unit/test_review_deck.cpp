// The review deck (src/deck/review_deck): its probes, put into the designer's Circuit by
// add_deck_probes, are the devices our reader finds when it reads the deck back; the deck's
// own AC sources are held at zero in the probe runs.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>

#include "parsers/netlist/netlist.hpp"
#include "src/deck/review_deck.hpp"
#include "src/model/circuit_build.hpp"
#include "src/recognise/find_mirrors.hpp"
#include "support/circuit_devices.hpp"
#include "support/ngspice_run.hpp"

namespace fs = std::filesystem;

namespace {

const char* netlist_text =
    "two mirrors with an AC input\n"
    ".model nc nmos level=1 vto=0.5 kp=200u lambda=0.06\n.model pc pmos level=1 vto=-0.6 kp=80u lambda=0.08\n"
    ".subckt drive n\nvsig n 0 dc 1 ac 1\n.ends\n"
    "vdd vdd 0 3.3\niref vdd ref 20u\nm1 ref ref 0 0 nc w=10u l=1u\nm2 out ref 0 0 nc w=10u l=1u\nrl vdd out 50k\n"
    "m3 p ref 0 0 nc w=10u l=1u\nmp1 p p vdd vdd pc w=20u l=1u\nmp2 pout p vdd vdd pc w=20u l=1u\nrp pout 0 40k\n"
    "xin in drive\nrin in out 1meg\nvac x 0 dc 0 ac 0.5\nrx x 0 1k\n";


}  // namespace

TEST_CASE("the probes add_deck_probes puts into the circuit are the ones the deck holds") {
    for (auto mode : {mirrorcheck::ProbeMode::injected, mirrorcheck::ProbeMode::held}) {
        CAPTURE(mode == mirrorcheck::ProbeMode::held);
        auto user = mirrorcheck::test::make_temp_dir("mirrorcheck-review-deck");
        auto work = mirrorcheck::test::make_temp_dir("mirrorcheck-review-deck");
        mirrorcheck::test::write_text(user / "amp.cir", netlist_text);
        const auto netlist = mirrorcheck::netlist::read_netlist(user / "amp.cir");
        mirrorcheck::Circuit circuit = mirrorcheck::build_circuit(netlist);
        mirrorcheck::DeckOptions options;
        options.mode = mode;
        options.deck_path = work / "review.cir";
        options.raw_path = work / "review.raw";
        const auto deck = mirrorcheck::write_review_deck(netlist, circuit, mirrorcheck::find_mirrors(circuit), options);
        mirrorcheck::save_review_deck(deck);
        REQUIRE(deck.probes.size() == 3);  // out, p and pout
        CHECK(deck.run_folder == fs::canonical(user));
        mirrorcheck::add_deck_probes(circuit, deck);
        const mirrorcheck::Circuit read_back = mirrorcheck::read_circuit(deck.path);
        CHECK(mirrorcheck::test::devices_without_sources(circuit) == mirrorcheck::test::devices_without_sources(read_back));
        for (const auto& p : deck.probes) {
            const auto* d = circuit.find_device(p.source);
            REQUIRE(d != nullptr);
            CHECK(d->source.line == read_back.find_device(p.source)->source.line);
        }
        // every AC source of the netlist but the probes is at zero in the probe runs
        for (const char* source : {"v.xin.vsig", "vac"})
            CHECK(deck.text.find(std::string("alter @") + source + "[acmag]=0\n") != std::string::npos);
        CHECK(deck.text.find("alter @vdd[acmag]") == std::string::npos);
        std::error_code ec;
        fs::remove_all(user, ec);
        fs::remove_all(work, ec);
    }
}
