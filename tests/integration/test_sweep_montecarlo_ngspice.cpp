// Monte Carlo against Pelgrom's law: a 1:1 NMOS mirror (ngspice's BSIM4, level 54) whose
// devices each draw a threshold shift delvto = agauss(0, AVT/sqrt(2 W L)), so that the pair's
// difference has the σ(ΔVt) = AVT/sqrt(W L) of M. J. M. Pelgrom, A. C. J. Duinmaijer and
// A. P. G. Welbers, "Matching properties of MOS transistors", IEEE JSSC 24(5), 1989. With
// the reference's Vgs fixed by its diode, the output current moves by gm2·(δVt1 - δVt2), so
// σ(Iout/Iref) = ratio · (gm/Id)2 · σ(ΔVt) to first order, with gm/Id from ngspice's own op
// of the mirror without mismatch. The sweep's σ of the measured ratio over N = 200 draws
// must agree within three standard errors of a sample standard deviation, σ/sqrt(2(N - 1))
// (normal samples; common practice, no source).
#include <cmath>
#include <cstdlib>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/ngspice_run.hpp"
#include "support/print_output.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

constexpr double avt = 5e-9;  // V·m: 5 mV·µm, as the deck writes it
constexpr double w = 4e-6, l = 1e-6;

std::string mirror(const std::string& avt_value) {
    return "* 1:1 NMOS mirror with threshold mismatch\n.param avt=" + avt_value +
           " w=4u l=1u\n.param sig={avt/sqrt(2*w*l)}\n.model nc nmos level=54 version=4.8\n"
           "vdd vdd 0 1.8\niref vdd g dc 20u\n"
           "m1 g g 0 0 nc w={w} l={l} delvto={agauss(0, sig, 1)}\n"
           "m2 out g 0 0 nc w={w} l={l} delvto={agauss(0, sig, 1)}\nvout out 0 dc 0.9\n";
}

}  // namespace

TEST_CASE("the σ of a 1:1 mirror's ratio over 200 draws is Pelgrom's") {
    // gm/Id of the output device and the ratio without mismatch, by ngspice.
    auto nominal = mirrorcheck::test::run_ngspice(
        mirror("0") + ".control\nop\nprint @m2[gm] @m2[id] @m1[id]\nquit 0\n.endc\n.end\n", "mc-pelgrom");
    REQUIRE_MESSAGE(nominal.status == 0, nominal.output);
    const auto printed = mirrorcheck::test::parse_print_output(nominal.output);
    const double gm = printed.at("@m2[gm]").at(0).real(), id2 = printed.at("@m2[id]").at(0).real();
    const double ratio = id2 / printed.at("@m1[id]").at(0).real();
    const double predicted = ratio * (gm / id2) * avt / std::sqrt(w * l);

    const auto dir = mirrorcheck::test::make_temp_dir("mc-pelgrom-sweep");
    mirrorcheck::test::write_text(dir / "mirror.cir", mirror("5e-9") + ".end\n");
    const auto r = mirrorcheck::test::run_cli("sweep mirror.cir --monte-carlo 200 --seed 1 --jobs 2 --format json", dir);
    std::filesystem::remove_all(dir);
    REQUIRE(r.status == 0);
    CHECK(mirrorcheck::test::sweep_schema_errors(r.out) == "");
    const auto j = nlohmann::json::parse(r.out);
    REQUIRE(j["summary"]["runs"] == 200);
    CHECK(j["summary"]["failed_runs"] == 0);
    const auto& s = j["outputs"][0]["statistics"]["current.ratio"];
    REQUIRE(s["count"] == 200);
    const double measured = s["sigma"].get<double>();
    const double standard_error = predicted / std::sqrt(2.0 * 199.0);
    MESSAGE("σ(ratio): measured " << measured << ", Pelgrom " << predicted << " ± " << standard_error);
    CHECK(std::fabs(measured - predicted) < 3 * standard_error);
    CHECK(s["mean"].get<double>() == doctest::Approx(ratio).epsilon(0.01));
}
