// The pollutants that rule sets, indices and observation files name, with the molar masses used
// for ppb/ppm <-> mass conversions.
//
// Molar masses [g/mol]: CO 28.01, NO 30.01, NO2 46.01, O3 48.00, SO2 64.06 (Swiss cantonal agency
// conversion notes; Teesing; calculator.academy, as collected in design/references.md section 4);
// benzene C6H6 78.11 (from memory: 6 x 12.011 + 6 x 1.008). PM2.5 and PM10 have none: they are
// mass concentrations already.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "lidbox/base/text.hpp"

namespace lidbox {

struct PollutantInfo {
  const char* name;         // canonical name, as written in outputs: "PM2.5", "NO2", ...
  double molar_mass_g_mol;  // 0 for aerosols
};

// Canonical entry for a name, matched explicitly through an alias table, without regard to case:
// the canonical names, common spellings (PM2.5 / PM25 / PM2_5 / PM2p5, ozone, "sulfur dioxide",
// ...) and the CF standard names (mass_concentration_of_..._in_air, mole_fraction_of_..._in_air,
// both PM spellings). Anything else is nullptr: "fine_dust" or "PM 10" are not guessed.
const PollutantInfo* find_pollutant(std::string_view name);
// The same, but an unknown name is an InputError naming `where`, with a "did you mean" hint.
const PollutantInfo& pollutant_or_throw(std::string_view name, std::string_view where);
std::vector<std::string> pollutant_names();

// did_you_mean() for the hint after an unknown name lives in text.hpp.

}  // namespace lidbox
