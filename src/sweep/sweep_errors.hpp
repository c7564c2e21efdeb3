// Errors of `sweep` and `merge` in what they were given (exit status 2), each written once.
#pragma once

#include <cstdint>
#include <string>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::sweep::errors {

// A per-run report that is not JSON (at `byte`), not a review report, or lacks a field.
InputError report_not_json(const std::string& path, std::uint64_t byte, const std::string& what);
InputError not_a_review_report(const std::string& path, const std::string& schema);
InputError report_field_missing(const std::string& path, const std::string& field);
// A run whose operating point does not fit the netlist (devices missing or different).
InputError run_does_not_fit(const std::string& path, const std::string& run, const std::string& why);
// --ac/--tf plots that cannot be shared out over the runs by plot order.
InputError plots_not_per_run(const std::string& path, std::size_t plots, std::size_t runs);
// Two runs with the same label.
InputError duplicate_run(const std::string& path, const std::string& label);

}  // namespace mirrorcheck::sweep::errors
