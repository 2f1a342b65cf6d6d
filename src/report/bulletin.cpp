#include "lidbox/report/bulletin.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <set>
#include <sstream>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/data_dir.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"
#include "lidbox/standards/averaging.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

// ---------------------------------------------------------------- templates

const std::map<std::string, std::vector<std::string>>& bulletin_template_fields() {
  static const std::vector<std::string> validity = {"issue", "issue_utc", "valid_from", "valid_to",
                                                    "zone"};
  static const std::map<std::string, std::vector<std::string>> fields = {
      {"title", {"area"}},
      {"subtitle", validity},
      {"not_official", {}},
      {"headline_episode",
       {"level", "pollutant", "area", "start", "duration_h", "likelihood", "category",
        "index_name"}},
      {"headline_clear", {"area", "valid_from", "valid_to", "category", "index_name"}},
      {"headline_no_index", {}},
      {"likelihood_ensemble", {"with", "members", "probability"}},
      {"likelihood_single", {}},
      {"section_incident", {}},
      {"incident",
       {"level", "rule", "rule_set", "pollutant", "area", "threshold", "unit", "start", "end",
        "duration_h", "peak", "peak_time"}},
      {"section_outlook", {}},
      {"outlook_day",
       {"day", "lid_max", "wind", "ventilation", "stagnation", "pollutant", "daily_max", "unit",
        "trend"}},
      {"trend_worse", {}},
      {"trend_better", {}},
      {"trend_same", {}},
      {"trend_first", {}},
      {"section_health", {}},
      {"health", {"category", "index_name", "groups", "general", "sensitive"}},
      {"section_sources", {}},
      {"source_share", {"part", "share", "pollutant", "peak_time"}},
      {"section_cut", {}},
      {"cut_feasible", {"sectors", "cut", "cut_all", "start", "rule", "pollutant", "day"}},
      {"cut_infeasible", {"day", "rule", "pollutant", "sectors", "rest", "level", "unit"}},
      {"cut_none", {}},
      {"section_timeline", {}},
      {"timeline_none", {}},
      {"timeline_more", {"more"}},
      {"section_validity", {}},
      {"validity", validity},
      {"section_caution", {}},
      {"section_monitors", {}},
      {"monitor",
       {"monitor", "pollutant", "peak", "unit", "peak_time", "modelled", "pairs", "mean_observed",
        "mean_modelled"}},
  };
  return fields;
}

namespace {

// The fields a template names, in order; InputError at `where` for an unclosed brace.
std::vector<std::string> fields_named(const std::string& text, const std::string& where) {
  std::vector<std::string> out;
  for (std::size_t i = text.find('{'); i != std::string::npos; i = text.find('{', i + 1)) {
    const std::size_t close = text.find('}', i);
    if (close == std::string::npos) {
      throw InputError(where, "a \"{\" without its \"}\"", "fields written {name}");
    }
    out.push_back(text.substr(i + 1, close - i - 1));
  }
  return out;
}

}  // namespace

BulletinTemplates parse_bulletin_templates(std::string_view toml_text, std::string_view path) {
  const TomlDocument doc(toml_text, std::string(path));
  const TomlTable top(doc, {"bulletin"});
  std::vector<std::string> keys;
  for (const auto& [k, f] : bulletin_template_fields()) keys.push_back(k);
  const auto t = top.optional_table("bulletin", keys);
  if (!t) top.throw_missing("bulletin", "a [bulletin] table with the templates");
  BulletinTemplates out;
  out.path = path;
  for (const auto& [key, allowed] : bulletin_template_fields()) {
    const std::string text = t->required_string(key);
    for (const std::string& f : fields_named(text, t->where(key))) {
      if (std::find(allowed.begin(), allowed.end(), f) != allowed.end()) continue;
      throw InputError(t->where(key), "unknown field {" + f + "}",
                       allowed.empty() ? std::string("no fields in this template")
                                       : "one of " + join(allowed) + did_you_mean(f, allowed));
    }
    out.text[key] = text;
  }
  return out;
}

BulletinTemplates load_bulletin_templates(std::string_view id_or_path) {
  const std::string s(id_or_path);
  const bool is_path = s.find('/') != std::string::npos ||
                       (s.size() > 5 && s.compare(s.size() - 5, 5, ".toml") == 0);
  const std::filesystem::path file = is_path ? std::filesystem::path(s) : data_dir("bulletin") / (s + ".toml");
  std::ifstream in(file, std::ios::binary);
  if (!in) {
    throw InputError(is_path ? s : "bulletin templates \"" + s + "\"", "cannot be read",
                     is_path ? "a readable templates TOML file" : "an id of lidbox data: bulletin/ (en) or a path");
  }
  std::ostringstream text;
  text << in.rdbuf();
  BulletinTemplates t = parse_bulletin_templates(text.str(), file.string());
  if (auto label = shipped_data_label(file, "bulletin")) t.path = *label;
  return t;
}

namespace {

// ---------------------------------------------------------------- content helpers

using Fields = std::map<std::string, std::string>;

std::string fill(const std::string& text, const Fields& f) {
  std::string out;
  std::size_t i = 0;
  while (i < text.size()) {
    const std::size_t open = text.find('{', i);
    if (open == std::string::npos) break;
    const std::size_t close = text.find('}', open);
    out += text.substr(i, open - i);
    const auto it = f.find(text.substr(open + 1, close - open - 1));
    // Every field was checked when the templates were read; a missing value is lidbox's bug.
    if (it == f.end()) throw InternalError("bulletin field " + text.substr(open, close - open + 1));
    out += it->second;
    i = close + 1;
  }
  return out + text.substr(std::min(i, text.size()));
}

struct Context {
  const BulletinInput& in;
  const CaseSpec& c;
  const RunResult& r;
  const BulletinTemplates& t;
  UtcSeconds from = 0, to = 0;  // validity: the run's hours
  std::string area;             // [bulletin] area, else the case's title
  UtcSeconds issue = 0;

  [[nodiscard]] std::string local(UtcSeconds s) const { return format_local(s, c.zone); }
  [[nodiscard]] std::string say(const std::string& key, const Fields& f = {}) const {
    return fill(t.get(key), f);
  }
};

std::string num(double v, int digits = 3) { return std::isnan(v) ? "n/a" : format_number(v, digits); }

// The case's pollutant index of a canonical name; n_pollutants when the case has none.
std::size_t pollutant_index(const Context& x, const std::string& canonical) {
  for (std::size_t p = 0; p < x.c.pollutants.size(); ++p) {
    const PollutantInfo* info = find_pollutant(x.c.pollutants[p].name);
    if (info && canonical == info->name) return p;
  }
  return x.r.n_pollutants;
}

std::string part_label(const CaseSpec& c, std::size_t j) {
  if (j == 0) return "background";
  if (j == 1) return "initial state";
  return c.sectors[j - 2].name;
}

// The chosen index's worst category between two instants (the whole run: from, to).
const IndexCategory* category_between(const Context& x, UtcSeconds t0, UtcSeconds t1) {
  if (!x.in.standards) return nullptr;
  const StandardsReport& s = *x.in.standards;
  const AirIndex& ix = headline_index_of(s.options);
  const IndexCategory* worst = nullptr;
  auto consider = [&worst](const IndexCategory* cat) {
    if (cat && (!worst || cat->index_lo > worst->index_lo)) worst = cat;
  };
  if (ix.kind == IndexKind::bands) {
    for (const BandedHour& h : s.banded) {
      if (h.hour_start_utc >= t0 && h.hour_start_utc < t1)
        consider(&ix.categories.at(static_cast<std::size_t>(h.level - 1)));
    }
  } else if (ix.kind == IndexKind::formula) {
    for (const AqhiHour& h : s.aqhi) {
      if (h.end_utc > t0 && h.end_utc <= t1) consider(ix.category_of(h.rounded));
    }
  } else {
    const int off = s.options.lst_offset_s;
    for (const DailyAqi& d : s.aqi) {
      if (d.day < lst_day_of(t0, off) || d.day > lst_day_of(t1 - 1, off)) continue;
      consider(ix.category_of(d.aqi) ? ix.category_of(d.aqi) : &ix.categories.back());
    }
  }
  return worst;
}

const Episode* main_episode(const Context& x) {
  if (!x.in.standards || x.in.standards->episodes.empty()) return nullptr;
  const auto& e = x.in.standards->episodes;
  return &*std::min_element(e.begin(), e.end(), [](const Episode& a, const Episode& b) {
    return a.start_utc < b.start_utc;
  });
}

const EnsembleEpisodes* ensemble_of(const Context& x, const Episode& e) {
  if (!x.in.ensemble) return nullptr;
  for (const EnsembleEpisodes& ee : x.in.ensemble->rules.episodes) {
    if (ee.rule_set_id == e.rule_set_id && ee.rule_id == e.rule_id) return &ee;
  }
  return nullptr;
}

std::string likelihood(const Context& x, const Episode& e) {
  if (const EnsembleEpisodes* ee = ensemble_of(x, e)) {
    return x.say("likelihood_ensemble", {{"with", std::to_string(ee->with_episode)},
                                         {"members", std::to_string(ee->members)},
                                         {"probability", num(100.0 * ee->probability, 3)}});
  }
  return x.say("likelihood_single");
}

std::string headline(const Context& x, const Episode* e, const IndexCategory* worst) {
  const std::string category = worst ? worst->name : x.say("headline_no_index");
  const std::string index_name =
      x.in.standards ? headline_index_of(x.in.standards->options).name : std::string("index");
  if (!e) {
    return x.say("headline_clear", {{"area", x.area},
                                    {"valid_from", x.local(x.from)},
                                    {"valid_to", x.local(x.to)},
                                    {"category", category},
                                    {"index_name", index_name}});
  }
  std::string text = x.say("headline_episode", {{"level", e->level_name},
                                    {"pollutant", e->pollutant},
                                    {"area", x.area},
                                    {"start", x.local(e->start_utc)},
                                    {"duration_h", num(e->duration_h)},
                                    {"likelihood", likelihood(x, *e)},
                                    {"category", category},
                                    {"index_name", index_name}});
  // A headline is a sentence: a level named in lower case ("stagnation advisory") starts it.
  if (!text.empty() && text[0] >= 'a' && text[0] <= 'z') text[0] = static_cast<char>(text[0] - 'a' + 'A');
  return text;
}

BulletinSection incident(const Context& x, const Episode& e) {
  return {x.say("section_incident"),
          {x.say("incident", {{"level", e.level_name},
                              {"rule", e.rule_id},
                              {"rule_set", e.rule_set_id},
                              {"pollutant", e.pollutant},
                              {"area", x.area},
                              {"threshold", num(e.threshold, 4)},
                              {"unit", e.unit},
                              {"start", x.local(e.start_utc)},
                              {"end", x.local(e.end_utc)},
                              {"duration_h", num(e.duration_h)},
                              {"peak", num(e.peak, 4)},
                              {"peak_time", x.local(e.peak_start_utc)}})}};
}

// Per local standard day of the run: afternoon (12-18 LST) highest lid and mean wind from the
// run's hours, the diagnostics' ventilation class and stagnation verdicts, and the day's highest
// hour of the pollutant with its trend against the day before (10 %: common practice, no source).
struct DayOutlook {
  std::int64_t day = 0;
  double lid_max = 0.0, wind_sum = 0.0, daily_max = 0.0;
  int wind_n = 0;
};

std::vector<DayOutlook> day_outlooks(const Context& x, std::size_t p) {
  const int off = x.c.zone.standard_offset_s();
  std::vector<DayOutlook> days;
  for (std::size_t i = 0; i < x.r.hours.size(); ++i) {
    const HourRecord& h = x.r.hours[i];
    const std::int64_t d = lst_day_of(h.start_utc, off);
    if (days.empty() || days.back().day != d) days.push_back({d, 0.0, 0.0, 0.0, 0});
    DayOutlook& o = days.back();
    const int hour = x.c.zone.standard(h.start_utc).hour;
    if (hour >= 12 && hour < 18) {
      o.lid_max = std::max(o.lid_max, h.mixing_height_m);
      o.wind_sum += h.wind_speed_m_s;
      ++o.wind_n;
    }
    if (p < x.r.n_pollutants) {
      const PollutantSpec& ps = x.c.pollutants[p];
      o.daily_max = std::max(o.daily_max, x.r.total(i, p) / ps.unit.to_g_m3);
    }
  }
  return days;
}

std::string stagnation_of(const Context& x, const std::string& date) {
  if (!x.in.days || !x.in.diagnostics || x.in.diagnostics->schemes.empty()) return "not judged";
  for (const DiagnosticDay& d : x.in.days->days) {
    if (d.date != date) continue;
    std::vector<std::string> yes, no;
    for (std::size_t k = 0; k < d.verdict.size(); ++k) {
      const std::string& id = x.in.diagnostics->schemes[k].id;
      if (d.verdict[k] == 1) yes.push_back(id);
      if (d.verdict[k] == 0) no.push_back(id);
    }
    if (!yes.empty()) return "stagnant by " + join(yes);
    if (!no.empty()) return "not stagnant (" + join(no) + ")";
  }
  return "not judged";
}

std::string ventilation_of(const Context& x, const std::string& date) {
  if (!x.in.days || !x.in.diagnostics || !x.in.diagnostics->table) return "not classed";
  for (const DiagnosticDay& d : x.in.days->days) {
    if (d.date == date && d.category >= 0)
      return x.in.diagnostics->table->categories.at(static_cast<std::size_t>(d.category)).name;
  }
  return "not classed";
}

BulletinSection outlook(const Context& x, std::size_t p) {
  BulletinSection s{x.say("section_outlook"), {}};
  const std::vector<DayOutlook> days = day_outlooks(x, p);
  const std::string pollutant = p < x.r.n_pollutants ? x.c.pollutants[p].name : "";
  const std::string unit = p < x.r.n_pollutants ? x.c.pollutants[p].unit.canonical : "";
  // The outlook covers the issue day and the six after it (the EU list's "following afternoon,
  // day and days"); a longer run keeps the rest in its tables.
  const std::int64_t first_day = lst_day_of(x.issue, x.c.zone.standard_offset_s());
  for (std::size_t k = 0; k < days.size(); ++k) {
    const DayOutlook& o = days[k];
    if (o.day < first_day || o.day >= first_day + 7) continue;
    std::string trend = x.say("trend_first");
    if (k > 0) {
      const double before = days[k - 1].daily_max;
      trend = o.daily_max > 1.1 * before   ? x.say("trend_worse")
              : o.daily_max < 0.9 * before ? x.say("trend_better")
                                           : x.say("trend_same");
    }
    const std::string date = format_day(o.day);
    s.items.push_back(x.say(
        "outlook_day",
        {{"day", date},
         {"lid_max", o.wind_n ? num(o.lid_max, 4) : std::string("n/a")},
         {"wind", o.wind_n ? num(o.wind_sum / o.wind_n, 2) : std::string("n/a")},
         {"ventilation", ventilation_of(x, date)},
         {"stagnation", stagnation_of(x, date)},
         {"pollutant", pollutant},
         {"daily_max", num(o.daily_max, 4)},
         {"unit", unit},
         {"trend", trend}}));
  }
  return s;
}

BulletinSection health(const Context& x, const IndexCategory* worst) {
  BulletinSection s{x.say("section_health"), {}};
  if (!worst) return s;
  s.items.push_back(x.say("health", {{"category", worst->name},
                                     {"index_name", headline_index_of(x.in.standards->options).name},
                                     {"groups", worst->groups_at_risk},
                                     {"general", worst->general_advice},
                                     {"sensitive", worst->sensitive_advice}}));
  return s;
}

BulletinSection sources(const Context& x, std::size_t p) {
  BulletinSection s{x.say("section_sources"), {}};
  if (p >= x.r.n_pollutants || x.r.hours.empty()) return s;
  std::size_t peak = 0;
  for (std::size_t i = 0; i < x.r.hours.size(); ++i) {
    if (x.r.total(i, p) > x.r.total(peak, p)) peak = i;
  }
  const double total = x.r.total(peak, p);
  std::vector<std::pair<double, std::size_t>> shares;
  for (std::size_t j = 0; j < x.r.n_parts; ++j)
    shares.emplace_back(total > 0.0 ? 100.0 * x.r.mean(peak, p, j) / total : 0.0, j);
  std::sort(shares.rbegin(), shares.rend());
  for (const auto& [share, j] : shares) {
    if (share < 0.5) continue;  // the initial state after a spin-up, or a silent sector
    s.items.push_back(x.say("source_share", {{"part", part_label(x.c, j)},
                                             {"share", num(share, 2)},
                                             {"pollutant", x.c.pollutants[p].name},
                                             {"peak_time", x.local(x.r.hours[peak].start_utc)}}));
  }
  return s;
}

// Each monitor's highest measured hour beside the model's value then, and both means over the
// monitor's paired hours (the monitors' own numbers: measured, not modelled).
BulletinSection monitors(const Context& x) {
  BulletinSection s{x.say("section_monitors"), {}};
  for (const MonitorPollutant& m : *x.in.monitors) {
    const std::vector<double> model = model_total(x.c, x.r, m.case_index);
    std::size_t peak = m.observed.size(), pairs = 0;
    double sum_o = 0.0, sum_m = 0.0;
    for (std::size_t i = 0; i < m.observed.size() && i < model.size(); ++i) {
      if (std::isnan(m.observed[i])) continue;
      ++pairs;
      sum_o += m.observed[i];
      sum_m += model[i];
      if (peak == m.observed.size() || m.observed[i] > m.observed[peak]) peak = i;
    }
    if (pairs == 0) continue;
    s.items.push_back(x.say(
        "monitor", {{"monitor", m.label},
                    {"pollutant", m.pollutant},
                    {"peak", num(m.observed[peak], 4)},
                    {"unit", m.unit},
                    {"peak_time", x.local(x.r.hours[peak].start_utc)},
                    {"modelled", num(model[peak], 4)},
                    {"pairs", std::to_string(pairs)},
                    {"mean_observed", num(sum_o / static_cast<double>(pairs), 4)},
                    {"mean_modelled", num(sum_m / static_cast<double>(pairs), 4)}}));
  }
  return s;
}

// A cut as people read it: rounded UP to 0.1 % so that the printed cut suffices (cut_report).
std::string cut_percent(double scale) {
  const double cut = std::ceil((1.0 - scale) * 1000.0 - 1e-9) / 10.0;
  return num(std::max(0.0, cut), 4);
}

BulletinSection cuts(const Context& x, const Episode* e) {
  BulletinSection s{x.say("section_cut"), {}};
  if (!x.in.cut) {
    s.items.push_back(x.say("cut_none"));
    return s;
  }
  const EmissionCut& cut = *x.in.cut;
  for (const CutRow& row : cut.rows) {
    if (row.whole_run || (e && row.rule_id != e->rule_id)) continue;
    if (s.items.size() >= 6) break;
    if (row.chosen.feasible) {
      s.items.push_back(x.say(
          "cut_feasible", {{"sectors", cut.sectors_label},
                           {"cut", cut_percent(row.chosen.scale)},
                           {"cut_all", row.all.feasible ? cut_percent(row.all.scale) : "n/a"},
                           {"start", x.local(cut.start_utc)},
                           {"rule", row.rule_id},
                           {"pollutant", row.pollutant},
                           {"day", format_day(row.day)}}));
    } else {
      s.items.push_back(x.say("cut_infeasible", {{"day", format_day(row.day)},
                                                 {"rule", row.rule_id},
                                                 {"pollutant", row.pollutant},
                                                 {"sectors", cut.sectors_label},
                                                 {"rest", num(row.chosen.rest_value, 4)},
                                                 {"level", num(row.level, 4)},
                                                 {"unit", row.unit}}));
    }
  }
  return s;
}

std::vector<BulletinTimelineRow> timeline(const Context& x) {
  std::vector<BulletinTimelineRow> rows;
  if (!x.in.standards) return rows;
  std::vector<const Episode*> eps;
  for (const Episode& e : x.in.standards->episodes) eps.push_back(&e);
  std::sort(eps.begin(), eps.end(),
            [](const Episode* a, const Episode* b) { return a->start_utc < b->start_utc; });
  const double span = std::max<double>(1.0, static_cast<double>(x.to - x.from));
  // The first 40 episodes; a long run keeps them all in episodes.csv (timeline_more says so).
  if (eps.size() > 40) eps.resize(40);
  for (const Episode* e : eps) {
    const IndexCategory* cat = category_between(x, e->start_utc, e->end_utc);
    const EnsembleEpisodes* ee = ensemble_of(x, *e);
    rows.push_back({e->level_name + " (" + e->rule_id + ")", e->pollutant, x.local(e->start_utc),
                    x.local(e->end_utc), num(e->duration_h), num(e->peak, 4) + " " + e->unit,
                    ee ? num(100.0 * ee->probability, 3) + " %" : std::string("single run"),
                    cat ? cat->colour : std::string("#777777"),
                    static_cast<double>(e->start_utc - x.from) / span,
                    static_cast<double>(e->end_utc - x.from) / span});
  }
  return rows;
}

}  // namespace

Bulletin build_bulletin(const BulletinInput& in) {
  if (!in.c || !in.r || !in.templates || in.r->hours.empty())
    throw InternalError("build_bulletin: case, run and templates are needed");
  Context x{in, *in.c, *in.r, *in.templates, 0, 0, std::string(), 0};
  x.area = x.c.bulletin_area.empty() ? x.c.title : x.c.bulletin_area;
  x.from = x.r.hours.front().start_utc;
  x.to = x.r.hours.back().start_utc + kSecondsPerHour;
  const UtcSeconds issue = in.issue_time_utc.value_or(x.from);
  x.issue = std::clamp(issue, x.from, x.to - kSecondsPerHour);
  const Fields validity = {{"issue", x.local(issue)},
                           {"issue_utc", format_utc(issue)},
                           {"valid_from", x.local(std::clamp(issue, x.from, x.to))},
                           {"valid_to", x.local(x.to)},
                           {"zone", x.c.zone.display_name()}};
  const Episode* e = main_episode(x);
  const IndexCategory* worst = category_between(x, x.from, x.to);
  const std::size_t p = e ? pollutant_index(x, e->pollutant) : 0;
  Bulletin b;
  b.title = x.say("title", {{"area", x.area}});
  b.subtitle = x.say("subtitle", validity);
  b.not_official = x.say("not_official");
  b.headline = headline(x, e, worst);
  b.category = worst ? worst->name : "";
  b.category_colour = worst ? worst->colour : "#777777";
  if (e) b.sections.push_back(incident(x, *e));
  b.sections.push_back(outlook(x, p));
  if (worst) b.sections.push_back(health(x, worst));
  b.sections.push_back(sources(x, p));
  if (e || in.cut) b.sections.push_back(cuts(x, e));
  if (in.monitors && !in.monitors->empty()) b.sections.push_back(monitors(x));
  b.timeline_heading = x.say("section_timeline");
  b.timeline_none = x.say("timeline_none");
  b.timeline = timeline(x);
  if (in.standards && in.standards->episodes.size() > b.timeline.size()) {
    b.timeline_more = x.say(
        "timeline_more", {{"more", std::to_string(in.standards->episodes.size() - b.timeline.size())}});
  }
  for (const HourRecord& h : x.r.hours) {
    const CivilTime lt = x.c.zone.civil(h.start_utc);
    if (lt.hour != 0) continue;
    char label[16];
    std::snprintf(label, sizeof label, "%02d-%02d", lt.month, lt.day);
    b.day_ticks.emplace_back(static_cast<double>(h.start_utc - x.from) /
                                 static_cast<double>(std::max<UtcSeconds>(1, x.to - x.from)),
                             label);
  }
  b.closing.push_back({x.say("section_validity"), {x.say("validity", validity)}});
  b.caution_heading = x.say("section_caution");
  b.chart_svg = in.chart_svg;
  return b;
}

std::vector<OutputFile> render_bulletin(const BulletinInput& in) {
  const Bulletin b = build_bulletin(in);
  return {{"bulletin.html", bulletin_html(b)},
          {"bulletin.md", bulletin_markdown(b)},
          {"bulletin.txt", bulletin_text(b)}};
}

// ---------------------------------------------------------------- renderings

namespace {

std::string html_escape(std::string_view t) {
  std::string out;
  for (char ch : t) {
    switch (ch) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      default: out += ch;
    }
  }
  return out;
}

// The chart file without its XML prolog, so that it sits inside the HTML body.
std::string inline_svg(const std::string& svg) {
  const std::size_t at = svg.find("<svg");
  return at == std::string::npos ? std::string() : svg.substr(at);
}

// Screen and print: A4, colours kept when printing, sections not split across pages.
constexpr const char* kStyle = R"(
body { font-family: "DejaVu Sans", Arial, sans-serif; margin: 24px auto; max-width: 980px; color: #1a1a1a; line-height: 1.4; }
h1 { font-size: 24px; margin: 0 0 4px 0; }
h2 { font-size: 17px; margin: 18px 0 6px 0; border-bottom: 1px solid #bbb; }
.sub { color: #444; margin: 0 0 12px 0; }
.notofficial { border: 3px solid #b00020; color: #b00020; font-weight: bold; padding: 8px 12px; margin: 10px 0; }
.headline { border-left: 14px solid var(--cat); background: #f4f4f4; padding: 10px 14px; font-size: 18px; }
.cat { display: inline-block; padding: 2px 8px; border: 1px solid #333; background: var(--cat); font-weight: bold; }
table { border-collapse: collapse; width: 100%; font-size: 13px; }
th, td { border: 1px solid #bbb; padding: 3px 6px; text-align: left; }
.chart svg { width: 100%; height: auto; }
.caution { border: 1px solid #555; padding: 8px 12px; background: #fafafa; font-size: 13px; }
section { break-inside: avoid; page-break-inside: avoid; }
@page { size: A4; margin: 14mm; }
@media print {
  body { margin: 0; max-width: none; font-size: 11pt; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  .chart { break-before: page; page-break-before: always; }
}
)";

void html_sections(std::ostringstream& o, const std::vector<BulletinSection>& sections) {
  for (const BulletinSection& s : sections) {
    if (s.items.empty()) continue;
    o << "<section><h2>" << html_escape(s.heading) << "</h2><ul>\n";
    for (const std::string& item : s.items) o << "<li>" << html_escape(item) << "</li>\n";
    o << "</ul></section>\n";
  }
}

// The validity period as a strip with one bar per episode, coloured by its index category.
void html_timeline(std::ostringstream& o, const Bulletin& b) {
  o << "<section><h2>" << html_escape(b.timeline_heading) << "</h2>\n";
  if (b.timeline.empty()) {
    o << "<p>" << html_escape(b.timeline_none) << "</p></section>\n";
    return;
  }
  const double row_h = 16.0;
  const double axis_h = 16.0;  // local-midnight labels under the bars
  const double bars_h = row_h * static_cast<double>(b.timeline.size()) + 4.0;
  const double height = bars_h + axis_h;
  o << "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 1000 " << height
    << "\" width=\"100%\" role=\"img\" aria-label=\"alert timeline\">"
    << "<rect x=\"0\" y=\"0\" width=\"1000\" height=\"" << bars_h
    << "\" fill=\"#f4f4f4\" stroke=\"#999\"/>";
  // At most about 15 labels, so a 90-day period stays readable.
  const std::size_t every = 1 + b.day_ticks.size() / 15;
  for (std::size_t k = 0; k < b.day_ticks.size(); ++k) {
    const double tx = 1000.0 * b.day_ticks[k].first;
    o << "<line x1=\"" << format_number(tx, 5) << "\" y1=\"0\" x2=\"" << format_number(tx, 5)
      << "\" y2=\"" << bars_h << "\" stroke=\"#bbb\"/>";
    if (k % every == 0 && tx < 970.0) {
      o << "<text x=\"" << format_number(tx + 2.0, 5) << "\" y=\"" << height - 3.0
        << "\" font-size=\"11\" fill=\"#333\">" << b.day_ticks[k].second << "</text>";
    }
  }
  for (std::size_t k = 0; k < b.timeline.size(); ++k) {
    const BulletinTimelineRow& t = b.timeline[k];
    const double x0 = 1000.0 * std::clamp(t.from_fraction, 0.0, 1.0);
    const double x1 = 1000.0 * std::clamp(t.to_fraction, 0.0, 1.0);
    o << "<rect x=\"" << format_number(x0, 5) << "\" y=\"" << 2.0 + row_h * static_cast<double>(k)
      << "\" width=\"" << format_number(std::max(2.0, x1 - x0), 5) << "\" height=\"" << row_h - 3.0
      << "\" fill=\"" << t.colour << "\" stroke=\"#222\"/>";
  }
  o << "</svg>\n<table><tr><th>Level</th><th>Pollutant</th><th>Start</th><th>End</th>"
       "<th>Hours</th><th>Peak</th><th>Likelihood</th></tr>\n";
  for (const BulletinTimelineRow& t : b.timeline) {
    o << "<tr><td><span class=\"cat\" style=\"--cat:" << t.colour << "\">&nbsp;</span> "
      << html_escape(t.level) << "</td><td>" << html_escape(t.pollutant) << "</td><td>"
      << html_escape(t.start) << "</td><td>" << html_escape(t.end) << "</td><td>"
      << html_escape(t.duration_h) << "</td><td>" << html_escape(t.peak) << "</td><td>"
      << html_escape(t.probability) << "</td></tr>\n";
  }
  o << "</table>";
  if (!b.timeline_more.empty()) o << "<p>" << html_escape(b.timeline_more) << "</p>";
  o << "</section>\n";
}

}  // namespace

std::string bulletin_html(const Bulletin& b) {
  std::ostringstream o;
  o << "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n<title>"
    << html_escape(b.title) << "</title>\n<style>" << kStyle << "</style></head>\n<body style=\"--cat:"
    << b.category_colour << "\">\n<h1>" << html_escape(b.title) << "</h1>\n<p class=\"sub\">"
    << html_escape(b.subtitle) << "</p>\n<p class=\"notofficial\">" << html_escape(b.not_official)
    << "</p>\n<p class=\"headline\">" << html_escape(b.headline);
  if (!b.category.empty())
    o << " <span class=\"cat\">" << html_escape(b.category) << "</span>";
  o << "</p>\n";
  html_sections(o, b.sections);
  html_timeline(o, b);
  html_sections(o, b.closing);
  o << "<section class=\"caution\"><strong>" << html_escape(b.caution_heading) << ".</strong> "
    << html_escape(kScreeningCaution) << "</section>\n";
  if (!b.chart_svg.empty()) o << "<section class=\"chart\">" << inline_svg(b.chart_svg) << "</section>\n";
  o << "</body></html>\n";
  return o.str();
}

namespace {

std::string md_cell(const std::string& t) {
  std::string out;
  for (char ch : t) out += ch == '|' ? std::string("\\|") : std::string(1, ch);
  return out;
}

}  // namespace

std::string bulletin_markdown(const Bulletin& b) {
  std::ostringstream o;
  o << "# " << b.title << "\n\n" << b.subtitle << "\n\n**" << b.not_official << "**\n\n> "
    << b.headline << (b.category.empty() ? "" : " **[" + b.category + "]**") << "\n";
  auto sections = [&o](const std::vector<BulletinSection>& list) {
    for (const BulletinSection& s : list) {
      if (s.items.empty()) continue;
      o << "\n## " << s.heading << "\n\n";
      for (const std::string& item : s.items) o << "- " << item << "\n";
    }
  };
  sections(b.sections);
  o << "\n## " << b.timeline_heading << "\n\n";
  if (b.timeline.empty()) o << b.timeline_none << "\n";
  else {
    o << "| Level | Pollutant | Start | End | Hours | Peak | Likelihood |\n|---|---|---|---|---:|---:|---|\n";
    for (const BulletinTimelineRow& t : b.timeline) {
      o << "| " << md_cell(t.level) << " | " << md_cell(t.pollutant) << " | " << t.start << " | "
        << t.end << " | " << t.duration_h << " | " << md_cell(t.peak) << " | " << t.probability << " |\n";
    }
    if (!b.timeline_more.empty()) o << "\n" << b.timeline_more << "\n";
  }
  sections(b.closing);
  o << "\n## " << b.caution_heading << "\n\n" << kScreeningCaution << "\n";
  if (!b.chart_svg.empty()) o << "\nChart: chart.svg in the same folder.\n";
  return o.str();
}

namespace {

// Plain text wrapped at 78 columns, continuation lines indented under the item.
void wrap(std::ostringstream& o, const std::string& text, const std::string& first,
          const std::string& rest) {
  std::istringstream words(text);
  std::string line = first, word;
  bool empty = true;
  while (words >> word) {
    if (!empty && line.size() + 1 + word.size() > 78) {
      o << line << "\n";
      line = rest;
      empty = true;
    }
    line += (empty ? "" : " ") + word;
    empty = false;
  }
  o << line << "\n";
}

}  // namespace

std::string bulletin_text(const Bulletin& b) {
  std::ostringstream o;
  wrap(o, b.title, "", "");
  o << std::string(std::min<std::size_t>(78, b.title.size()), '=') << "\n";
  wrap(o, b.subtitle, "", "");
  o << "\n";
  wrap(o, b.not_official, "!! ", "   ");
  o << "\n";
  wrap(o, b.headline + (b.category.empty() ? "" : " [" + b.category + "]"), "", "");
  auto sections = [&o](const std::vector<BulletinSection>& list) {
    for (const BulletinSection& s : list) {
      if (s.items.empty()) continue;
      o << "\n" << s.heading << "\n" << std::string(s.heading.size(), '-') << "\n";
      for (const std::string& item : s.items) wrap(o, item, "- ", "  ");
    }
  };
  sections(b.sections);
  o << "\n" << b.timeline_heading << "\n" << std::string(b.timeline_heading.size(), '-') << "\n";
  if (b.timeline.empty()) wrap(o, b.timeline_none, "", "");
  for (const BulletinTimelineRow& t : b.timeline) {
    wrap(o, t.start + " to " + t.end + " (" + t.duration_h + " h): " + t.level + ", " + t.pollutant +
                ", peak " + t.peak + ", likelihood " + t.probability,
         "- ", "  ");
  }
  if (!b.timeline_more.empty()) wrap(o, b.timeline_more, "", "");
  sections(b.closing);
  o << "\n" << b.caution_heading << "\n" << std::string(b.caution_heading.size(), '-') << "\n";
  wrap(o, kScreeningCaution, "", "");
  return o.str();
}

}  // namespace lidbox
