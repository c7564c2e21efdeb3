// Runs ngspice on small decks and checks the listing reader against ngspice itself: the
// device and model names of the deck, the values ngspice saved for the same device
// parameters in a raw file and printed with `print`, the full stdout log against the
// redirected `show all` file, and a wide table (`set width=200`) against the default one.
#include <doctest/doctest.h>

#include <cmath>
#include <sstream>
#include <string>

#include "parsers/listing/listing.hpp"
#include "parsers/raw/raw.hpp"
#include "support/ngspice_run.hpp"

namespace {

using mirrorcheck::listing::DeviceListing;
using mirrorcheck::listing::Listing;
using mirrorcheck::listing::read_listing;

// Level-1 NMOS and PMOS mirrors (m=2 output), BSIM3 and BSIM4 mirrors with the models'
// built-in parameters, a BSIM4 device inside a subcircuit, a BJT mirror, a pulse source.
const std::string deck = R"(* listing against raw: level-1, bsim3, bsim4 and bjt mirrors
vdd vdd 0 1.8
iref1 vdd g1 20u
m1 g1 g1 0 0 n1 w=10u l=1u
m2 d1 g1 0 0 n1 w=10u l=1u m=2
m3 d1 d1 vdd vdd p1 w=40u l=1u
m4 o1 d1 vdd vdd p1 w=40u l=1u
vo1 o1 0 0.6
iref2 vdd g2 10u
m5 g2 g2 0 0 n3 w=5u l=0.5u
m6 o2 g2 0 0 n3 w=5u l=0.5u
vo2 o2 0 1.0
iref3 vdd g3 10u
m7 g3 g3 0 0 n4 w=5u l=0.5u
x1 o3 g3 0 out_stage
vo3 o3 0 1.0
.subckt out_stage d g s
m1 d g s s n4 w=5u l=0.5u m=2
.ends
m8 g4 g4 vdd vdd p4 w=10u l=0.5u
iref4 g4 0 10u
iref5 vdd b5 10u
q1 b5 b5 0 npn1
q2 o5 b5 0 npn1 area=2
vo5 o5 0 1.0
vstep pin 0 pulse(0 1 1n 1n 1n 5n 10n)
rstep pin 0 1k
.model n1 nmos level=1 vto=0.5 kp=200u lambda=0.05 gamma=0.4 phi=0.7
.model p1 pmos level=1 vto=-0.5 kp=80u lambda=0.05
.model n3 nmos level=8 version=3.3.0
.model n4 nmos level=14 version=4.8.2
.model p4 pmos level=14 version=4.8.2
.model npn1 npn bf=100 vaf=50
.control
save @m1[gm] @m1[gds] @m1[vdsat] @m1[von] @m2[gm] @m2[gds] @m2[gmb] @m2[id] @m3[gm] @m3[vdsat]
+ @m4[gds] @m4[id] @m4[vds] @m5[gm] @m5[gmbs] @m6[gds] @m6[vth] @m6[vdsat] @m6[id]
+ @m7[gm] @m7[vgs] @m.x1.m1[gm] @m.x1.m1[gds] @m.x1.m1[gmbs] @m.x1.m1[id] @m8[vth] @m8[id] @m8[gm]
+ @q1[ic] @q2[ic] @q2[ib] @q2[gm] @q2[gpi] @q2[go]
op
write out.raw
show all > listing.txt
show m1 : gm gds nosuchparameter
show all
print @m1[gm] @m2[gm] @m6[gds] @m.x1.m1[gds] @q2[go]
set width=200
show all > wide.txt
quit 0
.endc
.end
)";

const mirrorcheck::test::NgspiceRun& ngspice_run() {
    static const auto run = mirrorcheck::test::run_ngspice(deck, "mirrorcheck-listing");
    return run;
}

const DeviceListing& device(const Listing& listing, const std::string& name) {
    const DeviceListing* found = listing.find(name);
    REQUIRE_MESSAGE(found != nullptr, "no device " << name << " in " << listing.path);
    return *found;
}

// `show` prints %.6g: six significant digits, so at most half a unit in the sixth digit off.
bool agrees_to_six_digits(double printed, double exact) {
    return std::abs(printed - exact) <= 5.0001e-6 * std::abs(exact) + 1e-300;
}

// `@m.x1.m1[gm]` -> {"m.x1.m1", "gm"}.
std::pair<std::string, std::string> split_device_parameter(const std::string& name) {
    auto open = name.find('[');
    REQUIRE(name.starts_with("@"));
    REQUIRE(open != std::string::npos);
    return {name.substr(1, open - 1), name.substr(open + 1, name.size() - open - 2)};
}

// The `@dev[param] = value` lines of ngspice's `print`. (No std::regex: GCC 12 warns inside
// it under the sanitizers.)
std::vector<std::pair<std::string, double>> printed_values(const std::string& output) {
    std::vector<std::pair<std::string, double>> values;
    std::istringstream lines(output);
    for (std::string line; std::getline(lines, line);) {
        auto equals = line.find("] = ");
        if (line.starts_with("@") && equals != std::string::npos)
            values.emplace_back(line.substr(0, equals + 1), std::stod(line.substr(equals + 4)));
    }
    return values;
}

}  // namespace

TEST_CASE("ngspice ran the deck") {
    const auto& run = ngspice_run();
    INFO(run.output);
    REQUIRE(run.status == 0);
    REQUIRE(std::filesystem::exists(run.file("listing.txt")));
    REQUIRE(std::filesystem::exists(run.file("out.raw")));
}

TEST_CASE("device names, model names and model types are the deck's") {
    Listing listing = read_listing(ngspice_run().file("listing.txt"));
    struct Expected {
        std::string name, model, model_type;
    };
    std::vector<Expected> expected{
        {"m1", "n1", "Mos1"},    {"m2", "n1", "Mos1"},      {"m3", "p1", "Mos1"},   {"m4", "p1", "Mos1"},
        {"m5", "n3", "BSIM3"},   {"m6", "n3", "BSIM3"},     {"m7", "n4", "BSIM4"},  {"m.x1.m1", "n4", "BSIM4"},
        {"m8", "p4", "BSIM4"},   {"q1", "npn1", "BJT"},     {"q2", "npn1", "BJT"},  {"vstep", "", "Vsource"},
        {"iref5", "", "Isource"}, {"rstep", "R", "Resistor"},
    };
    for (const auto& e : expected) {
        CAPTURE(e.name);
        const auto& d = device(listing, e.name);
        CHECK(d.model == e.model);
        CHECK(d.model_type == e.model_type);
        CHECK_FALSE(d.maybe_cut);
    }
    CHECK(listing.devices.size() == 23);
    CHECK(device(listing, "m.x1.m1").parameters.at("m") == 2.0);
    CHECK(device(listing, "m7").parameters.at("m") == 1.0);
    CHECK(device(listing, "m6").parameters.at("l") == 5e-07);
    CHECK(device(listing, "vstep").vectors.at("pulse") == std::vector<double>{0, 1, 1e-09, 1e-09, 1e-09, 5e-09, 1e-08});
    CHECK(device(listing, "vo1").parameters.at("dc") == 0.6);
}

TEST_CASE("listing values agree with the raw file's values of the same device parameters") {
    const auto& run = ngspice_run();
    Listing listing = read_listing(run.file("listing.txt"));
    auto raw = mirrorcheck::raw::read_raw(run.file("out.raw"));
    REQUIRE(raw.plots.size() == 1);
    const auto& plot = raw.plots.front();
    REQUIRE(plot.variables.size() == 34);

    for (const auto& variable : plot.variables) {
        auto [name, parameter] = split_device_parameter(mirrorcheck::raw::canonical_vector_name(variable.name));
        CAPTURE(variable.name);
        auto index = plot.find(variable.name);
        REQUIRE(index);
        double exact = plot.real[*index][0];
        const auto& d = device(listing, name);
        REQUIRE(d.parameters.count(parameter) == 1);
        CHECK(exact != 0.0);
        CHECK(agrees_to_six_digits(d.parameters.at(parameter), exact));
    }
}

TEST_CASE("listing values agree with ngspice's own `print` lines") {
    const auto& run = ngspice_run();
    Listing listing = read_listing(run.file("listing.txt"));
    auto raw = mirrorcheck::raw::read_raw(run.file("out.raw"));
    auto printed = printed_values(run.output);
    REQUIRE(printed.size() == 5);
    for (const auto& [vector, value] : printed) {
        CAPTURE(vector);
        auto [name, parameter] = split_device_parameter(vector);
        CHECK(agrees_to_six_digits(device(listing, name).parameters.at(parameter), value));
        auto index = raw.plots.front().find(vector);
        REQUIRE(index);
        CHECK(std::abs(raw.plots.front().real[*index][0] - value) <= 5.0001e-7 * std::abs(value));
    }
}

TEST_CASE("the full stdout log reads as the redirected `show all` file") {
    const auto& run = ngspice_run();
    Listing from_file = read_listing(run.file("listing.txt"));
    Listing from_log = read_listing(run.file("ngspice.log"));
    REQUIRE(from_log.devices.size() == from_file.devices.size());
    for (const auto& d : from_file.devices) {
        CAPTURE(d.name);
        const auto& same = device(from_log, d.name);
        CHECK(same.model == d.model);
        CHECK(same.model_type == d.model_type);
        CHECK(same.parameters == d.parameters);
        CHECK(same.text_values == d.text_values);
        CHECK(same.vectors == d.vectors);
    }
    CHECK(device(from_log, "m1").parameters.count("nosuchparameter") == 0);
}

TEST_CASE("a wide table (`set width=200`) reads as the default three-column one") {
    const auto& run = ngspice_run();
    Listing narrow = read_listing(run.file("listing.txt"));
    Listing wide = read_listing(run.file("wide.txt"));
    REQUIRE(wide.devices.size() == narrow.devices.size());
    for (const auto& d : narrow.devices) {
        CAPTURE(d.name);
        CHECK(device(wide, d.name).parameters == d.parameters);
        CHECK(device(wide, d.name).vectors == d.vectors);
    }
}

TEST_CASE("long names of wrapped devices are cut to 21 characters and flagged") {
    const std::string wrapped_deck = R"(* a transistor wrapped in a subcircuit, as process kits do
vdd vdd 0 1.8
iref vdd g 10u
xmirror_reference g g 0 0 nfet_wrapper_core_device
xmirror_output_one o g 0 0 nfet_wrapper_core_device
vo o 0 1.0
.subckt nfet_wrapper_core_device d g s b
mnfet_wrapper_core_device d g s b nwrap w=5u l=0.5u
.ends
.model nwrap nmos level=14 version=4.8.2
.control
op
show all > listing.txt
quit 0
.endc
.end
)";
    auto run = mirrorcheck::test::run_ngspice(wrapped_deck, "mirrorcheck-listing-cut");
    INFO(run.output);
    REQUIRE(run.status == 0);
    Listing listing = read_listing(run.file("listing.txt"));

    for (std::string full : {"m.xmirror_reference.mnfet_wrapper_core_device",
                             "m.xmirror_output_one.mnfet_wrapper_core_device"}) {
        CAPTURE(full);
        auto candidates = listing.find_candidates(full);
        REQUIRE(candidates.size() == 1);
        CHECK(candidates.front()->name == full.substr(0, mirrorcheck::listing::printed_name_length));
        CHECK(candidates.front()->maybe_cut);
        CHECK(candidates.front()->parameters.count("gm") == 1);
    }
}
