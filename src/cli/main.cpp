// mirrorcheck's command line: wires front ends, passes and back ends; no analysis here.
// Exit status (exit_status.hpp): 0 nothing at the failing severity, 1 findings at it, 2 bad
// usage or unreadable input, 3 an internal error.
#include <iostream>
#include <string>

#include <CLI/CLI.hpp>

#include "src/analyse/review_tree.hpp"
#include "src/cli/describe_command.hpp"
#include "src/cli/exit_status.hpp"
#include "src/cli/list_command.hpp"
#include "src/cli/merge_command.hpp"
#include "src/cli/peek_command.hpp"
#include "src/cli/prepare_command.hpp"
#include "src/cli/review_command.hpp"
#include "src/cli/sweep_command.hpp"
#include "src/cli/usage_errors.hpp"
#include "src/output/write_file.hpp"

int main(int argc, char** argv) {
    using namespace mirrorcheck::cli;
    CLI::App app{"mirrorcheck: checks the current mirrors of a circuit simulated with ngspice"};
    app.require_subcommand(1);
    const mirrorcheck::ToolInfo tool = mirrorcheck::this_tool();
    app.set_version_flag("--version", tool.name + " " + tool.version + " (" +
                                          (tool.revision.empty() ? "unknown revision" : "revision " + tool.revision) +
                                          ")");
    std::string exit_statuses = "Exit status:";
    for (const auto& e : exit_status_meanings) exit_statuses += "\n  " + std::to_string(e.status) + "  " + std::string(e.meaning);
    app.footer(exit_statuses);
    int status = 0;
    add_list_command(app, status);
    add_peek_command(app, status);
    add_review_command(app, status);
    add_prepare_command(app, status);
    add_run_command(app, status);
    add_sweep_command(app, status);
    add_merge_command(app, status);
    add_describe_command(app, status);  // hidden: the man page and completion, from everything above
    const int status_of_command = run_guarded(
        [&] {
            try {
                app.parse(argc, argv);
            } catch (const CLI::Success& e) {
                return app.exit(e);
            } catch (const CLI::ParseError& e) {
                app.exit(e);
                return exit_bad_input;
            }
            return status;
        },
        std::cerr);
    // A report that did not all reach its destination (a redirection to a full disk) is
    // no report: status 2, not the review's 0 or 1.
    if (auto failed = mirrorcheck::flush_standard_output()) {
        std::cerr << usage::cannot_write("standard output", *failed).what() << "\n";
        return exit_bad_input;
    }
    return status_of_command;
}
