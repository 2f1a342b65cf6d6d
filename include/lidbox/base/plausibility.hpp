// One plausibility range per input quantity, the same whatever reader delivers the value (CSV
// met, NetCDF met, the case file, monitor CSV). A value outside its range is an InputError naming
// the place (file and line, or variable and record), the quantity, the value and the range:
//
//   met.csv:14: column "mixing_height [m]": mixing height 1e+300 m is outside the plausible
//   range 0 to 10000 m (common practice, no source); expected a value in that range, or set
//   [plausibility] mixing_height in the case file
//
// The ranges are deliberately wide: they catch missing-value codes (-999, 9999), unit mistakes
// by factors of 1000 and corrupt numbers, not unusual weather. Each range carries its source, or
// "common practice, no source" where that is the truth. Units are SI as in the engine, except the
// monitor ranges, which are in ug/m3 (a mole fraction is compared through its unit's factor).
//
// A case file overrides any range in its [plausibility] table, as two quantity strings:
//   [plausibility]
//   mixing_height = ["0 m", "12 km"]
// Unknown keys get toml_table's message with the list of keys.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace lidbox {

struct PlausibleRange {
  std::string key;       // the [plausibility] key, e.g. "mixing_height"
  std::string label;     // words for messages, e.g. "mixing height"
  std::string unit;      // the unit of min and max, as UDUNITS reads it ("m", "m/s", "g/s")
  std::string quantity;  // UDUNITS quantity words for the override's unit check ("length")
  double min = 0.0;
  double max = 0.0;
  std::string source;  // a published source, or "common practice, no source"
  // Inside [min, max]; NaN counts as inside (a missing value is the gap rule's business). Lets a
  // reader test a value before it builds the place a message would need.
  [[nodiscard]] bool admits(double v) const { return !(v < min || v > max); }
};

class PlausibilityLimits {
 public:
  // The shipped table (plausibility.cpp lists each range with its source).
  PlausibilityLimits();

  [[nodiscard]] const PlausibleRange& range(std::string_view key) const;
  [[nodiscard]] std::vector<std::string> keys() const;
  // Replaces a range (a case file's override); min <= max is checked by the caller's reader.
  void set(std::string_view key, double min, double max, const std::string& source);

  // InputError at `where` when value is NaN-free and outside the range of `key` (NaN passes: a
  // missing value is the gap rule's business). `shown` is the value as the input wrote it ("" to
  // format `value`), `shown_unit` the unit written beside it ("" when `shown` holds its unit);
  // the message adds the value in the range's unit when that differs.
  // `hint` ends the expected part; "" gives "change it in [plausibility] <key>".
  void check(std::string_view key, double value, const std::string& where,
             const std::string& shown = "", const std::string& shown_unit = "",
             const std::string& hint = "") const;
  // The message's "expected" part: "a <label> from <min> to <max> <unit> (<source>; <hint>)".
  [[nodiscard]] std::string expected(std::string_view key, const std::string& hint = "") const;

 private:
  std::vector<PlausibleRange> ranges_;
};

}  // namespace lidbox
