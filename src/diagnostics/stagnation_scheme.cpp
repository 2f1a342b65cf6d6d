#include "lidbox/diagnostics/stagnation_scheme.hpp"

#include <algorithm>
#include <filesystem>

#include "lidbox/base/data_dir.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"
#include "lidbox/base/units.hpp"

namespace lidbox {

const std::array<const char*, kDiagnosticFields>& diagnostic_field_names() {
  static const std::array<const char*, kDiagnosticFields> names = {
      "mixing_height",    "wind_10m",         "wind_500hPa",   "precipitation",
      "geostrophic_wind", "mixed_layer_wind", "transport_wind"};
  return names;
}

const char* to_string(DiagnosticField f) {
  return diagnostic_field_names()[static_cast<std::size_t>(f)];
}

const char* si_unit(DiagnosticField f) {
  return f == DiagnosticField::mixing_height || f == DiagnosticField::precipitation ? "m" : "m/s";
}

namespace {
const std::array<const char*, 6> kStatisticNames = {"mean", "min",         "max",
                                                    "sum",  "morning_max", "afternoon_max"};
}

const char* to_string(DailyStatistic s) {
  return kStatisticNames[static_cast<std::size_t>(s)];
}

std::vector<DiagnosticField> StagnationScheme::fields() const {
  std::vector<DiagnosticField> out;
  for (const auto& c : criteria) {
    if (std::find(out.begin(), out.end(), c.field) == out.end()) out.push_back(c.field);
  }
  std::sort(out.begin(), out.end());
  return out;
}

namespace {

template <typename Enum, std::size_t N>
Enum parse_name(const TomlTable& t, const std::string& key,
                const std::array<const char*, N>& names) {
  const std::string s = t.required_string(key);
  std::vector<std::string> all(names.begin(), names.end());
  for (std::size_t k = 0; k < N; ++k) {
    if (s == names[k]) return static_cast<Enum>(k);
  }
  throw InputError(t.where(key), "\"" + s + "\"", "one of " + join(all) + did_you_mean(s, all));
}

StagnationCriterion parse_criterion(const TomlTable& ct) {
  StagnationCriterion c;
  c.field = parse_name<DiagnosticField>(ct, "field", diagnostic_field_names());
  c.statistic = parse_name<DailyStatistic>(ct, "statistic", kStatisticNames);
  const bool below = ct.has("below");
  const bool at_most = ct.has("at_most");
  if (below == at_most) {
    if (below)
      throw InputError(ct.where("at_most"), "both below and at_most",
                       "one threshold per criterion");
    ct.throw_missing("below", std::string("a quantity string such as \"3.2 m/s\" (or at_most)"));
  }
  const std::string key = below ? "below" : "at_most";
  const std::string unit = si_unit(c.field);
  c.threshold_si = ct.required_quantity(key, unit, unit == "m" ? "length" : "speed");
  c.inclusive = at_most;
  const auto text = ct.optional_quantity_text(key, "quantity", "\"3.2 m/s\"");
  c.text = std::string(to_string(c.statistic)) + " " + to_string(c.field) +
           (at_most ? " <= " : " < ") +
           (text ? text->text : format_number(c.threshold_si) + " " + unit);
  return c;
}


}  // namespace

StagnationScheme parse_stagnation_scheme(std::string_view text, const std::string& file) {
  const TomlDocument doc(text, file);
  const TomlTable top(doc, {"id", "title", "source", "checked", "episode_min_days", "criterion"});
  StagnationScheme s;
  s.id = top.required_string("id");
  s.title = top.required_string("title");
  s.source = top.required_string("source");
  s.checked = top.required_string("checked");
  s.path = file;
  s.episode_min_days = top.required_whole_number("episode_min_days", 1, 30);
  for (const auto& ct :
       top.array_of_tables("criterion", {"field", "statistic", "below", "at_most"},
                           "[[criterion]] tables with field, statistic and a threshold")) {
    s.criteria.push_back(parse_criterion(ct));
  }
  if (s.criteria.empty()) top.throw_missing("criterion", "at least one [[criterion]] table");
  return s;
}

std::vector<std::string> shipped_stagnation_schemes() {
  return data_file_ids(data_dir("stagnation"));
}

StagnationScheme load_stagnation_scheme(std::string_view id_or_path) {
  const std::string s(id_or_path);
  if (names_a_data_file(s)) return parse_stagnation_scheme(read_text_file(s, s), s);
  const auto file = data_dir("stagnation") / (s + ".toml");
  if (!std::filesystem::exists(file)) {
    const auto ids = shipped_stagnation_schemes();
    throw InputError("stagnation scheme \"" + s + "\"", "not a shipped scheme",
                     "one of " + join(ids) + " or a path to a TOML file" + did_you_mean(s, ids));
  }
  const std::string label = shipped_data_label(file, "stagnation").value_or(file.string());
  return parse_stagnation_scheme(read_text_file(file.string(), label), label);
}

}  // namespace lidbox
