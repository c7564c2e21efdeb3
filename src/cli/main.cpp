// mirrorcheck's command line: wires front ends, passes and back ends; no analysis here.
// Exit status: 0 nothing at error severity, 1 findings at error severity, 2 bad usage or
// unreadable input.
#include <iostream>

#include <CLI/CLI.hpp>

#include "parsers/common/input_error.hpp"
#include "src/cli/list_command.hpp"
#include "src/cli/peek_command.hpp"
#include "src/cli/prepare_command.hpp"
#include "src/cli/review_command.hpp"

int main(int argc, char** argv) {
    CLI::App app{"mirrorcheck: checks the current mirrors of a circuit simulated with ngspice"};
    app.require_subcommand(1);
    app.set_version_flag("--version", "mirrorcheck 0.1.0");
    int status = 0;
    mirrorcheck::cli::add_list_command(app, status);
    mirrorcheck::cli::add_peek_command(app, status);
    mirrorcheck::cli::add_review_command(app, status);
    mirrorcheck::cli::add_prepare_command(app, status);
    mirrorcheck::cli::add_run_command(app, status);
    try {
        app.parse(argc, argv);
    } catch (const CLI::Success& e) {
        return app.exit(e);
    } catch (const CLI::ParseError& e) {
        app.exit(e);
        return 2;
    } catch (const mirrorcheck::InputError& e) {
        std::cerr << e.what() << "\n";
        return 2;
    } catch (const std::exception& e) {
        std::cerr << "mirrorcheck: internal error: " << e.what() << " (please report it with the input files)\n";
        return 2;
    }
    return status;
}
