// JUnit XML back end for `review`, for CI servers that show test results: one test case per
// mirror output, failing with one <failure> per error finding that concerns it.
#pragma once

#include <string>

#include "src/analyse/pipeline.hpp"
#include "src/report/review_report.hpp"

namespace mirrorcheck::report {

// <testsuites> holding one <testsuite name="mirrorcheck review">: its <properties> name the
// input files; each output of each mirror is a <testcase classname="MIRROR-ID" name="output
// NODE"> with a <failure type="CODE"> per unwaived error that concerns it (finding_scope.hpp),
// and its waived errors, warnings and notes as lines of <system-out>. Errors that concern no
// output fail one extra test case, "findings outside the mirror outputs"; other such findings
// go to the suite's <system-out>. `failures` counts failed test cases, so that passed = tests
// - failures; `errors` and `skipped` are 0. The text is UTF-8, with no time stamp.
std::string review_to_junit(const ReviewInputs& inputs, const Circuit& circuit, const OpPoint& op,
                            const Review& review);

}  // namespace mirrorcheck::report
