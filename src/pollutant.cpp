#include "lidbox/pollutant.hpp"

#include <algorithm>
#include <cctype>

#include "lidbox/error.hpp"

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

// Optimal-string-alignment distance: Levenshtein plus adjacent transpositions, so "levle" is
// one edit from "level".
std::size_t edit_distance(const std::string& a, const std::string& b) {
  std::vector<std::vector<std::size_t>> d(a.size() + 1, std::vector<std::size_t>(b.size() + 1));
  for (std::size_t i = 0; i <= a.size(); ++i) d[i][0] = i;
  for (std::size_t j = 0; j <= b.size(); ++j) d[0][j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t cost = a[i - 1] == b[j - 1] ? 0 : 1;
      d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) {
        d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
      }
    }
  }
  return d[a.size()][b.size()];
}

std::string lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
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

std::string did_you_mean(std::string_view word, const std::vector<std::string>& choices) {
  const std::string w = lower(word);
  const std::size_t limit = std::max<std::size_t>(1, w.size() / 3);
  std::size_t best = limit + 1;
  const std::string* pick = nullptr;
  for (const std::string& c : choices) {
    const std::size_t d = edit_distance(w, lower(c));
    if (d < best) {
      best = d;
      pick = &c;
    }
  }
  return pick ? " (did you mean \"" + *pick + "\"?)" : "";
}

}  // namespace lidbox
