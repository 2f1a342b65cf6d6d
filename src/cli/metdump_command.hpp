// `lidbox met-dump`: a diagnostic that shows what the NetCDF reader makes of a file (hourly met,
// or observed concentrations, as CSV with units in the headers) or writes it through the CF
// writer. Used by the round-trip tests; hidden from the main help.
#pragma once

#include <CLI/CLI.hpp>

namespace lidbox::cli {

// Registers the subcommand. When it runs, exit_code is set (0, 2 for an input error, 1 for an
// internal error) and the message is on stderr.
void add_met_dump_command(CLI::App& app, int& exit_code);

}  // namespace lidbox::cli
