// `lidbox observe`: the standards, index and episode tables for observed hourly concentrations.
#pragma once

#include <CLI/CLI.hpp>

namespace lidbox::cli {

// Registers the subcommand. When it runs, `exit_code` becomes 0 on success, 2 for bad input
// (message on stderr, nothing written) and 1 for an internal error.
void add_observe_command(CLI::App& app, int& exit_code);

}  // namespace lidbox::cli
