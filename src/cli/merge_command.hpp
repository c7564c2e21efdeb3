// `mirrorcheck merge REPORT.json...`: per-run review reports, made anywhere, turned into the
// statistics and yield of `sweep`.
#pragma once

#include <CLI/CLI.hpp>

namespace mirrorcheck::cli {

// Adds the `merge` subcommand; its callback sets `status` as `sweep` does.
void add_merge_command(CLI::App& app, int& status);

}  // namespace mirrorcheck::cli
