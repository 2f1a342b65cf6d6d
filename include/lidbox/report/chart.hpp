// Charts of a run, and of a run against monitors, as SVG text. Each render function returns a
// whole <svg> element that refers to nothing outside itself (no fonts, images, scripts or style
// sheets), so a page can embed it inline as it is.
//
// Time runs along x in local civil time of the case's zone, named on the axis. A run of up to
// kHourlyChartDays days is drawn hour by hour; a longer one from bins of whole local days (one
// day per bin while that fits the plot's width, else several), each drawn as its mean with a
// band up to its highest hour, so that a chart's size depends on the plot's width and not on the
// run's length. Everything is linear in the run's hours.
//
// Palette (kPalette...): chosen for this program, not taken from any product. Colours that are
// read against each other differ in lightness first (neighbours in the sector stack by at least
// 15 in CIE L*, so the stack reads even in greyscale) and otherwise along the blue-yellow axis,
// which protanopes and deuteranopes keep; no two rely on a red-green difference alone. Lines are
// further told apart by dash patterns and named in legends and labels.
// tests/reference/test_chart_palette.py checks the lightness steps, and that every two colours
// shown together stay at least 10 apart (CIE76) after simulated protanopia and deuteranopia
// (Machado, Oliveira and Fernandes 2009).
#pragma once

#include <cstddef>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/base/time.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/standards_report.hpp"

namespace lidbox {

// Runs longer than this many days are drawn from daily bins.
inline constexpr std::size_t kHourlyChartDays = 14;

// The palette (sRGB hex). Stack colours alternate dark and light so neighbours in a stack differ
// in lightness; the line colours are dark enough to read on white and on the light fills.
inline constexpr const char* kPaletteStack[] = {"#b0b0b0", "#ece3c6", "#1f4e79", "#e9a93b",
                                                "#5c3317", "#8fc6e0", "#b5542b", "#e8e29a"};
inline constexpr const char* kPaletteLine = "#1a1a1a";      // the run's concentration
inline constexpr const char* kPaletteBand = "#9cc3e0";      // ensemble band
inline constexpr const char* kPaletteMedian = "#1f4e79";    // ensemble median
inline constexpr const char* kPaletteMonitor = "#b5542b";   // observations
inline constexpr const char* kPaletteFit = "#3b8fc4";       // after a fit
inline constexpr const char* kPaletteLevel = "#8c1c13";     // limits and alert thresholds
inline constexpr const char* kPaletteEpisode = "#f4d58d";   // episode shading
inline constexpr const char* kPaletteLid = "#a9cbe0";       // mixing height fill
inline constexpr const char* kPaletteResidual = "#1f4e79";  // residual-layer top
inline constexpr const char* kPaletteWind = "#b5542b";      // wind speed
inline constexpr const char* kPaletteAmber = "#e9a93b";     // scatter: after a fit

// ---- the time axis -----------------------------------------------------------------------

// Consecutive groups of hours drawn as one x step. `first` has one entry per bin plus the run's
// hour count at the end; days_per_bin is 0 for hour-by-hour drawing.
struct TimeBins {
  std::size_t hours = 0;
  int days_per_bin = 0;
  std::vector<std::size_t> first;
  [[nodiscard]] std::size_t count() const { return first.empty() ? 0 : first.size() - 1; }
};

// Hourly for runs of at most kHourlyChartDays days; else bins of whole local civil days (a bin
// starts at local midnight; the first and last may be partial) of as many days as needed to keep
// at most `max_bins` bins.
TimeBins make_time_bins(const std::vector<HourRecord>& hours, std::size_t max_bins);

// Mean and highest value of each bin over the hours that are not NaN (NaN for a bin without
// any). `value_at(i)` gives hour i.
struct BinStats {
  std::vector<double> mean, max;
};
BinStats bin_statistics(const TimeBins& bins, const std::function<double(std::size_t)>& value_at);

// Tick labels along the time axis at positions in hours from the run's first hour start. One row
// of local hours (when hours can be told apart at this width) and one row of dates, months or
// years; in each row the spacing is the smallest of its candidate steps for which the estimated
// label widths (label_width_px) plus a gap never overlap.
struct TickLabel {
  double hour = 0.0;
  std::string text;
};
struct TimeTicks {
  int hour_step = 0;  // 0: no hour row
  std::vector<TickLabel> hour_row;
  std::string date_step;  // "1 day", "7 days", "1 month", "2 years", ...
  std::vector<TickLabel> date_row;
};
TimeTicks choose_time_ticks(const std::vector<HourRecord>& hours, double plot_width_px,
                            double font_px);
// Estimated width of a label: 0.6 em per character (common practice for sans-serif digits,
// no source; generous, since digits are about 0.55 em).
double label_width_px(std::size_t chars, double font_px);
inline constexpr double kTickLabelGapPx = 8.0;

// A value axis from lo to hi in about five steps of 1, 2, 2.5 or 5 times a power of ten.
struct NiceAxis {
  double lo = 0.0, hi = 1.0, step = 0.25;
};
NiceAxis nice_axis(double lo, double hi);

// The zone as people read it: an IANA name as it is ("Europe/Paris"), a POSIX rule by its
// abbreviations and standard offset ("MST/MDT, UTC-07:00 standard"), a fixed offset as
// "UTC+01:00".
std::string zone_display_name(const TimeZone& zone);

// ---- charts -------------------------------------------------------------------------------

struct RunChartInput {
  const CaseSpec* c = nullptr;
  const RunResult* r = nullptr;
  const StandardsReport* standards = nullptr;     // limits, alert thresholds and episodes
  const EnsemblePercentiles* ensemble = nullptr;  // the band between its outer percentiles
  std::optional<UtcSeconds> issue_time_utc;       // marked when inside the run
};

// chart.svg: the lid-and-wind panel, then per pollutant its concentration (with the ensemble
// band, the limits and alert thresholds of 24 h or shorter averaging drawn and labelled in the
// pollutant's unit, episodes shaded, the issue time marked) and its stack of parts (background,
// initial state, each emission sector).
std::string render_run_chart_svg(const RunChartInput& in);

struct MonitorChartSeries {
  std::string label;  // monitor
  std::string pollutant;
  std::string unit;
  std::vector<double> modelled;            // per run hour
  std::vector<double> fitted;              // per run hour, or empty
  std::vector<double> observed;            // per run hour, NaN where missing
  std::vector<unsigned char> substituted;  // 1: a below-detection hour given a substitute
};

struct MonitorChartInput {
  const CaseSpec* c = nullptr;
  const std::vector<HourRecord>* hours = nullptr;
  std::vector<MonitorChartSeries> series;
};

// One concentration panel per monitor and pollutant: the model, the monitor overlaid, the fit.
std::string render_monitor_chart_svg(const MonitorChartInput& in);
// Modelled (and fitted) against observed hour means, one square per monitor and pollutant, with
// the 1:1 line and the factor-of-two lines.
std::string render_scatter_svg(const MonitorChartInput& in);

}  // namespace lidbox
