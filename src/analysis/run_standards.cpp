#include "lidbox/analysis/run_standards.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

NamedSeries run_series(const CaseSpec& c, const RunResult& r, std::vector<std::string>* skipped) {
  NamedSeries out;
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    const PollutantSpec& ps = c.pollutants[p];
    const PollutantInfo* info = find_pollutant(ps.name);
    if (!info) {
      if (skipped) skipped->push_back(ps.name);
      continue;
    }
    HourlySeries s;
    s.first_hour_start_utc = r.hours.empty() ? 0 : r.hours.front().start_utc;
    s.unit = ps.unit.canonical;
    s.values.reserve(r.hours.size());
    for (std::size_t i = 0; i < r.hours.size(); ++i)
      s.values.push_back(r.total(i, p) / ps.unit.to_g_m3);
    out[info->name] = std::move(s);
  }
  return out;
}

std::optional<StandardsReport> run_standards(const CaseSpec& c, const RunResult& r,
                                             std::optional<UtcSeconds> issue_time_override) {
  if (!c.standards) return std::nullopt;
  const StandardsSpec& st = *c.standards;
  ReportOptions opt;
  const auto dir = rules_directory(
      st.rules_dir.empty() ? std::nullopt : std::optional<std::filesystem::path>(st.rules_dir));
  opt.rule_sets = load_rule_sets(st.rule_sets, dir);
  opt.lst_offset_s = c.zone.standard_offset_s();
  opt.issue_time_utc = issue_time_override ? issue_time_override : st.issue_time_utc;
  opt.aqi_table = parse_aqi_table(st.aqi_table, c.file + ": [standards] aqi_table");
  opt.with_aqi = st.aqi;
  opt.with_aqhi = st.aqhi;
  if (!st.index.empty()) {
    try {
      opt.index = load_air_index(st.index);
    } catch (const InputError& e) {
      throw e.within(st.index_where);
    }
  }
  for (const auto& [k, m] : st.rolling_h)
    opt.rolling.push_back({k, m > 0 ? m : min_valid_count(k)});
  opt.input_label = "model run " + c.file + " (case " + c.name + ", hour means of the mixed layer)";
  opt.file_prefix = "";
  NamedSeries series = run_series(c, r, &opt.unknown_pollutants);
  return compute_standards_report(series, std::move(opt));
}

std::string standards_summary(const StandardsReport& report) {
  std::ostringstream o;
  o << "Standards (hour means of the box; screening only, not a compliance determination)\n";
  const RuleCoverage& cov = report.coverage;
  for (const auto& rs : report.options.rule_sets) {
    if (std::find(cov.idle_rule_sets.begin(), cov.idle_rule_sets.end(), rs.id) !=
        cov.idle_rule_sets.end()) {
      o << "  " << rs.id << ": judges none of the pollutants here\n";
      continue;
    }
    int exceeded = 0, within = 0, incomplete = 0;
    std::string above;
    auto add = [&above](const std::string& item) { above += (above.empty() ? "" : ", ") + item; };
    for (const auto& l : report.limits) {
      if (l.rule_set_id != rs.id) continue;
      if (l.verdict == Verdict::exceeded) ++exceeded;
      if (l.verdict == Verdict::within) ++within;
      if (l.verdict == Verdict::incomplete) ++incomplete;
      if (l.exceedances > 0) {
        add(l.limit_id + " " + std::to_string(l.exceedances) + " (level " +
            format_number(l.level, 4) + " " + l.unit + ")");
      }
      // An annual value has no count; above its level it is named, and an incomplete year says
      // so rather than hiding behind "none".
      if (l.exceedances < 0 && !std::isnan(l.value) && l.value > l.level) {
        add(l.limit_id + " annual mean " + format_number(l.value, 4) + " above level " +
            format_number(l.level, 4) + " " + l.unit + " in " + std::to_string(l.year) +
            (l.complete ? std::string()
                        : ", an incomplete year (" + std::to_string(l.valid_count) + " of " +
                              std::to_string(l.possible_count) + " values)"));
      }
    }
    if (exceeded + within + incomplete == 0) {
      o << "  " << rs.id << ": alert rules only\n";
      continue;
    }
    o << "  " << rs.id << ": " << exceeded << " exceeded, " << within << " within, " << incomplete
      << " incomplete for the year; values above a level: " << (above.empty() ? "none" : above)
      << "\n";
  }
  if (!cov.unjudged_pollutants.empty()) {
    o << "  judged by no selected rule set: " << join(cov.unjudged_pollutants) << "\n";
  }
  if (report.episodes.empty()) {
    o << "  alert episodes: none\n";
  } else {
    const Episode* first = &report.episodes.front();
    for (const auto& e : report.episodes) {
      if (e.start_utc < first->start_utc) first = &e;
    }
    o << "  alert episodes: " << report.episodes.size() << " (first " << first->rule_set_id << " "
      << first->rule_id << ", " << first->level_name << ", " << format_utc(first->start_utc)
      << " for " << format_number(first->duration_h, 4) << " h, peak "
      << format_number(first->peak, 4) << " " << first->unit;
    if (first->lead_time_h) o << ", lead time " << format_number(*first->lead_time_h, 4) << " h";
    o << ")\n";
  }
  return o.str();
}

}  // namespace lidbox
