// `sweep --corners` on a deck that picks its process corner by file name, as the corpus's
// SKY130 corner deck does (`.include ".../sky130_fd_pr__nfet_01v8__tt.corner.spice"`, one
// line per device type, beside a `__mismatch.corner.spice` of the same family), run as it
// is on a copy of ../shared/corpus/sky130 (ngspice writes into the deck's folder):
// - each corner's run simulates that corner: the operating point of every run equals what
//   ngspice printed for the same corner in the corpus's own logs (expected/corners_sky130_
//   CORNER.log, made by the corpus's authors with the deck's two names changed), to the
//   7 digits ngspice printed;
// - asked for corners that do not include the deck's own (`tt`), the sweep cannot tell the
//   corner file from the mismatch file and says so (exit status 2), instead of guessing.
#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"
#include "support/corpus.hpp"
#include "support/ngspice_run.hpp"
#include "support/run_cli.hpp"

namespace fs = std::filesystem;

namespace {

// The `name = value` lines ngspice's `print` wrote into a log.
std::map<std::string, double> printed_values(const fs::path& log) {
    std::map<std::string, double> values;
    std::ifstream in(log);
    for (std::string line; std::getline(in, line);) {
        const auto eq = line.find(" = ");
        if (eq == std::string::npos || line.find(' ') < eq) continue;
        try {
            values[line.substr(0, eq)] = std::stod(line.substr(eq + 3));
        } catch (const std::exception&) {
        }
    }
    return values;
}

}  // namespace

TEST_CASE("SKY130 corners by file name: every run at its corner, as ngspice printed it") {
    if (!mirrorcheck::test::corpus_present()) return;
    const fs::path corpus = mirrorcheck::test::corpus_dir() / "sky130";
    const auto dir = mirrorcheck::test::make_temp_dir("mc-sweep-sky130");
    fs::copy(corpus, dir / "sky130", fs::copy_options::recursive);
    const fs::path deck = dir / "sky130" / "corners_sky130.cir";
    const std::string original = mirrorcheck::test::read_text(deck);

    const auto r = mirrorcheck::test::run_cli("sweep corners_sky130.cir --corners tt,ss,ff,sf,fs --jobs 2 --keep "
                                              "../work --format json",
                                              dir / "sky130");
    REQUIRE_MESSAGE(r.status < 2, r.err);
    CHECK(mirrorcheck::test::read_text(deck) == original);
    const auto report = nlohmann::json::parse(r.out);
    REQUIRE(report["runs"].size() == 5);
    const char* corners[] = {"tt", "ss", "ff", "sf", "fs"};
    for (std::size_t k = 0; k < 5; ++k) {
        const std::string corner = corners[k];
        CAPTURE(corner);
        CHECK(report["runs"][k]["label"] == corner);
        CHECK_FALSE(report["runs"][k].value("failed", false));
        const auto expected = printed_values(corpus / "expected" / ("corners_sky130_" + corner + ".log"));
        REQUIRE(expected.size() >= 19);
        const auto raw = mirrorcheck::raw::read_raw(dir / "work" / ("run" + std::to_string(k + 1)) / "review.raw");
        const mirrorcheck::raw::Plot* op = nullptr;
        for (const auto& p : raw.plots)
            if (p.kind() == "op") op = &p;
        REQUIRE(op);
        std::size_t compared = 0;
        for (const auto& [name, value] : expected) {
            const auto v = op->find(name);
            if (!v) continue;
            CAPTURE(name);
            CHECK(op->real[*v][0] == doctest::Approx(value).epsilon(2e-6).scale(1e-12));
            ++compared;
        }
        CHECK(compared >= 15);  // the devices' id, vds, vdsat, vth and the node voltages
    }
    // The corners differ: ss's nfet threshold is above ff's (a fact of the trade; the values
    // themselves are ngspice's, compared above).
    const auto vth = [&](const std::string& corner) {
        return printed_values(corpus / "expected" / ("corners_sky130_" + corner + ".log"))
            .at("@m.xm1.msky130_fd_pr__nfet_01v8[vth]");
    };
    CHECK(vth("ss") > vth("ff"));

    const auto ambiguous = mirrorcheck::test::run_cli("sweep corners_sky130.cir --corners ss,ff", dir / "sky130");
    CHECK(ambiguous.status == 2);
    CHECK(ambiguous.err.find("[sweep.ambiguous-corner]") != std::string::npos);
    CHECK(ambiguous.err.find("corners_sky130.cir:8") != std::string::npos);
    fs::remove_all(dir);
}
