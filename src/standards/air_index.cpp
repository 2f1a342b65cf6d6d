#include "lidbox/standards/air_index.hpp"

#include <algorithm>
#include <cmath>
#include <fstream>
#include <map>
#include <mutex>
#include <sstream>

#include "lidbox/base/data_dir.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"
#include "lidbox/standards/averaging.hpp"
#include "lidbox/standards/pollutant.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {

const char* to_string(IndexKind k) {
  switch (k) {
    case IndexKind::breakpoints:
      return "breakpoints";
    case IndexKind::bands:
      return "bands";
    case IndexKind::formula:
      return "formula";
  }
  return "?";
}

const char* to_string(IndexStatistic s) {
  switch (s) {
    case IndexStatistic::hourly:
      return "hourly";
    case IndexStatistic::running_mean:
      return "running_mean";
    case IndexStatistic::daily_mean:
      return "daily_mean";
    case IndexStatistic::daily_max_1h:
      return "daily_max_1h";
    case IndexStatistic::daily_max_8h:
      return "daily_max_8h";
    case IndexStatistic::daily_max_8h_ozone:
      return "daily_max_8h_ozone";
  }
  return "?";
}

const IndexCategory* AirIndex::category_of(int index) const {
  for (const IndexCategory& c : categories) {
    if (index >= c.index_lo && index <= c.index_hi) return &c;
  }
  return nullptr;
}

const IndexScale* AirIndex::scale(std::string_view n) const {
  for (const IndexScale& s : scales) {
    if (s.name == n) return &s;
  }
  return nullptr;
}

namespace {

const std::vector<std::string> kHeadKeys = {"id",
                                            "name",
                                            "kind",
                                            "version",
                                            "reference_temperature_K",
                                            "reference_pressure_Pa",
                                            "beyond_name",
                                            "note"};
const std::vector<std::string> kSourceKeys = {"document", "version", "date", "url", "checked"};
const std::vector<std::string> kCategoryKeys = {
    "name",           "index",          "colour",          "colour_source",
    "groups_at_risk", "general_advice", "sensitive_advice", "checked"};
const std::vector<std::string> kScaleKeys = {
    "name", "pollutant", "statistic", "window_hours", "min_valid_hours", "unit",
    "truncate_decimals", "above_top", "rows", "checked"};
const std::vector<std::string> kFormulaKeys = {"numerator", "denominator", "window_hours",
                                               "min_valid_hours", "minimum", "checked"};
const std::vector<std::string> kTermKeys = {"pollutant", "unit", "coefficient", "checked"};

template <class E, std::size_t N>
E pick(const TomlTable& t, const std::string& key, const std::pair<const char*, E> (&all)[N]) {
  const std::string v = t.required_string(key);
  std::vector<std::string> names;
  for (const auto& [n, e] : all) {
    if (v == n) return e;
    names.emplace_back(n);
  }
  throw InputError(t.where(key), "\"" + v + "\"", "one of " + join(names) + did_you_mean(v, names));
}

bool is_colour(const std::string& c) {
  if (c.size() != 7 || c[0] != '#') return false;
  return std::all_of(c.begin() + 1, c.end(), [](char ch) { return std::isxdigit(ch) != 0; });
}

// [lo, hi] or [lo] for an open top.
void read_index_range(const TomlTable& t, IndexCategory& c) {
  const std::string expected = "[low, high] whole index values, or [low] for an open top";
  const auto v = t.number_array("index");
  if (!t.has("index")) t.throw_missing("index", expected);
  const bool whole = std::all_of(v.begin(), v.end(), [](double x) { return x == std::floor(x); });
  if (v.empty() || v.size() > 2 || !whole || (v.size() == 2 && v[1] < v[0])) {
    throw InputError(t.where("index"), "an index range of " + std::to_string(v.size()) + " values",
                     expected);
  }
  c.index_lo = static_cast<int>(v[0]);
  c.index_hi = v.size() == 2 ? static_cast<int>(v[1]) : kOpenTop;
}

IndexCategory read_category(const TomlTable& t) {
  IndexCategory c;
  c.name = t.required_string("name");
  read_index_range(t, c);
  if (!t.has("colour")) t.throw_missing("colour", "a colour \"#RRGGBB\"");
  c.colour = t.required_string("colour");
  if (!is_colour(c.colour)) {
    throw InputError(t.where("colour"), "\"" + c.colour + "\"", "a colour \"#RRGGBB\"");
  }
  c.colour_source = t.optional_string("colour_source").value_or("");
  c.groups_at_risk = t.required_string("groups_at_risk");
  c.general_advice = t.required_string("general_advice");
  c.sensitive_advice = t.required_string("sensitive_advice");
  return c;
}

void check_categories(const TomlTable& top, const std::vector<TomlTable>& tables,
                      const std::vector<IndexCategory>& cats) {
  if (cats.empty()) top.throw_missing("category", "[[category]] tables, one per category");
  for (std::size_t k = 1; k < cats.size(); ++k) {
    const IndexCategory& a = cats[k - 1];
    const IndexCategory& b = cats[k];
    const std::string found = "category \"" + b.name + "\" starts at " + std::to_string(b.index_lo) +
                              " after \"" + a.name + "\" ends at " +
                              (a.index_hi == kOpenTop ? "an open top" : std::to_string(a.index_hi));
    const std::string expected =
        "categories in rising order, each starting one index point above the previous one's end";
    if (a.index_hi == kOpenTop || b.index_lo <= a.index_hi) {
      throw InputError(tables[k].where("index"), "overlapping categories: " + found, expected);
    }
    if (b.index_lo > a.index_hi + 1) {
      throw InputError(tables[k].where("index"), "a gap between categories: " + found, expected);
    }
  }
}

std::vector<IndexRow> read_rows(const TomlTable& t, IndexKind kind) {
  const bool bp = kind == IndexKind::breakpoints;
  const std::string expected =
      bp ? "rows = [[C_lo, C_hi, I_lo, I_hi], ...], concentrations and whole index values"
         : "rows = [[C_lo, C_hi], ...], one band per category in rising order";
  const toml::node* n = t.node("rows");
  if (!n) t.throw_missing("rows", expected);
  const toml::array* a = n->as_array();
  if (!a || a->empty()) t.throw_wrong_type("rows", expected);
  std::vector<IndexRow> out;
  for (std::size_t k = 0; k < a->size(); ++k) {
    const toml::array* r = (*a)[k].as_array();
    std::vector<double> v;
    if (r) {
      for (const toml::node& x : *r) {
        if (auto d = x.value<double>(); d && std::isfinite(*d)) v.push_back(*d);
      }
    }
    const std::size_t want = bp ? 4 : 2;
    if (!r || v.size() != want || r->size() != want || v[1] < v[0] || v[0] < 0.0 ||
        (bp && (v[2] != std::floor(v[2]) || v[3] != std::floor(v[3]) || v[3] < v[2]))) {
      throw InputError(t.where("rows") + " row " + std::to_string(k + 1), "a malformed row",
                       expected);
    }
    IndexRow row{v[0], v[1], bp ? static_cast<int>(v[2]) : static_cast<int>(k) + 1,
                 bp ? static_cast<int>(v[3]) : static_cast<int>(k) + 1};
    out.push_back(row);
  }
  return out;
}

std::string num(double v) {
  std::ostringstream o;
  o << v;
  return o.str();
}

void check_rows(const TomlTable& t, const IndexScale& s, IndexKind kind) {
  const double step = s.truncate_decimals == -99 ? 0.0 : std::pow(10.0, -s.truncate_decimals);
  constexpr double eps = 1e-9;
  for (std::size_t k = 1; k < s.rows.size(); ++k) {
    const IndexRow& a = s.rows[k - 1];
    const IndexRow& b = s.rows[k];
    const double expected_lo = a.c_hi + (kind == IndexKind::breakpoints ? step : 0.0);
    const std::string where = t.where("rows") + " row " + std::to_string(k + 1);
    const std::string found = "starts at " + num(b.c_lo) + " " + s.unit + " after row " +
                              std::to_string(k) + " ends at " + num(a.c_hi);
    const std::string expected =
        kind == IndexKind::breakpoints
            ? "the next row to start one truncation step (" + num(step) + ") above " + num(a.c_hi)
            : "the next band to start where the previous one ends (" + num(a.c_hi) + ")";
    if (b.c_lo < expected_lo - eps) throw InputError(where, "overlapping bands: " + found, expected);
    if (b.c_lo > expected_lo + eps) throw InputError(where, "a gap between bands: " + found, expected);
    if (kind == IndexKind::breakpoints && b.i_lo != a.i_hi + 1) {
      throw InputError(where, "index " + std::to_string(b.i_lo) + " after " + std::to_string(a.i_hi),
                       "index values continuing one point above the previous row");
    }
  }
}

IndexScale read_scale(const TomlTable& t, const AirIndex& ix) {
  IndexScale s;
  s.where = t.location();
  s.name = t.required_string("name");
  s.pollutant = t.required_string("pollutant");
  pollutant_or_throw(s.pollutant, t.where("pollutant"));
  static const std::pair<const char*, IndexStatistic> kStats[] = {
      {"hourly", IndexStatistic::hourly},
      {"running_mean", IndexStatistic::running_mean},
      {"daily_mean", IndexStatistic::daily_mean},
      {"daily_max_1h", IndexStatistic::daily_max_1h},
      {"daily_max_8h", IndexStatistic::daily_max_8h},
      {"daily_max_8h_ozone", IndexStatistic::daily_max_8h_ozone}};
  s.statistic = pick(t, "statistic", kStats);
  const bool hourly_kind =
      s.statistic == IndexStatistic::hourly || s.statistic == IndexStatistic::running_mean;
  if (hourly_kind != (ix.kind == IndexKind::bands)) {
    throw InputError(t.where("statistic"), std::string("\"") + to_string(s.statistic) + "\"",
                     ix.kind == IndexKind::bands
                         ? "hourly or running_mean for a bands index"
                         : "daily_mean, daily_max_1h, daily_max_8h or daily_max_8h_ozone");
  }
  if (s.statistic == IndexStatistic::running_mean) {
    s.window_h = t.required_whole_number("window_hours", 1, 8784);
    s.min_valid_h = t.required_whole_number("min_valid_hours", 1, s.window_h);
  }
  s.unit = t.required_string("unit");
  // The unit is checked now, against the pollutant, so a bad file fails before any run; reports
  // write it in its canonical spelling ("ug m-3").
  s.unit = parse_concentration_unit(s.unit, pollutant_or_throw(s.pollutant, t.where("pollutant")).molar_mass_g_mol,
                                    ix.reference, t.where("unit"))
               .canonical;
  if (ix.kind == IndexKind::breakpoints) {
    s.truncate_decimals = t.required_whole_number("truncate_decimals", -3, 6);
    static const std::pair<const char*, AboveTop> kAbove[] = {
        {"extrapolate", AboveTop::extrapolate},
        {"undefined", AboveTop::undefined},
        {"hold_at_top", AboveTop::hold_at_top}};
    s.above_top = pick(t, "above_top", kAbove);
  }
  s.rows = read_rows(t, ix.kind);
  if (ix.kind == IndexKind::bands && s.rows.size() != ix.categories.size()) {
    throw InputError(t.where("rows"), std::to_string(s.rows.size()) + " bands",
                     "one band per category (" + std::to_string(ix.categories.size()) + ")");
  }
  check_rows(t, s, ix.kind);
  return s;
}

void read_formula(const TomlTable& top, AirIndex& ix) {
  const auto f = top.optional_table("formula", kFormulaKeys);
  if (!f) top.throw_missing("formula", "a [formula] table for a formula index");
  ix.numerator = f->required_number("numerator");
  ix.denominator = f->required_number("denominator");
  if (!(ix.denominator > 0.0)) {
    throw InputError(f->where("denominator"), num(ix.denominator), "a positive number");
  }
  ix.window_h = f->required_whole_number("window_hours", 1, 168);
  ix.min_valid_h = f->required_whole_number("min_valid_hours", 1, ix.window_h);
  ix.minimum = f->optional_whole_number("minimum", 0, 1000).value_or(0);
  for (const TomlTable& t : top.array_of_tables("term", kTermKeys, "[[term]] tables")) {
    FormulaTerm term{t.required_string("pollutant"), t.required_string("unit"),
                     t.required_number("coefficient")};
    pollutant_or_throw(term.pollutant, t.where("pollutant"));
    unit_factor(term.unit, term.unit, term.pollutant, ix.reference, t.where("unit"));
    ix.terms.push_back(term);
  }
  if (ix.terms.empty()) top.throw_missing("term", "[[term]] tables, one per pollutant");
}

void read_head(const TomlTable& top, AirIndex& ix) {
  const auto h = top.optional_table("index", kHeadKeys);
  if (!h) top.throw_missing("index", "an [index] table with id, name, kind and version");
  ix.id = h->required_string("id");
  ix.name = h->required_string("name");
  static const std::pair<const char*, IndexKind> kKinds[] = {{"breakpoints", IndexKind::breakpoints},
                                                             {"bands", IndexKind::bands},
                                                             {"formula", IndexKind::formula}};
  ix.kind = pick(*h, "kind", kKinds);
  ix.version = h->required_string("version");
  ix.reference.temperature_K = h->required_number("reference_temperature_K");
  ix.reference.pressure_Pa = h->required_number("reference_pressure_Pa");
  ix.beyond_name = h->optional_string("beyond_name").value_or("");
}

}  // namespace

AirIndex parse_air_index(std::string_view toml_text, std::string_view path) {
  const TomlDocument doc(toml_text, std::string(path));
  const TomlTable top(doc, {"index", "source", "category", "scale", "formula", "term"});
  AirIndex ix;
  ix.path = path;
  read_head(top, ix);
  for (const TomlTable& t : top.array_of_tables("source", kSourceKeys, "[[source]] tables")) {
    ix.sources.push_back(IndexSource{t.required_string("document"), t.required_string("version"),
                                     t.required_string("date"),
                                     t.optional_string("url").value_or(""),
                                     t.required_string("checked")});
  }
  if (ix.sources.empty()) top.throw_missing("source", "[[source]] tables naming the documents");
  const auto cat_tables = top.array_of_tables("category", kCategoryKeys, "[[category]] tables");
  for (const TomlTable& t : cat_tables) ix.categories.push_back(read_category(t));
  check_categories(top, cat_tables, ix.categories);
  if (ix.kind == IndexKind::formula) {
    read_formula(top, ix);
    if (top.has("scale")) {
      throw InputError(top.where("scale"), "[[scale]] tables in a formula index", "[[term]] tables");
    }
    return ix;
  }
  if (top.has("formula") || top.has("term")) {
    throw InputError(top.where(top.has("formula") ? "formula" : "term"),
                     std::string("a formula in a ") + to_string(ix.kind) + " index",
                     "[[scale]] tables");
  }
  for (const TomlTable& t : top.array_of_tables("scale", kScaleKeys, "[[scale]] tables")) {
    IndexScale s = read_scale(t, ix);
    if (ix.scale(s.name)) {
      throw InputError(t.where("name"), "scale \"" + s.name + "\" twice", "each scale once");
    }
    ix.scales.push_back(std::move(s));
  }
  if (ix.scales.empty()) top.throw_missing("scale", "[[scale]] tables, one per input");
  return ix;
}

AirIndex load_air_index_file(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path.string(), "cannot be read", "a readable index TOML file");
  std::ostringstream text;
  text << in.rdbuf();
  return parse_air_index(text.str(), path.string());
}

std::filesystem::path indices_directory() { return data_dir("indices"); }

std::vector<std::string> list_air_indices(const std::filesystem::path& dir) {
  return data_file_ids(dir);
}

AirIndex load_air_index(std::string_view id_or_path) {
  const std::string s(id_or_path);
  if (names_a_data_file(s)) return load_air_index_file(s);
  const auto dir = indices_directory();
  const auto file = dir / (s + ".toml");
  if (!std::filesystem::exists(file)) {
    const auto ids = list_air_indices(dir);
    throw InputError("index \"" + s + "\"", "not found in lidbox data: indices/",
                     "one of " + join(ids) + " or the path of an index file" + did_you_mean(s, ids));
  }
  AirIndex ix = load_air_index_file(file);
  if (auto label = shipped_data_label(file, "indices")) ix.path = *label;
  return ix;
}

const AirIndex& shipped_air_index(std::string_view id) {
  static std::mutex m;
  static std::map<std::string, AirIndex, std::less<>> cache;
  const std::lock_guard<std::mutex> lock(m);
  auto it = cache.find(id);
  if (it == cache.end()) it = cache.emplace(std::string(id), load_air_index(id)).first;
  return it->second;
}

// ---------------------------------------------------------------- banded index

int band_level(const IndexScale& scale, double c) {
  if (std::isnan(c) || c < 0.0) return 0;
  for (const IndexRow& r : scale.rows) {
    if (c <= r.c_hi) return r.i_lo;
  }
  return scale.rows.back().i_lo;
}

std::vector<BandedHour> hourly_banded_index(const NamedSeries& series, const AirIndex& index) {
  std::map<UtcSeconds, BandedHour> hours;
  for (const IndexScale& sc : index.scales) {
    const auto it = series.find(sc.pollutant);
    if (it == series.end() || it->second.size() == 0) continue;
    const HourlySeries& s = it->second;
    const double f = unit_factor(s.unit, sc.unit, sc.pollutant, index.reference,
                                 index.id + " input " + sc.name + " [" + s.unit + "]");
    auto add = [&](UtcSeconds hour_start, double v) {
      const int level = band_level(sc, v * f);
      if (level == 0) return;
      BandedHour& h = hours[hour_start];
      h.hour_start_utc = hour_start;
      h.inputs.push_back(BandedInput{sc.name, v * f, level});
    };
    if (sc.statistic == IndexStatistic::hourly) {
      for (std::size_t i = 0; i < s.size(); ++i) add(s.hour_start(i), s.values[i]);
    } else {
      // Trailing means: the window ending with hour i starts window_h - 1 hours earlier.
      const RunningMeans rm =
          running_means(s, sc.window_h, sc.min_valid_h, WindowSpan::reaching_into_series);
      for (std::size_t i = 0; i < rm.size(); ++i) {
        const UtcSeconds last_hour = rm.window_end_utc(i) - kSecondsPerHour;
        if (last_hour >= s.first_hour_start_utc && last_hour <= s.hour_start(s.size() - 1))
          add(last_hour, rm.mean[i]);
      }
    }
  }
  std::vector<BandedHour> out;
  out.reserve(hours.size());
  for (auto& [t, h] : hours) {
    const BandedInput* worst = &h.inputs.front();
    for (const BandedInput& in : h.inputs) {
      if (in.level > worst->level) worst = &in;
    }
    h.level = worst->level;
    h.responsible = worst->scale;
    h.category = index.categories.at(static_cast<std::size_t>(h.level - 1)).name;
    out.push_back(std::move(h));
  }
  return out;
}

}  // namespace lidbox
