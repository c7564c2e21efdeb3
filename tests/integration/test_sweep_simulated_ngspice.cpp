// `mirrorcheck sweep NETLIST --corners/--temps/--supply/--monte-carlo`: the runs simulated
// by the tool, on copies of the shared corpus's GF180MCU decks (in temporary folders, as
// they are) and on a cascode of our own over the same PDK models:
// - corners, from ngspice's own op at each corner: the ss corner leaves the top device of
//   an NMOS cascode less saturation margin (Vds - Vdsat) than ff at the same reference
//   current, and the sweep names ss at the minimum and ff at the maximum, with ngspice's
//   values;
// - labels (corner/temperature/supply), the user's files never written;
// - a corner the `.lib` file lacks: exit status 2 naming the library;
// - Monte Carlo on the corpus's statistical deck: the same seed gives the same statistics,
//   another seed other values, and the draws differ from each other;
// - a run whose ngspice fails is reported failed with its log's end, counts against the
//   yield, and the sweep goes on;
// - --engine parallel through GNU parallel for real (local host): the same statistics;
// - --engine slurm: the job array script and sbatch's arguments, through a stand-in sbatch
//   that runs each array task as Slurm's documented interface does (the real cluster is
//   test_sweep_slurm_ngspice's).
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/corpus.hpp"
#include "support/ngspice_run.hpp"
#include "support/print_output.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

namespace fs = std::filesystem;
using nlohmann::json;
using mirrorcheck::test::CliResult;

// A copy of the corpus's GF180MCU folder in a temporary folder.
struct Gf180Copy {
    fs::path dir = mirrorcheck::test::make_temp_dir("mc-sweep-gf180");
    Gf180Copy() {
        for (const auto& e : fs::directory_iterator(mirrorcheck::test::corpus_dir() / "gf180mcu"))
            if (e.is_regular_file()) fs::copy_file(e.path(), dir / e.path().filename());
    }
    ~Gf180Copy() {
        std::error_code ec;
        if (!std::getenv("MIRRORCHECK_KEEP_TEST_DIRS")) fs::remove_all(dir, ec);
    }
};

CliResult sweep(const fs::path& dir, const std::string& args) {
    CliResult r = mirrorcheck::test::run_cli("sweep " + args, dir);
    if (args.find("--format json") != std::string::npos && r.status < 2)
        CHECK(mirrorcheck::test::sweep_schema_errors(r.out) == "");
    return r;
}

const json& device(const json& report, const std::string& name) {
    for (const json& d : report["devices"])
        if (d["name"] == name) return d;
    FAIL("no device " << name);
    static const json none;
    return none;
}

// An NMOS cascode sink of 3.3 V devices, 20 µA in, the output held at 1.2 V.
std::string cascode(const std::string& corner) {
    return "* gf180 nmos cascode\n.include \"design.ngspice\"\n.lib \"sm141064.ngspice\" " + corner +
           "\n.param sw_stat_mismatch=0\nVDD vdd 0 3.3\nIREF vdd top DC 20u\n"
           "M2 top top mid 0 nmos_3p3 w=10u l=1u\nM1 mid mid 0 0 nmos_3p3 w=10u l=1u\n"
           "M4 out top s4 0 nmos_3p3 w=10u l=1u\nM3 s4 mid 0 0 nmos_3p3 w=10u l=1u\nVOUT out 0 DC 1.2\n";
}

// ngspice's own Vds - Vdsat of m4 at `corner`, and its drain current.
std::pair<double, double> ngspice_margin(const fs::path& dir, const std::string& corner) {
    mirrorcheck::test::write_text(dir / ("own_" + corner + ".cir"),
                                  cascode(corner) + ".control\nop\nprint @m4[vds] @m4[vdsat] @m4[id]\nquit 0\n.endc\n.end\n");
    const std::string cmd = "cd '" + dir.string() + "' && ngspice -b own_" + corner + ".cir > own_" + corner + ".log 2>&1";
    REQUIRE(std::system(cmd.c_str()) == 0);
    const auto printed = mirrorcheck::test::parse_print_output(mirrorcheck::test::read_text(dir / ("own_" + corner + ".log")));
    const auto value = [&](const char* name) { return printed.at(name).at(0).real(); };
    return {value("@m4[vds]") - value("@m4[vdsat]"), value("@m4[id]")};
}

}  // namespace

TEST_CASE("corners: ss leaves the cascode's top device less margin than ff, by ngspice's own op") {
    if (!mirrorcheck::test::corpus_present()) return;
    Gf180Copy gf;
    mirrorcheck::test::write_text(gf.dir / "cascode.cir", cascode("typical") + ".end\n");
    const auto [ss, ss_id] = ngspice_margin(gf.dir, "ss");
    const auto [ff, ff_id] = ngspice_margin(gf.dir, "ff");
    CHECK(ss < ff);                                            // the ordering a designer expects
    CHECK(std::fabs(ss_id - ff_id) < 0.05 * std::fabs(ff_id));  // at the same current

    const std::string before = mirrorcheck::test::read_text(gf.dir / "cascode.cir");
    const CliResult r = sweep(gf.dir, "cascode.cir --corners ss,ff --jobs 2 --format json");
    CHECK(r.status == 0);
    const json j = json::parse(r.out);
    CHECK(j["runs"][0]["label"] == "ss");
    CHECK(j["runs"][1]["label"] == "ff");
    const json& m = device(j, "m4")["statistics"]["margin"];
    CHECK(m["min_run"] == "ss");
    CHECK(m["max_run"] == "ff");
    CHECK(m["min"].get<double>() == doctest::Approx(ss).epsilon(1e-4));
    CHECK(m["max"].get<double>() == doctest::Approx(ff).epsilon(1e-4));
    CHECK(mirrorcheck::test::read_text(gf.dir / "cascode.cir") == before);  // never written
}

TEST_CASE("corners, temperatures and supplies of the corpus deck as it is; a corner the library lacks") {
    if (!mirrorcheck::test::corpus_present()) return;
    Gf180Copy gf;
    const CliResult r = sweep(gf.dir, "corners_gf180.cir --corners typical,ss --temps=-40,125 --supply VDD=3.0,3.6 "
                                      "--format json");
    CHECK(r.status == 0);
    CHECK(r.err.find("runs simulated") == std::string::npos);  // no progress line when stderr is no terminal
    const json j = json::parse(r.out);
    REQUIRE(j["runs"].size() == 8);
    CHECK(j["runs"][0]["label"] == "typical/-40C/VDD=3");
    CHECK(j["runs"][7]["label"] == "ss/125C/VDD=3.6");
    for (const json& run : j["runs"]) CHECK(run["failed"] == false);
    // The supply reached the circuit: the PMOS output's headroom spans the two supplies.
    for (const json& o : j["outputs"])
        if (o["node"] == "out") {
            const json& h = o["statistics"]["headroom.margin"];
            CHECK(h["max"].get<double>() - h["min"].get<double>() > 0.4);
        }

    const CliResult bad = sweep(gf.dir, "corners_gf180.cir --corners ss,tt");
    CHECK(bad.status == 2);
    CHECK(bad.err.find("sm141064.ngspice") != std::string::npos);
    CHECK(bad.err.find("[sweep.unknown-corner]") != std::string::npos);

    // A supply the netlist lacks: refused before any run (it gave identical runs that passed).
    const CliResult no_source = sweep(gf.dir, "corners_gf180.cir --supply vnosuch=1,2");
    CHECK(no_source.status == 2);
    CHECK(no_source.err.find("no voltage source `vnosuch`") != std::string::npos);
}

TEST_CASE("Monte Carlo on the corpus's statistical deck: a fixed seed repeats, draws differ") {
    if (!mirrorcheck::test::corpus_present()) return;
    Gf180Copy gf;
    const std::string args = "mc_gf180.cir --monte-carlo 3 --jobs 2 --format json";
    const CliResult a = sweep(gf.dir, args + " --seed 11");
    const CliResult b = sweep(gf.dir, args + " --seed 11");
    const CliResult c = sweep(gf.dir, args + " --seed 12");
    REQUIRE(a.status == 0);
    const json ja = json::parse(a.out), jb = json::parse(b.out), jc = json::parse(c.out);
    CHECK(ja["runs"][2]["label"] == "mc3");
    CHECK(ja["outputs"] == jb["outputs"]);
    CHECK(ja["devices"] == jb["devices"]);
    CHECK(ja["outputs"] != jc["outputs"]);
    for (const json& o : ja["outputs"]) CHECK(o["statistics"]["current.ratio"]["sigma"].get<double>() > 0);
}

TEST_CASE("a run whose ngspice fails: reported failed with its log, counted against the yield, the sweep goes on") {
    if (!mirrorcheck::test::corpus_present()) return;
    Gf180Copy gf;
    // An ngspice that fails at one supply value, as a non-converging run would end.
    mirrorcheck::test::write_text(gf.dir / "flaky-ngspice",
                                  "#!/bin/sh\nif grep -q 'dc=3.1' \"$2\"; then echo 'doAnalyses: iteration limit "
                                  "reached'; echo 'run simulation(s) aborted'; exit 1; fi\nexec ngspice \"$@\"\n");
    fs::permissions(gf.dir / "flaky-ngspice", fs::perms::owner_all);
    const CliResult r = sweep(gf.dir, "corners_gf180.cir --supply VDD=3.0,3.1,3.3 --ngspice ./flaky-ngspice "
                                      "--format json");
    CHECK(r.status == 1);
    const json j = json::parse(r.out);
    REQUIRE(j["runs"].size() == 3);
    CHECK(j["runs"][1]["label"] == "VDD=3.1");
    CHECK(j["runs"][1]["failed"] == true);
    CHECK(j["runs"][1]["failure"].get<std::string>().find("iteration limit") != std::string::npos);
    CHECK(j["runs"][0]["failed"] == false);
    CHECK(j["runs"][2]["failed"] == false);
    CHECK(j["summary"]["failed_runs"] == 1);
    CHECK(j["summary"]["yield"].get<double>() == doctest::Approx(2.0 / 3.0));
    const CliResult table = sweep(gf.dir, "corners_gf180.cir --supply VDD=3.0,3.1 --ngspice ./flaky-ngspice");
    CHECK(table.out.find("VDD=3.1: failed") != std::string::npos);
}

TEST_CASE("--engine parallel: GNU parallel runs the jobs, the same statistics as local processes") {
    if (!mirrorcheck::test::corpus_present()) return;
    if (std::system("parallel --version > /dev/null 2>&1") != 0) {
        FAIL("GNU parallel is not installed (Debian package `parallel`, in .ci/setup)");
        return;
    }
    Gf180Copy gf;
    const std::string args = "corners_gf180.cir --corners typical,ss,ff --jobs 2 --format json";
    const CliResult local = sweep(gf.dir, args);
    const CliResult parallel = sweep(gf.dir, args + " --engine parallel --keep kept");
    REQUIRE(local.status == 0);
    REQUIRE(parallel.status == 0);
    const json a = json::parse(local.out), b = json::parse(parallel.out);
    CHECK(a["outputs"] == b["outputs"]);
    CHECK(a["devices"] == b["devices"]);
    // Each run's ngspice was GNU parallel's job: its exit status file beside its log.
    for (int k = 1; k <= 3; ++k) CHECK(fs::exists(gf.dir / "kept" / ("run" + std::to_string(k)) / "ngspice.status"));
    CHECK(mirrorcheck::test::read_text(gf.dir / "kept" / "jobs.txt").find("ngspice") != std::string::npos);
}

TEST_CASE("--engine slurm: the job array script, as sbatch runs it") {
    if (!mirrorcheck::test::corpus_present()) return;
    Gf180Copy gf;
    if (std::system("sbatch --version > /dev/null 2>&1") != 0)
        MESSAGE("no sbatch here: the script is checked with a stand-in only");
    // A stand-in sbatch on PATH, as the interface is documented (`sbatch --array=1-N script`,
    // each task run with SLURM_ARRAY_TASK_ID set; --wait returns when all are done).
    fs::create_directories(gf.dir / "bin");
    mirrorcheck::test::write_text(gf.dir / "bin" / "sbatch",
                                  "#!/bin/sh\nfor a in \"$@\"; do case \"$a\" in --array=*) r=${a#--array=};; "
                                  "--*) ;; *) s=$a;; esac; done\necho \"$@\" > sbatch.args\n"
                                  "for i in $(seq ${r%-*} ${r#*-}); do SLURM_ARRAY_TASK_ID=$i sh \"$s\"; done\n");
    fs::permissions(gf.dir / "bin" / "sbatch", fs::perms::owner_all);
    const std::string cmd = "cd '" + gf.dir.string() + "' && PATH='" + (gf.dir / "bin").string() + "':\"$PATH\" '" +
                            MIRRORCHECK_EXE +
                            "' sweep corners_gf180.cir --corners ss,ff --engine slurm "
                            "--engine-option=--partition=short --keep kept --format json > out.json 2> err.txt";
    CHECK(std::system(cmd.c_str()) == 0);
    const json j = json::parse(mirrorcheck::test::read_text(gf.dir / "out.json"));
    CHECK(mirrorcheck::test::sweep_schema_errors(j.dump()) == "");
    CHECK(j["summary"]["runs"] == 2);
    CHECK(j["summary"]["failed_runs"] == 0);
    const std::string args = mirrorcheck::test::read_text(gf.dir / "sbatch.args");
    CHECK(args.find("--wait") != std::string::npos);
    CHECK(args.find("--array=1-2") != std::string::npos);
    CHECK(args.find("--partition=short") != std::string::npos);
}
