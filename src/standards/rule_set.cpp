#include "lidbox/standards/rule_set.hpp"

#include <algorithm>
#include <cstdlib>
#include <fstream>
#include <set>
#include <sstream>

#include "lidbox/base/data_dir.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

const char* to_string(StatisticKind s) {
  switch (s) {
    case StatisticKind::hourly_value:
      return "hourly_value";
    case StatisticKind::running_mean:
      return "running_mean";
    case StatisticKind::daily_mean:
      return "daily_mean";
    case StatisticKind::daily_max_1h:
      return "daily_max_1h";
    case StatisticKind::daily_max_8h_17_windows:
      return "daily_max_8h_17_windows";
    case StatisticKind::daily_max_8h_24_windows:
      return "daily_max_8h_24_windows";
    case StatisticKind::annual_mean:
      return "annual_mean";
    case StatisticKind::annual_mean_of_quarterly_means:
      return "annual_mean_of_quarterly_means";
    case StatisticKind::peak_season_mean:
      return "peak_season_mean";
  }
  return "?";
}

const char* to_string(LimitForm f) {
  switch (f) {
    case LimitForm::exceedances:
      return "exceedances";
    case LimitForm::nth_highest:
      return "nth_highest";
    case LimitForm::percentile:
      return "percentile";
    case LimitForm::annual_value:
      return "annual_value";
  }
  return "?";
}

const char* to_string(RankingTable t) {
  switch (t) {
    case RankingTable::us_98th:
      return "us_98th";
    case RankingTable::us_99th:
      return "us_99th";
    case RankingTable::nearest_rank:
      return "nearest_rank";
  }
  return "?";
}

namespace {

constexpr StatisticKind kStatistics[] = {
    StatisticKind::hourly_value,
    StatisticKind::running_mean,
    StatisticKind::daily_mean,
    StatisticKind::daily_max_1h,
    StatisticKind::daily_max_8h_17_windows,
    StatisticKind::daily_max_8h_24_windows,
    StatisticKind::annual_mean,
    StatisticKind::annual_mean_of_quarterly_means,
    StatisticKind::peak_season_mean,
};
constexpr LimitForm kForms[] = {LimitForm::exceedances, LimitForm::nth_highest,
                                LimitForm::percentile, LimitForm::annual_value};
constexpr RankingTable kRankings[] = {RankingTable::us_98th, RankingTable::us_99th,
                                      RankingTable::nearest_rank};

template <class E, std::size_t N>
std::vector<std::string> names_of(const E (&all)[N]) {
  std::vector<std::string> out;
  for (E e : all) out.emplace_back(to_string(e));
  return out;
}

template <class E, std::size_t N>
E enum_from(const std::string& text, const E (&all)[N], const std::string& where,
            const char* what) {
  for (E e : all) {
    if (text == to_string(e)) return e;
  }
  const auto names = names_of(all);
  throw InputError(where, std::string("unknown ") + what + " \"" + text + "\"",
                   "one of " + join(names) + did_you_mean(text, names));
}

Rounding parse_rounding(const std::string& text, const std::string& where) {
  if (text == "none") return {};
  const auto colon = text.find(':');
  const std::string mode = text.substr(0, colon);
  Rounding r;
  if (mode == "round_half_up") {
    r.mode = RoundingMode::round_half_up;
  } else if (mode == "truncate") {
    r.mode = RoundingMode::truncate;
  }
  if (r.mode == RoundingMode::none || colon == std::string::npos) {
    throw InputError(where, "\"" + text + "\"",
                     "none, round_half_up:<digits> or truncate:<digits>");
  }
  try {
    std::size_t used = 0;
    r.decimals = std::stoi(text.substr(colon + 1), &used);
    if (used != text.size() - colon - 1 || r.decimals < -6 || r.decimals > 9) throw 0;
  } catch (...) {
    throw InputError(where, "\"" + text + "\"", "a digit count from -6 to 9 after ':'");
  }
  return r;
}

// "8-hour" -> 8; "day" -> 24; "year" / "peak-season" -> 0. Unknown spellings are errors.
int parse_averaging(const std::string& text, const std::string& where) {
  if (text == "day") return 24;
  if (text == "year" || text == "calendar-year" || text == "peak-season") return 0;
  const std::string suffix = "-hour";
  if (text.size() > suffix.size() &&
      text.compare(text.size() - suffix.size(), suffix.size(), suffix) == 0) {
    const std::string digits = text.substr(0, text.size() - suffix.size());
    if (!digits.empty() && digits.size() <= 4 &&
        std::all_of(digits.begin(), digits.end(), [](char c) { return c >= '0' && c <= '9'; })) {
      const int h = std::stoi(digits);
      if (h >= 1 && h <= 8784) return h;
    }
  }
  throw InputError(where, "\"" + text + "\"",
                   "\"<k>-hour\" (k = 1 .. 8784), \"day\", \"year\" or \"peak-season\"");
}

// Checks that statistic and averaging agree and fills averaging_h.
int check_averaging(StatisticKind s, const std::string& averaging, const std::string& where) {
  const int h = parse_averaging(averaging, where);
  auto need = [&](bool ok, const char* expected) {
    if (!ok) {
      throw InputError(where,
                       "averaging \"" + averaging + "\" with statistic \"" + to_string(s) + "\"",
                       expected);
    }
  };
  switch (s) {
    case StatisticKind::hourly_value:
    case StatisticKind::daily_max_1h:
      need(h == 1, "averaging \"1-hour\"");
      return 1;
    case StatisticKind::running_mean:
      need(h >= 2, "averaging \"<k>-hour\" with k >= 2");
      return h;
    case StatisticKind::daily_mean:
      need(h == 24, "averaging \"24-hour\" or \"day\"");
      return 24;
    case StatisticKind::daily_max_8h_17_windows:
    case StatisticKind::daily_max_8h_24_windows:
      need(h == 8, "averaging \"8-hour\"");
      return 8;
    case StatisticKind::annual_mean:
    case StatisticKind::annual_mean_of_quarterly_means:
      need(h == 0 && averaging != "peak-season", "averaging \"year\"");
      return 0;
    case StatisticKind::peak_season_mean:
      need(averaging == "peak-season", "averaging \"peak-season\"");
      return 0;
  }
  return h;
}

bool is_annual(StatisticKind s) {
  return s == StatisticKind::annual_mean || s == StatisticKind::annual_mean_of_quarterly_means ||
         s == StatisticKind::peak_season_mean;
}

std::string check_tag(const std::string& checked, const std::string& where) {
  for (const char* tag : {"SRC", "MEM", "PRAC", "DERIVED"}) {
    if (checked.rfind(tag, 0) == 0) return checked;
  }
  throw InputError(
      where, "\"" + checked + "\"",
      "a text starting with SRC, MEM, PRAC or DERIVED saying how the entry was verified");
}

// Counts (allowed exceedances, ranks, years, persistence hours) are small; the cap keeps a
// typing slip from passing as a rule.
constexpr int kMaxCount = 100000;

int count(const TomlTable& r, const char* key, bool required, int fallback, int min_value) {
  if (required) return r.required_whole_number(key, min_value, kMaxCount);
  return r.optional_whole_number(key, min_value, kMaxCount).value_or(fallback);
}

const std::vector<std::string> kLimitKeys = {"id",
                                             "pollutant",
                                             "kind",
                                             "averaging",
                                             "statistic",
                                             "level",
                                             "unit",
                                             "form",
                                             "allowed_exceedances",
                                             "rank",
                                             "percentile",
                                             "ranking",
                                             "non_overlapping",
                                             "rounding",
                                             "day_valid_fraction",
                                             "period_valid_fraction",
                                             "year_coverage",
                                             "min_valid_fraction",
                                             "incomplete_day_counts_if_above",
                                             "years_averaged",
                                             "legal_source",
                                             "legal_date",
                                             "checked",
                                             "note"};

const std::vector<std::string> kAlertKeys = {
    "id",   "pollutant",   "level_name",   "averaging",  "statistic", "threshold",
    "unit", "persistence", "legal_source", "legal_date", "checked",   "note"};

// How the statistic is judged against the level: counted exceedances, an n-th highest value, a
// percentile, or the annual value itself.
void read_limit_form(const TomlTable& r, Limit& l) {
  const std::string form = r.required_string("form");
  l.form = enum_from(form, kForms, r.where("form"), "form");
  if ((l.form == LimitForm::annual_value) != is_annual(l.statistic)) {
    throw InputError(r.where("form"),
                     "form \"" + form + "\" with statistic \"" + to_string(l.statistic) + "\"",
                     is_annual(l.statistic) ? "form \"annual_value\" for an annual statistic"
                                            : "exceedances, nth_highest or percentile");
  }
  l.allowed_exceedances = count(r, "allowed_exceedances", l.form == LimitForm::exceedances, 0, 0);
  l.rank = count(r, "rank", l.form == LimitForm::nth_highest, 1, 1);
  l.percentile = l.form == LimitForm::percentile ? r.required_number("percentile")
                                                 : r.optional_number("percentile").value_or(0.0);
  if (l.form == LimitForm::percentile) {
    l.ranking = enum_from(r.required_string("ranking"), kRankings, r.where("ranking"), "ranking");
    if (!(l.percentile > 0.0 && l.percentile <= 100.0)) {
      throw InputError(r.where("percentile"), format_number(l.percentile), "a value in (0, 100]");
    }
  }
}

bool built_from_days(StatisticKind s) {
  return s == StatisticKind::daily_mean || s == StatisticKind::daily_max_1h ||
         s == StatisticKind::daily_max_8h_17_windows ||
         s == StatisticKind::daily_max_8h_24_windows ||
         s == StatisticKind::annual_mean_of_quarterly_means || s == StatisticKind::peak_season_mean;
}

// A completeness fraction in (0, 1], or the fallback when the key is absent; a key the statistic
// has no use for is an error rather than a silent no-op.
double fraction(const TomlTable& r, const char* key, double fallback, bool applies, const Limit& l,
                const char* applies_to) {
  const auto v = r.optional_number(key);
  if (!v) return fallback;
  if (!applies) {
    throw InputError(r.where(key),
                     std::string(key) + " with statistic \"" + to_string(l.statistic) + "\"",
                     std::string(key) + " only " + applies_to);
  }
  if (!(*v > 0.0 && *v <= 1.0)) {
    throw InputError(r.where(key), format_number(*v), "a fraction in (0, 1]");
  }
  return *v;
}

// The two completeness rules of the published standards, kept apart: what makes a day (or a
// quarter, a month) valid, and what share of a year's values makes the year covered.
void read_completeness(const TomlTable& r, Limit& l) {
  if (r.optional_number("min_valid_fraction")) {
    throw InputError(r.where("min_valid_fraction"),
                     "min_valid_fraction, which mixed a day's completeness with a year's",
                     "day_valid_fraction (the share of a day's hours or 8-h windows that makes "
                     "a valid day) and year_coverage (the share of a year's values that makes a "
                     "covered year)");
  }
  const bool quarters = l.statistic == StatisticKind::annual_mean_of_quarterly_means;
  const bool season = l.statistic == StatisticKind::peak_season_mean;
  l.day_valid_fraction = fraction(r, "day_valid_fraction", 0.75, built_from_days(l.statistic), l,
                                  "for statistics built from days");
  l.period_valid_fraction = fraction(r, "period_valid_fraction", 0.75, quarters || season, l,
                                     "with annual_mean_of_quarterly_means or peak_season_mean");
  l.year_coverage = fraction(r, "year_coverage", quarters ? 1.0 : 0.75, !season, l,
                             "with statistics other than peak_season_mean");
}

// Which values count: windows, rounding before comparison, completeness, years averaged.
void read_limit_data_rules(const TomlTable& r, Limit& l) {
  l.non_overlapping = r.optional_bool("non_overlapping").value_or(false);
  if (l.non_overlapping && l.statistic != StatisticKind::running_mean) {
    throw InputError(
        r.where("non_overlapping"),
        std::string("non_overlapping with statistic \"") + to_string(l.statistic) + "\"",
        "non_overlapping only with statistic \"running_mean\"");
  }
  l.rounding = parse_rounding(r.optional_string("rounding").value_or("none"), r.where("rounding"));
  read_completeness(r, l);
  l.incomplete_day_counts_if_above =
      r.optional_bool("incomplete_day_counts_if_above").value_or(false);
  l.years_averaged = count(r, "years_averaged", false, 1, 1);
}

Limit read_limit(const TomlTable& r, const ReferenceConditions& ref) {
  Limit l;
  l.where = r.location();
  l.id = r.required_string("id");
  l.pollutant = pollutant_or_throw(r.required_string("pollutant"), r.where("pollutant")).name;
  l.kind = r.required_string("kind");
  l.statistic =
      enum_from(r.required_string("statistic"), kStatistics, r.where("statistic"), "statistic");
  l.averaging = r.required_string("averaging");
  l.averaging_h = check_averaging(l.statistic, l.averaging, r.where("averaging"));
  l.level = r.required_number("level");
  l.unit = r.required_string("unit");
  (void)unit_factor(l.unit, l.unit, l.pollutant, ref, r.where("unit"));
  read_limit_form(r, l);
  read_limit_data_rules(r, l);
  l.legal_source = r.required_string("legal_source");
  l.legal_date = r.optional_string("legal_date").value_or("");
  l.checked = check_tag(r.required_string("checked"), r.where("checked"));
  l.note = r.optional_string("note").value_or("");
  return l;
}

AlertRule read_alert(const TomlTable& r, const ReferenceConditions& ref) {
  AlertRule a;
  a.where = r.location();
  a.id = r.required_string("id");
  a.pollutant = pollutant_or_throw(r.required_string("pollutant"), r.where("pollutant")).name;
  a.level_name = r.required_string("level_name");
  const std::string statistic = r.required_string("statistic");
  a.statistic = enum_from(statistic, kStatistics, r.where("statistic"), "statistic");
  if (a.statistic != StatisticKind::hourly_value && a.statistic != StatisticKind::running_mean &&
      a.statistic != StatisticKind::daily_mean) {
    throw InputError(r.where("statistic"), "alert statistic \"" + statistic + "\"",
                     "hourly_value, running_mean or daily_mean");
  }
  a.averaging = r.required_string("averaging");
  a.averaging_h = check_averaging(a.statistic, a.averaging, r.where("averaging"));
  a.threshold = r.required_number("threshold");
  a.unit = r.required_string("unit");
  (void)unit_factor(a.unit, a.unit, a.pollutant, ref, r.where("unit"));
  a.persistence = count(r, "persistence", false, 1, 1);
  a.legal_source = r.required_string("legal_source");
  a.legal_date = r.optional_string("legal_date").value_or("");
  a.checked = check_tag(r.required_string("checked"), r.where("checked"));
  a.note = r.optional_string("note").value_or("");
  return a;
}

void read_head(const TomlTable& top, RuleSet& rs) {
  const auto h =
      top.optional_table("rule_set", {"id", "name", "legal_source", "legal_date", "note",
                                      "reference_temperature_K", "reference_pressure_Pa"});
  if (!h) top.throw_missing("rule_set", "a [rule_set] table with id and name");
  rs.id = h->required_string("id");
  rs.name = h->required_string("name");
  rs.legal_source = h->required_string("legal_source");
  rs.legal_date = h->required_string("legal_date");
  rs.note = h->optional_string("note").value_or("");
  rs.reference.temperature_K = h->required_number("reference_temperature_K");
  rs.reference.pressure_Pa = h->required_number("reference_pressure_Pa");
  if (!(rs.reference.temperature_K > 150.0 && rs.reference.temperature_K < 350.0) ||
      !(rs.reference.pressure_Pa > 50000.0 && rs.reference.pressure_Pa < 120000.0)) {
    throw InputError(h->where_table(),
                     "reference conditions " + std::to_string(rs.reference.temperature_K) + " K, " +
                         std::to_string(rs.reference.pressure_Pa) + " Pa",
                     "a temperature of 150-350 K and a pressure of 50-120 kPa");
  }
}

template <class Rule, class Reader>
void read_rules(const TomlTable& top, const char* key, const std::vector<std::string>& keys,
                Reader reader, const RuleSet& rs, std::set<std::string>& ids,
                std::vector<Rule>& out) {
  for (const TomlTable& t : top.array_of_tables(key, keys, std::string("[[") + key + "]] tables")) {
    Rule rule = reader(t, rs.reference);
    if (!ids.insert(rule.id).second) {
      throw InputError(rule.where, "id \"" + rule.id + "\" used twice",
                       "ids unique within the file");
    }
    out.push_back(std::move(rule));
  }
}

}  // namespace

double unit_factor(std::string_view series_unit, std::string_view rule_unit,
                   std::string_view pollutant, const ReferenceConditions& ref,
                   std::string_view where) {
  const PollutantInfo& p = pollutant_or_throw(pollutant, where);
  const auto from = parse_concentration_unit(series_unit, p.molar_mass_g_mol, ref, where);
  const auto to = parse_concentration_unit(rule_unit, p.molar_mass_g_mol, ref, where);
  return from.to_g_m3 / to.to_g_m3;
}

RuleSet parse_rule_set(std::string_view toml_text, std::string_view path) {
  const TomlDocument doc(toml_text, std::string(path));
  const TomlTable top(doc, {"rule_set", "limit", "alert"});
  RuleSet rs;
  rs.path = path;
  read_head(top, rs);
  std::set<std::string> ids;
  read_rules(top, "limit", kLimitKeys, read_limit, rs, ids, rs.limits);
  read_rules(top, "alert", kAlertKeys, read_alert, rs, ids, rs.alerts);
  if (rs.limits.empty() && rs.alerts.empty()) {
    throw InputError(top.where_table(), "no [[limit]] or [[alert]] tables", "at least one rule");
  }
  return rs;
}

RuleSet load_rule_set_file(const std::filesystem::path& path) {
  return parse_rule_set(read_text_file(path.string(), path.string()), path.string());
}

std::filesystem::path rules_directory(const std::optional<std::filesystem::path>& explicit_dir) {
  if (explicit_dir) return *explicit_dir;
  if (const char* env = std::getenv("LIDBOX_RULES_DIR"); env && *env) return env;
  return data_dir("rules");
}

std::vector<std::string> list_rule_sets(const std::filesystem::path& dir) {
  return data_file_ids(dir);
}

RuleSet load_rule_set(std::string_view name_or_path, const std::filesystem::path& dir) {
  const std::string s(name_or_path);
  if (names_a_data_file(s)) return load_rule_set_file(s);
  // A shipped file is named by its place in lidbox's data, so that reports read the same wherever
  // lidbox is checked out or installed; a file from the user's own folder keeps its path.
  auto load_labelled = [](const std::filesystem::path& file) {
    RuleSet rs = load_rule_set_file(file);
    if (auto label = shipped_data_label(file, "rules")) rs.path = *label;
    return rs;
  };
  const auto file = dir / (s + ".toml");
  if (std::filesystem::exists(file)) return load_labelled(file);
  const auto ids = list_rule_sets(dir);
  // A unique beginning is enough ("eu-2008" for "eu-2008-50").
  std::vector<std::string> starting;
  for (const auto& id : ids) {
    if (id.rfind(s, 0) == 0) starting.push_back(id);
  }
  if (starting.size() == 1 && !s.empty()) return load_labelled(dir / (starting[0] + ".toml"));
  throw InputError("rule set \"" + s + "\"", "not found in " + dir.string(),
                   (ids.empty() ? std::string("a rule-set file path") : "one of " + join(ids)) +
                       did_you_mean(s, ids));
}

std::vector<RuleSet> load_rule_sets(const std::vector<std::string>& names_or_paths,
                                    const std::filesystem::path& dir) {
  std::vector<RuleSet> out;
  for (const auto& n : names_or_paths) {
    RuleSet rs = load_rule_set(n, dir);
    for (const RuleSet& other : out) {
      if (other.id == rs.id) {
        throw InputError("rule set \"" + n + "\"", "id \"" + rs.id + "\" already loaded",
                         "each rule set once");
      }
    }
    out.push_back(std::move(rs));
  }
  return out;
}

}  // namespace lidbox
