// The shipped sample (samples/tamarack/): what a newcomer sees first must not drift.
//
// 1. `mirrorcheck review` on the shipped netlist and results prints exactly the expected
//    report kept beside them (samples/tamarack/expected/: the table and the JSON), and
//    exits 1 because the sample's cascode tail has too little headroom. No ngspice needed.
//    After a deliberate change, rewrite the expected files and review the diff:
//        MIRRORCHECK_ACCEPT=1 ctest --test-dir build -R test_samples
// 2. regenerate.sh, run into a temporary folder, gives the same numbers as the shipped
//    results (so they cannot drift from the netlist), and the claims the netlist's
//    comments make hold by ngspice's own numbers.
// 3. The second sample (samples/tamarack_vcm/, sky130 models): `run` on the designer's deck
//    prints exactly expected/run.txt and run.json, writes nothing beside the deck and names
//    no temporary file; its simulated Rout at isink equals ngspice's own `.tf`; the README
//    quotes the top of run.txt as it is; regenerate.sh gives the shipped raw file.
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "parsers/raw/raw.hpp"
#include "support/ngspice_run.hpp"
#include "support/print_output.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

namespace fs = std::filesystem;
using mirrorcheck::test::read_text;

const fs::path source_dir = MIRRORCHECK_SOURCE_DIR;
const fs::path sample = source_dir / "samples" / "tamarack";
const std::string review_args = "review samples/tamarack/bias.cir --op samples/tamarack/bias_op.raw";

// The only things a report may differ in between machines and commits: the project's
// absolute path, and the source revision the tool was built from (JSON's tool.revision).
std::string without_source_dir(std::string text) {
    const std::string dir = source_dir.string();
    for (std::size_t at = text.find(dir); at != std::string::npos; at = text.find(dir, at))
        text.replace(at, dir.size(), "<source>");
    const std::string key = "\"revision\": \"";
    if (std::size_t at = text.find(key); at != std::string::npos) {
        const std::size_t start = at + key.size(), end = text.find('"', start);
        text.replace(start, end - start, "<revision>");
    }
    return text;
}

// Compares with the golden file, or rewrites it when MIRRORCHECK_ACCEPT is set.
void check_golden(const std::string& actual, const fs::path& golden) {
    if (std::getenv("MIRRORCHECK_ACCEPT")) {
        fs::create_directories(golden.parent_path());
        mirrorcheck::test::write_text(golden, actual);
    }
    REQUIRE_MESSAGE(fs::exists(golden), golden.string() << " is missing; run with MIRRORCHECK_ACCEPT=1");
    CHECK_MESSAGE(actual == read_text(golden),
                  golden.filename().string() << " differs from the tool's output; if the change is deliberate, run "
                                                "MIRRORCHECK_ACCEPT=1 ctest -R test_samples and review the diff");
}

}  // namespace

TEST_CASE("review of the shipped sample: the expected table, exit status 1") {
    auto r = mirrorcheck::test::run_cli(review_args, source_dir);
    CHECK_MESSAGE(r.err.empty(), r.err);
    CHECK(r.status == 1);  // the cascode tail's mn4 is out of saturation: an error finding
    check_golden(without_source_dir(r.out), sample / "expected" / "review.txt");
}

TEST_CASE("review of the shipped sample: the expected JSON report") {
    auto r = mirrorcheck::test::run_cli(review_args + " --format json", source_dir);
    CHECK_MESSAGE(r.err.empty(), r.err);
    CHECK(r.status == 1);
    check_golden(without_source_dir(r.out), sample / "expected" / "review.json");
    CHECK(mirrorcheck::test::report_schema_errors(r.out) == "");
}

namespace {

// Equal to 9 significant digits: far finer than anything a report prints, coarse enough
// for the last bit of a floating-point sum.
bool same(double a, double b) { return a == b || std::abs(a - b) <= 1e-9 * std::max(std::abs(a), std::abs(b)); }

void check_same_plots(const fs::path& fresh_path, const fs::path& shipped_path) {
    auto fresh = mirrorcheck::raw::read_raw(fresh_path);
    auto shipped = mirrorcheck::raw::read_raw(shipped_path);
    REQUIRE(fresh.plots.size() == shipped.plots.size());
    for (std::size_t p = 0; p < fresh.plots.size(); ++p) {
        const auto& f = fresh.plots[p];
        const auto& s = shipped.plots[p];
        CAPTURE(p);
        CAPTURE(f.name);
        REQUIRE(f.name == s.name);
        REQUIRE(f.point_count == s.point_count);
        REQUIRE(f.variables.size() == s.variables.size());
        for (std::size_t v = 0; v < f.variables.size(); ++v) {
            CAPTURE(f.variables[v].name);
            REQUIRE(f.variables[v].name == s.variables[v].name);
            for (std::size_t k = 0; k < f.point_count; ++k) {
                if (f.complex) {
                    CHECK(same(f.cplx[v][k].real(), s.cplx[v][k].real()));
                    CHECK(same(f.cplx[v][k].imag(), s.cplx[v][k].imag()));
                } else {
                    CHECK(same(f.real[v][k], s.real[v][k]));
                }
            }
        }
    }
}

double op_value(const mirrorcheck::raw::Plot& op, const std::string& name) {
    auto i = op.find(name);
    REQUIRE_MESSAGE(i, name << " is not in the op plot");
    return op.real[*i][0];
}

}  // namespace

TEST_CASE("regenerate.sh: fresh ngspice results equal the shipped ones, and the netlist's claims hold") {
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-samples");
    struct Cleanup {
        fs::path dir;
        ~Cleanup() {
            std::error_code ignored;
            if (!std::getenv("MIRRORCHECK_KEEP_TEST_DIRS")) fs::remove_all(dir, ignored);
        }
    } cleanup{dir};
    const std::string cmd = "bash '" + (sample / "regenerate.sh").string() + "' '" + dir.string() + "' > '" +
                            (dir / "regenerate.log").string() + "' 2>&1";
    REQUIRE_MESSAGE(std::system(cmd.c_str()) == 0, read_text(dir / "regenerate.log"));

    SUBCASE("the binary results: op, AC and .tf plots") {
        check_same_plots(dir / "bias_op.raw", sample / "bias_op.raw");
    }
    SUBCASE("the ASCII op") { check_same_plots(dir / "bias_op_ascii.raw", sample / "bias_op_ascii.raw"); }
    SUBCASE("the show listing, to its printed digits") {
        CHECK(read_text(dir / "bias_show.txt") == read_text(sample / "bias_show.txt"));
    }
    SUBCASE("the claims in bias.cir's comments, by ngspice's own numbers") {
        auto raw = mirrorcheck::raw::read_raw(dir / "bias_op.raw", mirrorcheck::raw::Selection{{"op"}, false});
        const auto& op = raw.plots.at(0);
        REQUIRE(op.kind() == "op");
        auto margin = [&](const std::string& m) {
            return op_value(op, "@" + m + "[vds]") - op_value(op, "@" + m + "[vdsat]");
        };
        // 1. the standard cascode at 1.1 V: mn4 in triode (Vds 0.247 V, Vdsat 0.334 V), 40 uA
        CHECK(margin("mn4") < 0);
        CHECK(op_value(op, "@mn4[vds]") == doctest::Approx(0.247).epsilon(0.01));
        CHECK(op_value(op, "@mn4[vdsat]") == doctest::Approx(0.334).epsilon(0.01));
        CHECK(op_value(op, "@mn4[id]") == doctest::Approx(40e-6).epsilon(0.01));
        // 2, 3. the PMOS gate line at 21.5 uA, the chopper's bias at 21.8 uA
        CHECK(op_value(op, "@mn5[id]") == doctest::Approx(21.5e-6).epsilon(0.005));
        CHECK(op_value(op, "@mp2[id]") == doctest::Approx(21.8e-6).epsilon(0.005));
        // 4. the wide-swing cascode at 0.9 V: every device saturated with more than 100 mV
        for (const char* m : {"mn7", "mn8", "mn9", "mn11"}) {
            CAPTURE(m);
            CHECK(margin(m) > 0.1);
        }
        CHECK(op_value(op, "@mn9[vds]") == doctest::Approx(0.39).epsilon(0.01));
        CHECK(margin("mn11") == doctest::Approx(0.29).epsilon(0.02));
        CHECK(op_value(op, "@mn11[vbs]") == doctest::Approx(-0.39).epsilon(0.01));  // source above bulk
        CHECK(op_value(op, "@mn11[id]") == doctest::Approx(20e-6).epsilon(0.001));
        // 5. the Wilson: mp3 at 1.99 V, mp4 at 0.91 V, 23.3 uA out of a 25 uA reference
        for (const char* m : {"mp3", "mp4", "mp5"}) CHECK(margin(m) > 0.1);
        CHECK(op_value(op, "@mp3[vds]") == doctest::Approx(1.99).epsilon(0.005));
        CHECK(op_value(op, "@mp4[vds]") == doctest::Approx(0.91).epsilon(0.005));
        CHECK(op_value(op, "@mp5[id]") == doctest::Approx(23.3e-6).epsilon(0.005));
        // 6, 7, 8. bipolar: forward-active (Vce above 0.2 V), the Widlar's 1.99 uA, the PNP's 15.1 uA
        for (const char* q : {"q1", "q2", "q3", "q4", "q5", "q6"}) {
            CAPTURE(q);
            CHECK(op_value(op, "@" + std::string(q) + "[vbe]") - op_value(op, "@" + std::string(q) + "[vbc]") > 0.2);
        }
        CHECK(op_value(op, "@q4[ic]") == doctest::Approx(1.99e-6).epsilon(0.005));
        CHECK(std::abs(op_value(op, "@q6[ic]")) == doctest::Approx(15.1e-6).epsilon(0.005));
    }
}

// The second sample (samples/tamarack_vcm/): a sky130 deck as a schematic tool writes it,
// reviewed with `run`, which simulates it afresh with ngspice in the deck's folder.
namespace {

const fs::path vcm_sample = source_dir / "samples" / "tamarack_vcm";
const std::string run_args = "run samples/tamarack_vcm/tk2_vcm.spice";

// Every entry below the sample folder with its size and modification time: what `run` must
// leave as it found it.
std::string folder_listing(const fs::path& dir) {
    std::vector<std::string> lines;
    for (const auto& e : fs::recursive_directory_iterator(dir)) {
        std::string line = fs::relative(e.path(), dir).string();
        if (e.is_regular_file())
            line += " " + std::to_string(e.file_size()) + " " +
                    std::to_string(e.last_write_time().time_since_epoch().count());
        lines.push_back(line);
    }
    std::sort(lines.begin(), lines.end());
    std::string all;
    for (const auto& l : lines) all += l + "\n";
    return all;
}

// `run` on the sample, with the folder listed before and after.
mirrorcheck::test::CliResult run_vcm_sample(const std::string& extra) {
    const std::string before = folder_listing(vcm_sample);
    auto r = mirrorcheck::test::run_cli(run_args + extra, source_dir);
    CHECK_MESSAGE(folder_listing(vcm_sample) == before, "run wrote into samples/tamarack_vcm/");
    // `run` deletes its temporary folder: a report naming it names a file that is gone.
    CHECK(r.out.find("mirrorcheck-run-") == std::string::npos);
    CHECK(r.out.find(fs::temp_directory_path().string()) == std::string::npos);
    return r;
}

// The contents of the fenced block that follows the fenced block holding the line `marker`
// (the command, then what it prints); empty when there is none.
std::string fenced_block_after(const std::string& text, const std::string& marker) {
    const std::size_t at = text.find("\n" + marker + "\n");
    if (at == std::string::npos) return "";
    const std::size_t close = text.find("\n```\n", at);
    if (close == std::string::npos) return "";
    const std::size_t open = text.find("\n```\n", close + 4);
    if (open == std::string::npos) return "";
    const std::size_t start = open + 5, end = text.find("\n```", start);
    return end == std::string::npos ? "" : text.substr(start, end + 1 - start);
}

}  // namespace

TEST_CASE("run on the sky130 sample: the expected table, nothing written beside the deck") {
    auto r = run_vcm_sample("");
    CHECK(r.status == 0);  // warnings only: the cascode sink's low margin, the OTA's loaded nodes
    // stderr: the one card the review deck left out, the deck's own control block
    CHECK(r.err == "note: left out of the review deck: samples/tamarack_vcm/tk2_vcm.spice:47: .control ... .endc\n");
    check_golden(without_source_dir(r.out), vcm_sample / "expected" / "run.txt");
}

TEST_CASE("run on the sky130 sample: the expected JSON, valid, and its isink Rout equal to ngspice's own .tf") {
    auto r = run_vcm_sample(" --format json");
    CHECK(r.status == 0);
    check_golden(without_source_dir(r.out), vcm_sample / "expected" / "run.json");
    CHECK(mirrorcheck::test::report_schema_errors(r.out) == "");

    const nlohmann::json report = nlohmann::json::parse(r.out);
    std::optional<double> simulated;
    for (const auto& m : report["mirrors"])
        for (const auto& o : m["outputs"])
            if (o["node"] == "isink") {
                CHECK(o["rout"]["probe"] == "v3");  // the deck's own source holding the node
                // the cascode's reflection formula names the schematic's X instances
                CHECK(o["rout"]["formula"] == "ro(xm10) + (1 + (gm+gmb)(xm10)·ro(xm10))·ro(xm9)");
                if (o["rout"]["simulated"].is_number()) simulated = o["rout"]["simulated"].get<double>();
            }
    REQUIRE_MESSAGE(simulated, "no simulated Rout at isink");

    // ngspice's .tf of the designer's deck, its control block replaced by one of ours, in a
    // temporary folder beside a link to the sample's models.
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-vcm-tf");
    std::string deck = read_text(vcm_sample / "tk2_vcm.spice");
    const std::size_t control = deck.find("\n.control\n"), endc = deck.find("\n.endc\n");
    REQUIRE(control != std::string::npos);
    REQUIRE(endc != std::string::npos);
    deck.replace(control + 1, endc + 6 - control, ".control\ntf i(v3) v3\nprint all\nquit 0\n.endc\n");
    fs::create_directory_symlink(vcm_sample / "sky130", dir / "sky130");
    mirrorcheck::test::write_text(dir / "tf.spice", deck);
    mirrorcheck::test::write_text(dir / ".spiceinit", "set num_threads=1\n");
    const int status = std::system(("cd '" + dir.string() + "' && ngspice -b tf.spice > tf.log 2>&1").c_str());
    const std::string log = read_text(dir / "tf.log");
    REQUIRE_MESSAGE(status == 0, log);
    auto printed = mirrorcheck::test::parse_print_output(log);
    auto it = printed.find("v3#input_impedance");
    REQUIRE_MESSAGE(it != printed.end(), log);
    const double tf = it->second.at(0).real();
    MESSAGE("isink: simulated " << *simulated << " Ω, ngspice .tf " << tf << " Ω");
    CHECK(*simulated == doctest::Approx(tf).epsilon(1e-3));
    std::error_code ignored;
    fs::remove_all(dir, ignored);
}

TEST_CASE("the README quotes the top of the sky130 sample's run table as it is") {
    const std::string quoted =
        fenced_block_after(read_text(source_dir / "README.md"), "mirrorcheck run samples/tamarack_vcm/tk2_vcm.spice");
    REQUIRE_MESSAGE(!quoted.empty(), "no quoted run output in README.md");
    const std::string expected = read_text(vcm_sample / "expected" / "run.txt");
    CHECK(expected.compare(0, quoted.size(), quoted) == 0);
    CHECK(std::count(quoted.begin(), quoted.end(), '\n') >= 6);  // the verdict and the summary rows at least
}

TEST_CASE("sky130 sample: regenerate.sh gives the shipped results, and the deck's comments hold") {
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-vcm");
    const std::string cmd = "bash '" + (vcm_sample / "regenerate.sh").string() + "' '" + dir.string() + "' > '" +
                            (dir / "regenerate.log").string() + "' 2>&1";
    REQUIRE_MESSAGE(std::system(cmd.c_str()) == 0, read_text(dir / "regenerate.log"));
    check_same_plots(dir / "tk2_vcm.raw", vcm_sample / "tk2_vcm.raw");
    auto raw = mirrorcheck::raw::read_raw(dir / "tk2_vcm.raw");
    const auto& op = raw.plots.at(0);
    REQUIRE(op.kind() == "op");
    // the buffer follows its 0.9 V input to within its offset
    CHECK(std::abs(op_value(op, "v(vcm)") - op_value(op, "v(vin)")) < 5e-3);
    // the cascode sink pulls 20 uA (1:2 of I1's 10 uA) out of the 1.0 V input (V3)
    CHECK(op_value(op, "v(isink)") == doctest::Approx(1.0));
    CHECK(op_value(op, "i(v3)") == doctest::Approx(20e-6).epsilon(0.005));
    std::error_code ignored;
    fs::remove_all(dir, ignored);
}
