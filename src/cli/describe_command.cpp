#include "src/cli/describe_command.hpp"

#include <iostream>
#include <memory>
#include <sstream>
#include <string>

#include "src/cli/bash_completion.hpp"
#include "src/cli/cli_outline.hpp"
#include "src/cli/man_page.hpp"
#include "src/cli/usage_errors.hpp"
#include "src/output/write_file.hpp"

namespace mirrorcheck::cli {
namespace {

struct DescribeRequest {
    std::string what;
    std::string output;  // empty: stdout
};

int describe(const CLI::App& app, const DescribeRequest& r) {
    const CliOutline outline = outline_command_line(app);
    std::ostringstream text;
    if (r.what == "man") write_man_page(outline, text);
    else write_bash_completion(outline, text);
    if (r.output.empty()) {
        std::cout << text.str();
    } else if (auto failed = write_file_whole(r.output, text.str())) {
        throw usage::cannot_write(r.output, *failed);
    }
    return 0;
}

}  // namespace

void add_describe_command(CLI::App& app, int& status) {
    auto r = std::make_shared<DescribeRequest>();
    CLI::App* cmd = app.add_subcommand("describe-cli", "Write the man page or bash completion (used by the build)");
    cmd->group("");  // hidden from --help, the man page and the completion
    cmd->add_option("WHAT", r->what, "man or bash-completion")->required()->check(CLI::IsMember({"man", "bash-completion"}));
    cmd->add_option("-o,--output", r->output, "the file to write (default: standard output)");
    cmd->callback([r, &status, &app] { status = describe(app, *r); });
}

}  // namespace mirrorcheck::cli
