#include "lidbox/base/toml_table.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdint>
#include <limits>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/units.hpp"

namespace lidbox {

namespace {

std::string line_of(const toml::node& n) {
  return std::to_string(n.source().begin.line);
}

std::string a_or_an(const std::string& word) {
  const bool vowel = !word.empty() && std::string("aeiou").find(word.front()) != std::string::npos;
  return (vowel ? "an " : "a ") + word;
}

// A TOML bare key (A-Za-z0-9_-) stays as it is; any other is quoted, as the file must have it:
// [pollutants."PM2.5"].
std::string path_key(const std::string& key) {
  const bool bare = !key.empty() && std::all_of(key.begin(), key.end(), [](char c) {
    return std::isalnum(static_cast<unsigned char>(c)) || c == '_' || c == '-';
  });
  return bare ? key : "\"" + key + "\"";
}

std::string example_of(const std::string& si_unit) {
  if (si_unit == "m") return "500 m";
  if (si_unit == "m/s") return "0.5 m/s";
  if (si_unit == "s") return "3 day";
  if (si_unit == "degree") return "90 deg";
  return "1 " + si_unit;
}

std::string with_unit_expected(const std::string& quantity, const std::string& example) {
  return a_or_an(quantity) + " with its unit in quotes, such as \"" + example + "\"";
}

std::string whole_number_expected(int min_value, int max_value) {
  return "a whole number from " + std::to_string(min_value) + " to " + std::to_string(max_value);
}

std::string number_text(double v) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  return format_number(v);
}

}  // namespace

TomlDocument::TomlDocument(std::string_view text, std::string file) : file_(std::move(file)) {
  try {
    root_ = toml::parse(text, file_);
  } catch (const toml::parse_error& e) {
    throw InputError(file_ + ":" + std::to_string(e.source().begin.line),
                     "TOML syntax error: " + std::string(e.description()),
                     "valid TOML (toml.io v1.0.0)");
  }
}

std::optional<QuantityText> split_quantity(std::string_view text) {
  const std::string s(trim(text));
  // The longest prefix that can belong to a decimal number: digits, point, signs, and an
  // exponent letter only where a digit or sign follows it ("2e-3 s").
  std::size_t i = 0;
  auto exponent_at = [&s](std::size_t k) {
    return (s[k] == 'e' || s[k] == 'E') && k > 0 && k + 1 < s.size() &&
           (std::isdigit(static_cast<unsigned char>(s[k + 1])) || s[k + 1] == '-' ||
            s[k + 1] == '+');
  };
  while (i < s.size() && (std::isdigit(static_cast<unsigned char>(s[i])) || s[i] == '.' ||
                          s[i] == '-' || s[i] == '+' || exponent_at(i))) {
    ++i;
  }
  QuantityText q;
  if (i == 0 || !parse_double(s.substr(0, i), q.number)) return std::nullopt;
  q.unit = std::string(trim(std::string_view(s).substr(i)));
  q.text = s;
  return q;
}

std::string describe_toml_value(const toml::node& value) {
  switch (value.type()) {
    case toml::node_type::string:
      return "a string";
    case toml::node_type::integer:
      return "an integer";
    case toml::node_type::floating_point:
      return "a number";
    case toml::node_type::boolean:
      return "a boolean";
    case toml::node_type::array:
      return "an array";
    case toml::node_type::table:
      return "a table";
    default:
      return "a date or time";
  }
}

TomlTable::TomlTable(const toml::table& table, std::string file, std::string path, bool element,
                     std::optional<std::vector<std::string>> keys)
    : table_(&table),
      file_(std::move(file)),
      path_(std::move(path)),
      element_(element),
      keys_(std::move(keys)) {
  check_keys();
}

TomlTable::TomlTable(const TomlDocument& doc, std::vector<std::string> keys)
    : TomlTable(doc.root(), doc.file(), "", false, std::move(keys)) {}

void TomlTable::check_keys() const {
  if (!keys_) return;
  for (auto&& [k, v] : *table_) {
    const std::string key(k.str());
    if (std::find(keys_->begin(), keys_->end(), key) != keys_->end()) continue;
    throw InputError(file_ + ":" + line_of(v) + ": " + name(), "unknown key \"" + key + "\"",
                     keys_->empty() ? std::string("no keys here")
                                    : "one of " + join(*keys_) + did_you_mean(key, *keys_));
  }
}

std::string TomlTable::child_path(const std::string& key) const {
  return path_.empty() ? path_key(key) : path_ + "." + path_key(key);
}

std::string TomlTable::name() const {
  if (path_.empty()) return "(top level)";
  return element_ ? "[[" + path_ + "]]" : "[" + path_ + "]";
}

std::string TomlTable::location() const {
  return file_ + ":" + line_of(*table_);
}

std::string TomlTable::where_table() const {
  return location() + ": " + name();
}

std::string TomlTable::where(const std::string& key) const {
  const toml::node* n = node(key);
  return file_ + ":" + line_of(n ? *n : *table_) + ": " + name() + " " + key;
}

bool TomlTable::has(const std::string& key) const {
  return node(key) != nullptr;
}

const toml::node* TomlTable::node(const std::string& key) const {
  return table_->get(key);
}

void TomlTable::throw_missing(const std::string& key, const std::string& expected) const {
  throw InputError(where_table(), "no \"" + key + "\"", expected);
}

void TomlTable::throw_wrong_type(const std::string& key, const std::string& expected) const {
  const toml::node* n = node(key);
  throw InputError(where(key), n ? describe_toml_value(*n) : "nothing", expected);
}

std::optional<std::string> TomlTable::optional_string(const std::string& key) const {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  if (!n->is_string()) throw_wrong_type(key, "a string in quotes");
  return std::string(n->as_string()->get());
}

std::string TomlTable::required_string(const std::string& key) const {
  auto s = optional_string(key);
  if (!s) throw_missing(key, "a string in quotes");
  return *s;
}

std::optional<bool> TomlTable::optional_bool(const std::string& key) const {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  if (!n->is_boolean()) throw_wrong_type(key, "true or false");
  return n->as_boolean()->get();
}

std::optional<double> TomlTable::optional_number(const std::string& key) const {
  const char* expected = "a plain number (no unit)";
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  if (n->is_integer()) return static_cast<double>(n->as_integer()->get());
  if (!n->is_floating_point()) throw_wrong_type(key, expected);
  const double v = n->as_floating_point()->get();
  // TOML allows inf and nan; no value lidbox reads means either.
  if (!std::isfinite(v)) throw InputError(where(key), number_text(v), "a finite number");
  return v;
}

double TomlTable::required_number(const std::string& key) const {
  const auto v = optional_number(key);
  if (!v) throw_missing(key, "a plain number (no unit)");
  return *v;
}

std::optional<int> TomlTable::optional_whole_number(const std::string& key, int min_value,
                                                    int max_value) const {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  const std::string expected = whole_number_expected(min_value, max_value);
  if (!n->is_integer()) throw_wrong_type(key, expected);
  // TOML integers are 64-bit: compared before narrowing, so 2^32 + 1 is refused, not wrapped.
  const std::int64_t v = n->as_integer()->get();
  if (v < min_value || v > max_value) throw InputError(where(key), std::to_string(v), expected);
  return static_cast<int>(v);
}

int TomlTable::required_whole_number(const std::string& key, int min_value, int max_value) const {
  const auto v = optional_whole_number(key, min_value, max_value);
  if (!v) throw_missing(key, whole_number_expected(min_value, max_value));
  return *v;
}

std::optional<QuantityText> TomlTable::optional_quantity_text(const std::string& key,
                                                              const std::string& quantity,
                                                              const std::string& example) const {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  const std::string expected = with_unit_expected(quantity, example);
  if (n->is_number()) throw InputError(where(key), "a number without a unit", expected);
  if (!n->is_string()) throw_wrong_type(key, expected);
  const std::string text(n->as_string()->get());
  auto q = split_quantity(text);
  if (!q) {
    throw InputError(where(key), "\"" + text + "\" does not start with a number",
                     a_or_an(quantity) + " such as \"" + example + "\"");
  }
  return q;
}

std::optional<double> TomlTable::optional_quantity(const std::string& key,
                                                   const std::string& si_unit,
                                                   const std::string& quantity) const {
  const auto q = optional_quantity_text(key, quantity, example_of(si_unit));
  if (!q) return std::nullopt;
  // UDUNITS treats angles as dimensionless (units.hpp), so directions have their own check.
  if (si_unit == "degree") return direction_unit_to_degrees(q->unit, where(key))(q->number);
  return unit_conversion(q->unit, si_unit, quantity, where(key))(q->number);
}

double TomlTable::required_quantity(const std::string& key, const std::string& si_unit,
                                    const std::string& quantity) const {
  const auto v = optional_quantity(key, si_unit, quantity);
  if (!v) throw_missing(key, with_unit_expected(quantity, example_of(si_unit)));
  return *v;
}

std::vector<double> TomlTable::number_array(const std::string& key) const {
  const char* expected = "an array of plain numbers";
  const toml::node* n = node(key);
  if (!n) return {};
  if (!n->is_array()) throw_wrong_type(key, expected);
  std::vector<double> out;
  for (const toml::node& el : *n->as_array()) {
    const std::string element = "element " + std::to_string(out.size() + 1) + " is ";
    if (!el.is_number()) throw InputError(where(key), element + describe_toml_value(el), expected);
    const double v = el.is_integer() ? static_cast<double>(el.as_integer()->get())
                                     : el.as_floating_point()->get();
    if (!std::isfinite(v)) throw InputError(where(key), element + number_text(v), expected);
    out.push_back(v);
  }
  return out;
}

std::vector<std::string> TomlTable::string_array(const std::string& key) const {
  const char* expected = "an array of strings in quotes";
  const toml::node* n = node(key);
  if (!n) return {};
  if (!n->is_array()) throw_wrong_type(key, expected);
  std::vector<std::string> out;
  for (const toml::node& el : *n->as_array()) {
    if (!el.is_string()) {
      throw InputError(
          where(key),
          "element " + std::to_string(out.size() + 1) + " is " + describe_toml_value(el), expected);
    }
    out.emplace_back(el.as_string()->get());
  }
  return out;
}

std::optional<TomlTable> TomlTable::optional_table(const std::string& key,
                                                   std::vector<std::string> keys) const {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  if (!n->is_table()) throw_wrong_type(key, "a table");
  return TomlTable(*n->as_table(), file_, child_path(key), false, std::move(keys));
}

std::optional<TomlTable> TomlTable::optional_open_table(const std::string& key) const {
  const toml::node* n = node(key);
  if (!n) return std::nullopt;
  if (!n->is_table()) throw_wrong_type(key, "a table");
  return TomlTable(*n->as_table(), file_, child_path(key), false, std::nullopt);
}

std::vector<std::string> TomlTable::table_names_in_order() const {
  std::vector<std::pair<std::string, const toml::node*>> entries;
  for (auto&& [k, v] : *table_) {
    const std::string key(k.str());
    if (!v.is_table()) throw_wrong_type(key, "a table [" + child_path(key) + "]");
    entries.emplace_back(key, &v);
  }
  std::stable_sort(entries.begin(), entries.end(), [](const auto& a, const auto& b) {
    return a.second->source().begin < b.second->source().begin;
  });
  std::vector<std::string> out;
  for (const auto& e : entries) out.push_back(e.first);
  return out;
}

std::vector<TomlTable> TomlTable::array_of_tables(const std::string& key,
                                                  const std::vector<std::string>& keys,
                                                  const std::string& expected) const {
  const toml::node* n = node(key);
  if (!n) return {};
  if (!n->is_array()) throw_wrong_type(key, expected);
  const toml::array& arr = *n->as_array();
  if (arr.empty()) throw InputError(where(key), "an empty array", expected);
  std::vector<TomlTable> out;
  for (const toml::node& el : arr) {
    if (!el.is_table()) {
      throw InputError(
          where(key),
          "element " + std::to_string(out.size() + 1) + " is " + describe_toml_value(el), expected);
    }
    out.push_back(TomlTable(*el.as_table(), file_, child_path(key), true, keys));
  }
  return out;
}

}  // namespace lidbox
