// Reads the fields run_record.cpp takes from the review tree, under the names review_json.cpp
// gives them: mirrors[].id/label/outputs[] (node, status, rout.inspection/linearised/simulated,
// current.ratio, headroom.margin, findings[].code/waived), devices[].name/margin/region,
// summary.errors/warnings/passed, inputs.op. JSON numbers round-trip, so the values are the
// review's own to the last bit.
#include "src/sweep/read_review_report.hpp"

#include <algorithm>
#include <fstream>
#include <sstream>

#include <nlohmann/json.hpp>

#include "src/sweep/sweep_errors.hpp"

namespace mirrorcheck::sweep {
namespace {

using nlohmann::json;

class ReportReader {
public:
    explicit ReportReader(std::string path) : path_(std::move(path)) {}

    // The member `key` of `j`, which must be there with the type `is` checks.
    template <typename Is>
    const json& member(const json& j, const char* key, const std::string& where, Is is) const {
        const auto it = j.find(key);
        if (it == j.end() || !is(*it)) throw errors::report_field_missing(path_, where + key);
        return *it;
    }
    const json& object(const json& j, const char* key, const std::string& where) const {
        return member(j, key, where, [](const json& v) { return v.is_object(); });
    }
    const json& array(const json& j, const char* key, const std::string& where) const {
        return member(j, key, where, [](const json& v) { return v.is_array(); });
    }
    std::string text(const json& j, const char* key, const std::string& where) const {
        return member(j, key, where, [](const json& v) { return v.is_string(); }).get<std::string>();
    }
    // A number or null.
    std::optional<double> value(const json& j, const char* key, const std::string& where) const {
        const json& v = member(j, key, where, [](const json& x) { return x.is_number() || x.is_null(); });
        return v.is_null() ? std::nullopt : std::optional<double>(v.get<double>());
    }

    RunOutput output(const json& mirror, const json& o, const std::string& where, Severity fail_on) const {
        RunOutput r;
        r.mirror = text(mirror, "id", where);
        r.label = text(mirror, "label", where);
        r.node = text(o, "node", where);
        const json& rout = object(o, "rout", where);
        const json& current = object(o, "current", where);
        const json& headroom = object(o, "headroom", where);
        r.values[0] = value(rout, "inspection", where + "rout.");
        r.values[1] = value(rout, "linearised", where + "rout.");
        r.values[2] = value(rout, "simulated", where + "rout.");
        r.values[3] = current.contains("ratio") ? value(current, "ratio", where + "current.") : std::nullopt;
        r.values[4] = value(headroom, "margin", where + "headroom.");
        for (const json& f : array(o, "findings", where)) {
            const std::string code = text(f, "code", where + "findings[].");
            const bool waived = f.value("waived", false);
            const auto severity = parse_severity(text(f, "severity", where + "findings[]."));
            if (!severity) throw errors::report_field_missing(path_, where + "findings[].severity");
            if (!waived && std::find(r.findings.begin(), r.findings.end(), code) == r.findings.end())
                r.findings.push_back(code);
            if (!waived && *severity <= fail_on && std::find(r.failing.begin(), r.failing.end(), code) == r.failing.end())
                r.failing.push_back(code);
        }
        r.passed = text(o, "status", where) == "pass";
        return r;
    }

    RunRecord record(const json& j, const std::string& label) const {
        if (!j.is_object() || !j.contains("schema") || j["schema"] != "mirrorcheck-report/1")
            throw errors::not_a_review_report(
                path_, j.is_object() && j.contains("schema") && j["schema"].is_string() ? j["schema"].get<std::string>()
                                                                                      : "");
        RunRecord r;
        r.label = label;
        r.source = text(object(j, "inputs", ""), "op", "inputs.");
        const json& summary = object(j, "summary", "");
        auto count = [&](const char* key) {
            return member(summary, key, "summary.", [](const json& v) { return v.is_number_unsigned(); })
                .get<std::size_t>();
        };
        r.errors = count("errors");
        r.warnings = count("warnings");
        r.passed = member(summary, "passed", "summary.", [](const json& v) { return v.is_boolean(); }).get<bool>();
        const auto fail_on = parse_severity(text(object(j, "settings", ""), "fail_on", "settings."));
        if (!fail_on) throw errors::report_field_missing(path_, "settings.fail_on");
        for (const json& m : array(j, "mirrors", ""))
            for (const json& o : array(m, "outputs", "mirrors[]."))
                r.outputs.push_back(output(m, o, "mirrors[].outputs[].", *fail_on));
        for (const json& d : array(j, "devices", ""))
            r.devices.push_back({text(d, "name", "devices[]."), value(d, "margin", "devices[]."),
                                 text(d, "region", "devices[].")});
        return r;
    }

private:
    std::string path_;
};

}  // namespace

RunRecord read_review_report(const std::filesystem::path& path, const std::string& label) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream text;
    text << in.rdbuf();
    json j;
    try {
        j = json::parse(text.str());
    } catch (const json::parse_error& e) {
        throw errors::report_not_json(path.string(), e.byte, e.what());
    }
    return ReportReader(path.string()).record(j, label);
}

}  // namespace mirrorcheck::sweep
