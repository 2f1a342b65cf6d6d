#include "lidbox/diagnostics/ventilation_table.hpp"

#include <algorithm>
#include <cmath>

#include "lidbox/base/data_dir.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"

namespace lidbox {

const char* to_string(VentilationStatistic s) {
  switch (s) {
    case VentilationStatistic::min:
      return "min";
    case VentilationStatistic::mean:
      return "mean";
    case VentilationStatistic::afternoon_max:
      return "afternoon_max";
  }
  return "?";
}

int VentilationTable::classify(double ventilation_m2_s) const {
  if (std::isnan(ventilation_m2_s)) return -1;
  const double v = in_table_unit(ventilation_m2_s);
  for (std::size_t k = 0; k < categories.size(); ++k) {
    const VentilationCategory& c = categories[k];
    if (!c.bound || (c.inclusive ? v <= *c.bound : v < *c.bound)) return static_cast<int>(k);
  }
  return static_cast<int>(categories.size()) - 1;
}

VentilationTable parse_ventilation_table(std::string_view text, const std::string& file) {
  const TomlDocument doc(text, file);
  const TomlTable top(
      doc, {"id", "title", "source", "checked", "unit", "statistic", "wind_note", "category"});
  VentilationTable t;
  t.id = top.required_string("id");
  t.title = top.required_string("title");
  t.source = top.required_string("source");
  t.checked = top.required_string("checked");
  t.unit = top.required_string("unit");
  t.wind_note = top.optional_string("wind_note").value_or("");
  t.path = file;
  t.from_m2_s =
      unit_conversion("m2/s", t.unit, "ventilation (length times speed)", top.where("unit"));
  const std::string stat = top.required_string("statistic");
  const std::vector<std::string> stats = {"min", "mean", "afternoon_max"};
  if (stat == "min") {
    t.statistic = VentilationStatistic::min;
  } else if (stat == "mean") {
    t.statistic = VentilationStatistic::mean;
  } else if (stat == "afternoon_max") {
    t.statistic = VentilationStatistic::afternoon_max;
  } else {
    throw InputError(top.where("statistic"), "\"" + stat + "\"",
                     "one of " + join(stats) + did_you_mean(stat, stats));
  }
  const auto cats = top.array_of_tables("category", {"name", "below", "at_most"},
                                        "[[category]] tables with a name and a bound");
  for (std::size_t k = 0; k < cats.size(); ++k) {
    const TomlTable& ct = cats[k];
    VentilationCategory c;
    c.name = ct.required_string("name");
    const auto below = ct.optional_number("below");
    const auto at_most = ct.optional_number("at_most");
    const bool last = k + 1 == cats.size();
    if (below && at_most) {
      throw InputError(ct.where("at_most"), "both below and at_most", "one bound per category");
    }
    if (last && (below || at_most)) {
      throw InputError(ct.where_table(), "a bound on the last category",
                       "no bound (it takes every value above)");
    }
    if (!last && !below && !at_most)
      ct.throw_missing("below", "a plain number in the table's unit (or at_most)");
    if (!last) {
      c.bound = below ? *below : *at_most;
      c.inclusive = static_cast<bool>(at_most);
      if (!t.categories.empty() && *c.bound <= *t.categories.back().bound) {
        throw InputError(
            ct.where(below ? "below" : "at_most"), format_number(*c.bound),
            "a bound above the previous category's " + format_number(*t.categories.back().bound));
      }
    }
    t.categories.push_back(c);
  }
  if (t.categories.size() < 2) {
    throw InputError(top.where_table(), std::to_string(t.categories.size()) + " category",
                     "at least two categories");
  }
  return t;
}


std::vector<std::string> shipped_ventilation_tables() {
  return data_file_ids(data_dir("ventilation"));
}

VentilationTable load_ventilation_table(std::string_view id_or_path) {
  const std::string s(id_or_path);
  if (names_a_data_file(s)) return parse_ventilation_table(read_text_file(s, s), s);
  const auto dir = data_dir("ventilation");
  const auto file = dir / (s + ".toml");
  if (!std::filesystem::exists(file)) {
    const auto ids = data_file_ids(dir);
    throw InputError("ventilation table \"" + s + "\"", "not a shipped table",
                     "one of " + join(ids) + " or a path to a TOML file" + did_you_mean(s, ids));
  }
  const std::string label = shipped_data_label(file, "ventilation").value_or(file.string());
  VentilationTable t = parse_ventilation_table(read_text_file(file.string(), label), label);
  return t;
}

}  // namespace lidbox
