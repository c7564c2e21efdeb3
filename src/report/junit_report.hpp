// JUnit XML back end for `review`, for CI servers that show test results: one test case per
// mirror output, failing with one <failure> per finding that fails the review.
#pragma once

#include <string>

#include "src/analyse/review_tree.hpp"

namespace mirrorcheck::report {

// <testsuites> holding one <testsuite name="mirrorcheck review">: its <properties> name the
// input files, the --fail-on severity and the tool; each output of each mirror is a
// <testcase classname="MIRROR-LABEL" name="output NODE"> (dots written as `/`) with a
// <failure type="CODE"> per unwaived finding at --fail-on or worse that concerns it (the
// review tree's placement), and its other findings as lines of <system-out>. Failing
// findings that concern no output fail one extra test case, "findings outside the mirror
// outputs"; other such findings go to the suite's <system-out>. `failures` counts failed
// test cases, so that passed = tests - failures; `errors` and `skipped` are 0. The text is
// UTF-8, with no time stamp.
std::string review_to_junit(const ReviewTree& tree);

}  // namespace mirrorcheck::report
