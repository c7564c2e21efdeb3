// Back ends for `review`: the terminal table, JSON (schema mirrorcheck-report/1, kept in
// docs/report.schema.json) and JUnit XML. Each renders the review tree and nothing else.
#pragma once

#include <cstddef>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>

#include <nlohmann/json.hpp>

#include "src/analyse/review_tree.hpp"

namespace mirrorcheck::report {

using ReviewInputs = mirrorcheck::ReviewInputs;

enum class Format { table, json, junit };
std::optional<Format> parse_format(std::string_view name);

// How the table is laid out.
struct TableStyle {
    std::size_t width = 120;    // lines are wrapped to this many characters
    bool colour = false;        // ANSI colour on words that already say the same
    bool summary_only = false;  // the verdict and the summary rows alone
};

// Writes the review in `format` (the style applies to the table only).
void write_review(Format format, const ReviewTree& tree, std::ostream& out, const TableStyle& style = {});

// The verdict, one summary row per output, then one block per mirror with each output's
// values and findings, then what concerns the whole circuit.
std::string write_review_table(const ReviewTree& tree, const TableStyle& style = {});

// {"schema", "tool", "inputs", "settings", "assumptions", "notes", "mirrors", "devices",
// "findings", "summary"}: see README.md "JSON for flows" and docs/report.schema.json.
nlohmann::json review_to_json(const ReviewTree& tree);

// The same as review_to_json(tree).dump(2) and a line break, written a mirror, a device, a
// finding at a time (the document of a large circuit is never whole in memory).
void write_review_json(const ReviewTree& tree, std::ostream& out);

}  // namespace mirrorcheck::report
