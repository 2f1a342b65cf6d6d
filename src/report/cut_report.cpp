#include "lidbox/report/cut_report.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "lidbox/base/text.hpp"
#include "lidbox/standards/averaging.hpp"

namespace lidbox {

namespace {

std::string local_start(const CaseSpec& c, UtcSeconds t) { return format_local(t, c.zone); }

std::string share(double rest, double level) {
  char b[32];
  std::snprintf(b, sizeof b, "%.0f %%", 100.0 * rest / level);
  return b;
}

std::string csv_number(double v) {
  return std::isnan(v) ? "" : format_number(v);
}

std::string way(const CutScale& s, const std::string& what, const CutRow& r) {
  if (s.feasible) return what + " by " + cut_percent(s.scale);
  if (std::isnan(s.rest_value)) return what + ": not computed for this target";
  return what + " cannot suffice: the rest alone gives " + format_number(s.rest_value, 4) + " " +
         r.unit + " (" + share(s.rest_value, r.level) + " of the level)";
}

}  // namespace

std::string cut_percent(double scale) {
  const double tenths = std::ceil((1.0 - scale) * 1000.0 - 1e-9);
  char b[32];
  std::snprintf(b, sizeof b, "%.1f %%", std::max(0.0, tenths) / 10.0);
  return b;
}

std::string render_cut_csv(const CaseSpec& c, const EmissionCut& cut) {
  std::ostringstream o;
  o << "rule_set,rule,kind,pollutant,statistic,level,unit,day_lst,target,value_now,start_utc,start_"
       "local,"
       "sectors,scale_sectors,cut_sectors [%],rest_alone_sectors,rest_share_of_level_sectors [%],"
       "scale_all_sectors,cut_all_sectors [%],rest_alone_all,rest_share_of_level_all [%]\n";
  for (const CutRow& r : cut.rows) {
    o << r.rule_set_id << ',' << r.rule_id << ',' << (r.alert ? "alert" : "limit") << ','
      << r.pollutant << ',' << r.statistic << ',' << format_number(r.level) << ',' << r.unit << ','
      << (r.whole_run ? "whole run" : format_day(r.day)) << ',' << describe(cut.request.target)
      << ',' << csv_number(r.value) << ',' << format_utc(cut.start_utc) << ','
      << local_start(c, cut.start_utc) << ',' << cut.sectors_label;
    for (const CutScale* s : {&r.chosen, &r.all}) {
      o << ',' << csv_number(s->scale) << ','
        << (s->feasible ? csv_number(100.0 * (1.0 - s->scale)) : "infeasible") << ','
        << csv_number(s->rest_value) << ',' << csv_number(100.0 * s->rest_value / r.level);
    }
    o << '\n';
  }
  return o.str();
}

std::string render_cut_summary(const CaseSpec& c, const EmissionCut& cut) {
  std::ostringstream o;
  o << "\nEmission cut (exact, from the linear parts; target: " << describe(cut.request.target)
    << "; cuts from " << local_start(c, cut.start_utc) << ", rounded up to 0.1 %)\n";
  if (cut.rows.empty()) o << "  no daily rule is exceeded in the target: nothing to cut\n";
  // One line per rule: its days, and the whole-run row when there is one.
  for (std::size_t i = 0; i < cut.rows.size();) {
    std::size_t j = i;
    std::vector<std::string> days;
    while (j < cut.rows.size() && cut.rows[j].rule_set_id == cut.rows[i].rule_set_id &&
           cut.rows[j].rule_id == cut.rows[i].rule_id) {
      if (!cut.rows[j].whole_run) days.push_back(format_day(cut.rows[j].day));
      ++j;
    }
    const CutRow& r = cut.rows[j - 1];  // the whole-run row, or the only day
    o << "  " << r.rule_set_id << ' ' << r.rule_id << " ("
      << (r.alert ? "episode above " : r.statistic + " above ") << format_number(r.level, 4) << ' '
      << r.unit << ") on " << join(days) << ": " << way(r.chosen, "cut " + cut.sectors_label, r)
      << " from " << local_start(c, cut.start_utc) << ", or " << way(r.all, "all sectors", r)
      << "\n";
    i = j;
  }
  for (const auto& s : cut.skipped) o << "  not cut: " << s << "\n";
  return o.str();
}

}  // namespace lidbox
