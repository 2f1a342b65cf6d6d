#pragma once

#include <CLI/CLI.hpp>

namespace lidbox::cli {

// `lidbox outlook MET [--zone TZ] [--table ID] [--scheme ID ...] [-o DIR]`: ventilation classes,
// stagnation days, streaks and episodes from met alone, for forecasters without an inventory.
void add_outlook_command(CLI::App& app, int& exit_code);

}  // namespace lidbox::cli
