// A run against monitors (chart.hpp): per monitor and pollutant the model, the monitor overlaid
// and, after a fit, the fitted model, on the charts' common time axis.
#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/report/chart.hpp"
#include "report/chart_draw.hpp"

namespace lidbox {

namespace {

using namespace chart;

constexpr double kPanel = 190.0, kLegendRow = 20.0;

double block() {
  return kLegendRow + kPanel + kTickRows + kPanelGap;
}

void monitor_panel(svg::Writer& w, const TimeCanvas& t, const MonitorChartSeries& m, double y) {
  const auto at = [](const std::vector<double>& v) { return [&v](std::size_t i) { return v[i]; }; };
  const auto model = t.stats(at(m.modelled));
  const auto observed = t.stats(at(m.observed));
  BinStats fitted;
  if (!m.fitted.empty()) fitted = t.stats(at(m.fitted));
  double low = 0.0;
  for (double v : observed.mean) {
    if (std::isfinite(v)) low = std::min(low, v);
  }
  const Panel p{y + kLegendRow, kPanel,
                nice_axis(low, highest({&model.max, &observed.max, &fitted.max}) * 1.03)};
  draw_frame(w, t, p, m.pollutant + " [" + m.unit + "]");
  // Binned: the model's band up to its highest hour; the monitor's highest hours as a thin
  // dotted line, so that two bands never cover each other.
  draw_series(w, t, p, model, "stroke=\"" + std::string(kPaletteLine) + "\" stroke-width=\"1.4\"",
              "fill=\"#7a7a7a\" fill-opacity=\"0.3\"");
  if (!m.fitted.empty()) {
    draw_series(
        w, t, p, fitted,
        "stroke=\"" + std::string(kPaletteFit) + "\" stroke-width=\"1.4\" stroke-dasharray=\"6,3\"",
        "");
  }
  draw_series(w, t, p, observed,
              "stroke=\"" + std::string(kPaletteMonitor) + "\" stroke-width=\"1.4\"", "");
  if (!t.hourly()) {
    draw_series(w, t, p, BinStats{observed.max, observed.max},
                "stroke=\"" + std::string(kPaletteMonitor) +
                    "\" stroke-width=\"1\" stroke-dasharray=\"1,2\"",
                "");
  }
  // Substituted below-detection hours (hourly drawing only: a day's mean hides them).
  if (t.hourly()) {
    for (std::size_t i = 0; i < m.substituted.size(); ++i) {
      if (!m.substituted[i] || std::isnan(m.observed[i])) continue;
      w.raw("<circle cx=\"").num(t.x_of(static_cast<double>(i) + 0.5)).raw("\" cy=\"");
      w.num(p.y_of(m.observed[i])).raw("\" r=\"2.5\" fill=\"none\" stroke=\"");
      w.raw(kPaletteMonitor).raw("\"/>\n");
    }
  }
  std::vector<LegendItem> legend = {{"none", m.label + ":"},
                                    {"line:" + std::string(kPaletteMonitor) + ":", "monitor"},
                                    {"line:" + std::string(kPaletteLine) + ":", "model"}};
  if (!m.fitted.empty())
    legend.push_back({"line:" + std::string(kPaletteFit) + ":6,3", "model after the fit"});
  if (t.hourly()) {
    legend.push_back({"circle:" + std::string(kPaletteMonitor), "below detection, substituted"});
  } else {
    legend[2].text += " (band to its highest hour)";
    legend.push_back({"line:" + std::string(kPaletteMonitor) + ":1,2", "monitor's highest hour"});
  }
  draw_legend(w, y + 13, legend);
}

}  // namespace

std::string render_monitor_chart_svg(const MonitorChartInput& in) {
  if (!in.c || !in.hours || in.hours->empty())
    throw InternalError("render_monitor_chart_svg: incomplete input");
  for (const auto& s : in.series) {
    if (s.modelled.size() != in.hours->size() || s.observed.size() != in.hours->size() ||
        (!s.fitted.empty() && s.fitted.size() != in.hours->size()))
      throw InternalError("render_monitor_chart_svg: a series off the run's hours");
  }
  const TimeCanvas t(*in.hours, in.c->zone);
  const double header = 118.0;
  const double height = header + static_cast<double>(in.series.size()) * block() + 20;
  svg::Writer w(kWidth, static_cast<int>(height), kFont);
  double y = std::max(header, draw_header(w, in.c->name + ": the model against monitors", t));
  for (const auto& s : in.series) {
    monitor_panel(w, t, s, y);
    y += block();
  }
  return w.finish();
}

}  // namespace lidbox
