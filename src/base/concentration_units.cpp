#include "lidbox/base/concentration_units.hpp"

#include <algorithm>
#include <cctype>

#include "lidbox/base/error.hpp"

namespace lidbox {

double molar_volume_m3_mol(const ReferenceConditions& ref) {
  return kMolarGasConstant * ref.temperature_K / ref.pressure_Pa;
}

namespace {

std::string squeeze(std::string_view text) {
  // Lower-case, drop blanks, and fold the Unicode micro/superscript forms users type.
  std::string s(text);
  auto replace_all = [&s](const std::string& from, const std::string& to) {
    for (std::size_t pos = s.find(from); pos != std::string::npos; pos = s.find(from, pos)) {
      s.replace(pos, from.size(), to);
      pos += to.size();
    }
  };
  replace_all("\xC2\xB5", "u");  // U+00B5 micro sign
  replace_all("\xCE\xBC", "u");  // U+03BC Greek mu
  replace_all("\xC2\xB3", "3");  // U+00B3 superscript three
  replace_all("^3", "3");
  replace_all("**3", "3");
  replace_all("m-3", "/m3");
  std::string out;
  for (char c : s) {
    if (c == ' ' || c == '\t') continue;
    out.push_back(static_cast<char>(std::tolower(static_cast<unsigned char>(c))));
  }
  return out;
}

}  // namespace

ConcentrationUnit parse_concentration_unit(std::string_view text, double molar_mass_g_mol,
                                           const ReferenceConditions& ref, std::string_view where) {
  const std::string s = squeeze(text);
  struct Mass {
    const char* key;
    const char* canonical;
    double g;
  };
  static constexpr Mass kMass[] = {{"g/m3", "g m-3", 1.0},
                                   {"mg/m3", "mg m-3", 1e-3},
                                   {"ug/m3", "ug m-3", 1e-6},
                                   {"ng/m3", "ng m-3", 1e-9}};
  for (const auto& m : kMass) {
    if (s == m.key) return {std::string(text), m.canonical, m.g, false};
  }
  struct Ratio {
    const char* key;
    const char* canonical;
    double mol_per_mol;
  };
  static constexpr Ratio kRatio[] = {{"ppm", "ppm", 1e-6},  {"ppmv", "ppm", 1e-6},
                                     {"ppb", "ppb", 1e-9},  {"ppbv", "ppb", 1e-9},
                                     {"ppt", "ppt", 1e-12}, {"pptv", "ppt", 1e-12}};
  for (const auto& r : kRatio) {
    if (s != r.key) continue;
    if (!(molar_mass_g_mol > 0.0)) {
      throw InputError(std::string(where), "unit \"" + std::string(text) + "\" is a mixing ratio",
                       "a molar_mass_g_mol for this pollutant, or a mass unit such as ug/m3");
    }
    // x [mol/mol] * M [g/mol] / Vm [m3/mol] = g/m3
    return {std::string(text), r.canonical, r.mol_per_mol * molar_mass_g_mol / molar_volume_m3_mol(ref),
            true};
  }
  throw InputError(std::string(where), "unknown concentration unit \"" + std::string(text) + "\"",
                   "one of g/m3, mg/m3, ug/m3, ng/m3, ppm, ppb, ppt");
}

}  // namespace lidbox
