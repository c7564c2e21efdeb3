// Unit tests of the `show` listing reader. The fixtures in tests/data/listing are ngspice 39's
// own output for mos1_mirror.cir (the `show all` file and the full stdout log) and hand-made
// malformed copies of its tables; the expected values are the numbers ngspice printed there.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <string>

#include "parsers/common/input_error.hpp"
#include "parsers/listing/listing.hpp"
#include "support/ngspice_run.hpp"

namespace {

using mirrorcheck::InputError;
using mirrorcheck::listing::DeviceListing;
using mirrorcheck::listing::Listing;
using mirrorcheck::listing::parse_listing;
using mirrorcheck::listing::read_listing;

std::string fixture(const std::string& name) { return std::string(MIRRORCHECK_TEST_DATA) + "/listing/" + name; }

const DeviceListing& device(const Listing& listing, const std::string& name) {
    const DeviceListing* found = listing.find(name);
    REQUIRE_MESSAGE(found != nullptr, "no device " << name);
    return *found;
}

struct ExpectedError {
    std::string code;
    std::size_t line = 0;
    std::size_t column = 0;
};

ExpectedError error_of_file(const std::string& name) {
    try {
        read_listing(fixture(name));
    } catch (const InputError& e) {
        CHECK(e.where().file == fixture(name));
        CHECK_FALSE(e.message().empty());
        return {e.code(), e.where().line, e.where().column};
    }
    FAIL("no error reading " << name);
    return {};
}

std::string error_code_of_text(const std::string& text) {
    try {
        parse_listing(text, "inline.txt");
    } catch (const InputError& e) {
        return e.code();
    }
    return "";
}

// A block in ngspice's layout: name right-aligned in 11 columns, each value in 22.
std::string row(const std::string& name, std::initializer_list<std::string> values) {
    std::string line = std::string(name.size() < 11 ? 11 - name.size() : 0, ' ') + name;
    for (const std::string& v : values) line += std::string(v.size() < 22 ? 22 - v.size() : 0, ' ') + v;
    return line + "\n";
}

const std::string mos1_header = " Mos1: Level 1 MOSfet model with Meyer capacitance model\n";

}  // namespace

TEST_CASE("a `show all` file: devices, models, model types and values as ngspice printed them") {
    Listing listing = read_listing(fixture("mos1_mirror_show.txt"));

    std::vector<std::string> names;
    for (const auto& d : listing.devices) names.push_back(d.name);
    std::vector<std::string> expected{"l2",  "l1",    "k12",   "iref", "m3",  "m.xwrap.mtransistor_c", "m2",
                                      "m1",  "rsn",   "rin",   "vsine", "vstep", "vd2", "vpb", "vdd"};
    CHECK(names == expected);

    const auto& m1 = device(listing, "m1");
    CHECK(m1.model == "nch");
    CHECK(m1.model_type == "Mos1");
    CHECK(m1.model_description == "Level 1 MOSfet model with Meyer capacitance model");
    CHECK(m1.line == 63);
    CHECK(m1.parameters.at("gm") == 0.000204429);
    CHECK(m1.parameters.at("gds") == 9.57136e-07);
    CHECK(m1.parameters.at("id") == 2e-05);
    CHECK(m1.parameters.size() == 23);

    const auto& m3 = device(listing, "m3");
    CHECK(m3.model == "pch");
    CHECK(m3.parameters.at("vdsat") == -0.8);
    CHECK(m3.parameters.at("vbs") == 0.0);
    CHECK(std::signbit(m3.parameters.at("vbs")));  // printed `-0`
    CHECK(m3.line == 36);

    CHECK(device(listing, "m2").parameters.at("gm") == 0.000454778);
    CHECK(device(listing, "rin").model == "R");
}

TEST_CASE("sources: `-` placeholders are left out, waveform rows become vectors") {
    Listing listing = read_listing(fixture("mos1_mirror_show.txt"));

    const auto& iref = device(listing, "iref");
    CHECK(iref.model.empty());
    CHECK(iref.model_type == "Isource");
    CHECK(iref.parameters.at("dc") == 2e-05);
    CHECK(iref.parameters.count("pulse") == 0);
    CHECK(iref.vectors.empty());
    CHECK(iref.text_values.empty());

    // ngspice 39 answers every waveform row with the source's own coefficients.
    const auto& vstep = device(listing, "vstep");
    std::vector<double> pulse{0, 1, 1e-09, 1e-09, 1e-09, 5e-09, 1e-08};
    CHECK(vstep.vectors.at("pulse") == pulse);
    CHECK(vstep.vectors.at("sin") == pulse);
    CHECK(vstep.parameters.count("pulse") == 0);
    CHECK(device(listing, "vsine").vectors.at("sin") == std::vector<double>{0, 0.5, 1000});
    CHECK(device(listing, "vsine").parameters.at("acmag") == 1.0);

    const auto& vd2 = device(listing, "vd2");
    CHECK(vd2.vectors.empty());
    CHECK(vd2.parameters.at("dc") == 1.2);
    CHECK(vd2.parameters.at("i") == -1.01456e-05);
    CHECK(device(listing, "vdd").parameters.at("p") == -0.000212825);
}

TEST_CASE("text values: the inductors of a mutual inductance") {
    Listing listing = read_listing(fixture("mos1_mirror_show.txt"));
    const auto& k12 = device(listing, "k12");
    CHECK(k12.text_values.at("inductor1") == "l1");
    CHECK(k12.text_values.at("inductor2") == "l2");
    CHECK(k12.parameters.at("k") == 7.07107e-07);
}

TEST_CASE("names cut to 21 characters are flagged and found from the full name") {
    Listing listing = read_listing(fixture("mos1_mirror_show.txt"));
    const auto& wrapped = device(listing, "m.xwrap.mtransistor_c");
    CHECK(wrapped.maybe_cut);
    CHECK(wrapped.name.size() == mirrorcheck::listing::printed_name_length);
    CHECK_FALSE(device(listing, "m1").maybe_cut);
    CHECK_FALSE(device(listing, "m1").model_maybe_cut);

    auto candidates = listing.find_candidates("m.xwrap.mtransistor_core");
    REQUIRE(candidates.size() == 1);
    CHECK(candidates.front() == &wrapped);
    CHECK(listing.find("m.xwrap.mtransistor_core") == nullptr);
    CHECK(listing.find("M1") == &device(listing, "m1"));
    CHECK(listing.find_candidates("m1").size() == 1);
    CHECK(listing.find_candidates("m9").empty());
}

TEST_CASE("ngspice's full stdout: progress and print lines are skipped, repeated devices merged") {
    Listing from_file = read_listing(fixture("mos1_mirror_show.txt"));
    Listing from_log = read_listing(fixture("mos1_mirror_stdout.log"));

    REQUIRE(from_log.devices.size() == from_file.devices.size());
    for (const auto& d : from_file.devices) {
        const auto& same = device(from_log, d.name);
        CHECK(same.model == d.model);
        CHECK(same.parameters == d.parameters);
        CHECK(same.text_values == d.text_values);
        CHECK(same.vectors == d.vectors);
    }
    // `show m1 : gm gds` came first, at line 11; `show all` printed m1 again later.
    CHECK(device(from_log, "m1").line > 11);
}

TEST_CASE("a device shown twice: the later table's rows win, the others are kept") {
    std::string text = mos1_header + row("device", {"m1"}) + row("model", {"nch"}) + row("gm", {"0.0002"}) +
                       row("gds", {"1e-06"}) + "\n" + "@m1[gm] = 2.000000e-04\n" + mos1_header +
                       row("device", {"m1"}) + row("model", {"nch"}) + row("gm", {"0.0003"}) + "\n";
    Listing listing = parse_listing(text, "inline.txt");
    REQUIRE(listing.devices.size() == 1);
    CHECK(listing.devices[0].parameters.at("gm") == 0.0003);
    CHECK(listing.devices[0].parameters.at("gds") == 1e-06);
    CHECK(listing.devices[0].line == 9);
}

TEST_CASE("cut names are never merged: two devices may share their first 21 characters") {
    std::string cut = "m.xtop.xbias.xmirror.";
    std::string table = mos1_header + row("device", {cut, cut}) + row("model", {"nch", "nch"}) +
                        row("gm", {"0.0001", "0.0002"}) + "\n";
    Listing listing = parse_listing(table + table, "inline.txt");
    REQUIRE(listing.devices.size() == 4);
    CHECK(listing.devices[0].maybe_cut);
    CHECK(listing.devices[1].parameters.at("gm") == 0.0002);
    CHECK(listing.devices[3].parameters.at("gm") == 0.0002);
    CHECK(listing.find_candidates("m.xtop.xbias.xmirror.m1").size() == 4);
}

TEST_CASE("unknown and unavailable parameters: `?????????` is left out, `<<NAN, ...>>` kept as text") {
    std::string text = " BSIM3: Berkeley Short Channel IGFET Model Version-3\n" + row("device", {"m1", "m2"}) +
                       row("model", {"n3", "n3"}) + row("gm", {"0.000102738", "0.0001"}) +
                       row("foo", {"?????????", "?????????"}) + "        vth  <<NAN, error = 7>>              0.5\n" +
                       "\n";
    Listing listing = parse_listing(text, "inline.txt");
    const auto& m1 = device(listing, "m1");
    CHECK(m1.parameters.count("foo") == 0);
    CHECK(m1.text_values.count("foo") == 0);
    CHECK(m1.text_values.at("vth") == "<<NAN, error = 7>>");
    CHECK(device(listing, "m2").parameters.at("vth") == 0.5);
}

TEST_CASE("Windows line ends, nan and inf values, and wider tables read alike") {
    std::string text = mos1_header + row("device", {"m1", "m2", "m3", "m4", "m5"}) +
                       row("model", {"nch", "nch", "nch", "nch", "pch"}) + row("gm", {"1", "-nan", "inf", "-0", "2"}) +
                       "\n";
    std::string crlf;
    for (char c : text) crlf += c == '\n' ? std::string("\r\n") : std::string(1, c);
    Listing listing = parse_listing(crlf, "inline.txt");
    REQUIRE(listing.devices.size() == 5);
    CHECK(std::isnan(device(listing, "m2").parameters.at("gm")));
    CHECK(std::isinf(device(listing, "m3").parameters.at("gm")));
    CHECK(device(listing, "m5").model == "pch");
}

TEST_CASE("looks_like_listing tells a `show` table from other files") {
    using mirrorcheck::listing::looks_like_listing;
    using mirrorcheck::test::read_text;
    CHECK(looks_like_listing(read_text(fixture("mos1_mirror_show.txt"))));
    CHECK(looks_like_listing(read_text(fixture("mos1_mirror_stdout.log"))));
    CHECK_FALSE(looks_like_listing(read_text(fixture("mos1_mirror.cir"))));
    CHECK_FALSE(looks_like_listing(""));
    CHECK_FALSE(looks_like_listing(mos1_header));
}

TEST_CASE("malformed tables: each error names its code, line and column") {
    struct Case {
        std::string file;
        ExpectedError expected;
    };
    std::vector<Case> cases{
        {"row_too_short.txt", {"listing.row-width", 18, 56}},
        {"bad_number.txt", {"listing.bad-number", 19, 45}},
        {"text_in_number_row.txt", {"listing.expected-number", 11, 52}},
        {"header_without_device_row.txt", {"listing.missing-device-row", 5, 1}},
        {"truncated.txt", {"listing.truncated", 15, 69}},
        {"misaligned_continuation.txt", {"listing.misaligned-row", 11, 40}},
        {"stray_continuation.txt", {"listing.stray-continuation", 7, 1}},
        {"mos1_mirror.cir", {"listing.no-table", 0, 0}},
        {"empty.txt", {"input.empty", 0, 0}},
    };
    for (const Case& c : cases) {
        CAPTURE(c.file);
        ExpectedError got = error_of_file(c.file);
        CHECK(got.code == c.expected.code);
        CHECK(got.line == c.expected.line);
        CHECK(got.column == c.expected.column);
    }
}

TEST_CASE("error messages say what was expected") {
    try {
        read_listing(fixture("row_too_short.txt"));
        FAIL("no error");
    } catch (const InputError& e) {
        CHECK(e.message() == "row `gm` has 2 values; expected 3, one for each device of the table");
        CHECK(std::string(e.what()).starts_with(fixture("row_too_short.txt") + ":18:56: error: "));
    }
    try {
        read_listing(fixture("bad_number.txt"));
        FAIL("no error");
    } catch (const InputError& e) {
        CHECK(e.message().find("`4.78568e-0x` in row `gds` is not a number") == 0);
    }
}

TEST_CASE("more malformed rows") {
    CHECK(error_code_of_text(mos1_header + "     device\n\n") == "listing.no-devices");
    CHECK(error_code_of_text(mos1_header + row("device", {"m1"}) + row("model", {"a", "b"}) + "\n") ==
          "listing.row-width");
    CHECK(error_code_of_text(mos1_header + row("device", {"m1"}) + row("gm", {"1", "2"}) + "\n") ==
          "listing.row-width");
    CHECK(error_code_of_text(mos1_header + row("device", {"m1"}) + row("gm", {"1"})) == "listing.truncated");
    CHECK(error_code_of_text(mos1_header + row("device", {"m1"})) == "listing.truncated");
    CHECK(error_code_of_text(mos1_header + row("device", {"m1"}) + row("gm", {"1"}) +
                             "                                            2\n\n") == "listing.misaligned-row");
    CHECK(error_code_of_text(mos1_header + row("device", {"m1"}) + row("gm", {"-5x"}) + "\n") ==
          "listing.bad-number");
    CHECK(error_code_of_text(mos1_header + row("device", {"m1"}) + row("gm", {"1e999"}) + "\n") ==
          "listing.bad-number");
    CHECK(error_code_of_text("just some words\n  Note: not a table\n") == "listing.no-table");
    CHECK(error_code_of_text("\n\n") == "listing.no-table");
}

TEST_CASE("text outside tables that resembles a header is skipped") {
    std::string text = " Warning: something odd\n\n" + mos1_header + row("device", {"m1"}) + row("gm", {"1"}) +
                       "\n Note: done\nmore text\n";
    Listing listing = parse_listing(text, "inline.txt");
    CHECK(listing.devices.size() == 1);
}

TEST_CASE("never crashes: every cut and many random edits of a real listing either read or fail cleanly") {
    std::string text = mirrorcheck::test::read_text(fixture("mos1_mirror_stdout.log"));
    auto try_read = [](const std::string& input) {
        try {
            parse_listing(input, "fuzz.txt");
        } catch (const InputError&) {
        }
    };
    for (std::size_t cut = 0; cut < text.size(); cut += 13) try_read(text.substr(0, cut));

    std::mt19937 random(20240611);
    const std::string alphabet = " \t\r\n-<>?:.e+0123456789abcdevicemodel";
    for (int round = 0; round < 3000; ++round) {
        std::string edited = text;
        int edits = 1 + static_cast<int>(random() % 8);
        for (int k = 0; k < edits; ++k) {
            std::size_t at = random() % edited.size();
            char c = alphabet[random() % alphabet.size()];
            switch (random() % 3) {
                case 0: edited[at] = c; break;
                case 1: edited.insert(at, 1, c); break;
                default: edited.erase(at, 1 + random() % 30); break;
            }
            if (edited.empty()) edited = "x";
        }
        try_read(edited);
    }
    std::string bytes(4096, '\0');
    for (char& b : bytes) b = static_cast<char>(random() % 256);
    try_read(bytes);
    try_read(mos1_header + "     device " + bytes);
}
