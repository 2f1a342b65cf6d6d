// Canada's Air Quality Health Index from 3-hour running means of NO2, O3 (ppb) and PM2.5
// (ug/m3), computed every hour:
//
//   AQHI = (1000 / 10.4) * [(e^(0.000871 NO2) - 1) + (e^(0.000537 O3) - 1) + (e^(0.000487 PM2.5) -
//   1)]
//
// (Mieczyslaw 2017, J. Civil Eng. Environ. Sci. 3:006-007, who writes it as
// (100*10/10.4)*(sum e^... - 3); coefficients from Stieb et al. 2008, JAWMA 58:435, from memory.)
// Reported rounded to the nearest integer, at least 1 (from memory); categories Low 1-3,
// Moderate 4-6, High 7-10, Very High above 10 (a colour-scale table citing canada.ca "About
// the AQHI", design/references.md 2.4).
// The 3-h mean ending at the end of hour t uses hours t-2..t and needs 2 of them (common
// practice, no source). Gases are converted at 25 degC and 101.325 kPa (from memory).
#pragma once

#include <vector>

#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

double aqhi_value(double no2_ppb, double o3_ppb, double pm25_ug_m3);
int aqhi_rounded(double value);
const char* aqhi_category(int rounded);

struct AqhiHour {
  UtcSeconds end_utc = 0;                                // end of the 3-h window
  double no2_ppb = 0.0, o3_ppb = 0.0, pm25_ug_m3 = 0.0;  // the 3-h means
  double value = 0.0;
  int rounded = 0;
  const char* category = "";
};

// Hours where all three 3-h means exist; empty when a pollutant is absent.
std::vector<AqhiHour> hourly_aqhi(const NamedSeries& series);

}  // namespace lidbox
