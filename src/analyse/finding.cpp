// The catalogue of findings and causes: one row per code, everything fixed about it. The
// message templates name the finding's values in braces; src/report/finding_text.cpp fills
// them in. README.md's table of findings is the catalogue's severity, meaning and action
// columns (tests/unit/test_finding.cpp checks that they agree).
#include "src/analyse/finding.hpp"

#include <algorithm>
#include <stdexcept>
#include <utility>

namespace mirrorcheck {

std::string_view to_string(Severity severity) {
    switch (severity) {
        case Severity::error:
            return "error";
        case Severity::warning:
            return "warning";
        case Severity::info:
            return "info";
    }
    return "";
}

std::optional<Severity> parse_severity(std::string_view text) {
    for (Severity s : {Severity::error, Severity::warning, Severity::info})
        if (to_string(s) == text) return s;
    return std::nullopt;
}

const std::vector<FindingCodeInfo>& finding_catalogue() {
    using S = Severity;
    using C = FindingCode;
    static const std::vector<FindingCodeInfo> rows = {
        {C::cutoff, "cutoff", S::error, "error", 1, "a transistor of the mirror carries no current",
         "check the reference current and the bias of the gate or base",
         "{device} is cut off, so it carries no mirrored current and every formula above it is wrong."},
        {C::out_of_saturation, "out-of-saturation", S::error, "error", 2,
         "a transistor is in triode (bipolar: saturated), so its ro collapses",
         "raise the output voltage, lower Vdsat (wider device, less current), or drop a cascode level",
         "{device} is in {region}, {shortfall} below its saturation voltage of {saturation_voltage}, so its ro "
         "collapses and every formula above it is wrong."},
        {C::low_margin, "low-margin", S::warning, "warning", 3,
         "a transistor is saturated by less than the margin asked for (`--margin`, default 100 mV)",
         "check the margin across corners; consider more headroom",
         "{device} is saturated by only {margin}, less than the {margin_asked} margin asked for."},
        {C::gmb_missing, "gmb-missing", S::warning, "warning", 4,
         "the op data has no gmb for some MOS devices, so body effect is neglected everywhere",
         "save @m[gmbs] for every transistor, or write the `show all` listing",
         "The op data has no gmb for {devices}, so every resistance here neglects body effect; save "
         "@{first}[gmbs] (or write the `show all` listing) to include it."},
        {C::ratio_error, "ratio-error", S::warning, "warning", 5,
         "the output current differs from the design ratio by more than the tolerance (`--ratio-tolerance`, "
         "default 5 %)",
         "match Vds of reference and output (cascode), check base current, check geometry",
         "The output at {node} carries {measured} times the reference current against a design ratio of "
         "{design}, {error} off<; the operating point predicts {predicted} ({basis})>."},
        {C::low_intrinsic_gain, "low-intrinsic-gain", S::info, "info", 6,
         "a cascode device has a small gm·ro (below 10), so the hand formula is weak",
         "read the linearised value rather than the formula",
         "{device} has an intrinsic gain gm·ro of only {gain}, so the hand formula's approximations are weak "
         "at {node}."},
        {C::body_effect, "body-effect", S::info, "info", 7,
         "body effect changes the output resistance noticeably (more than 10 %)",
         "none needed; the value with body effect is the one to use",
         "Body effect changes Rout at {node} by {share}, {with_body} against {without_body} without it: the "
         "sources of its devices sit above their bulk."},
        {C::inspection_vs_own, "inspection-vs-own", S::warning, "warning", 8,
         "the hand formula and the exact solve of the mirror alone disagree",
         "read the cause in the message: a device out of saturation, a gate that is not AC ground, or the "
         "formula's approximation",
         "Rout at {node} by inspection ({inspection}) is {difference} the exact solve of the mirror alone "
         "({own}), beyond the {tolerance} tolerance: {cause}."},
        {C::loaded_output, "loaded-output", S::info, "info", 9,
         "the node's impedance in the circuit is well below the mirror's own output resistance: something "
         "else on the node loads it",
         "none needed when the load is the design; set a floor with --min-impedance to have it checked",
         "The output at {node} is loaded: the node shows {in_circuit} against the mirror's own {own} "
         "({own_from})<, with {loads} in parallel>."},
        {C::feedback_at_output, "feedback-at-output", S::info, "info", 10,
         "the node's impedance in the circuit is above the mirror's own output resistance (or negative): "
         "the circuit feeds the node back",
         "none needed when the loop is the design (a reference core, a regulated node)",
         "The node {node} shows {in_circuit} against the mirror's own {own} ({own_from}): the circuit around "
         "the mirror feeds the node back."},
        {C::low_node_impedance, "low-node-impedance", S::warning, "warning", 11,
         "the node's impedance is below the minimum asked for (`--min-impedance`)",
         "reduce the load on the node or raise the mirror's own output resistance (cascode, longer devices)",
         "The node {node} shows {impedance} ({source}), below the {limit} asked for<, loaded by {loads}>."},
        {C::linearised_vs_simulated, "linearised-vs-simulated", S::warning,
         "warning, or error when no benign cause explains it", 12,
         "the exact small-signal solve and the simulated impedance disagree",
         "read the cause in the message: frequency too high, a parameter missing, or a probe on the wrong node",
         "Rout at {node} from the linearised solve ({linearised}) is {difference} the simulated {simulated} "
         "({source}): {cause}."},
        {C::inspection_vs_simulated, "inspection-vs-simulated", S::warning, "warning", 13,
         "the hand formula and the simulated impedance disagree (no linearised value)",
         "read the cause in the message: a device on the output the formula leaves out, or the topology and "
         "the probe",
         "Rout at {node} by inspection ({inspection}) is {difference} the simulated {simulated} ({source}), and "
         "no linearised value can tell which is off: {cause}."},
        {C::not_linearised, "not-linearised", S::warning,
         "warning; info when the solve fell back to the mirror's own devices", 14,
         "the exact small-signal solve could not be done for the whole circuit",
         "save the missing parameters (see the message) or accept the fallback",
         "The output at {node} was {how}: {note}."},
        {C::not_simulated, "not-simulated", S::info, "info", 15,
         "no probe measured this output's impedance in the simulation data (simulation results were read)",
         "add a probe source on the output (see `mirrorcheck prepare`) or name one with --probe",
         "The output at {node} is {note}."},
        {C::waiver_unused, "waiver-unused", S::info, "info", 16, "a line of the waiver file matched no finding",
         "remove the stale waiver",
         "The waiver at {place} (`{waiver}`) waives no finding: nothing matches it, or an earlier waiver already "
         "covers what it matches."},
        {C::own_vs_simulated, "own-vs-simulated", S::warning, "warning, or error when no benign cause explains it",
         17, "the exact solve of the mirror alone and ngspice's run of the testbench of the mirror alone disagree",
         "read the cause in the message; keep the deck (`run --keep DIR`) and run its testbench of the mirror "
         "alone by hand",
         "The mirror's own Rout at {node} from the exact solve ({own}) is {difference} ngspice's run of the mirror "
         "alone ({simulated}, {source}): {cause}."},
    };
    return rows;
}

const FindingCodeInfo& catalogue_row(FindingCode code) {
    for (const auto& row : finding_catalogue())
        if (row.code == code) return row;
    throw std::logic_error("a finding code without a catalogue row");
}

const std::vector<CauseInfo>& cause_catalogue() {
    using C = CauseCode;
    static const std::vector<CauseInfo> rows = {
        {C::unbounded_formula, "unbounded-formula",
         "the formula is unbounded because a device reports gds = 0 (no channel-length modulation in its model), "
         "while the solve is bounded by the rest of the circuit or by gmin; use a model with it"},
        {C::collapsed_device, "collapsed-device",
         "{device} is in {region}, so the small-signal values the formula combines no longer describe a current "
         "source; fix its margin first"},
        {C::approximate_formula, "approximate-formula", "the {method} formula is an approximation ({note})"},
        {C::low_gain_in_stack, "low-gain-in-stack",
         "{device} has an intrinsic gain gm·ro of only {gain}, where the formula's neglected terms matter"},
        {C::gate_not_ac_ground, "gate-not-ac-ground",
         "a gate or base the formula takes as AC ground is not (a bias fed through a resistor or from a "
         "high-impedance node), or a device the recognition did not count sits in the path"},
        {C::not_dc_value, "not-dc-value",
         "the AC value at {frequency} is not a DC value (phase {phase}): capacitances already shunt the output; "
         "read the AC plot at a lower frequency (--at)"},
        {C::body_effect_neglected, "body-effect-neglected",
         "body effect is neglected: the op data has no gmb for {devices} (taken as 0) while the simulator "
         "includes it; save @{first}[gmbs] to include it"},
        {C::mirror_devices_only, "mirror-devices-only",
         "the linearised value covers only the mirror's own devices (the op data lacks parameters elsewhere), "
         "while the simulation has the whole circuit: loads and a reference that is not AC ground count there"},
        {C::data_mismatch, "data-mismatch",
         "the op data does not describe the simulated circuit: a parameter missing or misread, an operating "
         "point that differs between the op run and the AC run, or a probe on another node than the mirror "
         "output"},
    };
    return rows;
}

const CauseInfo& catalogue_row(CauseCode code) {
    for (const auto& row : cause_catalogue())
        if (row.code == code) return row;
    throw std::logic_error("a cause code without a catalogue row");
}

std::string_view to_string(FindingCode code) { return catalogue_row(code).name; }
std::string_view to_string(CauseCode code) { return catalogue_row(code).name; }

std::optional<FindingCode> parse_finding_code(std::string_view name) {
    for (const auto& row : finding_catalogue())
        if (row.name == name) return row.code;
    return std::nullopt;
}

std::string_view to_string(Unit unit) {
    switch (unit) {
        case Unit::volt:
            return "V";
        case Unit::ohm:
            return "Ω";
        case Unit::hertz:
            return "Hz";
        case Unit::degree:
            return "°";
        case Unit::percent:
            return "%";
        case Unit::none:
        case Unit::relation:
            return "";
    }
    return "";
}

FindingValue FindingValue::of(std::string name, double number, Unit unit) {
    FindingValue v;
    v.name = std::move(name);
    v.kind = Kind::number;
    v.number = number;
    v.unit = unit;
    return v;
}

FindingValue FindingValue::words(std::string name, std::string text) {
    FindingValue v;
    v.name = std::move(name);
    v.kind = Kind::text;
    v.text = std::move(text);
    return v;
}

FindingValue FindingValue::names(std::string name, std::vector<std::string> devices) {
    FindingValue v;
    v.name = std::move(name);
    v.kind = Kind::devices;
    v.devices = std::move(devices);
    return v;
}

const FindingValue* Finding::value(std::string_view name) const {
    for (const auto& v : values)
        if (v.name == name) return &v;
    return nullptr;
}

std::vector<std::string> finding_code_names() {
    std::vector<std::string> names;
    for (const auto& row : finding_catalogue()) names.emplace_back(row.name);
    return names;
}

Finding make_finding(FindingCode code, Severity severity, std::string mirror, std::string subject,
                     std::vector<FindingValue> values) {
    Finding f;
    f.code = code;
    f.severity = severity;
    f.mirror = std::move(mirror);
    f.subject = std::move(subject);
    f.values = std::move(values);
    return f;
}

Finding make_finding(FindingCode code, std::string mirror, std::string subject, std::vector<FindingValue> values) {
    return make_finding(code, catalogue_row(code).severity, std::move(mirror), std::move(subject), std::move(values));
}

bool fails_review(const Finding& finding, Severity fail_on) {
    return !finding.waived && finding.severity <= fail_on;
}

void sort_findings(std::vector<Finding>& findings) {
    std::stable_sort(findings.begin(), findings.end(), [](const Finding& a, const Finding& b) {
        if (a.severity != b.severity) return a.severity < b.severity;
        return catalogue_row(a.code).reading_order < catalogue_row(b.code).reading_order;
    });
}

}  // namespace mirrorcheck
