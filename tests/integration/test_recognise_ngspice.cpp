// Integration tests of the recognition pass against ngspice: every recognition deck is a
// valid circuit that converges, the devices recognised are named as ngspice names them,
// and the currents ngspice finds in each mirror's bottom devices follow the design ratio
// the pass read from the netlist.
#include <doctest/doctest.h>

#include <cmath>
#include <filesystem>
#include <map>
#include <regex>
#include <string>
#include <vector>

#include "src/model/circuit_build.hpp"
#include "src/recognise/find_mirrors.hpp"
#include "support/ngspice_run.hpp"

using mirrorcheck::Circuit;
using mirrorcheck::Family;
using mirrorcheck::Mirror;

namespace {

std::filesystem::path deck_dir() { return std::filesystem::path(MIRRORCHECK_TEST_DATA) / "recognise"; }

std::vector<std::filesystem::path> all_decks() {
    std::vector<std::filesystem::path> decks;
    for (const auto& entry : std::filesystem::directory_iterator(deck_dir()))
        if (entry.path().extension() == ".cir") decks.push_back(entry.path());
    std::sort(decks.begin(), decks.end());
    return decks;
}

// "@m1[id]" for MOS, "@q1[ic]" for bipolar.
std::string current_vector(const Circuit& c, std::size_t device) {
    const auto& d = c.devices()[device];
    return "@" + d.name + (d.kind == mirrorcheck::DeviceKind::bjt ? "[ic]" : "[id]");
}

// The deck with its `print all` replaced by a print of the given vectors.
std::string with_prints(const std::string& deck, const std::vector<std::string>& vectors) {
    std::string line = "print";
    for (const auto& v : vectors) line += " " + v;
    auto at = deck.find("print all");
    REQUIRE(at != std::string::npos);
    return deck.substr(0, at) + line + deck.substr(at + std::string("print all").size());
}

// Values ngspice printed as `name = value`, by name.
std::map<std::string, double> printed(const std::string& output) {
    std::map<std::string, double> values;
    static const std::regex line(R"((\S+)\s+=\s+([-+0-9.eE]+))");
    for (auto it = std::sregex_iterator(output.begin(), output.end(), line); it != std::sregex_iterator(); ++it)
        values[(*it)[1].str()] = std::stod((*it)[2].str());
    return values;
}

bool ratio_follows_design(Family f) { return f != Family::widlar && f != Family::current_source; }

// Cascoded outputs and the improved Wilson hold the bottom devices at equal drain voltages.
double ratio_tolerance(Family f) {
    switch (f) {
        case Family::cascode:
        case Family::wide_swing_cascode:
        case Family::regulated_cascode:
        case Family::improved_wilson: return 0.01;
        default: return 0.15;  // channel-length modulation and base currents: a few per cent
    }
}

}  // namespace

TEST_CASE("every recognition deck converges in ngspice") {
    auto decks = all_decks();
    CHECK(decks.size() >= 40);
    for (const auto& path : decks) {
        CAPTURE(path.filename().string());
        auto run = mirrorcheck::test::run_ngspice(mirrorcheck::test::read_text(path), "mirrorcheck-recognise");
        CHECK(run.status == 0);
        CHECK(run.output.find("singular") == std::string::npos);
        CHECK(run.output.find("failed") == std::string::npos);
    }
}

TEST_CASE("ngspice's currents in each recognised mirror follow its design ratio") {
    for (const auto& path : all_decks()) {
        Circuit c = mirrorcheck::read_circuit(path);
        auto mirrors = mirrorcheck::find_mirrors(c);
        if (mirrors.empty()) continue;
        CAPTURE(path.filename().string());
        std::vector<std::string> vectors;
        for (const Mirror& m : mirrors)
            for (const auto& out : m.outputs) {
                for (std::size_t d : out.devices) vectors.push_back(current_vector(c, d));
                if (!m.reference.empty()) vectors.push_back(current_vector(c, m.reference.front()));
            }
        auto run = mirrorcheck::test::run_ngspice(with_prints(mirrorcheck::test::read_text(path), vectors),
                                                  "mirrorcheck-recognise");
        REQUIRE(run.status == 0);
        auto values = printed(run.output);
        for (const auto& v : vectors) {
            CAPTURE(v);
            REQUIRE(values.contains(v));
            CHECK(std::abs(values[v]) > 1e-7);  // every recognised device conducts
        }
        for (const Mirror& m : mirrors) {
            if (!ratio_follows_design(m.family)) continue;
            CAPTURE(m.id);
            double ref = std::abs(values[current_vector(c, m.reference.front())]);
            for (const auto& out : m.outputs) {
                double measured = std::abs(values[current_vector(c, out.devices.front())]) / ref;
                CHECK(measured == doctest::Approx(out.design_ratio.value()).epsilon(ratio_tolerance(m.family)));
            }
        }
    }
}
