#include "lidbox/met/csv_met.hpp"

#include <charconv>
#include <cmath>
#include <fstream>
#include <limits>
#include <sstream>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/units.hpp"

namespace lidbox {

void split_header(const std::string& header, std::string& name, std::string& unit) {
  const std::string h(trim(header));
  const auto open = h.find('[');
  const auto close = h.rfind(']');
  if (open == std::string::npos || close == std::string::npos || close < open) {
    name = h;
    unit.clear();
    return;
  }
  name = trim(h.substr(0, open));
  unit = trim(h.substr(open + 1, close - open - 1));
}

namespace {

enum class Role { time, mixing_height, wind_speed, wind_from, u, v, temperature, pressure, extra };

Role role_of(const std::string& name) {
  if (name == "time") return Role::time;
  if (name == "mixing_height") return Role::mixing_height;
  if (name == "wind_speed") return Role::wind_speed;
  if (name == "wind_from" || name == "wind_from_direction") return Role::wind_from;
  if (name == "eastward_wind") return Role::u;
  if (name == "northward_wind") return Role::v;
  if (name == "air_temperature") return Role::temperature;
  if (name == "surface_air_pressure") return Role::pressure;
  return Role::extra;
}

// The text's lines as views, split at \n with a \r before it dropped (as split_lines), numbered
// from 1; no copy of the file.
class Lines {
 public:
  explicit Lines(std::string_view text) : text_(text) {}
  bool next(std::string_view& line, int& number) {
    if (pos_ >= text_.size()) return false;
    std::size_t end = text_.find('\n', pos_);
    if (end == std::string_view::npos) end = text_.size();
    line = text_.substr(pos_, end - pos_);
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    pos_ = end + 1;
    number = ++number_;
    return true;
  }

 private:
  std::string_view text_;
  std::size_t pos_ = 0;
  int number_ = 0;
};

// A cell of plain decimal digits (an optional leading minus, at most one point) of up to 20
// characters: parsed with std::from_chars, which gives the same correctly rounded value as the
// strtod of parse_double; such a cell can neither overflow nor underflow. Anything else goes to
// parse_double, which decides.
bool parse_cell(std::string_view cell, double& value) {
  if (cell.size() <= 20) {
    bool plain = true;
    int points = 0;
    for (std::size_t i = 0; i < cell.size() && plain; ++i) {
      const char c = cell[i];
      if (c == '.') {
        ++points;
      } else if (!(c >= '0' && c <= '9') && !(c == '-' && i == 0)) {
        plain = false;
      }
    }
    if (plain && points <= 1) {
      const auto [end, ec] = std::from_chars(cell.data(), cell.data() + cell.size(), value);
      if (ec == std::errc() && end == cell.data() + cell.size()) return true;
    }
  }
  return parse_double(cell, value);
}

int two(std::string_view s, std::size_t at) {
  const char a = s[at], b = s[at + 1];
  if (a < '0' || a > '9' || b < '0' || b > '9') return -1;
  return (a - '0') * 10 + (b - '0');
}

// The common "YYYY-MM-DDTHH:MM:SSZ" of years 1900-2199, read without the general parser; false
// for anything else (or anything doubtful), which parse_iso8601 then reads or refuses.
bool quick_utc(std::string_view s, UtcSeconds& t) {
  if (s.size() != 20 || s[4] != '-' || s[7] != '-' || s[10] != 'T' || s[13] != ':' ||
      s[16] != ':' || s[19] != 'Z') {
    return false;
  }
  const int y1 = two(s, 0), y2 = two(s, 2), mo = two(s, 5), d = two(s, 8), h = two(s, 11),
            mi = two(s, 14), se = two(s, 17);
  if (y1 < 19 || y1 > 21 || y2 < 0 || mo < 1 || mo > 12 || d < 1 || h < 0 || h > 23 || mi < 0 ||
      mi > 59 || se < 0 || se > 59) {
    return false;
  }
  const int y = y1 * 100 + y2;
  static const int kDays[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  const bool leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
  if (d > kDays[mo - 1] + (mo == 2 && leap ? 1 : 0)) return false;
  t = days_from_civil(y, mo, d) * kSecondsPerDay + h * 3600 + mi * 60 + se;
  return true;
}

struct Column {
  Role role;
  std::string header;
  std::string name;
  std::string unit;
  UnitConversion to_si;
};

const char* const kHeaderExample =
    "a header row such as \"time,mixing_height [m],wind_speed [m/s],wind_from [deg]\"";

// The first non-blank line: the header (InputError on an empty file or a huge first line).
std::string_view header_line_of(Lines& lines, int& header_no, const std::string& display_name) {
  std::string_view line;
  while (lines.next(line, header_no)) {
    if (!trim(line).empty()) break;
    line = {};
  }
  if (trim(line).empty()) {
    throw InputError(display_name, "the file is empty",
                     std::string(kHeaderExample) + " and hourly rows");
  }
  // A header of column names is short; a huge first line (a file with no line breaks) is
  // refused before it is split and copied.
  constexpr std::size_t kMaxHeaderBytes = 65536;
  if (line.size() > kMaxHeaderBytes) {
    throw InputError(display_name + ":" + std::to_string(header_no),
                     "a first line of " + std::to_string(line.size()) + " bytes (" +
                         excerpt(line) + ")",
                     "a header row of column names such as \"time,mixing_height [m],wind_speed "
                     "[m/s],wind_from [deg]\", then one line per hour");
  }
  return line;
}

// One header cell: its role and its conversion to SI.
Column column_of(const std::string& header, const std::vector<Column>& before,
                 const std::string& header_where) {
  Column col;
  col.header = trim(header);
  split_header(col.header, col.name, col.unit);
  col.role = role_of(col.name);
  const std::string where = header_where + ": column \"" + excerpt(col.header) + "\"";
  for (const auto& other : before) {
    if (other.name == col.name) {
      throw InputError(where, "a second column named \"" + excerpt(col.name) + "\"",
                       "each column name once");
    }
  }
  switch (col.role) {
    case Role::time:
      break;
    case Role::mixing_height:
      col.to_si = unit_conversion(col.unit, "m", "length", where);
      break;
    case Role::wind_speed:
    case Role::u:
    case Role::v:
      col.to_si = unit_conversion(col.unit, "m/s", "speed", where);
      break;
    case Role::wind_from:
      col.to_si = direction_unit_to_degrees(col.unit, where);
      break;
    case Role::temperature:
      col.to_si = unit_conversion(col.unit, "K", "temperature", where);
      break;
    case Role::pressure:
      col.to_si = unit_conversion(col.unit, "Pa", "pressure", where);
      break;
    case Role::extra:
      if (col.name.empty()) throw InputError(where, "an empty column name", "a name");
      break;
  }
  return col;
}

bool has_role(const std::vector<Column>& cols, Role r) {
  for (const auto& c : cols) {
    if (c.role == r) return true;
  }
  return false;
}

// Refuses a header without time, mixing height or one complete wind (speed and direction, or
// u and v); returns the time column.
std::size_t check_columns(const std::vector<Column>& cols, std::string_view header_line,
                          const std::string& header_where) {
  std::string found;
  for (const auto& c : cols) found += (found.empty() ? "" : ", ") + c.header;
  found = excerpt(found);
  std::size_t time_col = cols.size();
  for (std::size_t c = 0; c < cols.size(); ++c) {
    if (cols[c].role == Role::time) time_col = c;
  }
  if (time_col == cols.size()) {
    throw InputError(header_where,
                     "no \"time\" column (found: " + found + ")" + separator_hint(header_line),
                     "a column named time holding ISO 8601 times");
  }
  if (!has_role(cols, Role::mixing_height)) {
    throw InputError(header_where, "no mixing height column (found: " + found + ")",
                     "a column \"mixing_height [unit]\"");
  }
  const bool polar = has_role(cols, Role::wind_speed) || has_role(cols, Role::wind_from);
  const bool cartesian = has_role(cols, Role::u) || has_role(cols, Role::v);
  if (polar && cartesian) {
    throw InputError(header_where, "both speed/direction and u/v wind columns",
                     "either wind_speed and wind_from, or eastward_wind and northward_wind");
  }
  if (polar ? !(has_role(cols, Role::wind_speed) && has_role(cols, Role::wind_from))
            : !(has_role(cols, Role::u) && has_role(cols, Role::v))) {
    throw InputError(header_where, "no complete wind (found: " + found + ")",
                     "columns \"wind_speed [unit]\" and \"wind_from [deg]\", or "
                     "\"eastward_wind [unit]\" and \"northward_wind [unit]\"");
  }
  return time_col;
}

// The rows of a met CSV after its header, into a MetSeries. Cells are views into the file's
// text; message texts are built only for an error.
class RowReader {
 public:
  RowReader(std::vector<Column> cols, std::size_t time_col, const CsvMetOptions& options,
            const std::string& display_name)
      : cols_(std::move(cols)), time_col_(time_col), options_(options),
        display_name_(display_name),
        limits_(options.limits ? *options.limits : shipped_),
        polar_(has_role(cols_, Role::wind_speed)),
        has_t_(has_role(cols_, Role::temperature)),
        has_p_(has_role(cols_, Role::pressure)) {
    met_.source = display_name;
    for (const auto& c : cols_) {
      if (c.role == Role::extra) met_.extra.push_back({c.name, c.unit, {}});
    }
  }

  void row(std::string_view line, int line_no) {
    line_no_ = line_no;
    split(line);
    const UtcSeconds t = time_of_row();
    previous_ = t;
    any_ = true;
    values();
  }

  MetSeries finish() {
    if (met_.size() < 2) {
      throw InputError(display_name_, std::to_string(met_.size()) + " data rows",
                       "at least two hourly rows");
    }
    fill_gaps(met_, options_.max_gap_hours);
    return std::move(met_);
  }

 private:
  [[nodiscard]] std::string where() const {
    return display_name_ + ":" + std::to_string(line_no_);
  }

  void split(std::string_view line) {
    cells_.clear();
    if (line.find('"') != std::string_view::npos) {
      quoted_ = split_csv_row(std::string(line), where());
      for (const auto& q : quoted_) cells_.emplace_back(q);
    } else {
      std::size_t start = 0;
      for (;;) {
        const std::size_t comma = line.find(',', start);
        if (comma == std::string_view::npos) {
          cells_.push_back(line.substr(start));
          break;
        }
        cells_.push_back(line.substr(start, comma - start));
        start = comma + 1;
      }
    }
    if (cells_.size() != cols_.size()) {
      throw InputError(where(), std::to_string(cells_.size()) + " fields",
                       std::to_string(cols_.size()) + " fields as in the header");
    }
  }

  // The row's time, checked against the previous row; missing hours before it become gaps.
  UtcSeconds time_of_row() {
    UtcSeconds t = 0;
    if (!quick_utc(trim(cells_[time_col_]), t)) {
      t = parse_iso8601(trim(cells_[time_col_]), options_.zone_for_naive_times, where());
    }
    if (!any_) {
      met_.first_stamp_utc = t;
      return t;
    }
    if (t == previous_) {
      throw InputError(where(), "time " + format_utc(t) + " repeats the previous row",
                       "strictly increasing hourly times");
    }
    if (t < previous_) {
      throw InputError(
          where(), "time " + format_utc(t) + " is before the previous row's " + format_utc(previous_),
          "strictly increasing hourly times");
    }
    if ((t - previous_) % kSecondsPerHour != 0) {
      throw InputError(where(),
                       "time " + format_utc(t) + " is off the hourly grid of " +
                           format_utc(met_.first_stamp_utc),
                       "times a whole number of hours apart");
    }
    // The gap rule is applied here first, before a missing hour is allocated, so that a row in
    // the year 9999 after one in 2026 is refused at once rather than after 70 million rows.
    const long long missing = (t - previous_) / kSecondsPerHour - 1;
    if (missing > options_.max_gap_hours) {
      throw InputError(where(),
                       "a gap of " + std::to_string(missing) + " hours (" +
                           format_utc(previous_ + kSecondsPerHour) + " to " +
                           format_utc(t - kSecondsPerHour) + ")",
                       "gaps of at most " + std::to_string(options_.max_gap_hours) +
                           " hours (set [met] max_gap_hours to fill longer gaps, or split the "
                           "run)");
    }
    // Missing stamps become gaps for the fill rule (source line 0: no line of the file).
    for (UtcSeconds g = previous_ + kSecondsPerHour; g < t; g += kSecondsPerHour) {
      for (auto& e : met_.extra) e.values.push_back(kNaN);
      push_hour(kNaN, kNaN, kNaN, kNaN, kNaN, 0);
    }
    return t;
  }

  // The hour's fields other than the extra columns (those are pushed as they are read).
  void push_hour(double h, double u, double v, double temp, double pres, int line) {
    met_.mixing_height_m.push_back(h);
    met_.wind_u_m_s.push_back(u);
    met_.wind_v_m_s.push_back(v);
    if (has_t_) met_.air_temperature_K.push_back(temp);
    if (has_p_) met_.surface_pressure_Pa.push_back(pres);
    met_.source_line.push_back(line);
  }

  // A cell's value in SI (extra columns as written); NaN for an empty cell.
  double cell_value(const Column& col, std::string_view cell) const {
    double value = kNaN;
    if (cell.empty()) return value;
    if (!parse_cell(cell, value)) {
      throw InputError(where() + ": column \"" + col.header + "\"",
                       "\"" + excerpt(cell) + "\" is not a number",
                       "a decimal number, or an empty cell for a missing value");
    }
    return col.role == Role::extra ? value : col.to_si(value);
  }

  // The row's values, each checked against its plausible range, appended to the series.
  void values() {
    double h = kNaN, speed = kNaN, from = kNaN, u = kNaN, v = kNaN, temp = kNaN, pres = kNaN;
    std::size_t extra_i = 0;
    for (std::size_t c = 0; c < cols_.size(); ++c) {
      const Column& col = cols_[c];
      if (col.role == Role::time) continue;
      const std::string_view cell = trim(cells_[c]);
      const double value = cell_value(col, cell);
      // The message is built only for a value outside its range (NaN passes: a gap).
      const auto check = [&](const char* key) {
        const PlausibleRange& r = limits_.range(key);
        if (r.admits(value)) return;
        limits_.check(key, value, where() + ": column \"" + col.header + "\"", std::string(cell),
                      col.unit);
      };
      switch (col.role) {
        case Role::mixing_height: check("mixing_height"); h = value; break;
        case Role::wind_speed: check("wind_speed"); speed = value; break;
        case Role::wind_from: check("wind_from"); from = value; break;
        case Role::u: u = value; break;
        case Role::v: v = value; break;
        case Role::temperature: check("air_temperature"); temp = value; break;
        case Role::pressure: check("surface_pressure"); pres = value; break;
        case Role::extra: met_.extra[extra_i++].values.push_back(value); break;
        case Role::time: break;
      }
    }
    if (polar_ && !std::isnan(speed) && !std::isnan(from)) wind_components(speed, from, u, v);
    push_hour(h, u, v, temp, pres, line_no_);
  }

  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  std::vector<Column> cols_;
  std::size_t time_col_;
  const CsvMetOptions& options_;
  std::string display_name_;
  PlausibilityLimits shipped_;
  const PlausibilityLimits& limits_;
  bool polar_, has_t_, has_p_;
  MetSeries met_;
  UtcSeconds previous_ = 0;
  bool any_ = false;
  int line_no_ = 0;
  std::vector<std::string_view> cells_;
  std::vector<std::string> quoted_;
};

}  // namespace

MetSeries parse_met_csv(const std::string& text, const CsvMetOptions& options,
                        const std::string& display_name) {
  refuse_cr_only_lines(text, display_name);
  Lines lines(strip_utf8_bom(text));
  int header_no = 0;
  const std::string_view header_line = header_line_of(lines, header_no, display_name);
  const std::string header_where = display_name + ":" + std::to_string(header_no);
  std::vector<Column> cols;
  for (const auto& h : split_csv_row(std::string(header_line), header_where)) {
    cols.push_back(column_of(h, cols, header_where));
  }
  const std::size_t time_col = check_columns(cols, header_line, header_where);
  RowReader rows(std::move(cols), time_col, options, display_name);
  std::string_view line;
  int line_no = 0;
  while (lines.next(line, line_no)) {
    if (!trim(line).empty()) rows.row(line, line_no);
  }
  return rows.finish();
}

MetSeries read_met_csv(const std::string& path, const CsvMetOptions& options,
                       const std::string& display_name) {
  return parse_met_csv(read_text_file(path, display_name), options, display_name);
}

}  // namespace lidbox
