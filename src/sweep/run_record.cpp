// A run's record from its review tree: the values each output's JSON report carries under
// the same names (review_json.cpp), so that a record read back from the report is equal.
#include "src/sweep/run_record.hpp"

#include <algorithm>
#include <cmath>
#include <utility>

namespace mirrorcheck::sweep {
namespace {

std::optional<double> finite(std::optional<double> x) {
    if (x && !std::isfinite(*x)) return std::nullopt;
    return x;
}

RunOutput output_record(const ReviewTree& t, const ReviewMirror& m, const ReviewOutput& o) {
    RunOutput r;
    r.mirror = m.id;
    r.label = m.label;
    r.node = o.node;
    const SimulatedValue* sim = o.rout.simulated.best();
    r.values[0] = finite(o.rout.inspection.value);
    r.values[1] = finite(o.rout.linearised.resistance);
    r.values[2] = finite(sim ? std::optional<double>(sim->magnitude) : std::nullopt);
    r.values[3] = finite(o.ratio ? std::optional<double>(o.ratio->measured) : std::nullopt);
    r.values[4] = finite(o.headroom.margin);
    for (std::size_t k : o.findings) {
        const Finding& f = t.findings[k];
        const std::string code(to_string(f.code));
        if (!f.waived && std::find(r.findings.begin(), r.findings.end(), code) == r.findings.end())
            r.findings.push_back(code);
        if (fails_review(f, t.settings.fail_on) && std::find(r.failing.begin(), r.failing.end(), code) == r.failing.end())
            r.failing.push_back(code);
    }
    r.passed = o.status == OutputStatus::pass;
    return r;
}

}  // namespace

RunRecord record_from_review(const ReviewTree& t, std::string label, std::string source) {
    RunRecord r;
    r.label = std::move(label);
    r.source = std::move(source);
    r.errors = t.summary.errors;
    r.warnings = t.summary.warnings;
    r.passed = t.summary.passed;
    for (const ReviewMirror& m : t.mirrors)
        for (const ReviewOutput& o : m.outputs) r.outputs.push_back(output_record(t, m, o));
    for (const ReviewDevice& d : t.devices)
        r.devices.push_back({d.name, finite(d.margin), std::string(to_string(d.region))});
    return r;
}

RunRecord failed_record(std::string label, std::string source, std::string failure) {
    RunRecord r;
    r.label = std::move(label);
    r.source = std::move(source);
    r.passed = false;
    r.failed = true;
    r.failure = std::move(failure);
    return r;
}

}  // namespace mirrorcheck::sweep
