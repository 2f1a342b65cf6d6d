// `lidbox evaluate`: a case's run against monitor files, with optional fitting of sector scales.
#pragma once

#include <CLI/CLI.hpp>

namespace lidbox::cli {

// Registers the subcommand; `exit_code` becomes 0 on success (errors rise to main()).
void add_evaluate_command(CLI::App& app, int& exit_code);

}  // namespace lidbox::cli
