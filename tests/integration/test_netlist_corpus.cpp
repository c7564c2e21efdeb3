// The netlist reader on the shared corpus of third-party decks (../shared/corpus, read in
// place; skipped with a message when absent): every deck is read, or refused with a clear
// "unsupported"; for the two process-kit mirror decks, our devices, models and nets equal
// those of ngspice: its recorded `show all` log and raw file, and a fresh `listing expand`.
#include <doctest/doctest.h>

#include <algorithm>
#include <filesystem>
#include <map>
#include <sstream>
#include <set>
#include <string>
#include <vector>

#include "src/model/circuit_build.hpp"
#include "support/corpus.hpp"
#include "support/ngspice_run.hpp"
#include "test_netlist_support.hpp"

namespace fs = std::filesystem;
using mirrorcheck::Circuit;
using namespace mirrorcheck::test::netlist;

namespace {

using mirrorcheck::test::corpus_dir;
using mirrorcheck::test::corpus_present;

std::vector<fs::path> corpus_decks() {
    std::vector<fs::path> decks;
    for (const auto& entry : fs::recursive_directory_iterator(corpus_dir())) {
        auto ext = entry.path().extension().string();
        if (entry.is_regular_file() && (ext == ".cir" || ext == ".sp" || ext == ".in" || ext == ".net"))
            decks.push_back(entry.path());
    }
    std::sort(decks.begin(), decks.end());
    return decks;
}

// A variable table entry of an ASCII raw file: "\t3\ti(@m.xm3.m0[id])\tcurrent".
std::vector<std::string> raw_variables(const fs::path& raw) {
    std::vector<std::string> names;
    std::istringstream in(mirrorcheck::test::read_text(raw));
    std::string line;
    bool in_table = false;
    while (std::getline(in, line)) {
        if (line.rfind("Variables:", 0) == 0) {
            in_table = true;
            continue;
        }
        if (line.rfind("Values:", 0) == 0 || line.rfind("Binary:", 0) == 0) break;
        if (!in_table) continue;
        std::istringstream words(line);
        std::string index, name;
        words >> index >> name;
        names.push_back(name);
    }
    return names;
}

// "v(out)" -> net "out"; "i(@m1[id])", "@m1[gm]", "v(m1#body)" -> device "m1"; others -> "".
std::string raw_net(const std::string& v) {
    if (v.rfind("v(", 0) == 0 && v.find_first_of("@#") == std::string::npos) return v.substr(2, v.size() - 3);
    return {};
}
std::string raw_internal_node_device(const std::string& v) {
    auto hash = v.find('#');
    if (v.rfind("v(", 0) != 0 || hash == std::string::npos) return {};
    return v.substr(2, hash - 2);
}
std::string raw_device(const std::string& v) {
    auto at = v.find('@');
    auto bracket = v.find('[');
    if (at == std::string::npos || bracket == std::string::npos) return {};
    return v.substr(at + 1, bracket - at - 1);
}

void check_against_expected(const fs::path& deck, const std::string& stem) {
    Circuit c = mirrorcheck::read_circuit(deck);
    fs::path expected = deck.parent_path() / "expected";
    std::string log = mirrorcheck::test::read_text(expected / (stem + ".log"));

    // Devices and models: ngspice's `show all` log.
    auto shown = shown_devices(log);
    std::set<std::string> ours, theirs;
    for (const auto& d : c.devices()) ours.insert(cut(d.name));
    for (const auto& [name, rows] : shown) theirs.insert(name);
    CHECK(ours == theirs);
    CHECK(c.devices().size() == shown.size());
    CHECK(check_against_show(c, log, 1) == 4);

    // Nets and device names: the raw file's vectors.
    std::set<std::string> our_nets, raw_nets;
    for (const auto& n : c.nets())
        if (n.name != "0") our_nets.insert(n.name);
    std::size_t device_vectors = 0;
    for (const auto& v : raw_variables(expected / (stem + "_op_ascii.raw"))) {
        if (auto net = raw_net(v); !net.empty()) raw_nets.insert(net);
        if (auto dev = raw_internal_node_device(v); !dev.empty()) CHECK_MESSAGE(c.find_device(dev) != nullptr, dev);
        if (auto dev = raw_device(v); !dev.empty()) {
            CHECK_MESSAGE(c.find_device(dev) != nullptr, dev);
            ++device_vectors;
        }
    }
    CHECK(our_nets == raw_nets);
    CHECK(device_vectors >= 4);
}

// `showmod DEVICE : lmin lmax wmin wmax` for every binned MOS device: the bin ngspice chose.
std::vector<const mirrorcheck::Device*> binned_devices(const Circuit& c) {
    std::vector<const mirrorcheck::Device*> out;
    for (const auto& d : c.devices())
        if (d.kind == mirrorcheck::DeviceKind::mosfet && d.model && d.model->parameters.count("lmin")) out.push_back(&d);
    return out;
}

// The bin limits of each `showmod` block, in the order the commands were given.
std::vector<std::map<std::string, double>> shown_bin_limits(const std::string& output) {
    std::vector<std::map<std::string, double>> out;
    std::istringstream in(output);
    std::string line;
    while (std::getline(in, line)) {
        std::istringstream words(line);
        std::string key, value;
        words >> key >> value;
        if (key == "model" && value.find("?") == std::string::npos) out.emplace_back();
        else if (!out.empty() && (key == "lmin" || key == "lmax" || key == "wmin" || key == "wmax"))
            out.back()[key] = std::stod(value);
    }
    return out;
}

// Copies a corpus folder, swaps the deck's control block for a listing, runs ngspice.
// Returns how many devices with a model `show` confirmed.
std::size_t check_against_live_listing(const fs::path& folder, const std::string& deck_name) {
    fs::path dir = mirrorcheck::test::make_temp_dir("mirrorcheck-netlist-corpus");
    fs::copy(folder, dir, fs::copy_options::recursive);
    fs::permissions(dir / deck_name, fs::perms::owner_write, fs::perm_options::add);
    std::string deck = mirrorcheck::test::read_text(dir / deck_name);
    deck = deck.substr(0, std::min(deck.find(".control"), deck.find(".end\n")));
    mirrorcheck::test::write_text(dir / deck_name, deck);
    Circuit c = mirrorcheck::read_circuit(dir / deck_name);
    std::string showmods;
    for (const auto* d : binned_devices(c)) showmods += "showmod " + d->name + " : lmin lmax wmin wmax\n";
    mirrorcheck::test::write_text(dir / deck_name,
                                  deck + ".control\nlisting expand\nshow all\necho bins-follow\n" + showmods + "quit 0\n.endc\n.end\n");
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
    std::string cmd = "cd '" + dir.string() + "' && ngspice -b " + deck_name + " > ngspice.log 2> ngspice.err";
    REQUIRE(std::system(cmd.c_str()) == 0);
    std::string output = mirrorcheck::test::read_text(dir / "ngspice.log");
    check_against_listing(c, listed_elements(output, c.title));
    std::size_t models = check_against_show(c, output);
    auto limits = shown_bin_limits(output.substr(output.find("bins-follow")));
    auto binned = binned_devices(c);
    REQUIRE(limits.size() == binned.size());
    for (std::size_t i = 0; i < binned.size(); ++i)
        for (const auto& [key, value] : limits[i])
            CHECK_MESSAGE(binned[i]->model->parameters.at(key) == doctest::Approx(value), binned[i]->name << " " << key);
    std::error_code ec;
    fs::permissions(dir, fs::perms::owner_all, fs::perm_options::add, ec);
    for (const auto& entry : fs::recursive_directory_iterator(dir, ec))
        fs::permissions(entry.path(), fs::perms::owner_all, fs::perm_options::add, ec);
    fs::remove_all(dir, ec);
    return models;
}

}  // namespace

TEST_CASE("corpus: every deck is read, or refused as unsupported") {
    if (!corpus_present()) return;
    // Decks that use what this reader refuses, with the code it must give.
    const std::set<std::string> unsupported{};
    std::size_t read = 0;
    for (const fs::path& deck : corpus_decks()) {
        CAPTURE(deck.string());
        try {
            Circuit c = mirrorcheck::read_circuit(deck);
            CHECK_MESSAGE(unsupported.count(deck.filename().string()) == 0, "now supported: " << deck.string());
            ++read;
        } catch (const mirrorcheck::InputError& e) {
            CHECK_MESSAGE(unsupported.count(deck.filename().string()) == 1, e.what());
            CHECK(e.code() == "netlist.unsupported");
            CHECK(e.where().line > 0);
        }
    }
    CHECK(read >= 70);
}

TEST_CASE("corpus: the GF180MCU mirror equals ngspice's recorded devices, models and nets") {
    if (!corpus_present()) return;
    check_against_expected(corpus_dir() / "gf180mcu" / "mirror_gf180.cir", "mirror_gf180");
}

TEST_CASE("corpus: the SKY130 mirror equals ngspice's recorded devices, models and nets") {
    if (!corpus_present()) return;
    check_against_expected(corpus_dir() / "sky130" / "mirror_sky130.cir", "mirror_sky130");
}

TEST_CASE("corpus: both mirrors equal a fresh ngspice listing") {
    if (!corpus_present()) return;
    CHECK(check_against_live_listing(corpus_dir() / "gf180mcu", "mirror_gf180.cir") == 4);
    CHECK(check_against_live_listing(corpus_dir() / "sky130", "mirror_sky130.cir") == 4);
}

TEST_CASE("corpus: ngspice's own decks flatten as ngspice lists them") {
    if (!corpus_present()) return;
    const std::vector<std::string> decks = {
        "ngspice/tests/regression/misc/if-elseif.cir",
        "ngspice/tests/regression/misc/dollar-1.cir",
        "ngspice/tests/regression/model/binning-1.cir",
        "ngspice/tests/regression/lib-processing/ex1a.cir",
        "ngspice/tests/regression/lib-processing/scope-2.cir",
        "ngspice/tests/regression/subckt-processing/global-1.cir",
        "ngspice/tests/regression/subckt-processing/model-scope-5.cir",
        "ngspice/examples/measure/inv-meas-tran.sp",
        "ngspice/examples/mos/ro-meas.cir",
        "ngspice/examples/mos/adder_mos.cir",
        "ngspice/examples/numparam/param-example.cir",
        "ngspice/examples/Monte_Carlo/mc_ring_circ.net",
        "ngspice/examples/digital/compare/adder_bip.cir",
        "ngspice/examples/vbic/vbic99_dc.sp",
    };
    for (const std::string& deck : decks) {
        SUBCASE(deck.c_str()) {
            fs::path path = corpus_dir() / deck;
            std::size_t models = check_against_live_listing(path.parent_path(), path.filename().string());
            MESSAGE(deck << ": " << models << " devices with a model checked against `show`");
        }
    }
}
