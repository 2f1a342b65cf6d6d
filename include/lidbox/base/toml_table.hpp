// One reader for every TOML data file lidbox reads (case files, rule sets, and whatever data
// file comes next): TOML v1.0.0 (https://toml.io/en/v1.0.0) through toml++ 3.
//
// A table is read through a TomlTable that knows its file, its place in the document and the
// keys it allows, so that every message has one shape (error.hpp):
//   where(key)        "<file>:<line>: <table> <key>"   the line of the key
//   where_table()     "<file>:<line>: <table>"         the line of the table
// where <table> is "(top level)", "[airshed]", "[pollutants.NO2.background]" or, for an element
// of an array of tables, "[[limit]]".
//
// The messages for the mistakes every file shares:
//   unknown key   c.toml:12: [airshed]: unknown key "x_sid"; expected one of x_side, y_side,
//                 x_side_bearing (did you mean "x_side"?)
//                 (the hint as for every unknown name, text.hpp's did_you_mean)
//   missing key   c.toml:8: [met]: no "file"; expected a string in quotes
//   wrong type    r.toml:15: [[limit]] level: a string; expected a plain number (no unit)
//   out of range  c.toml:9: [met] max_gap_hours: 49; expected a whole number from 0 to 48
//   TOML syntax   c.toml:3: TOML syntax error: <toml++'s description>; expected valid TOML
//                 (toml.io v1.0.0)
// The "expected" part for a key is the same whether the key is missing or has the wrong type.
//
// Quantities are strings with their unit ("16 km", "0.5 m/s", "3 day"), converted to the unit
// the caller names through UDUNITS-2 (units.hpp); directions ("90 deg", "0.5 rad") to degrees.
// A bare number where a quantity belongs is an error: the unit is never guessed.
#pragma once

#include <toml++/toml.h>

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace lidbox {

// The text of a TOML document parsed; a syntax error is an InputError at its line. TomlTables
// point into the document, so it must outlive them.
class TomlDocument {
 public:
  TomlDocument(std::string_view text, std::string file);
  TomlDocument(const TomlDocument&) = delete;
  TomlDocument& operator=(const TomlDocument&) = delete;

  [[nodiscard]] const toml::table& root() const { return root_; }
  [[nodiscard]] const std::string& file() const { return file_; }

 private:
  std::string file_;
  toml::table root_;
};

// A quantity string split, its unit not yet interpreted ("0.2 ppb" -> 0.2, "ppb").
struct QuantityText {
  double number = 0.0;
  std::string unit;
  std::string text;  // as written, for messages
};

// "16 km" -> {16, "km"}; nullopt when the text does not start with a finite decimal number.
std::optional<QuantityText> split_quantity(std::string_view text);

// What a TOML value is, with its article, for the "found" part of a message: "a string",
// "an integer", "a number" (a float), "a boolean", "an array", "a table", "a date or time".
std::string describe_toml_value(const toml::node& value);

// One table of a document. Its keys are checked when it is made, before any value is read, so
// a misspelt key is reported as unknown rather than as the missing key it was meant to be.
// Sub-tables are named by their TOML path; a key that is not bare is quoted as the file must
// write it: [pollutants."PM2.5"].
class TomlTable {
 public:
  // The top level of `doc`; every key must be one of `keys`.
  TomlTable(const TomlDocument& doc, std::vector<std::string> keys);
  TomlTable(const TomlDocument&& doc, std::vector<std::string> keys) = delete;  // would dangle

  [[nodiscard]] std::string where(const std::string& key) const;
  [[nodiscard]] std::string where_table() const;
  // "<file>:<line>" of the table, without its name (a rule's location in reports).
  [[nodiscard]] std::string location() const;
  // "(top level)", "[met]", "[[limit]]".
  [[nodiscard]] std::string name() const;

  [[nodiscard]] bool has(const std::string& key) const;
  // The raw value (nullptr when absent), for keys that take more than one type.
  [[nodiscard]] const toml::node* node(const std::string& key) const;

  // Throws the missing-key message: "<where_table>: no "<key>"; expected <expected>".
  [[noreturn]] void throw_missing(const std::string& key, const std::string& expected) const;
  // Throws the wrong-type message: "<where(key)>: <describe_toml_value>; expected <expected>".
  [[noreturn]] void throw_wrong_type(const std::string& key, const std::string& expected) const;

  // Strings; expected "a string in quotes".
  [[nodiscard]] std::string required_string(const std::string& key) const;
  [[nodiscard]] std::optional<std::string> optional_string(const std::string& key) const;
  // true or false.
  [[nodiscard]] std::optional<bool> optional_bool(const std::string& key) const;
  // A plain number without a unit (integer or float), finite.
  [[nodiscard]] double required_number(const std::string& key) const;
  [[nodiscard]] std::optional<double> optional_number(const std::string& key) const;
  // A TOML integer from min_value to max_value (both inclusive). A value outside the range, or
  // outside int (such as 2^32 + 1), is an error, never wrapped.
  [[nodiscard]] int required_whole_number(const std::string& key, int min_value,
                                          int max_value) const;
  [[nodiscard]] std::optional<int> optional_whole_number(const std::string& key, int min_value,
                                                         int max_value) const;
  // A quantity string converted to `si_unit` ("m", "m/s", "s", "1/s", "K", "Pa", "g/mol", or
  // "degree" for directions). `quantity` words the message ("length", "speed", "time").
  [[nodiscard]] double required_quantity(const std::string& key, const std::string& si_unit,
                                         const std::string& quantity) const;
  [[nodiscard]] std::optional<double> optional_quantity(const std::string& key,
                                                        const std::string& si_unit,
                                                        const std::string& quantity) const;
  // A quantity string split but its unit left to the caller (a concentration whose unit needs
  // a molar mass, a rate that may be a total or an area flux). `quantity` and `example` word
  // the message: "a concentration with its unit in quotes, such as "0.2 ppb"".
  [[nodiscard]] std::optional<QuantityText> optional_quantity_text(
      const std::string& key, const std::string& quantity, const std::string& example) const;
  // Arrays; an absent key gives an empty array. Numbers must be finite.
  [[nodiscard]] std::vector<double> number_array(const std::string& key) const;
  [[nodiscard]] std::vector<std::string> string_array(const std::string& key) const;

  // Sub-tables, named after their path ("[met.footprint]"). An open table has key names chosen
  // by the user ([pollutants] holds [pollutants.NAME]) and no key check.
  [[nodiscard]] std::optional<TomlTable> optional_table(const std::string& key,
                                                        std::vector<std::string> keys) const;
  [[nodiscard]] std::optional<TomlTable> optional_open_table(const std::string& key) const;
  // The names of the sub-tables of this table in the order the file has them (toml++ keeps keys
  // sorted); any value that is not a table is an error.
  [[nodiscard]] std::vector<std::string> table_names_in_order() const;
  // The elements of an array of tables ([[limit]], or an inline array of inline tables), each
  // named "[[<path>]]"; absent: none. An empty array or an element that is not a table is an
  // error with `expected` as its expected part.
  [[nodiscard]] std::vector<TomlTable> array_of_tables(const std::string& key,
                                                       const std::vector<std::string>& keys,
                                                       const std::string& expected) const;

 private:
  TomlTable(const toml::table& table, std::string file, std::string path, bool element,
            std::optional<std::vector<std::string>> keys);
  void check_keys() const;
  [[nodiscard]] std::string child_path(const std::string& key) const;

  const toml::table* table_;
  std::string file_;
  std::string path_;      // dotted TOML path, "" for the top level
  bool element_ = false;  // an element of an array of tables
  std::optional<std::vector<std::string>> keys_;
};

}  // namespace lidbox
