// `mirrorcheck review NETLIST --op FILE`: the mirrors checked against one operating point.
#pragma once

#include <string>
#include <vector>

#include <CLI/CLI.hpp>

#include "parsers/netlist/netlist.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/model/circuit.hpp"

namespace mirrorcheck::cli {

// Everything `review` is asked on its command line, as typed.
struct ReviewOptions {
    std::string netlist;
    std::string op;
    std::string op_name;              // what the report calls the op file (`run`: results it deletes); empty: its path
    std::string format = "table";
    std::string margin = "100mV";
    std::string vce_sat = "0.2V";
    std::string ratio_tolerance = "5%";
    std::vector<std::string> ac, tf;  // raw files with AC or .tf plots
    std::vector<std::string> probes;  // NODE=SOURCE
    std::string at;                   // frequency for AC values
    std::string tolerance = "10%";
    std::vector<std::string> min_impedance;  // R or NODE=R
    std::vector<std::string> waive;   // waiver files
    std::string fail_on = "error";    // the severity that fails the review (exit 1, JUnit failures)
    bool summary = false;             // the table's verdict and summary rows alone
    netlist::ReadLimits limits;       // --max-devices
};

// Reads the inputs, reviews, prints the report; returns 1 when a finding fails the review
// (at --fail-on or worse, not waived), else 0.
int review_and_report(const ReviewOptions& options);

// The same for a circuit already built (`run`: the designer's netlist with the probes its
// deck added); `left_out` lists the cards the simulated deck left out ("file:line: card").
int review_circuit_and_report(const ReviewOptions& options, const Circuit& circuit,
                              const std::vector<std::string>& left_out);

// The review settings the options ask for (reads the waiver files); shared with `sweep`.
ReviewSettings review_settings(const ReviewOptions& options);

// The options that judge the circuit and shape the report, shared with `run`.
void add_judgement_options(CLI::App& cmd, ReviewOptions& options);

// An option value with an SI prefix and its unit, or a usage error naming the option: one
// for text that is no such value, one for a number without its unit, one for a value below
// zero.
double quantity(const std::string& option, const std::string& text, const char* unit);

// Adds the `review` subcommand to the application; its callback sets `status`
// (0, or 1 when a finding has error severity).
void add_review_command(CLI::App& app, int& status);

}  // namespace mirrorcheck::cli
