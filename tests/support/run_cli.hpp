// Test support: runs the mirrorcheck executable as a user would, in a shell, and hands
// back its exit status, stdout and stderr.
#pragma once

#include <cstdlib>
#include <filesystem>
#include <string>

#include <sys/wait.h>

#include "support/ngspice_run.hpp"

namespace mirrorcheck::test {

struct CliResult {
    int status = -1;
    std::string out, err;
};

// `args` is pasted into a shell command line after the executable: quote what needs it.
// With `cwd`, the command runs in that folder.
inline CliResult run_cli(const std::string& args, const std::filesystem::path& cwd = {}) {
    auto dir = make_temp_dir("mc-cli");
    std::string cmd = (cwd.empty() ? std::string() : "cd '" + cwd.string() + "' && ") + "'" + MIRRORCHECK_EXE +
                      "' " + args + " > '" + (dir / "out").string() + "' 2> '" + (dir / "err").string() + "'";
    int raw_status = std::system(cmd.c_str());
    CliResult r{WIFEXITED(raw_status) ? WEXITSTATUS(raw_status) : -1, read_text(dir / "out"), read_text(dir / "err")};
    std::filesystem::remove_all(dir);
    return r;
}

}  // namespace mirrorcheck::test
