// The exit statuses of the command line (src/cli/exit_status.hpp): what a command returns
// passes through, bad input is 2 with its message, anything else is 3, an internal error,
// so that a flow can tell a bug in the tool from a problem in its own files.
#include <sstream>
#include <stdexcept>
#include <vector>

#include <doctest/doctest.h>

#include "src/cli/exit_status.hpp"

using namespace mirrorcheck;
using namespace mirrorcheck::cli;

TEST_CASE("a command's own status passes through") {
    std::ostringstream err;
    CHECK(run_guarded([] { return exit_passed; }, err) == 0);
    CHECK(run_guarded([] { return exit_findings; }, err) == 1);
    CHECK(err.str().empty());
}

TEST_CASE("bad input is 2, with the error's location, message and code") {
    std::ostringstream err;
    const int status =
        run_guarded([]() -> int { throw InputError("raw.truncated-data", Location::at_byte("run.raw", 12), "cut"); }, err);
    CHECK(status == 2);
    CHECK(err.str() == "run.raw: byte 12: error: cut [raw.truncated-data]\n");
}

TEST_CASE("any other exception is 3, an internal error") {
    std::ostringstream err;
    CHECK(run_guarded([]() -> int { throw std::logic_error("a finding lacks a value"); }, err) == 3);
    CHECK(err.str().find("internal error: a finding lacks a value") != std::string::npos);
    std::ostringstream err2;
    CHECK(run_guarded([]() -> int { return std::vector<int>{}.at(1); }, err2) == exit_internal_error);
}
