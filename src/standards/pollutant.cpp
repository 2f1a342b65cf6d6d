#include "lidbox/standards/pollutant.hpp"

#include <algorithm>
#include <cctype>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {

constexpr PollutantInfo kPollutants[] = {
    {"PM2.5", 0.0}, {"PM10", 0.0}, {"O3", 48.00}, {"NO2", 46.01},
    {"SO2", 64.06}, {"CO", 28.01}, {"NO", 30.01}, {"benzene", 78.11},
};

// Lower-case with '.', '_', '-' and blanks dropped, so "PM2.5", "pm25" and "PM2_5" meet.
std::string fold(std::string_view s) {
  std::string out;
  for (char c : s) {
    if (c == '.' || c == '_' || c == '-' || c == ' ') continue;
    out.push_back(static_cast<char>(std::tolower(static_cast<unsigned char>(c))));
  }
  return out;
}

}  // namespace

const PollutantInfo* find_pollutant(std::string_view name) {
  const std::string key = fold(name);
  if (key == "ozone") return &kPollutants[2];
  for (const PollutantInfo& p : kPollutants) {
    if (fold(p.name) == key) return &p;
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
  const auto names = pollutant_names();
  std::string list;
  for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
  throw InputError(std::string(where), "unknown pollutant \"" + std::string(name) + "\"",
                   "one of " + list + did_you_mean(name, names));
}

}  // namespace lidbox
