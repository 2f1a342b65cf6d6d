#pragma once

#include <CLI/CLI.hpp>

namespace lidbox::cli {

// `lidbox grid CASE.toml [-o DIR] [--threads N] [-q]`: every cell of the case's met grid as its
// own box; maps per period, series of chosen cells. Under mpirun (a build with LIDBOX_MPI=ON)
// the processes take blocks of grid rows and rank 0 writes the files.
void add_grid_command(CLI::App& app, int& exit_code);

}  // namespace lidbox::cli
