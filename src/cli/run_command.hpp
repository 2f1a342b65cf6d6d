#pragma once

#include <CLI/CLI.hpp>

namespace lidbox::cli {

// `lidbox run CASE.toml [-o DIR] [--quiet]`. The callback stores the command's exit code.
void add_run_command(CLI::App& app, int& exit_code);

}  // namespace lidbox::cli
