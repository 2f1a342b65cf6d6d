#include "lidbox/standards/observations_csv.hpp"

#include <charconv>
#include <cmath>
#include <fstream>
#include <optional>
#include <sstream>

#include "base/civil_calendar.hpp"
#include "lidbox/base/concentration_units.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/time.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

namespace {

// The met reader's CSV splitter (RFC 4180 quotes), each cell trimmed.
std::vector<std::string> split_cells(std::string_view line, const std::string& where) {
  std::vector<std::string> cells = split_csv_row(std::string(line), where);
  for (auto& c : cells) c = std::string(trim(c));
  return cells;
}

struct Column {
  std::string pollutant;
  std::string unit;  // canonical spelling
  double to_ug_m3 = 1.0;
};

// The header: "time", then one "<pollutant> [<unit>]" per column, each pollutant once.
std::vector<Column> read_header(const std::vector<std::string>& cells, std::string_view line,
                                const std::string& where) {
  if (cells.size() < 2 || !(cells[0] == "time" || cells[0] == "Time")) {
    throw InputError(where, "header \"" + excerpt(line) + "\"" + separator_hint(line),
                     "\"time\" followed by columns like \"PM2.5 [ug/m3]\"");
  }
  std::vector<Column> columns;
  for (std::size_t c = 1; c < cells.size(); ++c) {
    const std::string_view cell = cells[c];
    const auto open = cell.find('[');
    const auto close = cell.rfind(']');
    if (open == std::string_view::npos || close == std::string_view::npos || close < open ||
        close + 1 != cell.size()) {
      throw InputError(where + ": column " + std::to_string(c + 1),
                       "header \"" + excerpt(cell) + "\" has no unit",
                       "\"<pollutant> [<unit>]\", e.g. \"PM2.5 [ug/m3]\"");
    }
    const std::string name(trim(cell.substr(0, open)));
    const std::string unit_text(trim(cell.substr(open + 1, close - open - 1)));
    const std::string col_where = where + ": column \"" + excerpt(cell) + "\"";
    const PollutantInfo& p = pollutant_or_throw(name, col_where);
    const auto unit =
        parse_concentration_unit(unit_text, p.molar_mass_g_mol, kUsReferenceConditions, col_where);
    for (const Column& other : columns) {
      if (other.pollutant == p.name) {
        throw InputError(col_where, "a second column for " + std::string(p.name),
                         "one column per pollutant");
      }
    }
    columns.push_back(Column{p.name, unit.canonical, unit.to_g_m3 * 1e6});
  }
  return columns;
}

// The data rows so far: one value array per column, on the hourly grid of the first row.
struct Rows {
  std::vector<Column> columns;
  std::vector<std::vector<double>> values;
  std::vector<std::vector<double>> detection_limits;  // per column, "<L" cells; empty if none
  std::vector<std::size_t> missing_codes;             // per column, cells with a declared code
  std::vector<SmallNegatives> negatives;              // per column, values kept below zero
  UtcSeconds first = 0;
  UtcSeconds previous = 0;
  std::size_t previous_line = 0;
  std::size_t count = 0;
};

// The row's hour on the grid of the first row; hours strictly increase, gaps are allowed.
std::size_t hour_index(const Rows& rows, const std::string& time_text, UtcSeconds t,
                       const std::string& where) {
  if (rows.count == 0) return 0;
  if (t <= rows.previous) {
    throw InputError(where,
                     "time " + time_text + (t == rows.previous ? " repeats" : " goes back before") +
                         " the hour on line " + std::to_string(rows.previous_line),
                     "strictly increasing hours");
  }
  if ((t - rows.first) % kSecondsPerHour != 0) {
    throw InputError(where,
                     "time " + time_text + " is off the hourly grid of line " +
                         std::to_string(rows.previous_line),
                     "whole hours after the first row");
  }
  if (t - rows.first > 30LL * 366 * kSecondsPerDay) {
    throw InputError(where, "time " + time_text + " is more than 30 years after the first row",
                     "at most 30 years of hourly data");
  }
  return static_cast<std::size_t>((t - rows.first) / kSecondsPerHour);
}

// A measured value: a declared code becomes a gap (counted), anything else must be plausible.
double judged_value(Rows& rows, std::size_t c, double x, std::string_view cell,
                    const std::string& where, const ObservationsOptions& options) {
  for (double code : options.missing_values) {
    if (x == code) {
      ++rows.missing_codes[c];
      return kMissing;
    }
  }
  const Column& col = rows.columns[c];
  const char* key = col.pollutant == "CO" ? "monitor_co" : "monitor_concentration";
  options.limits.check(key, x * col.to_ug_m3,
                       where + ": column \"" + col.pollutant + " [" + col.unit + "]\"",
                       std::string(cell), col.unit,
                       "a missing-value code such as -999 must be declared (observe "
                       "--missing-value)");
  if (x < 0.0) {
    SmallNegatives& n = rows.negatives[c];
    n.lowest = n.count == 0 ? x : std::min(n.lowest, x);
    ++n.count;
  }
  return x;
}

// The row's values at `index`; the hours skipped since the previous row become missing values.
void read_values(Rows& rows, const std::vector<std::string>& cells, std::size_t index,
                 const std::string& where, const ObservationsOptions& options) {
  for (std::size_t c = 0; c < rows.columns.size(); ++c) {
    std::vector<double>& v = rows.values[c];
    v.resize(index, kMissing);
    const std::string_view cell = cells[c + 1];
    if (cell.empty()) {
      v.push_back(kMissing);
      continue;
    }
    if (cell.front() == '<') {
      double limit = 0.0;
      if (!parse_double(trim(cell.substr(1)), limit) || limit < 0.0) {
        throw InputError(
            where + ": column \"" + rows.columns[c].pollutant + " [" + rows.columns[c].unit + "]\"",
            "value \"" + excerpt(cell) + "\"", "a detection limit \"<L\" with a number L >= 0");
      }
      std::vector<double>& dl = rows.detection_limits[c];
      dl.resize(index, kMissing);
      dl.push_back(limit);
      v.push_back(kMissing);
      continue;
    }
    double x = 0.0;
    const auto [end, ec] = std::from_chars(cell.data(), cell.data() + cell.size(), x);
    if (ec != std::errc() || end != cell.data() + cell.size() || !std::isfinite(x)) {
      throw InputError(
          where + ": column \"" + rows.columns[c].pollutant + " [" + rows.columns[c].unit + "]\"",
          "value \"" + excerpt(cell) + "\"", "a number, or an empty cell for a missing value");
    }
    v.push_back(judged_value(rows, c, x, cell, where, options));
  }
}

void read_row(Rows& rows, const std::vector<std::string>& cells, std::size_t line_no,
              const std::string& where, const ObservationsOptions& options) {
  if (cells.size() != rows.columns.size() + 1) {
    throw InputError(where, std::to_string(cells.size()) + " cells",
                     std::to_string(rows.columns.size() + 1) + " cells as in the header");
  }
  const UtcSeconds t = parse_instant_with_offset(cells[0], where + ": time");
  const std::size_t index = hour_index(rows, cells[0], t, where);
  if (rows.count == 0) rows.first = t;
  read_values(rows, cells, index, where, options);
  rows.previous = t;
  rows.previous_line = line_no;
  ++rows.count;
}

}  // namespace

std::vector<double> parse_missing_value_codes(const std::vector<std::string>& texts,
                                              std::string_view where) {
  std::vector<double> out;
  for (const auto& text : texts) {
    std::size_t start = 0;
    for (;;) {
      const std::size_t comma = text.find(',', start);
      const std::string_view item =
          trim(std::string_view(text).substr(start, comma == std::string::npos ? std::string::npos
                                                                              : comma - start));
      double v = 0.0;
      if (!parse_double(item, v)) {
        throw InputError(std::string(where), "\"" + excerpt(item) + "\"",
                         "a number that the monitor file writes for a missing value, e.g. -999");
      }
      out.push_back(v);
      if (comma == std::string::npos) break;
      start = comma + 1;
    }
  }
  return out;
}

std::vector<std::string> reading_notes(const Observations& obs) {
  std::vector<std::string> notes;
  for (const auto& [pollutant, n] : obs.missing_code_count) {
    notes.push_back(std::to_string(n) + " " + pollutant +
                    " values hold a declared missing-value code and are gaps in these tables");
  }
  for (const auto& [pollutant, neg] : obs.small_negatives) {
    notes.push_back(std::to_string(neg.count) + " " + pollutant + " values are below zero (lowest " +
                    format_number(neg.lowest, 4) + " " + obs.series.at(pollutant).unit +
                    "), within the instrument-noise tolerance; kept as measured");
  }
  return notes;
}

int parse_utc_offset_s(std::string_view text, std::string_view where) {
  // Local standard time is the zone's standard offset, also for a zone with daylight saving.
  return TimeZone::parse(trim(text), where).standard_offset_s();
}

UtcSeconds parse_instant_with_offset(std::string_view text, std::string_view where) {
  return parse_iso8601(text, nullptr, where);
}

Observations parse_observations_csv(std::string_view text, std::string_view path_view,
                                    const ObservationsOptions& options) {
  const std::string path(path_view);
  refuse_cr_only_lines(text, path);
  text = strip_utf8_bom(text);
  std::optional<Rows> rows;  // set by the header line
  std::size_t line_no = 0;
  for (std::size_t pos = 0; pos <= text.size();) {
    const std::size_t nl = text.find('\n', pos);
    const std::string_view line =
        trim(text.substr(pos, nl == std::string_view::npos ? text.size() - pos : nl - pos));
    pos = nl == std::string_view::npos ? text.size() + 1 : nl + 1;
    ++line_no;
    if (line.empty() || line.front() == '#') continue;
    const std::string where = path + ":" + std::to_string(line_no);
    const auto cells = split_cells(line, where);
    if (rows) {
      read_row(*rows, cells, line_no, where, options);
    } else {
      rows.emplace();
      rows->columns = read_header(cells, line, where);
      rows->values.resize(rows->columns.size());
      rows->detection_limits.resize(rows->columns.size());
      rows->missing_codes.resize(rows->columns.size());
      rows->negatives.resize(rows->columns.size());
    }
  }
  if (!rows) throw InputError(path, "no header line", "\"time\" followed by pollutant columns");
  if (rows->count == 0) throw InputError(path, "no data rows", "at least one hourly row");
  Observations obs;
  obs.path = path;
  obs.rows = rows->count;
  for (std::size_t c = 0; c < rows->columns.size(); ++c) {
    if (!rows->detection_limits[c].empty()) {
      rows->detection_limits[c].resize(rows->values[c].size(), kMissing);
      obs.below_detection[rows->columns[c].pollutant] = std::move(rows->detection_limits[c]);
    }
    const std::string& name = rows->columns[c].pollutant;
    if (rows->missing_codes[c] > 0) obs.missing_code_count[name] = rows->missing_codes[c];
    if (rows->negatives[c].count > 0) obs.small_negatives[name] = rows->negatives[c];
    obs.series[rows->columns[c].pollutant] =
        HourlySeries{rows->first, std::move(rows->values[c]), rows->columns[c].unit};
  }
  return obs;
}

Observations read_observations_csv(const std::filesystem::path& path,
                                   const ObservationsOptions& options) {
  return parse_observations_csv(read_text_file(path.string(), path.string()), path.string(),
                                options);
}

}  // namespace lidbox
