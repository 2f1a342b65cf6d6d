#include "lidbox/report/standards_tables.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <map>
#include <sstream>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {

// Ten significant digits, as printf's %.10g, through std::to_chars: printf's float path was
// the largest cost of writing ten years of tables.
std::string num(double v) {
  if (std::isnan(v)) return "";
  char buf[32];
  const auto res = std::to_chars(buf, buf + sizeof buf, v, std::chars_format::general, 10);
  return std::string(buf, res.ptr);
}

// CSV cell: quoted when it holds a comma, quote or newline (RFC 4180).
std::string csv(const std::string& s) {
  if (s.find_first_of(",\"\n") == std::string::npos) return s;
  std::string out = "\"";
  for (char c : s) {
    if (c == '"') out += '"';
    out += c;
  }
  return out + "\"";
}

std::string limits_csv(const StandardsReport& r) {
  std::ostringstream o;
  o << "rule_set,limit_id,pollutant,kind,year,statistic,value,unit,level,exceedances,"
       "allowed_exceedances,valid_count,possible_count,complete,years_averaged,"
       "multi_year_value,result,legal_source,checked\n";
  for (const auto& x : r.limits) {
    o << csv(x.rule_set_id) << ',' << csv(x.limit_id) << ',' << csv(x.pollutant) << ','
      << csv(x.kind) << ',' << x.year << ',' << csv(x.statistic) << ',' << num(x.value) << ','
      << csv(x.unit) << ',' << num(x.level) << ','
      << (x.exceedances < 0 ? "" : std::to_string(x.exceedances)) << ','
      << (x.allowed_exceedances < 0 ? "" : std::to_string(x.allowed_exceedances)) << ','
      << x.valid_count << ',' << x.possible_count << ',' << (x.complete ? "true" : "false") << ','
      << x.years_averaged << ',' << num(x.multi_year_value) << ',' << to_string(x.verdict) << ','
      << csv(x.legal_source) << ',' << csv(x.checked) << '\n';
  }
  return o.str();
}

std::string daily_csv(const StandardsReport& r) {
  std::ostringstream o;
  o << "pollutant,date_lst,statistic,value,unit,valid_count,possible_count,complete\n";
  for (const auto& x : r.daily) {
    o << csv(x.pollutant) << ',' << format_day(x.day) << ',' << x.statistic << ',' << num(x.value)
      << ',' << csv(x.unit) << ',' << x.valid_count << ',' << x.possible_count << ','
      << (x.complete ? "true" : "false") << '\n';
  }
  return o.str();
}

std::string periods_csv(const StandardsReport& r) {
  std::ostringstream o;
  o << "pollutant,period,year,index,first_day_lst,last_day_lst,mean,unit,valid_hours,"
       "possible_hours,complete\n";
  for (const auto& x : r.periods) {
    const char* kind = x.period == Period::month     ? "month"
                       : x.period == Period::quarter ? "quarter"
                                                     : "year";
    o << csv(x.pollutant) << ',' << kind << ',' << x.mean.year << ',' << x.mean.index << ','
      << format_day(x.mean.first_day) << ',' << format_day(x.mean.last_day) << ','
      << num(x.mean.mean) << ',' << csv(x.unit) << ',' << x.mean.valid_count << ','
      << x.mean.possible_count << ',' << (x.mean.complete ? "true" : "false") << '\n';
  }
  return o.str();
}

std::string aqi_csv(const StandardsReport& r) {
  std::ostringstream o;
  o << "date_lst,input,concentration,unit,sub_index,beyond_the_aqi,day_aqi,day_category,"
       "responsible,table\n";
  const std::string table = csv(aqi_index_of(r.options).version);
  for (const auto& d : r.aqi) {
    for (const auto& s : d.sub_indices) {
      o << format_day(d.day) << ',' << csv(s.input) << ',' << num(s.concentration) << ','
        << csv(s.unit) << ',' << s.aqi << ',' << (s.beyond_the_aqi ? "true" : "false")
        << ',' << d.aqi << ',' << csv(d.category) << ',' << d.responsible << ',' << table << '\n';
    }
  }
  return o.str();
}

std::string aqhi_csv(const StandardsReport& r) {
  std::ostringstream o;
  o << "window_end_utc,NO2 3-h mean [ppb],O3 3-h mean [ppb],PM2.5 3-h mean [ug m-3],aqhi,"
       "aqhi_rounded,category\n";
  for (const auto& h : r.aqhi) {
    o << format_utc(h.end_utc) << ',' << num(h.no2_ppb) << ',' << num(h.o3_ppb) << ','
      << num(h.pm25_ug_m3) << ',' << num(h.value) << ',' << h.rounded << ',' << h.category << '\n';
  }
  return o.str();
}

// The chosen bands index hour by hour: the level and category of the hour, the input that set
// it, then each input's value and level.
std::string banded_csv(const StandardsReport& r) {
  const AirIndex& ix = *r.options.index;
  std::ostringstream o;
  o << "hour_start_utc,level,category,responsible";
  for (const auto& s : ix.scales) o << ',' << csv(s.name + " [" + s.unit + "]") << ',' << csv(s.name + " level");
  o << ",index\n";
  for (const auto& h : r.banded) {
    o << format_utc(h.hour_start_utc) << ',' << h.level << ',' << csv(h.category) << ','
      << csv(h.responsible);
    for (const auto& s : ix.scales) {
      const auto it = std::find_if(h.inputs.begin(), h.inputs.end(),
                                   [&](const BandedInput& b) { return b.scale == s.name; });
      if (it == h.inputs.end()) o << ",,";
      else o << ',' << num(it->concentration) << ',' << it->level;
    }
    o << ',' << csv(ix.id) << '\n';
  }
  return o.str();
}

std::string episodes_csv(const StandardsReport& r) {
  std::ostringstream o;
  o << "rule_set,rule_id,level_name,pollutant,start_utc,end_utc,duration [h],values_above,"
       "peak,unit,peak_start_utc,threshold,lead_time [h],legal_source,checked\n";
  for (const auto& e : r.episodes) {
    o << csv(e.rule_set_id) << ',' << csv(e.rule_id) << ',' << csv(e.level_name) << ','
      << csv(e.pollutant) << ',' << format_utc(e.start_utc) << ',' << format_utc(e.end_utc) << ','
      << num(e.duration_h) << ',' << e.values_above << ',' << num(e.peak) << ',' << csv(e.unit)
      << ',' << format_utc(e.peak_start_utc) << ',' << num(e.threshold) << ','
      << (e.lead_time_h ? num(*e.lead_time_h) : "") << ',' << csv(e.legal_source) << ','
      << csv(e.checked) << '\n';
  }
  return o.str();
}

std::string rolling_csv(const StandardsReport& r, const RollingRequest& q) {
  std::ostringstream o;
  o << "pollutant,window_start_utc,window_end_utc,mean,unit,valid_hours,window_hours,"
       "min_valid_hours\n";
  for (const auto& t : r.rolling) {
    if (t.means.window_h != q.window_h || t.means.min_valid_h != q.min_valid_h) continue;
    for (std::size_t i = 0; i < t.means.size(); ++i) {
      o << csv(t.pollutant) << ',' << format_utc(t.means.window_start_utc(i)) << ','
        << format_utc(t.means.window_end_utc(i)) << ',' << num(t.means.mean[i]) << ','
        << csv(t.unit) << ',' << t.means.valid_h[i] << ',' << t.means.window_h << ','
        << t.means.min_valid_h << '\n';
    }
  }
  return o.str();
}

// ---------------------------------------------------------------- JSON

std::string js(const std::string& s) {
  std::string out = "\"";
  for (unsigned char c : s) {
    switch (c) {
      case '"':
        out += "\\\"";
        break;
      case '\\':
        out += "\\\\";
        break;
      case '\n':
        out += "\\n";
        break;
      case '\t':
        out += "\\t";
        break;
      case '\r':
        out += "\\r";
        break;
      default:
        if (c < 0x20) {
          char buf[8];
          std::snprintf(buf, sizeof buf, "\\u%04x", c);
          out += buf;
        } else {
          out += static_cast<char>(c);
        }
    }
  }
  return out + "\"";
}

std::string jn(double v) {
  return std::isnan(v) ? "null" : num(v);
}

std::vector<std::string> base_table_names(const StandardsReport& r) {
  std::vector<std::string> names = {"limits.csv", "daily.csv", "periods.csv", "episodes.csv"};
  if (r.options.with_aqi) names.emplace_back("aqi.csv");
  if (r.options.with_aqhi) names.emplace_back("aqhi.csv");
  if (r.options.index && r.options.index->kind == IndexKind::bands) names.emplace_back("index.csv");
  for (const auto& q : r.options.rolling) {
    const std::string n = "rolling_" + q.name() + ".csv";
    if (std::find(names.begin(), names.end(), n) == names.end()) names.push_back(n);
  }
  return names;
}

// The names as written: with the prefix.
std::vector<std::string> table_names(const StandardsReport& r) {
  auto names = base_table_names(r);
  for (auto& n : names) n = r.options.file_prefix + n;
  return names;
}

}  // namespace

namespace {

void json_series(std::ostringstream& o, const StandardsReport& r) {
  o << "  \"series\": [";
  for (std::size_t i = 0; i < r.series.size(); ++i) {
    const auto& s = r.series[i];
    o << (i ? ",\n" : "\n") << "    {\"pollutant\": " << js(s.pollutant)
      << ", \"unit\": " << js(s.unit)
      << ", \"first_hour_start_utc\": " << js(format_utc(s.first_hour_start_utc))
      << ", \"hours\": " << s.hours << ", \"valid_hours\": " << s.valid_hours << "}";
  }
}

void json_rule_sets(std::ostringstream& o, const StandardsReport& r) {
  const auto& opt = r.options;
  o << "\n  ],\n  \"rule_sets\": [";
  for (std::size_t i = 0; i < opt.rule_sets.size(); ++i) {
    const auto& rs = opt.rule_sets[i];
    o << (i ? ",\n" : "\n") << "    {\"id\": " << js(rs.id) << ", \"name\": " << js(rs.name)
      << ", \"legal_source\": " << js(rs.legal_source) << ", \"legal_date\": " << js(rs.legal_date)
      << ", \"file\": " << js(rs.path)
      << ", \"reference_temperature_K\": " << jn(rs.reference.temperature_K)
      << ", \"reference_pressure_Pa\": " << jn(rs.reference.pressure_Pa) << "}";
  }
}

void json_limits(std::ostringstream& o, const StandardsReport& r) {
  o << "\n  ],\n  \"limits\": [";
  for (std::size_t i = 0; i < r.limits.size(); ++i) {
    const auto& x = r.limits[i];
    o << (i ? ",\n" : "\n") << "    {\"rule_set\": " << js(x.rule_set_id)
      << ", \"limit_id\": " << js(x.limit_id) << ", \"pollutant\": " << js(x.pollutant)
      << ", \"kind\": " << js(x.kind) << ", \"year\": " << x.year
      << ", \"statistic\": " << js(x.statistic) << ", \"value\": " << jn(x.value)
      << ", \"unit\": " << js(x.unit) << ", \"level\": " << jn(x.level) << ", \"exceedances\": "
      << (x.exceedances < 0 ? std::string("null") : std::to_string(x.exceedances))
      << ", \"allowed_exceedances\": "
      << (x.allowed_exceedances < 0 ? std::string("null") : std::to_string(x.allowed_exceedances))
      << ", \"valid_count\": " << x.valid_count << ", \"possible_count\": " << x.possible_count
      << ", \"complete\": " << (x.complete ? "true" : "false")
      << ", \"years_averaged\": " << x.years_averaged
      << ", \"multi_year_value\": " << jn(x.multi_year_value)
      << ", \"result\": " << js(to_string(x.verdict))
      << ", \"legal_source\": " << js(x.legal_source) << ", \"checked\": " << js(x.checked) << "}";
  }
}

void json_episodes(std::ostringstream& o, const StandardsReport& r) {
  o << "\n  ],\n  \"episodes\": [";
  for (std::size_t i = 0; i < r.episodes.size(); ++i) {
    const auto& e = r.episodes[i];
    o << (i ? ",\n" : "\n") << "    {\"rule_set\": " << js(e.rule_set_id)
      << ", \"rule_id\": " << js(e.rule_id) << ", \"level_name\": " << js(e.level_name)
      << ", \"pollutant\": " << js(e.pollutant)
      << ", \"start_utc\": " << js(format_utc(e.start_utc))
      << ", \"end_utc\": " << js(format_utc(e.end_utc)) << ", \"duration_h\": " << jn(e.duration_h)
      << ", \"values_above\": " << e.values_above << ", \"peak\": " << jn(e.peak)
      << ", \"unit\": " << js(e.unit) << ", \"threshold\": " << jn(e.threshold)
      << ", \"lead_time_h\": " << (e.lead_time_h ? jn(*e.lead_time_h) : "null")
      << ", \"legal_source\": " << js(e.legal_source) << "}";
  }
  o << "\n  ],\n";
}

void json_aqi(std::ostringstream& o, const StandardsReport& r) {
  const auto& opt = r.options;
  o << "  \"aqi\": {\"table\": " << js(aqi_index_of(opt).version) << ", \"days\": [";
  for (std::size_t i = 0; i < r.aqi.size(); ++i) {
    const auto& d = r.aqi[i];
    o << (i ? ",\n" : "\n") << "    {\"date_lst\": " << js(format_day(d.day))
      << ", \"aqi\": " << d.aqi << ", \"category\": " << js(d.category)
      << ", \"responsible\": " << js(d.responsible) << "}";
  }
  o << "\n  ]},\n";
}

void json_aqhi(std::ostringstream& o, const StandardsReport& r) {
  std::map<std::string, int> counts;
  const AqhiHour* worst = nullptr;
  for (const auto& h : r.aqhi) {
    ++counts[h.category];
    if (!worst || h.value > worst->value) worst = &h;
  }
  o << "  \"aqhi\": {\"hours\": " << r.aqhi.size() << ", \"hours_by_category\": {";
  bool first = true;
  for (const auto& [k, n] : counts) {
    o << (first ? "" : ", ") << js(k) << ": " << n;
    first = false;
  }
  o << "}, \"highest\": ";
  if (worst) {
    o << "{\"window_end_utc\": " << js(format_utc(worst->end_utc))
      << ", \"aqhi\": " << worst->rounded << ", \"category\": " << js(worst->category) << "}";
  } else {
    o << "null";
  }
  o << ", \"table\": \"aqhi.csv\"},\n";
}

}  // namespace

std::string report_json(const StandardsReport& r) {
  std::ostringstream o;
  const auto& opt = r.options;
  o << "{\n";
  o << "  \"caution\": " << js(caution_for(opt.measured_data)) << ",\n";
  o << "  \"generator\": " << js(std::string("lidbox ") + LIDBOX_VERSION) << ",\n";
  o << "  \"official\": false,\n";
  o << "  \"input\": " << js(opt.input_label) << ",\n";
  o << "  \"lst_offset\": " << js(format_utc_offset(opt.lst_offset_s)) << ",\n";
  o << "  \"issue_time_utc\": "
    << (opt.issue_time_utc ? js(format_utc(*opt.issue_time_utc)) : "null") << ",\n";
  auto list = [&](const std::vector<std::string>& v) {
    std::string out = "[";
    for (std::size_t i = 0; i < v.size(); ++i) out += (i ? ", " : "") + js(v[i]);
    return out + "]";
  };
  o << "  \"rule_sets_judging_none\": " << list(r.coverage.idle_rule_sets) << ",\n";
  o << "  \"pollutants_judged_by_none\": " << list(r.coverage.unjudged_pollutants) << ",\n";
  json_series(o, r);
  json_rule_sets(o, r);
  json_limits(o, r);
  json_episodes(o, r);
  if (opt.with_aqi) json_aqi(o, r);
  if (opt.with_aqhi) json_aqhi(o, r);
  o << "  \"tables\": [";
  const auto names = table_names(r);
  for (std::size_t i = 0; i < names.size(); ++i) o << (i ? ", " : "") << js(names[i]);
  o << "]\n}\n";
  return o.str();
}

namespace {

std::string md(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '|') out += '\\';
    out += c;
  }
  return out;
}

// Four significant digits for people; the CSV tables keep full precision.
std::string mdn(double v) {
  if (std::isnan(v)) return "–";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", v);
  return buf;
}

}  // namespace

namespace {

void md_header(std::ostringstream& o, const StandardsReport& r) {
  const auto& opt = r.options;
  o << "# Air-quality statistics against standards ("
    << (opt.measured_data ? "measured data" : "screening estimate") << ")\n\n";
  o << "> **Caution.** " << caution_for(opt.measured_data) << "\n\n";
  o << "- Input: " << md(opt.input_label) << "\n";
  o << "- Local standard time for days, months and years: UTC"
    << format_utc_offset(opt.lst_offset_s) << " (no daylight saving)\n";
  o << "- Local civil time in the text below: " << md(opt.zone.display_name())
    << " (the tables keep UTC)\n";
  if (opt.issue_time_utc) {
    o << "- Issue time: " << format_local(*opt.issue_time_utc, opt.zone) << " ("
      << format_utc(*opt.issue_time_utc) << ")\n";
  }
  o << "- Generated by lidbox " << LIDBOX_VERSION << "; tables: ";
  const auto names = table_names(r);
  for (std::size_t i = 0; i < names.size(); ++i) o << (i ? ", " : "") << "`" << names[i] << "`";
  o << "\n\n## Series\n\n| Pollutant | Unit | First hour (UTC) | Hours | Valid hours |\n"
       "|---|---|---|---:|---:|\n";
  for (const auto& s : r.series) {
    o << "| " << md(s.pollutant) << " | " << md(s.unit) << " | "
      << format_utc(s.first_hour_start_utc) << " | " << s.hours << " | " << s.valid_hours << " |\n";
  }
}

void md_rule_sets_and_limits(std::ostringstream& o, const StandardsReport& r) {
  const auto& opt = r.options;
  o << "\n## Rule sets used\n\n| Id | Name | Legal source | Date | Reference conditions | File |\n"
       "|---|---|---|---|---|---|\n";
  for (const auto& rs : opt.rule_sets) {
    o << "| " << md(rs.id) << " | " << md(rs.name) << " | " << md(rs.legal_source) << " | "
      << md(rs.legal_date) << " | " << num(rs.reference.temperature_K) << " K, "
      << num(rs.reference.pressure_Pa) << " Pa | `" << md(rs.path) << "` |\n";
  }
  // Nothing passes silently: a rule set that judges none of the pollutants, and a pollutant no
  // rule set judges, are named.
  if (!r.coverage.idle_rule_sets.empty() || !r.coverage.unjudged_pollutants.empty()) {
    o << "\n";
    if (!r.coverage.idle_rule_sets.empty()) {
      o << "- Rule sets that judge none of the pollutants here: "
        << md(join(r.coverage.idle_rule_sets)) << "\n";
    }
    if (!r.coverage.unjudged_pollutants.empty()) {
      o << "- Pollutants that no selected rule set judges: "
        << md(join(r.coverage.unjudged_pollutants)) << "\n";
    }
  }
  o << "\nRule entries say how each was verified in the `checked` column of `" << opt.file_prefix
    << "limits.csv`: SRC (seen in a published copy), MEM (from memory, not "
       "verified), PRAC (common practice).\n";
  for (const auto& rs : opt.rule_sets) {
    o << "\n## " << md(rs.name) << "\n\n";
    bool any = false;
    for (const auto& x : r.limits) {
      if (x.rule_set_id != rs.id) continue;
      if (!any) {
        o << "| Limit | Kind | Year | Statistic | Value | Level | Exceedances (allowed) | "
             "Valid / possible | Multi-year mean | Result | Legal source |\n"
             "|---|---|---:|---|---:|---:|---:|---:|---:|---|---|\n";
        any = true;
      }
      o << "| " << md(x.limit_id) << " | " << md(x.kind) << " | " << x.year << " | "
        << md(x.statistic) << " | " << mdn(x.value) << " " << md(x.unit) << " | " << mdn(x.level)
        << " " << md(x.unit) << " | "
        << (x.exceedances < 0 ? std::string("–") : std::to_string(x.exceedances))
        << (x.allowed_exceedances >= 0 ? " (" + std::to_string(x.allowed_exceedances) + ")" : "")
        << " | " << x.valid_count << " / " << x.possible_count << " | "
        << (x.years_averaged > 1
                ? mdn(x.multi_year_value) + " (" + std::to_string(x.years_averaged) + " yr)"
                : "–")
        << " | " << to_string(x.verdict) << " | " << md(x.legal_source) << " |\n";
    }
    if (!any) o << "No limit of this rule set applies to the pollutants given.\n";
  }
}

void md_episodes(std::ostringstream& o, const StandardsReport& r) {
  o << "\n## Alert episodes\n\n";
  if (r.episodes.empty()) {
    o << "No episode above any alert rule of the rule sets used.\n";
  } else {
    const TimeZone& z = r.options.zone;
    o << "| Rule set | Rule | Level | Pollutant | Start (local) | End (local) | Duration [h] | "
         "Peak | Peak hour (local) | Lead time [h] |\n|---|---|---|---|---|---|---:|---:|---|---:|\n";
    for (const auto& e : r.episodes) {
      o << "| " << md(e.rule_set_id) << " | " << md(e.rule_id) << " | " << md(e.level_name) << " | "
        << md(e.pollutant) << " | " << format_local(e.start_utc, z) << " | "
        << format_local(e.end_utc, z) << " | " << mdn(e.duration_h) << " | " << mdn(e.peak) << " "
        << md(e.unit) << " | " << format_local(e.peak_start_utc, z) << " | "
        << (e.lead_time_h ? mdn(*e.lead_time_h) : "–") << " |\n";
    }
    o << "\nThe same episodes in UTC: `" << r.options.file_prefix << "episodes.csv`.\n";
  }
}

void md_aqi(std::ostringstream& o, const StandardsReport& r) {
  const auto& opt = r.options;
  const AirIndex& ix = aqi_index_of(opt);
  o << "\n## " << ix.name << " (breakpoints: " << ix.version << ")\n\n";
  if (r.aqi.empty()) {
    o << "No day with a complete AQI input.\n";
  } else {
    std::map<int, std::pair<std::string, int>> by_rank;
    const DailyAqi* worst = &r.aqi.front();
    for (const auto& d : r.aqi) {
      const IndexCategory* cat = ix.category_of(d.aqi);
      const int rank = d.category == ix.beyond_name || !cat ? kOpenTop : cat->index_lo;
      auto& slot = by_rank[rank];
      slot.first = d.category;
      ++slot.second;
      if (d.aqi > worst->aqi) worst = &d;
    }
    o << "| Category | Days |\n|---|---:|\n";
    for (const auto& [rank, c] : by_rank) o << "| " << c.first << " | " << c.second << " |\n";
    o << "\nHighest: AQI " << worst->aqi << " (" << worst->category << ") on "
      << format_day(worst->day) << ", responsible pollutant " << worst->responsible << ".\n";
  }
}

void md_banded(std::ostringstream& o, const StandardsReport& r) {
  const AirIndex& ix = *r.options.index;
  o << "\n## " << ix.name << " (hourly; " << ix.version << ")\n\n";
  if (r.banded.empty()) {
    o << "No hour with an input of this index.\n";
    return;
  }
  std::vector<int> hours(ix.categories.size(), 0);
  const BandedHour* worst = &r.banded.front();
  for (const auto& h : r.banded) {
    ++hours[static_cast<std::size_t>(h.level - 1)];
    if (h.level > worst->level) worst = &h;
  }
  o << "| Level | Category | Hours |\n|---:|---|---:|\n";
  for (std::size_t k = 0; k < hours.size(); ++k)
    o << "| " << k + 1 << " | " << md(ix.categories[k].name) << " | " << hours[k] << " |\n";
  o << "\nPoorest: " << worst->category << " from " << format_local(worst->hour_start_utc, r.options.zone)
    << " (first such hour), set by " << worst->responsible << ". Hour by hour: index.csv.\n";
}

void md_aqhi(std::ostringstream& o, const StandardsReport& r) {
  o << "\n## Canada AQHI (hourly, from 3-hour means)\n\n";
  if (r.aqhi.empty()) {
    o << "Not computed: NO2, O3 and PM2.5 are all needed.\n";
  } else {
    const auto worst =
        std::max_element(r.aqhi.begin(), r.aqhi.end(),
                         [](const auto& a, const auto& b) { return a.value < b.value; });
    o << r.aqhi.size() << " hours; highest AQHI " << worst->rounded << " (" << worst->category
      << ") for the 3 hours ending " << format_local(worst->end_utc, r.options.zone) << ".\n";
  }
}

}  // namespace

std::string report_markdown(const StandardsReport& r) {
  std::ostringstream o;
  md_header(o, r);
  md_rule_sets_and_limits(o, r);
  md_episodes(o, r);
  if (r.options.with_aqi) md_aqi(o, r);
  if (r.options.with_aqhi) md_aqhi(o, r);
  if (!r.banded.empty() || (r.options.index && r.options.index->kind == IndexKind::bands))
    md_banded(o, r);
  o << "\n## How to read this\n\n"
       "- \"exceeded\": the statistic computed here from the series given is above the level "
       "(or the count above the allowed number); \"within\": not above, on a complete year; "
       "\"incomplete\": not above, but the year lacks the data the rule asks for. None of these "
       "is a compliance determination or an official alert.\n"
       "- Multi-year forms (e.g. 3-year averages) show the single year and, where enough "
       "consecutive complete years exist, their mean.\n"
       "- Daily values are midnight-to-midnight local standard time; running means are labelled "
       "by their start hour in the tables and assigned to days as each rule says.\n";
  o << "\n> **Caution.** " << caution_for(r.options.measured_data) << "\n";
  return o.str();
}

std::vector<OutputFile> render_standards_report(const StandardsReport& r) {
  std::vector<OutputFile> files;
  files.push_back({"limits.csv", limits_csv(r)});
  files.push_back({"daily.csv", daily_csv(r)});
  files.push_back({"periods.csv", periods_csv(r)});
  files.push_back({"episodes.csv", episodes_csv(r)});
  if (r.options.with_aqi) files.push_back({"aqi.csv", aqi_csv(r)});
  if (r.options.with_aqhi) files.push_back({"aqhi.csv", aqhi_csv(r)});
  if (r.options.index && r.options.index->kind == IndexKind::bands)
    files.push_back({"index.csv", banded_csv(r)});
  for (const auto& q : r.options.rolling) {
    const std::string name = "rolling_" + q.name() + ".csv";
    const bool seen = std::any_of(files.begin(), files.end(),
                                  [&](const OutputFile& f) { return f.name == name; });
    if (!seen) files.push_back({name, rolling_csv(r, q)});
  }
  files.push_back({"report.md", report_markdown(r)});
  files.push_back({"report.json", report_json(r)});
  for (auto& f : files) f.name = r.options.file_prefix + f.name;
  return files;
}

std::vector<std::filesystem::path> write_standards_report(const StandardsReport& report,
                                                          const std::filesystem::path& dir) {
  return write_output_files(dir, render_standards_report(report));
}

}  // namespace lidbox
