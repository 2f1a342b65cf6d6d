// Private to the report room: the pieces every time chart is drawn from (chart.hpp). A panel is
// a plot area with a value axis; series arrive as bin statistics (chart.hpp's TimeBins), so the
// same code draws an hourly run and a 30-year one.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "lidbox/report/chart.hpp"
#include "report/svg_writer.hpp"

namespace lidbox::chart {

inline constexpr int kWidth = 1100;
inline constexpr double kLeft = 92.0, kRight = 86.0, kFont = 12.0;
inline constexpr double kPlotWidth = kWidth - kLeft - kRight;
// Room under a panel for two rows of tick labels, and between panels.
inline constexpr double kTickRows = 34.0, kPanelGap = 44.0;

// The time axis shared by the panels of one chart.
struct TimeCanvas {
  TimeCanvas(const std::vector<HourRecord>& hours, const TimeZone& zone);
  const std::vector<HourRecord>& hours;
  TimeBins bins;
  TimeTicks ticks;
  std::string zone_name;
  [[nodiscard]] double x_of(double hour) const;
  [[nodiscard]] double x_of_bin(std::size_t k) const;  // its centre
  [[nodiscard]] bool hourly() const { return bins.days_per_bin == 0; }
  // "hour means" or "daily means (band up to the day's highest hour)" ...
  [[nodiscard]] std::string drawn_as() const;
  [[nodiscard]] BinStats stats(const std::function<double(std::size_t)>& value_at) const {
    return bin_statistics(bins, value_at);
  }
};

struct Panel {
  double y = 0.0, h = 0.0;  // top and height of the plot area
  NiceAxis axis;
  [[nodiscard]] double y_of(double v) const {
    return y + h - h * (v - axis.lo) / (axis.hi - axis.lo);
  }
};

// The frame, horizontal grid with value labels, the value axis title, and the time grid with the
// tick labels under the panel.
void draw_frame(svg::Writer& w, const TimeCanvas& t, const Panel& p, std::string_view title);
// Value labels and title on the right side for a second quantity on its own axis.
void draw_right_axis(svg::Writer& w, const Panel& p, const NiceAxis& axis, std::string_view title);
// A series: hourly a line through the hours' centres (NaN breaks it); binned the bins' means as
// a line and, with a non-empty band_style, a band from the mean up to the highest hour.
void draw_series(svg::Writer& w, const TimeCanvas& t, const Panel& p, const BinStats& s,
                 std::string_view line_style, std::string_view band_style);
// Area from the axis's zero (or its bottom) up to each bin's value.
void draw_area(svg::Writer& w, const TimeCanvas& t, const Panel& p, const std::vector<double>& v,
               std::string_view style);
// Band between two per-bin series.
void draw_band(svg::Writer& w, const TimeCanvas& t, const Panel& p, const std::vector<double>& lo,
               const std::vector<double>& hi, std::string_view style);
// A shaded span of hours [from, to), and a vertical mark at an hour with its label (if any) near
// the bottom.
void draw_span(svg::Writer& w, const TimeCanvas& t, const Panel& p, double from_hour,
               double to_hour, std::string_view style);
void draw_mark(svg::Writer& w, const TimeCanvas& t, const Panel& p, double hour,
               std::string_view label);
// Horizontal level lines with their labels at the right end of the plot; labels closer than a
// line of text move apart.
struct Level {
  double value = 0.0;
  std::string label;
  std::string style;
  bool alert = false;  // an alert threshold (else a limit)
};
void draw_levels(svg::Writer& w, const Panel& p, std::vector<Level> levels);
// A legend row above the panel: swatches ("fill:#...", "line:#...:dash", "circle:#..." or
// "none" for a bold heading) and texts.
struct LegendItem {
  std::string swatch;
  std::string text;
};
void draw_legend(svg::Writer& w, double y, const std::vector<LegendItem>& items, double x = kLeft);
// Title, caution and the time axis's name; returns the y where the first panel may start.
double draw_header(svg::Writer& w, std::string_view title, const TimeCanvas& t);
// The highest finite value of the series given.
double highest(std::initializer_list<const std::vector<double>*> series);

}  // namespace lidbox::chart
