#include "lidbox/analysis/monitor_pairing.hpp"

#include <cmath>
#include <filesystem>

#include "lidbox/base/concentration_units.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

BelowDetection parse_below_detection(const std::string& text, const std::string& where) {
  if (text == "half") return BelowDetection::half_limit;
  if (text == "limit") return BelowDetection::limit;
  if (text == "zero") return BelowDetection::zero;
  if (text == "drop") return BelowDetection::drop;
  throw InputError(where,
                   "\"" + text + "\"" + did_you_mean(text, {"half", "limit", "zero", "drop"}),
                   "half, limit, zero or drop");
}

const char* describe(BelowDetection b) {
  switch (b) {
    case BelowDetection::half_limit:
      return "replaced by half the detection limit (common practice, no source)";
    case BelowDetection::limit:
      return "replaced by the detection limit";
    case BelowDetection::zero:
      return "replaced by zero";
    case BelowDetection::drop:
      return "left out of the pairs";
  }
  return "";
}

std::string canonical_pollutant(const std::string& case_name) {
  const PollutantInfo* info = find_pollutant(case_name);
  return info ? std::string(info->name) : case_name;
}

std::vector<double> model_total(const CaseSpec& c, const RunResult& r, std::size_t p) {
  std::vector<double> v(r.hours.size());
  const double to = c.pollutants[p].unit.to_g_m3;
  for (std::size_t i = 0; i < v.size(); ++i) v[i] = r.total(i, p) / to;
  return v;
}

std::vector<double> model_part(const CaseSpec& c, const RunResult& r, std::size_t p,
                               std::size_t part) {
  std::vector<double> v(r.hours.size());
  const double to = c.pollutants[p].unit.to_g_m3;
  for (std::size_t i = 0; i < v.size(); ++i) v[i] = r.mean(i, p, part) / to;
  return v;
}

namespace {

std::string period_text(UtcSeconds first, UtcSeconds last) {
  return format_utc(first) + " to " + format_utc(last);
}

// The case pollutant that `name` (any spelling) stands for, or npos.
std::size_t case_index_of(const CaseSpec& c, const std::string& name) {
  const std::string wanted = canonical_pollutant(name);
  for (std::size_t p = 0; p < c.pollutants.size(); ++p) {
    if (canonical_pollutant(c.pollutants[p].name) == wanted) return p;
  }
  return std::string::npos;
}

MonitorPollutant pair_one(const CaseSpec& c, const RunResult& r, const Observations& obs,
                          const std::string& name, const HourlySeries& s, std::size_t p,
                          BelowDetection below) {
  const PollutantSpec& ps = c.pollutants[p];
  MonitorPollutant m;
  m.monitor = obs.path;
  m.label = std::filesystem::path(obs.path).stem().string();
  m.pollutant = name;
  m.case_index = p;
  m.monitor_unit = s.unit;
  m.unit = ps.unit.canonical;
  const std::string where = obs.path + ": column \"" + name + " [" + s.unit + "]\"";
  const ConcentrationUnit mu =
      parse_concentration_unit(s.unit, ps.molar_mass_g_mol, ps.reference, where);
  m.to_case_unit = mu.to_g_m3 / ps.unit.to_g_m3;
  const std::size_t n = r.hours.size();
  m.observed.assign(n, kMissing);
  m.substituted.assign(n, 0);
  m.monitor_hours = s.size();
  m.first_hour_utc = s.first_hour_start_utc;
  m.last_hour_utc = s.hour_start(s.size() - 1);
  const auto bd_it = obs.below_detection.find(name);
  const std::vector<double>* limits = bd_it == obs.below_detection.end() ? nullptr : &bd_it->second;
  const UtcSeconds run_first = r.hours.front().start_utc;
  for (std::size_t k = 0; k < s.size(); ++k) {
    const UtcSeconds t = s.hour_start(k);
    const long long i = (t - run_first) / kSecondsPerHour;
    if (t < run_first || i >= static_cast<long long>(n)) {
      ++m.outside_run;
      continue;
    }
    const auto ui = static_cast<std::size_t>(i);
    const double v = s.values[k];
    const double limit = limits ? (*limits)[k] : kMissing;
    if (!std::isnan(limit)) {
      ++m.below_detection;
      double sub = kMissing;
      switch (below) {
        case BelowDetection::half_limit:
          sub = 0.5 * limit;
          break;
        case BelowDetection::limit:
          sub = limit;
          break;
        case BelowDetection::zero:
          sub = 0.0;
          break;
        case BelowDetection::drop:
          ++m.dropped_below_detection;
          continue;
      }
      m.observed[ui] = sub * m.to_case_unit;
      m.substituted[ui] = 1;
      ++m.pairs;
      continue;
    }
    if (std::isnan(v)) {
      ++m.missing;
      continue;
    }
    if (v < 0.0) ++m.negative;
    m.observed[ui] = v * m.to_case_unit;
    ++m.pairs;
  }
  const UtcSeconds run_last = r.hours.back().start_utc;
  if (m.outside_run == m.monitor_hours) {
    throw InputError(obs.path,
                     "monitor hours " + period_text(m.first_hour_utc, m.last_hour_utc) +
                         " do not overlap the run's hours " + period_text(run_first, run_last),
                     "a monitor period that overlaps the run by at least one hour");
  }
  if (m.pairs == 0) {
    throw InputError(where,
                     "no usable value in the run's hours " + period_text(run_first, run_last) +
                         " (" + std::to_string(m.missing) + " missing, " +
                         std::to_string(m.dropped_below_detection) + " below detection dropped)",
                     "at least one measured hour inside the run");
  }
  return m;
}

}  // namespace

std::vector<MonitorPollutant> pair_monitor(const CaseSpec& c, const RunResult& r,
                                           const Observations& obs, const std::string& pollutant,
                                           BelowDetection below,
                                           std::vector<std::string>* skipped) {
  if (r.hours.empty()) throw InternalError("pair_monitor: a run without hours");
  std::vector<MonitorPollutant> out;
  std::vector<std::string> case_names, monitor_names;
  for (const auto& ps : c.pollutants) case_names.push_back(ps.name);
  for (const auto& [name, s] : obs.series) monitor_names.push_back(name);
  if (!pollutant.empty()) {
    const std::size_t p = case_index_of(c, pollutant);
    if (p == std::string::npos) {
      throw InputError(
          "--pollutant " + pollutant,
          "a pollutant the case " + c.file + " does not have" + did_you_mean(pollutant, case_names),
          "one of the case's pollutants: " + join(case_names));
    }
    const std::string canon = canonical_pollutant(c.pollutants[p].name);
    const auto it = obs.series.find(canon);
    if (it == obs.series.end()) {
      throw InputError(obs.path,
                       "no column for " + canon + " (columns: " + join(monitor_names) + ")",
                       "a \"" + canon + " [<unit>]\" column");
    }
    out.push_back(pair_one(c, r, obs, canon, it->second, p, below));
    return out;
  }
  for (const auto& [name, s] : obs.series) {
    const std::size_t p = case_index_of(c, name);
    if (p == std::string::npos) {
      if (skipped) skipped->push_back(obs.path + ": " + name + " (not in the case)");
      continue;
    }
    out.push_back(pair_one(c, r, obs, name, s, p, below));
  }
  if (out.empty()) {
    throw InputError(obs.path,
                     "no pollutant the case has (monitor: " + join(monitor_names) + "; case " +
                         c.file + ": " + join(case_names) + ")",
                     "a column for at least one of the case's pollutants");
  }
  return out;
}

}  // namespace lidbox
