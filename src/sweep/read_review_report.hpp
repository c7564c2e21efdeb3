// Reader of a review's JSON report (schema mirrorcheck-report/1) into a sweep's run record:
// the one way `merge` gets its runs, wherever the reviews were made.
#pragma once

#include <filesystem>
#include <string>

#include "src/sweep/run_record.hpp"

namespace mirrorcheck::sweep {

// The run record of the report at `path`, labelled `label` (merge: the file's name without
// .json). Throws InputError (sweep_errors.hpp) for a file that is not JSON, not a review
// report, or lacks a field the record needs.
RunRecord read_review_report(const std::filesystem::path& path, const std::string& label);

}  // namespace mirrorcheck::sweep
