// A finding: one thing a designer should read, as a record: a code from the catalogue, a
// severity, the mirror and subject it concerns, and the named values behind it (numbers in
// plain SI units with their unit, device names as ngspice names them, short texts). Passes
// return findings; src/report/finding_text.cpp alone turns one into a sentence, from the
// message template of its catalogue row.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace mirrorcheck {

// In order of importance: error first.
enum class Severity { error, warning, info };

// "error", "warning", "info": the one word for each severity, everywhere.
std::string_view to_string(Severity severity);
std::optional<Severity> parse_severity(std::string_view text);

// Every finding a review can give; the catalogue (finding.cpp) has one row per code.
enum class FindingCode {
    cutoff,
    out_of_saturation,
    low_margin,
    gmb_missing,
    ratio_error,
    low_intrinsic_gain,
    body_effect,
    inspection_vs_own,
    loaded_output,
    feedback_at_output,
    low_node_impedance,
    linearised_vs_simulated,
    inspection_vs_simulated,
    not_linearised,
    not_simulated,
    waiver_unused,
    own_vs_simulated,
};
inline constexpr std::size_t finding_code_count = 17;

// "out-of-saturation", ...: the stable name that JSON, JUnit and waiver files use.
std::string_view to_string(FindingCode code);
std::optional<FindingCode> parse_finding_code(std::string_view name);

// Why two resistance values disagree: the cause a reconciliation finding names.
enum class CauseCode {
    unbounded_formula,      // a device reports gds = 0
    collapsed_device,       // a device out of saturation
    approximate_formula,    // the family formula is an approximation
    low_gain_in_stack,      // a level with gm·ro below low_intrinsic_gain
    gate_not_ac_ground,     // nothing else explains it
    not_dc_value,           // the AC point is above DC
    body_effect_neglected,  // gmb missing from the op data
    mirror_devices_only,    // the solve covered the mirror's devices only
    data_mismatch,          // the op data and the simulation disagree, no benign cause
};
inline constexpr std::size_t cause_code_count = 9;
std::string_view to_string(CauseCode code);

// How a number is written in a sentence (src/report/finding_text.cpp).
enum class Unit {
    none,      // a plain number (a ratio, a gain): 4 significant digits
    volt,      // SI prefix and unit: "86.5 mV"
    ohm,
    hertz,
    degree,    // a phase: "12°"
    percent,   // a fraction, written as a percentage: 0.113 -> "11.3 %"
    relation,  // first/second - 1, written as "12 % above", "8 % below", "163 times", "1/40 of"
};

// "V", "Ω", "Hz", "°", "%", "" (relation and none): the unit JSON gives beside a number.
std::string_view to_string(Unit unit);

// One named value of a finding or a cause.
struct FindingValue {
    enum class Kind { number, text, devices };
    std::string name;
    Kind kind = Kind::number;
    double number = 0;                 // plain SI
    Unit unit = Unit::none;
    std::string text;                  // a node, a region, a data source, a formula's method
    std::vector<std::string> devices;  // ngspice names; shown as the designer knows them

    static FindingValue of(std::string name, double number, Unit unit);
    static FindingValue words(std::string name, std::string text);
    static FindingValue names(std::string name, std::vector<std::string> devices);
};

struct Cause {
    CauseCode code = CauseCode::data_mismatch;
    std::vector<FindingValue> values;
};

struct Finding {
    FindingCode code = FindingCode::cutoff;
    Severity severity = Severity::info;
    std::string mirror;   // Mirror::id; empty for a finding about the whole circuit
    std::string subject;  // the device (ngspice name) or output node concerned, or a waiver's place
    bool subject_is_device = false;
    std::vector<FindingValue> values;
    std::optional<Cause> cause;  // reconciliation findings: why the values differ
    bool waived = false;         // accepted by a waiver file; then it never fails a review
    std::string waiver;          // the waiver's reason, as written

    const FindingValue* value(std::string_view name) const;
};

// One row of the catalogue: everything fixed about a code. The README's table of findings
// is this table (tests/unit/test_finding.cpp compares them).
struct FindingCodeInfo {
    FindingCode code;
    std::string_view name;
    Severity severity;               // the usual one; a pass may choose another (see severity_text)
    std::string_view severity_text;  // as the README says it
    int reading_order;               // within a severity: device states, currents, resistances, waivers
    std::string_view meaning;
    std::string_view action;
    std::string_view message;  // template: {name} is a value of the finding, {cause} its cause
};
const std::vector<FindingCodeInfo>& finding_catalogue();  // in reading order
const FindingCodeInfo& catalogue_row(FindingCode code);

struct CauseInfo {
    CauseCode code;
    std::string_view name;
    std::string_view message;  // template, as for findings
};
const std::vector<CauseInfo>& cause_catalogue();
const CauseInfo& catalogue_row(CauseCode code);

// The codes' names, for readers that check names against the catalogue (waiver files).
std::vector<std::string> finding_code_names();

// A finding at its code's usual severity, or at the one given.
Finding make_finding(FindingCode code, std::string mirror, std::string subject, std::vector<FindingValue> values);
Finding make_finding(FindingCode code, Severity severity, std::string mirror, std::string subject,
                     std::vector<FindingValue> values);

// True when the finding fails a review at `fail_on` (error by default): that severity or a
// worse one, and not waived.
bool fails_review(const Finding& finding, Severity fail_on = Severity::error);

// Severity first, then the catalogue's reading order; the order among equals is kept.
void sort_findings(std::vector<Finding>& findings);

}  // namespace mirrorcheck
