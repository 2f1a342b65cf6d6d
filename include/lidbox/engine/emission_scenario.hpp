// An emission scenario: chosen sectors scaled from a start time, so that a forecaster can run a
// curtailed episode ("home heating at 80 % from tomorrow 06:00") and look at it.
//
// Case file:
//   [scenario]
//   start = "2026-01-14T18:00:00-07:00"        # ISO 8601; without an offset: the case's zone
//   scale = { home_heating = 0.8, traffic = 0.9 }  # plain factors >= 0 per named sector
//
// The scale multiplies the sector's emissions in every hour that starts at or after `start`;
// hours before are untouched, and so is the spin-up (the state the run starts from is the
// unscaled past). `start` must be the start of an hour of the run (the emission clocks are
// hourly); a start outside the run is an InputError naming the key. Concentrations are linear
// in each sector's emissions (physics note section 6), so a scenario is also how a computed
// cut (emission_cut.hpp) is checked by running it.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "lidbox/base/time.hpp"
#include "lidbox/base/toml_table.hpp"
#include "lidbox/engine/box_model.hpp"

namespace lidbox {

struct EmissionScenario {
  UtcSeconds start_utc = 0;
  std::vector<double> sector_scale;  // [sector] in the case's order; 1 for sectors not named
  std::string where;                 // "<file>:<line>: [scenario] start", for messages
};

// The index of the hour that starts at `start_utc` among n_hours hours from first_hour_utc.
// InputError naming `where` when it is not a whole hour of the run: "<where>: 2026-01-20T01:00:00Z,
// outside the run; expected the start of an hour from 2026-01-12T07:00:00Z to
// 2026-01-19T06:00:00Z".
std::size_t hour_index_in_run(UtcSeconds start_utc, UtcSeconds first_hour_utc, std::size_t n_hours,
                              const std::string& where);

// Multiplies the clock factors of each sector by its scale from the scenario's start hour on.
void apply_emission_scenario(const EmissionScenario& scenario, UtcSeconds first_hour_utc,
                             Forcing& forcing);

// Names of sectors given in a case-file table, checked against the case's sectors: the index of
// each, in the order given. An unknown name is an InputError at `key` with a "did you mean".
std::vector<std::size_t> sector_indices(const TomlTable& table, const std::string& key,
                                        const std::vector<std::string>& names,
                                        const std::vector<std::string>& sector_names);

// The [scenario] table of a case file, when present. `sector_names` in the case's order.
std::optional<EmissionScenario> read_emission_scenario(const TomlTable& top,
                                                       const std::vector<std::string>& sector_names,
                                                       const TimeZone& zone);

}  // namespace lidbox
