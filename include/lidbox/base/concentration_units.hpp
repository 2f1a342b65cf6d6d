// Concentration units for reporting: mass per volume (g/m3, mg/m3, ug/m3, ng/m3) and volume
// mixing ratios (ppm, ppb, ppt) through the ideal gas law at stated reference conditions.
//
//   C [g m-3] = x [mol/mol] * p * M / (R * T)                  (ideal gas law)
//
// Reference conditions differ between rule sets: the US corrects gases to 25 degC and 760 mm Hg
// (40 CFR 50.3), the EU to 293 K and 101.3 kPa (Directive 2008/50/EC, Annex VI). The conventional
// "24.45 L/mol" is a rounding of the exact 24.465 L/mol at 298.15 K and 101.325 kPa; lidbox uses
// the exact ideal-gas value and states the conditions in every output that uses them.
#pragma once

#include <string>
#include <string_view>

namespace lidbox {

struct ReferenceConditions {
  double temperature_K = 298.15;
  double pressure_Pa = 101325.0;
};

inline constexpr ReferenceConditions kUsReferenceConditions{298.15, 101325.0};
inline constexpr ReferenceConditions kEuReferenceConditions{293.0, 101300.0};

// Molar gas constant, CODATA 2018 exact value [J mol-1 K-1].
inline constexpr double kMolarGasConstant = 8.314462618;

// Molar volume of an ideal gas [m3 mol-1].
double molar_volume_m3_mol(const ReferenceConditions& ref);

// A reporting unit for one pollutant: value_in_unit = concentration_g_m3 / to_g_m3.
struct ConcentrationUnit {
  std::string text;       // as written by the user, e.g. "ppb", "ug/m3"
  std::string canonical;  // "ppb", "ug m-3", ... (as written in outputs and NetCDF units)
  double to_g_m3 = 1.0;   // grams per cubic metre for one of this unit
  bool is_mixing_ratio = false;
};

// Parses a concentration unit. Mixing ratios need molar_mass_g_mol > 0 (pass 0 for aerosols; a
// mixing-ratio unit then gives an InputError naming `where`). Accepted spellings:
// g/m3, mg/m3, ug/m3, µg/m³, ng/m3 (also "ug m-3" forms), ppm, ppb, ppt (also ppmv, ppbv, pptv).
ConcentrationUnit parse_concentration_unit(std::string_view text, double molar_mass_g_mol,
                                           const ReferenceConditions& ref, std::string_view where);

}  // namespace lidbox
