#include "lidbox/met/csv_met.hpp"

#include <charconv>
#include <cmath>
#include <fstream>
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

}  // namespace

MetSeries parse_met_csv(const std::string& text, const CsvMetOptions& options,
                        const std::string& display_name) {
  refuse_cr_only_lines(text, display_name);
  Lines lines(strip_utf8_bom(text));
  std::string_view header_line;
  int header_no = 0;
  bool have_header = false;
  while (lines.next(header_line, header_no)) {
    if (!trim(header_line).empty()) {
      have_header = true;
      break;
    }
  }
  if (!have_header) {
    throw InputError(display_name, "the file is empty",
                     "a header row such as \"time,mixing_height [m],wind_speed [m/s],wind_from "
                     "[deg]\" and hourly rows");
  }
  const std::string header_where = display_name + ":" + std::to_string(header_no);
  // A header of column names is short; a huge first line (a file with no line breaks) is
  // refused before it is split and copied.
  constexpr std::size_t kMaxHeaderBytes = 65536;
  if (header_line.size() > kMaxHeaderBytes) {
    throw InputError(header_where,
                     "a first line of " + std::to_string(header_line.size()) + " bytes (" +
                         excerpt(header_line) + ")",
                     "a header row of column names such as \"time,mixing_height [m],wind_speed "
                     "[m/s],wind_from [deg]\", then one line per hour");
  }
  const std::vector<std::string> headers = split_csv_row(std::string(header_line), header_where);
  std::vector<Column> cols;
  int time_col = -1;
  for (std::size_t c = 0; c < headers.size(); ++c) {
    Column col;
    col.header = trim(headers[c]);
    split_header(col.header, col.name, col.unit);
    col.role = role_of(col.name);
    const std::string where = header_where + ": column \"" + excerpt(col.header) + "\"";
    for (const auto& other : cols) {
      if (other.name == col.name) {
        throw InputError(where, "a second column named \"" + excerpt(col.name) + "\"",
                         "each column name once");
      }
    }
    switch (col.role) {
      case Role::time:
        time_col = static_cast<int>(c);
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
    cols.push_back(col);
  }
  auto has = [&](Role r) {
    for (const auto& c : cols) {
      if (c.role == r) return true;
    }
    return false;
  };
  std::string found;
  for (const auto& c : cols) found += (found.empty() ? "" : ", ") + c.header;
  found = excerpt(found);
  if (time_col < 0) {
    throw InputError(header_where,
                     "no \"time\" column (found: " + found + ")" + separator_hint(header_line),
                     "a column named time holding ISO 8601 times");
  }
  if (!has(Role::mixing_height)) {
    throw InputError(header_where, "no mixing height column (found: " + found + ")",
                     "a column \"mixing_height [unit]\"");
  }
  const bool polar = has(Role::wind_speed) || has(Role::wind_from);
  const bool cartesian = has(Role::u) || has(Role::v);
  if (polar && cartesian) {
    throw InputError(header_where, "both speed/direction and u/v wind columns",
                     "either wind_speed and wind_from, or eastward_wind and northward_wind");
  }
  if (polar ? !(has(Role::wind_speed) && has(Role::wind_from))
            : !(has(Role::u) && has(Role::v))) {
    throw InputError(header_where, "no complete wind (found: " + found + ")",
                     "columns \"wind_speed [unit]\" and \"wind_from [deg]\", or "
                     "\"eastward_wind [unit]\" and \"northward_wind [unit]\"");
  }

  MetSeries met;
  met.source = display_name;
  const bool has_t = has(Role::temperature);
  const bool has_p = has(Role::pressure);
  for (const auto& c : cols) {
    if (c.role == Role::extra) met.extra.push_back({c.name, c.unit, {}});
  }
  const double nan = std::nan("");
  const PlausibilityLimits shipped;
  const PlausibilityLimits& limits = options.limits ? *options.limits : shipped;
  UtcSeconds previous = 0;
  bool any = false;
  // The rows: cells are views into the file's text, the message texts are built only for an
  // error.
  std::vector<std::string_view> cells;
  std::vector<std::string> quoted;
  std::string_view line;
  int line_no = 0;
  while (lines.next(line, line_no)) {
    if (trim(line).empty()) continue;
    const auto where = [&display_name, &line_no] {
      return display_name + ":" + std::to_string(line_no);
    };
    cells.clear();
    if (line.find('"') != std::string_view::npos) {
      quoted = split_csv_row(std::string(line), where());
      for (const auto& q : quoted) cells.emplace_back(q);
    } else {
      std::size_t start = 0;
      for (;;) {
        const std::size_t comma = line.find(',', start);
        if (comma == std::string_view::npos) {
          cells.push_back(line.substr(start));
          break;
        }
        cells.push_back(line.substr(start, comma - start));
        start = comma + 1;
      }
    }
    if (cells.size() != cols.size()) {
      throw InputError(where(), std::to_string(cells.size()) + " fields",
                       std::to_string(cols.size()) + " fields as in the header");
    }
    UtcSeconds t = 0;
    if (!quick_utc(trim(cells[time_col]), t)) {
      t = parse_iso8601(trim(cells[time_col]), options.zone_for_naive_times, where());
    }
    if (any) {
      if (t == previous) {
        throw InputError(where(), "time " + format_utc(t) + " repeats the previous row",
                         "strictly increasing hourly times");
      }
      if (t < previous) {
        throw InputError(
            where(),
            "time " + format_utc(t) + " is before the previous row's " + format_utc(previous),
            "strictly increasing hourly times");
      }
      if ((t - previous) % kSecondsPerHour != 0) {
        throw InputError(where(),
                         "time " + format_utc(t) + " is off the hourly grid of " +
                             format_utc(met.first_stamp_utc),
                         "times a whole number of hours apart");
      }
      // The gap rule is applied here first, before a missing hour is allocated, so that a row
      // in the year 9999 after one in 2026 is refused at once rather than after 70 million rows.
      const long long missing = (t - previous) / kSecondsPerHour - 1;
      if (missing > options.max_gap_hours) {
        throw InputError(where(),
                         "a gap of " + std::to_string(missing) + " hours (" +
                             format_utc(previous + kSecondsPerHour) + " to " +
                             format_utc(t - kSecondsPerHour) + ")",
                         "gaps of at most " + std::to_string(options.max_gap_hours) +
                             " hours (set [met] max_gap_hours to fill longer gaps, or split the "
                             "run)");
      }
      // Missing stamps become gaps for the fill rule.
      for (UtcSeconds g = previous + kSecondsPerHour; g < t; g += kSecondsPerHour) {
        met.mixing_height_m.push_back(nan);
        met.wind_u_m_s.push_back(nan);
        met.wind_v_m_s.push_back(nan);
        if (has_t) met.air_temperature_K.push_back(nan);
        if (has_p) met.surface_pressure_Pa.push_back(nan);
        for (auto& e : met.extra) e.values.push_back(nan);
        met.source_line.push_back(0);
      }
    } else {
      met.first_stamp_utc = t;
    }
    previous = t;
    any = true;
    double h = nan, speed = nan, from = nan, u = nan, v = nan, temp = nan, pres = nan;
    std::size_t extra_i = 0;
    for (std::size_t c = 0; c < cols.size(); ++c) {
      const Column& col = cols[c];
      if (col.role == Role::time) continue;
      const std::string_view cell_view = trim(cells[c]);
      const auto cell = [&cell_view] { return std::string(cell_view); };
      double value = nan;
      if (!cell_view.empty()) {
        if (!parse_cell(cell_view, value)) {
          throw InputError(where() + ": column \"" + col.header + "\"",
                           "\"" + excerpt(cell_view) + "\" is not a number",
                           "a decimal number, or an empty cell for a missing value");
        }
        if (col.role != Role::extra) value = col.to_si(value);
      }
      const auto cw = [&] { return where() + ": column \"" + col.header + "\""; };
      switch (col.role) {
        case Role::mixing_height:
          limits.check("mixing_height", value, cw(), cell(), col.unit);
          h = value;
          break;
        case Role::wind_speed:
          limits.check("wind_speed", value, cw(), cell(), col.unit);
          speed = value;
          break;
        case Role::wind_from:
          limits.check("wind_from", value, cw(), cell(), col.unit);
          from = value;
          break;
        case Role::u:
          u = value;
          break;
        case Role::v:
          v = value;
          break;
        case Role::temperature:
          limits.check("air_temperature", value, cw(), cell(), col.unit);
          temp = value;
          break;
        case Role::pressure:
          limits.check("surface_pressure", value, cw(), cell(), col.unit);
          pres = value;
          break;
        case Role::extra:
          met.extra[extra_i++].values.push_back(value);
          break;
        case Role::time:
          break;
      }
    }
    if (polar && !std::isnan(speed) && !std::isnan(from)) wind_components(speed, from, u, v);
    met.mixing_height_m.push_back(h);
    met.wind_u_m_s.push_back(u);
    met.wind_v_m_s.push_back(v);
    if (has_t) met.air_temperature_K.push_back(temp);
    if (has_p) met.surface_pressure_Pa.push_back(pres);
    met.source_line.push_back(line_no);
  }
  if (met.size() < 2) {
    throw InputError(display_name, std::to_string(met.size()) + " data rows",
                     "at least two hourly rows");
  }
  fill_gaps(met, options.max_gap_hours);
  return met;
}

MetSeries read_met_csv(const std::string& path, const CsvMetOptions& options,
                       const std::string& display_name) {
  return parse_met_csv(read_text_file(path, display_name), options, display_name);
}

}  // namespace lidbox
