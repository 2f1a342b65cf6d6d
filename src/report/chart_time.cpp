// The charts' time axis: bins of hours or local days, tick labels that never overlap, value axes
// and the zone's name (chart.hpp).
#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>

#include "lidbox/base/error.hpp"
#include "lidbox/report/chart.hpp"

namespace lidbox {

namespace {

// Local civil day number and seconds into the day of hour i's start.
std::int64_t local_day(const HourRecord& h) {
  const std::int64_t t = h.start_utc + h.civil_offset_s;
  return t >= 0 ? t / kSecondsPerDay : -((-t + kSecondsPerDay - 1) / kSecondsPerDay);
}
std::int64_t local_second_of_day(const HourRecord& h) {
  return h.start_utc + h.civil_offset_s - local_day(h) * kSecondsPerDay;
}

std::int64_t floor_mod(std::int64_t a, std::int64_t b) {
  return ((a % b) + b) % b;
}

// Candidate labels with their positions; keeps those that fit inside [0, width] and leave the
// gap to the previous kept one. The filter is the guarantee; the step choice keeps it from
// having to drop more than the odd label around a daylight-saving change.
std::vector<TickLabel> without_overlap(std::vector<TickLabel> labels, double px_per_hour,
                                       double width_px, double font_px) {
  std::vector<TickLabel> kept;
  double right = -1e300;
  for (auto& l : labels) {
    const double x = l.hour * px_per_hour;
    const double half = 0.5 * label_width_px(l.text.size(), font_px);
    if (x < 0.0 || x > width_px) continue;
    if (x - half < right + kTickLabelGapPx) continue;
    right = x + half;
    kept.push_back(std::move(l));
  }
  return kept;
}

struct DateStep {
  enum Unit { day, month, year } unit;
  int count;
  double min_days;  // shortest distance between two ticks
};

std::string date_label(const CivilTime& c, const DateStep& s, bool weekday) {
  static const char* kDays[] = {"Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"};
  char b[32];
  if (s.unit == DateStep::year) {
    std::snprintf(b, sizeof b, "%04d", c.year);
  } else if (s.unit == DateStep::month) {
    std::snprintf(b, sizeof b, "%04d-%02d", c.year, c.month);
  } else if (weekday) {
    std::snprintf(b, sizeof b, "%s %02d-%02d", kDays[c.day_of_week], c.month, c.day);
  } else {
    std::snprintf(b, sizeof b, "%02d-%02d", c.month, c.day);
  }
  return b;
}

std::size_t date_label_chars(const DateStep& s, bool weekday) {
  if (s.unit == DateStep::year) return 4;
  if (s.unit == DateStep::month) return 7;
  return weekday ? 9 : 5;
}

bool date_tick_at(const CivilTime& c, std::int64_t day_number, const DateStep& s) {
  switch (s.unit) {
    case DateStep::day:  // aligned on Mondays (1970-01-05 is day 4)
      return floor_mod(day_number - 4, s.count) == 0;
    case DateStep::month:
      return c.day == 1 && (c.month - 1) % s.count == 0;
    case DateStep::year:
      return c.day == 1 && c.month == 1 && floor_mod(c.year, s.count) == 0;
  }
  return false;
}

void choose_date_row(const std::vector<HourRecord>& hours, double px_per_hour, double width_px,
                     double font_px, TimeTicks& t) {
  static const DateStep kSteps[] = {
      {DateStep::day, 1, 1},      {DateStep::day, 2, 2},       {DateStep::day, 7, 7},
      {DateStep::day, 14, 14},    {DateStep::month, 1, 28},    {DateStep::month, 2, 59},
      {DateStep::month, 3, 89},   {DateStep::month, 6, 181},   {DateStep::year, 1, 365},
      {DateStep::year, 2, 730},   {DateStep::year, 5, 1826},   {DateStep::year, 10, 3652},
      {DateStep::year, 20, 7305}, {DateStep::year, 50, 18262}, {DateStep::year, 100, 36524}};
  const DateStep* chosen = &kSteps[std::size(kSteps) - 1];
  bool weekday = false;
  for (const auto& s : kSteps) {
    const double spacing = s.min_days * 24.0 * px_per_hour;
    const bool wd = s.unit == DateStep::day && s.count == 1 &&
                    spacing >= label_width_px(9, font_px) + kTickLabelGapPx;
    if (spacing >= label_width_px(date_label_chars(s, wd), font_px) + kTickLabelGapPx) {
      chosen = &s;
      weekday = wd;
      break;
    }
  }
  static const char* kUnit[] = {"day", "month", "year"};
  t.date_step =
      std::to_string(chosen->count) + " " + kUnit[chosen->unit] + (chosen->count > 1 ? "s" : "");
  std::vector<TickLabel> labels;
  std::int64_t previous = 0;
  for (std::size_t i = 0; i < hours.size(); ++i) {
    const std::int64_t d = local_day(hours[i]);
    if (i > 0 && d == previous) continue;
    previous = d;
    if (local_second_of_day(hours[i]) >= kSecondsPerHour) continue;  // the run starts mid-day
    const CivilTime c = civil_from_utc_seconds(hours[i].start_utc + hours[i].civil_offset_s);
    if (!date_tick_at(c, d, *chosen)) continue;
    labels.push_back({static_cast<double>(i), date_label(c, *chosen, weekday)});
  }
  t.date_row = without_overlap(std::move(labels), px_per_hour, width_px, font_px);
}

}  // namespace

double label_width_px(std::size_t chars, double font_px) {
  return 0.6 * font_px * static_cast<double>(chars);
}

TimeBins make_time_bins(const std::vector<HourRecord>& hours, std::size_t max_bins) {
  TimeBins b;
  b.hours = hours.size();
  if (hours.size() <= kHourlyChartDays * 24) {
    for (std::size_t i = 0; i <= hours.size(); ++i) b.first.push_back(i);
    return b;
  }
  std::vector<std::size_t> day_starts;
  for (std::size_t i = 0; i < hours.size(); ++i) {
    if (i == 0 || local_day(hours[i]) != local_day(hours[i - 1])) day_starts.push_back(i);
  }
  const std::size_t limit = std::max<std::size_t>(1, max_bins);
  const std::size_t per = (day_starts.size() + limit - 1) / limit;
  b.days_per_bin = static_cast<int>(per);
  for (std::size_t k = 0; k < day_starts.size(); k += per) b.first.push_back(day_starts[k]);
  b.first.push_back(hours.size());
  return b;
}

BinStats bin_statistics(const TimeBins& bins, const std::function<double(std::size_t)>& value_at) {
  BinStats s;
  const std::size_t n = bins.count();
  s.mean.assign(n, std::nan(""));
  s.max.assign(n, std::nan(""));
  for (std::size_t k = 0; k < n; ++k) {
    double sum = 0.0, hi = -INFINITY;
    std::size_t valid = 0;
    for (std::size_t i = bins.first[k]; i < bins.first[k + 1]; ++i) {
      const double v = value_at(i);
      if (std::isnan(v)) continue;
      sum += v;
      hi = std::max(hi, v);
      ++valid;
    }
    if (valid == 0) continue;
    s.mean[k] = sum / static_cast<double>(valid);
    s.max[k] = hi;
  }
  return s;
}

TimeTicks choose_time_ticks(const std::vector<HourRecord>& hours, double plot_width_px,
                            double font_px) {
  TimeTicks t;
  if (hours.empty()) return t;
  const double px_per_hour = plot_width_px / static_cast<double>(hours.size());
  const double hour_label = label_width_px(5, font_px) + kTickLabelGapPx;
  for (int step : {1, 2, 3, 6, 12}) {
    if (step * px_per_hour >= hour_label) {
      t.hour_step = step;
      break;
    }
  }
  if (t.hour_step > 0) {
    std::vector<TickLabel> labels;
    for (std::size_t i = 0; i < hours.size(); ++i) {
      const std::int64_t s = local_second_of_day(hours[i]);
      const int hour = static_cast<int>(s / kSecondsPerHour);
      if (hour % t.hour_step != 0) continue;
      char b[16];
      std::snprintf(b, sizeof b, "%02d:%02d", hour, static_cast<int>(s % kSecondsPerHour) / 60);
      labels.push_back({static_cast<double>(i), b});
    }
    t.hour_row = without_overlap(std::move(labels), px_per_hour, plot_width_px, font_px);
  }
  choose_date_row(hours, px_per_hour, plot_width_px, font_px, t);
  return t;
}

NiceAxis nice_axis(double lo, double hi) {
  if (!(hi > lo)) hi = lo + 1.0;
  const double raw = (hi - lo) / 5.0;
  const double e = std::pow(10.0, std::floor(std::log10(raw)));
  double step = 10.0 * e;
  for (double m : {1.0, 2.0, 2.5, 5.0}) {
    if (raw <= m * e) {
      step = m * e;
      break;
    }
  }
  NiceAxis a;
  a.step = step;
  a.lo = std::floor(lo / step) * step;
  a.hi = std::ceil(hi / step) * step;
  return a;
}

std::string zone_display_name(const TimeZone& zone) {
  // The zone's own name (TimeZone::display_name); a POSIX rule adds its standard offset, which
  // its abbreviations alone do not tell.
  const std::string name = zone.display_name();
  if (zone.from_tz_database() || name.rfind("UTC", 0) == 0) return name;
  const int off = zone.standard_offset_s();
  return name + ", UTC" + (off == 0 ? std::string() : format_utc_offset(off)) + " standard";
}

}  // namespace lidbox
