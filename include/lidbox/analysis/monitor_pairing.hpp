// Monitor hour means paired with a run's hour means, by pollutant and UTC hour.
//
// A monitor file is the observations CSV (observations_csv.hpp): hour-start stamps with an
// explicit offset, so both sides are on the same UTC hour grid and hour i of the run covers
// [start_i, start_i + 1 h) on both. Each monitor column whose pollutant the case has is converted
// to the case's unit for that pollutant (the monitor's unit parsed with the case pollutant's molar
// mass and reference conditions: value_case = value_monitor * to_g_m3(monitor) / to_g_m3(case)).
//
// What happens to each monitor hour, counted so the report can say why a pair was not used:
//   outside the run          the monitor hour is before the run's first or after its last hour
//   missing                  an empty cell, or an hour the file skips
//   below detection ("<L")   substituted by the chosen rule (default L/2, common practice, no
//                            source) and used, or left out with --below-detection drop
//   negative                 kept as measured (instrument noise around zero is part of the
//                            record; clipping it would bias the mean up); counted
// Pairs are the run hours with a usable monitor value. A monitor with no column the case has, a
// monitor whose hours do not overlap the run, and one with no usable value inside the run are
// InputErrors naming the file, its period and the run's.
#pragma once

#include <string>
#include <vector>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/observations_csv.hpp"

namespace lidbox {

enum class BelowDetection { half_limit, limit, zero, drop };
// "half", "limit", "zero", "drop"; InputError naming `where` otherwise.
BelowDetection parse_below_detection(const std::string& text, const std::string& where);
const char* describe(BelowDetection b);

struct MonitorPollutant {
  std::string monitor;         // the file as named by the user
  std::string label;           // its file stem, for tables and charts
  std::string pollutant;       // canonical name ("PM2.5")
  std::size_t case_index = 0;  // index into CaseSpec::pollutants
  std::string monitor_unit;    // as the file had it (canonical spelling)
  std::string unit;            // the case's unit for the pollutant (canonical spelling)
  double to_case_unit = 1.0;   // monitor value * to_case_unit = value in `unit`
  // Per run hour: the usable observed value in `unit`, NaN where there is none.
  std::vector<double> observed;
  std::vector<unsigned char> substituted;  // 1 where a "<L" value was substituted
  // Counts of the monitor's hours.
  std::size_t monitor_hours = 0;  // hours on the file's grid, first to last row
  std::size_t outside_run = 0;
  std::size_t missing = 0;          // inside the run
  std::size_t below_detection = 0;  // inside the run
  std::size_t dropped_below_detection = 0;
  std::size_t negative = 0;  // inside the run, kept
  std::size_t pairs = 0;
  UtcSeconds first_hour_utc = 0;
  UtcSeconds last_hour_utc = 0;
};

// The pairs of one monitor file with a run, one entry per pollutant that both have.
// `pollutant` empty: every common pollutant; else only that one (canonical or case spelling),
// and a monitor without it is an InputError. Pollutants of the monitor that the case lacks are
// listed in `skipped` as "<file>: <pollutant>".
std::vector<MonitorPollutant> pair_monitor(const CaseSpec& c, const RunResult& r,
                                           const Observations& obs, const std::string& pollutant,
                                           BelowDetection below, std::vector<std::string>* skipped);

// The run's hour means of case pollutant p in its unit: total, and each part (0 background,
// 1 initial state, 2 + s sector s).
std::vector<double> model_total(const CaseSpec& c, const RunResult& r, std::size_t p);
std::vector<double> model_part(const CaseSpec& c, const RunResult& r, std::size_t p,
                               std::size_t part);

// The case pollutant's canonical name ("PM25" -> "PM2.5"), or its own name when the standards
// do not know it.
std::string canonical_pollutant(const std::string& case_name);

}  // namespace lidbox
