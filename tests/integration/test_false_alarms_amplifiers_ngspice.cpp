// A false-alarm budget of zero: `mirrorcheck run` on the amplifier and reference decks of
// tests/data/amplifiers (mirrors and current sources inside OTAs, a two-stage and a folded
// cascode amplifier, a bipolar pair with a divider-biased tail, PTAT and constant-gm cores,
// a beta-helper bias, followers, a regulated cascode with a booster load), simulated by
// ngspice as they are. Each healthy deck gives no warning and no error: loaded nodes and
// loops are information. Each planted-fault twin gives its fault at the right severity on
// the device its header names, and every warning or error it gives concerns the mirror that
// holds that device (consequences of the fault, such as a formula that no longer applies,
// stay with it). The decks' headers state the ground truth; tests/data/amplifiers/README.md
// tabulates it.
#include <filesystem>
#include <set>
#include <string>
#include <vector>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

using nlohmann::json;
namespace fs = std::filesystem;

const fs::path decks = fs::path(MIRRORCHECK_SOURCE_DIR) / "tests" / "data" / "amplifiers";

struct Twin {
    const char* deck;
    std::vector<std::string> faulty;  // the devices the fault is planted on
    const char* code;                 // the finding it must give
    const char* severity;
};

const std::vector<Twin> twins = {
    {"beta_helper_bias", {"q3"}, "out-of-saturation", "error"},
    {"bjt_diff_pair", {"q3"}, "out-of-saturation", "error"},
    {"constant_gm", {"mp4", "mp5"}, "ratio-error", "warning"},
    {"folded_cascode", {"mp3", "mp4"}, "out-of-saturation", "error"},
    {"miller_two_stage", {"mn6"}, "out-of-saturation", "error"},
    {"ota_5t", {"mn6"}, "out-of-saturation", "error"},
    {"ptat_core", {"q5"}, "out-of-saturation", "error"},
    {"regulated_cascode", {"mn4"}, "out-of-saturation", "error"},
    {"source_followers", {"mn2"}, "out-of-saturation", "error"},
};

json run(const std::string& deck, int& status) {
    const auto r = mirrorcheck::test::run_cli("run '" + (decks / (deck + ".cir")).string() + "' --format json");
    REQUIRE_MESSAGE(r.status != 2, deck << ": " << r.err);
    CHECK(mirrorcheck::test::report_schema_errors(r.out) == "");
    status = r.status;
    return json::parse(r.out);
}

std::string not_info(const json& report) {
    std::string s;
    for (const auto& f : report["findings"])
        if (f["severity"] != "info") s += "\n  " + f["message"].get<std::string>();
    return s;
}

// The ids of the mirrors that hold one of `devices` (as reference or output).
std::set<std::string> mirrors_holding(const json& report, const std::vector<std::string>& devices) {
    std::set<std::string> ids;
    auto holds = [&](const json& list) {
        for (const auto& d : list)
            for (const auto& f : devices)
                if (d == f) return true;
        return false;
    };
    for (const auto& m : report["mirrors"]) {
        bool held = holds(m["reference"]);
        for (const auto& o : m["outputs"]) held = held || holds(o["devices"]);
        if (held) ids.insert(m["id"].get<std::string>());
    }
    return ids;
}

}  // namespace

TEST_CASE("healthy amplifiers and references: no warning, no error, exit 0") {
    for (const Twin& t : twins) {
        CAPTURE(t.deck);
        int status = -1;
        const json report = run(t.deck, status);
        CHECK_MESSAGE(report["summary"]["errors"] == 0, not_info(report));
        CHECK_MESSAGE(report["summary"]["warnings"] == 0, not_info(report));
        CHECK(status == 0);
        CHECK(report["summary"]["mirrors"].get<int>() >= 1);
    }
}

TEST_CASE("planted faults: flagged at the right severity on the right device, and nowhere else") {
    for (const Twin& t : twins) {
        CAPTURE(t.deck);
        int status = -1;
        const json report = run(std::string(t.deck) + "_fault", status);
        const std::set<std::string> faulty = mirrors_holding(report, t.faulty);
        REQUIRE_MESSAGE(!faulty.empty(), "no mirror holds the faulty device");
        bool flagged = false;
        for (const auto& f : report["findings"]) {
            if (f["code"] == t.code && f["severity"] == t.severity && faulty.count(f["mirror"].get<std::string>()))
                flagged = true;
            if (f["severity"] != "info")
                CHECK_MESSAGE(faulty.count(f["mirror"].get<std::string>()), f["message"]);
        }
        CHECK_MESSAGE(flagged, not_info(report));
        CHECK(status == (std::string(t.severity) == "error" ? 1 : 0));
    }
}
