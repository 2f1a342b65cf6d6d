// Command-line spellings of the NetCDF met options, shared by met-dump and (at merge) `lidbox run`.
#pragma once

#include <CLI/CLI.hpp>
#include <string>
#include <vector>

#include "lidbox/met/netcdf_met.hpp"

namespace lidbox::cli {

// The texts the options are parsed into; converted by netcdf_met_options() after parsing so that
// bad values become lidbox InputErrors (exit 2) with the option named.
struct NetcdfOptionTexts {
  std::string station;
  std::string point;      // "LAT,LON" in degrees north, degrees east
  std::string footprint;  // "LATMIN,LATMAX,LONMIN,LONMAX"
  std::string member;
  std::vector<std::string> maps;    // "role=variable"
  std::vector<std::string> extras;  // "column=variable or standard_name"
  std::string sub_hourly = "hour_mean";
  std::string coarse = "refuse";
};

void add_netcdf_options(CLI::App& app, NetcdfOptionTexts& texts);
NetcdfMetOptions netcdf_met_options(const NetcdfOptionTexts& texts);

}  // namespace lidbox::cli
