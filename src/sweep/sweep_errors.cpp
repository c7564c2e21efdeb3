#include "src/sweep/sweep_errors.hpp"

namespace mirrorcheck::sweep::errors {

InputError report_not_json(const std::string& path, std::uint64_t byte, const std::string& what) {
    return {"merge.not-json", Location::at_byte(path, byte),
            "expected a JSON report from `mirrorcheck review --format json`: " + what};
}

InputError not_a_review_report(const std::string& path, const std::string& schema) {
    return {"merge.not-a-review-report", Location(path),
            "expected a report with \"schema\": \"mirrorcheck-report/1\" (from `mirrorcheck review --format "
            "json`), found " +
                (schema.empty() ? std::string("none") : "\"" + schema + "\"")};
}

InputError report_field_missing(const std::string& path, const std::string& field) {
    return {"merge.missing-field", Location(path),
            "the report lacks `" + field + "` (or it has the wrong type): expected a complete mirrorcheck-report/1"};
}

InputError run_does_not_fit(const std::string& path, const std::string& run, const std::string& why) {
    return {"sweep.run-does-not-fit", Location(path),
            "run " + run + " does not fit the netlist (every run must simulate the netlist given to `sweep`): " +
                why};
}

InputError plots_not_per_run(const std::string& path, std::size_t plots, std::size_t runs) {
    return {"sweep.plots-not-per-run", Location(path),
            "expected the same number of AC or .tf plots for every run: " + std::to_string(plots) +
                " plots do not share out over " + std::to_string(runs) + " runs by plot order"};
}

InputError duplicate_run(const std::string& path, const std::string& label) {
    return {"merge.duplicate-run", Location(path),
            "run " + label + " is given twice: expected each run's report once"};
}

}  // namespace mirrorcheck::sweep::errors
