#include "lidbox/standards/pollutant.hpp"

#include <algorithm>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {

constexpr PollutantInfo kPollutants[] = {
    {"PM2.5", 0.0}, {"PM10", 0.0}, {"O3", 48.00}, {"NO2", 46.01},
    {"SO2", 64.06}, {"CO", 28.01}, {"NO", 30.01}, {"benzene", 78.11},
};

struct Alias {
  const char* spelling;  // compared without regard to case
  int pollutant;         // index into kPollutants
};

// Every accepted spelling, listed: a name that is not here is not a pollutant lidbox knows
// (a case may still model it; the reports then say that no rule judges it). CF standard names:
// design/references.md 7.1 (mass_concentration_of_..._in_air, SRC from CF mapping tables and
// NetCDF headers; the PM names with and without "_particles", both in use; the mole_fraction
// names and those for NO and benzene from memory).
constexpr Alias kAliases[] = {
    {"PM2.5", 0},
    {"PM25", 0},
    {"PM2_5", 0},
    {"PM2p5", 0},
    {"mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air", 0},
    {"mass_concentration_of_pm2p5_ambient_aerosol_in_air", 0},
    {"PM10", 1},
    {"mass_concentration_of_pm10_ambient_aerosol_particles_in_air", 1},
    {"mass_concentration_of_pm10_ambient_aerosol_in_air", 1},
    {"O3", 2},
    {"ozone", 2},
    {"mass_concentration_of_ozone_in_air", 2},
    {"mole_fraction_of_ozone_in_air", 2},
    {"NO2", 3},
    {"nitrogen dioxide", 3},
    {"nitrogen_dioxide", 3},
    {"mass_concentration_of_nitrogen_dioxide_in_air", 3},
    {"mole_fraction_of_nitrogen_dioxide_in_air", 3},
    {"SO2", 4},
    {"sulfur dioxide", 4},
    {"sulphur dioxide", 4},
    {"sulfur_dioxide", 4},
    {"mass_concentration_of_sulfur_dioxide_in_air", 4},
    {"mole_fraction_of_sulfur_dioxide_in_air", 4},
    {"CO", 5},
    {"carbon monoxide", 5},
    {"carbon_monoxide", 5},
    {"mass_concentration_of_carbon_monoxide_in_air", 5},
    {"mole_fraction_of_carbon_monoxide_in_air", 5},
    {"NO", 6},
    {"nitrogen monoxide", 6},
    {"nitric oxide", 6},
    {"mass_concentration_of_nitrogen_monoxide_in_air", 6},
    {"mole_fraction_of_nitrogen_monoxide_in_air", 6},
    {"benzene", 7},
    {"C6H6", 7},
    {"mass_concentration_of_benzene_in_air", 7},
    {"mole_fraction_of_benzene_in_air", 7},
};

}  // namespace

const PollutantInfo* find_pollutant(std::string_view name) {
  const std::string key = lower(trim(name));
  for (const Alias& a : kAliases) {
    if (lower(a.spelling) == key) return &kPollutants[a.pollutant];
  }
  return nullptr;
}

std::vector<std::string> pollutant_names() {
  std::vector<std::string> out;
  for (const PollutantInfo& p : kPollutants) out.emplace_back(p.name);
  return out;
}

const PollutantInfo& pollutant_or_throw(std::string_view name, std::string_view where) {
  if (const PollutantInfo* p = find_pollutant(name)) return *p;
  throw InputError(std::string(where), "unknown pollutant \"" + std::string(name) + "\"",
                   "one of " + join(pollutant_names()) + did_you_mean(name, pollutant_names()));
}

}  // namespace lidbox
