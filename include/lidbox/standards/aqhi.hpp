// Canada's Air Quality Health Index from 3-hour running means of NO2, O3 (ppb) and PM2.5
// (ug/m3), computed every hour:
//
//   AQHI = (1000 / 10.4) * [(e^(0.000871 NO2) - 1) + (e^(0.000537 O3) - 1) + (e^(0.000487 PM2.5) -
//   1)]
//
// The formula's coefficients, window, minimum and categories are data: src/data/indices/
// ca-aqhi.toml (air_index.hpp, kind "formula"); an agency's own formula file works the same way.
// (Mieczyslaw 2017, J. Civil Eng. Environ. Sci. 3:006-007, who writes it as
// (100*10/10.4)*(sum e^... - 3); coefficients from Stieb et al. 2008, JAWMA 58:435, from memory.)
// Reported rounded to the nearest integer, at least 1 (from memory); categories Low 1-3,
// Moderate 4-6, High 7-10, Very High above 10 (a colour-scale table citing canada.ca "About
// the AQHI", design/references.md 2.4).
// The 3-h mean ending at the end of hour t uses hours t-2..t and needs 2 of them (common
// practice, no source). Gases are converted at 25 degC and 101.325 kPa (from memory).
#pragma once

#include <vector>

#include "lidbox/standards/air_index.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

// The shipped index, ca-aqhi.toml.
const AirIndex& aqhi_index();
// The formula of `index` with one mean per term, in the terms' order and units.
double formula_value(const AirIndex& index, const std::vector<double>& term_means);
// Rounded half up, at least the index's minimum.
int formula_rounded(const AirIndex& index, double value);
// With the shipped index: NO2 and O3 in ppb, PM2.5 in ug/m3.
double aqhi_value(double no2_ppb, double o3_ppb, double pm25_ug_m3);
int aqhi_rounded(double value);
const char* aqhi_category(int rounded);

struct AqhiHour {
  UtcSeconds end_utc = 0;                                // end of the 3-h window
  double no2_ppb = 0.0, o3_ppb = 0.0, pm25_ug_m3 = 0.0;  // the 3-h means
  double value = 0.0;
  int rounded = 0;
  const char* category = "";  // points into the index's categories
};

// Hours where the means of every term exist; empty when a pollutant is absent. The NO2, O3 and
// PM2.5 fields hold those terms' means when the index has them (NaN otherwise).
std::vector<AqhiHour> hourly_formula_index(const NamedSeries& series, const AirIndex& index);
std::vector<AqhiHour> hourly_aqhi(const NamedSeries& series);

}  // namespace lidbox
