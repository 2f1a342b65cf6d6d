// The case file (TOML, https://toml.io/en/v1.0.0): the airshed, its time zone, the met file and
// how to read it, the pollutants, the emission sectors and their clocks, floors, sub-step control
// and the output directory. Every dimensional value is a quantity string with its unit
// ("16 km", "0.5 m/s", "9 t/h", "3 day"), converted with UDUNITS-2.
//
// Unknown keys are errors with a "did you mean" hint; every missing required value is named;
// every message starts with "<file>:<line>: [<table>] <key>" (the shapes of toml_table.hpp).
// README.md documents each key.
#pragma once

#include "lidbox/base/plausibility.hpp"

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/base/concentration_units.hpp"
#include "lidbox/base/time.hpp"
#include "lidbox/engine/box_model.hpp"
#include "lidbox/engine/cut_request.hpp"
#include "lidbox/engine/emission_scenario.hpp"
#include "lidbox/engine/emissions.hpp"
#include "lidbox/engine/ensemble_spec.hpp"
#include "lidbox/engine/footprint.hpp"
#include "lidbox/met/met_series.hpp"
#include "lidbox/met/netcdf_met.hpp"

namespace lidbox {

struct WindSectorValue {
  double from_deg = 0.0;  // clockwise from north, start of the sector (inclusive)
  double to_deg = 0.0;    // end (exclusive); may wrap through north
  double value_g_m3 = 0.0;
};

struct BackgroundSpec {
  enum class Kind { constant, by_wind_from, column };
  Kind kind = Kind::constant;
  double value_g_m3 = 0.0;
  std::vector<WindSectorValue> sectors;
  std::string column;  // name of a met column (its header unit converts to the pollutant's)

  // Value for air arriving from `from_deg` (by_wind_from only).
  [[nodiscard]] double for_direction(double from_deg) const;
};

struct PollutantSpec {
  std::string name;
  ConcentrationUnit unit;
  double molar_mass_g_mol = 0.0;  // 0 for aerosols
  ReferenceConditions reference;
  std::string reference_label;  // "us", "eu" or "custom"
  PollutantProcesses processes;
  BackgroundSpec background;
  double free_troposphere_g_m3 = 0.0;
  std::optional<double> initial_g_m3;           // only without spin-up
  std::optional<double> initial_residual_g_m3;  // only without spin-up; > 0 needs a top
};

enum class SpinUp { none, repeat_first_day };

enum class MetFormat { csv, netcdf };

struct MetSpec {
  std::string path;          // resolved against the case file's folder
  std::string display_name;  // as written in the case file
  MetFormat format = MetFormat::csv;  // default from the extension: .nc/.nc4/.cdf -> netcdf
  MetReading reading = MetReading::hour_average;
  HourLabel hour_label = HourLabel::period_start;
  int max_gap_hours = 3;
  NetcdfMetOptions netcdf;  // station, point, footprint, member, variables (NetCDF only)
};

// Which rule sets the run's hour means are judged against (rule_set.hpp, standards_report.hpp).
struct StandardsSpec {
  std::vector<std::string> rule_sets;  // ids ("us-naaqs") or TOML paths resolved against the case
  std::string rules_dir;               // empty: $LIDBOX_RULES_DIR, else the shipped src/data/rules
  std::string aqi_table = "2024";      // US AQI breakpoints: "2024" or "2018"
  bool aqi = true;
  bool aqhi = true;
  // The index people read (headline, bulletin): an id of src/data/indices ("eu-eaqi-2017") or a
  // TOML path resolved against the case; empty: the US AQI of aqi_table.
  std::string index;
  std::string index_where;  // "<case>:<line>: [standards] index", for messages
  std::optional<UtcSeconds> issue_time_utc;    // forecast issue time, for episode lead times
  std::vector<std::pair<int, int>> rolling_h;  // extra running-mean tables: (window, min valid;
                                               // 0 = the standards' 75 % default)
};

// What [diagnostics] names; the diagnostics room loads and applies it (daily_diagnostics.hpp).
struct DiagnosticsSpec {
  std::string ventilation_table = "usfs-vcis";  // id or path; "" for none
  std::vector<std::string> schemes;             // ids or paths (resolved against the case)
  std::map<std::string, std::string> fields;    // field -> NetCDF variable (NetCDF met only)
};

// The diagnostics fields a met file may carry beside the mixing height and wind (the names of
// stagnation_scheme.hpp's DiagnosticField; a test checks that the two lists agree).
const std::vector<std::string>& diagnostics_extra_fields();

struct CaseSpec {
  std::string file;  // the case file as named by the user
  // The shipped plausibility ranges with the case's [plausibility] overrides; every reader of
  // the case's inputs checks against them (plausibility.hpp).
  PlausibilityLimits plausibility;
  std::string name;
  std::string title;
  TimeZone zone;
  Footprint footprint;
  MetSpec met;
  EngineOptions engine;
  SpinUp spin_up = SpinUp::repeat_first_day;
  double spin_up_tolerance = 1e-3;  // relative change of the day's hour means
  int spin_up_max_days = 60;
  // Top of the residual layer at the start [m] (only without spin-up); it must be at or above
  // the initial lid, which run_case checks against the met. Absent: no residual layer at the
  // start. `initial_residual_top_where` places the key for that message.
  std::optional<double> initial_residual_top_m;
  std::string initial_residual_top_where;
  std::vector<PollutantSpec> pollutants;
  std::vector<EmissionSector> sectors;  // rates per pollutant in the order of `pollutants`
  std::optional<StandardsSpec> standards;  // absent: no standards tables
  DiagnosticsSpec diagnostics;
  std::string output_directory;         // default outputs/<name>
  // [bulletin] templates: the wording of bulletin.html/.md/.txt, an id of src/data/bulletin or a
  // path resolved against the case (report/bulletin.hpp); area: the place the bulletin names
  // (default: the title).
  std::string bulletin_templates = "en";
  std::string bulletin_area;
  bool netcdf_output = false;           // also write hourly.nc, budget.nc, daily.nc
  bool invented = false;                // the case says its scenario is invented
  std::optional<EmissionScenario> scenario;  // [scenario]: sectors scaled from a start time
  std::optional<EnsembleSpec> ensemble;      // [ensemble]: met members run beside [met]
  std::optional<CutRequest> cut;             // [cut]: the exact emission cut asked for
  // Where the case's [grid] table is ("file:line: (top level) grid"), "" without one: a grid
  // case is read by grid/grid_case.hpp and run by `lidbox grid`, never as a point.
  std::string grid_table;
};

// Reads and checks a case file. Relative paths inside it are resolved against its folder.
CaseSpec load_case(const std::string& path);
// From text (tests); `file` is used in messages and `base_dir` resolves relative paths.
CaseSpec parse_case(const std::string& text, const std::string& file, const std::string& base_dir);

}  // namespace lidbox
