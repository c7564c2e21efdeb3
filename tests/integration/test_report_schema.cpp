// The JSON report contract (docs/report.schema.json), checked by Python's jsonschema: the
// schema is itself valid, the shipped sample's report follows it, and a report that
// breaks it (a field renamed or missing, a region or code the contract does not know, a
// device key that is not documented) is rejected, so the checks the other tests make
// with report_schema_errors can fail.
#include <regex>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

using nlohmann::json;

json sample_report() {
    auto r = mirrorcheck::test::run_cli("review samples/tamarack/bias.cir --op samples/tamarack/bias_op.raw --format json",
                                        MIRRORCHECK_SOURCE_DIR);
    REQUIRE(r.status == 1);
    return json::parse(r.out);
}

}  // namespace

TEST_CASE("the sample's report follows the schema, with the fields flows read") {
    const json report = sample_report();
    CHECK(mirrorcheck::test::report_schema_errors(report.dump()) == "");
    CHECK(report["tool"]["version"] == "0.1.0");  // CMakeLists.txt's project version
    // the git revision the build was made from, or null outside a git checkout
    const json& revision = report["tool"]["revision"];
    CHECK((revision.is_null() || std::regex_match(revision.get<std::string>(), std::regex("[0-9a-f]{12}"))));
    auto version = mirrorcheck::test::run_cli("--version");
    CHECK(version.out.find("mirrorcheck 0.1.0") == 0);
    CHECK(report["settings"]["fail_on"] == "error");
    CHECK(report["settings"]["margin"] == doctest::Approx(0.1));
    CHECK(report["summary"]["passed"] == false);
    CHECK(report["mirrors"][0]["outputs"][0]["status"] == "fail");  // the tail: mn4 in triode
    CHECK(report["mirrors"][2]["outputs"][0]["status"] == "pass");  // chop
    for (const auto& d : report["devices"]) {
        CAPTURE(d["name"]);
        CHECK(d["healthy"] == (d["region"] == "saturation" || d["region"] == "forward-active"));
    }
}

TEST_CASE("a report that breaks the contract is rejected") {
    const json good = sample_report();
    auto rejected = [](json doc) { return !mirrorcheck::test::report_schema_errors(doc.dump()).empty(); };
    json renamed = good;
    renamed["summary"]["notes"] = renamed["summary"]["infos"];
    renamed["summary"].erase("infos");
    CHECK(rejected(renamed));
    json region = good;
    region["devices"][0]["region"] = "active";
    CHECK(rejected(region));
    json code = good;
    code["findings"][0]["code"] = "rout-disagrees";
    CHECK(rejected(code));
    json key = good;
    key["devices"][0]["vce"] = 1.0;  // a bipolar key on a MOS device
    CHECK(rejected(key));
    json status = good;
    status["mirrors"][0]["outputs"][0].erase("status");
    CHECK(rejected(status));
}
