// chart.svg of a run (chart.hpp): the lid-and-wind panel, then per pollutant its concentration
// panel and its stack of parts.
#include <algorithm>
#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/report/chart.hpp"
#include "lidbox/standards/pollutant.hpp"
#include "report/chart_draw.hpp"

namespace lidbox {

namespace {

using namespace chart;

constexpr double kLidPanel = 150.0, kConcentrationPanel = 190.0, kStackPanel = 140.0;
constexpr double kLegendRow = 20.0;

double block(double panel_h) {
  return kLegendRow + panel_h + kTickRows + kPanelGap;
}

std::string part_name(const CaseSpec& c, std::size_t j) {
  if (j == 0) return "background";
  if (j == 1) return "initial state";
  return c.sectors[j - 2].name;
}

double hours_from_start(const RunResult& r, UtcSeconds t) {
  return static_cast<double>(t - r.hours.front().start_utc) / kSecondsPerHour;
}

// Hours whose wind was raised to the calm floor, as ticks on the panel's floor (hour by hour
// only: a day's bin would hide which hours). Returns how many hours there were.
std::size_t calm_floor_marks(svg::Writer& w, const TimeCanvas& t, const RunResult& r,
                             const Panel& p) {
  std::size_t n = 0;
  for (std::size_t i = 0; i < r.hours.size(); ++i) {
    if (!r.hours[i].calm_floor) continue;
    ++n;
    if (!t.hourly()) continue;
    w.rect(t.x_of(static_cast<double>(i)), p.y + p.h - 5, t.x_of(1.0) - t.x_of(0.0), 5,
           "fill=\"" + std::string(kPaletteLevel) + "\"");
  }
  return n;
}

// The issue time as a vertical line on a panel, labelled on the concentration panels.
void mark_issue_time(svg::Writer& w, const TimeCanvas& t, const RunChartInput& in, const Panel& p,
                     bool labelled) {
  if (!in.issue_time_utc) return;
  const double h = hours_from_start(*in.r, *in.issue_time_utc);
  if (h < 0.0 || h > static_cast<double>(in.r->hours.size())) return;
  draw_mark(w, t, p, h, labelled ? "issued " + format_local(*in.issue_time_utc, in.c->zone) : "");
}

void lid_and_wind_panel(svg::Writer& w, const TimeCanvas& t, const RunChartInput& in, double y) {
  const RunResult& r = *in.r;
  const auto lid = t.stats([&](std::size_t i) { return r.hours[i].mixing_height_m; });
  const auto residual = t.stats([&](std::size_t i) { return r.hours[i].residual_top_m; });
  const auto wind = t.stats([&](std::size_t i) { return r.hours[i].wind_speed_m_s; });
  const Panel p{y + kLegendRow, kLidPanel,
                nice_axis(0.0, highest({&lid.max, &residual.mean}) * 1.02)};
  const NiceAxis wind_axis = nice_axis(0.0, highest({&wind.mean}) * 1.02);
  const Panel pw{p.y, p.h, wind_axis};
  draw_frame(w, t, p, "height above ground [m]");
  draw_right_axis(w, p, wind_axis, "wind speed [m/s]");
  draw_area(w, t, p, lid.mean, "fill=\"" + std::string(kPaletteLid) + "\"");
  if (!t.hourly()) {
    draw_band(w, t, p, lid.mean, lid.max,
              "fill=\"" + std::string(kPaletteLid) + "\" fill-opacity=\"0.45\"");
  }
  draw_series(w, t, p, BinStats{residual.mean, residual.mean},
              "stroke=\"" + std::string(kPaletteResidual) +
                  "\" stroke-width=\"1.3\" stroke-dasharray=\"5,3\"",
              "");
  draw_series(w, t, pw, wind, "stroke=\"" + std::string(kPaletteWind) + "\" stroke-width=\"1.3\"",
              "");
  std::vector<LegendItem> legend = {
      {"fill:" + std::string(kPaletteLid),
       t.hourly() ? "mixing height [m]" : "mixing height [m], mean and band to highest"},
      {"line:" + std::string(kPaletteResidual) + ":5,3", "residual-layer top [m]"},
      {"line:" + std::string(kPaletteWind) + ":", "wind speed [m/s], right axis"}};
  mark_issue_time(w, t, in, p, false);
  const std::size_t calm = calm_floor_marks(w, t, r, p);
  if (calm > 0) {
    legend.push_back(
        {"fill:" + std::string(kPaletteLevel),
         std::to_string(calm) + " h under the calm floor" + (t.hourly() ? "" : " (hourly.csv)")});
  }
  draw_legend(w, y + 13, legend);
}

// Limits and alert thresholds of the rule sets for pollutant p with averaging of 24 h or less,
// in the pollutant's reporting unit; levels of equal value share one line.
std::vector<Level> levels_of(const RunChartInput& in, std::size_t p) {
  std::vector<Level> out;
  if (!in.standards) return out;
  const PollutantSpec& ps = in.c->pollutants[p];
  const PollutantInfo* info = find_pollutant(ps.name);
  if (!info) return out;
  const auto add = [&](double level, const std::string& unit, const std::string& label,
                       const RuleSet& rs, const std::string& where, bool alert) {
    const double f = unit_factor(ps.unit.canonical, unit, info->name, rs.reference, where);
    const double v = level / f;
    for (auto& l : out) {
      if (std::abs(l.value - v) <= 1e-9 * std::abs(v)) {
        l.label += "; " + label;
        return;
      }
    }
    out.push_back({v, label + ": " + format_number(v, 4) + " " + ps.unit.canonical,
                   "stroke=\"" + std::string(kPaletteLevel) + "\" stroke-width=\"1.3\"" +
                       (alert ? " stroke-dasharray=\"9,3,2,3\"" : " stroke-dasharray=\"6,4\""),
                   alert});
  };
  const auto short_enough = [](StatisticKind s) {
    return s != StatisticKind::annual_mean && s != StatisticKind::annual_mean_of_quarterly_means &&
           s != StatisticKind::peak_season_mean;
  };
  for (const auto& rs : in.standards->options.rule_sets) {
    for (const auto& l : rs.limits) {
      if (l.pollutant != info->name || !short_enough(l.statistic)) continue;
      // The panel names the pollutant: "PM2.5-24h-IT-3" is labelled "24h-IT-3".
      const std::string prefix = info->name + std::string("-");
      const std::string id = l.id.rfind(prefix, 0) == 0 ? l.id.substr(prefix.size()) : l.id;
      add(l.level, l.unit, rs.id + " " + id, rs, l.where, false);
    }
    for (const auto& a : rs.alerts) {
      if (a.pollutant != info->name || !short_enough(a.statistic)) continue;
      add(a.threshold, a.unit, rs.id + " " + a.level_name + " (" + a.averaging + ")", rs, a.where,
          true);
    }
  }
  return out;
}

struct Band {
  std::vector<double> lo, hi, median;
  std::string label;
};

std::optional<Band> ensemble_band(const RunChartInput& in, const TimeCanvas& t, std::size_t p) {
  if (!in.ensemble) return std::nullopt;
  const EnsemblePercentiles& e = *in.ensemble;
  if (e.hours() != in.r->hours.size() || e.pollutants() <= p || e.percentiles().size() < 2)
    throw InternalError("render_run_chart_svg: the ensemble does not match the run");
  const double to = in.c->pollutants[p].unit.to_g_m3;
  const std::size_t top = e.percentiles().size() - 1;
  Band b;
  b.lo = t.stats([&](std::size_t i) { return e.value(i, p, 0) / to; }).mean;
  b.hi = t.stats([&](std::size_t i) { return e.value(i, p, top) / to; }).max;
  const auto& q = e.percentiles();
  const auto mid = std::find(q.begin(), q.end(), 50.0);
  if (mid != q.end()) {
    const std::size_t k = static_cast<std::size_t>(mid - q.begin());
    b.median = t.stats([&](std::size_t i) { return e.value(i, p, k) / to; }).mean;
  }
  b.label = "ensemble p" + format_number(q.front(), 3) + "-p" + format_number(q.back(), 3) + " (" +
            std::to_string(e.members()) + " members" +
            (t.hourly() ? ")" : "; bin mean of the lower, highest hour of the upper)");
  return b;
}

// Episodes of pollutant p's alert rules shaded; true when there was any.
bool shade_episodes(svg::Writer& w, const TimeCanvas& t, const RunChartInput& in, std::size_t p,
                    const Panel& pn) {
  const PollutantInfo* info = find_pollutant(in.c->pollutants[p].name);
  bool any = false;
  if (!in.standards || !info) return any;
  for (const auto& e : in.standards->episodes) {
    if (e.pollutant != info->name) continue;
    draw_span(w, t, pn, hours_from_start(*in.r, e.start_utc), hours_from_start(*in.r, e.end_utc),
              "fill=\"" + std::string(kPaletteEpisode) + "\" fill-opacity=\"0.7\"");
    any = true;
  }
  return any;
}

void draw_ensemble(svg::Writer& w, const TimeCanvas& t, const Panel& pn, const Band& band,
                   std::vector<LegendItem>& legend) {
  draw_band(w, t, pn, band.lo, band.hi,
            "fill=\"" + std::string(kPaletteBand) + "\" fill-opacity=\"0.8\"");
  legend.push_back({"fill:" + std::string(kPaletteBand), band.label});
  if (band.median.empty()) return;
  draw_series(w, t, pn, BinStats{band.median, band.median},
              "stroke=\"" + std::string(kPaletteMedian) +
                  "\" stroke-width=\"1.2\" stroke-dasharray=\"4,2\"",
              "");
  legend.push_back({"line:" + std::string(kPaletteMedian) + ":4,2", "ensemble median"});
}

// The levels drawn, their legend entries, and one line naming those above the axis (more than
// twice the highest value would flatten the run into the axis); the tables list them all.
void draw_levels_and_notes(svg::Writer& w, const Panel& pn, const std::vector<Level>& shown,
                           const std::vector<Level>& off_scale, std::vector<LegendItem>& legend) {
  draw_levels(w, pn, shown);
  const auto any_level = [&shown](bool alert) {
    return std::any_of(shown.begin(), shown.end(),
                       [alert](const Level& l) { return l.alert == alert; });
  };
  if (any_level(false)) legend.push_back({"line:" + std::string(kPaletteLevel) + ":6,4", "limit"});
  if (any_level(true))
    legend.push_back({"line:" + std::string(kPaletteLevel) + ":9,3,2,3", "alert level"});
  if (off_scale.empty()) return;
  std::string text = "Above the axis (more than twice the highest value):";
  for (const auto& l : off_scale) text += (text.back() == ':' ? " " : "; ") + l.label;
  const std::size_t fits = static_cast<std::size_t>(kPlotWidth / label_width_px(1, 10.5));
  if (text.size() > fits) text = text.substr(0, fits - 24) + "... (all in limits.csv)";
  w.text(kLeft + 6, pn.y + 13, text,
         "font-size=\"10.5\" fill=\"" + std::string(kPaletteLevel) +
             "\" stroke=\"white\" stroke-width=\"3\" paint-order=\"stroke\"");
}

void concentration_panel(svg::Writer& w, const TimeCanvas& t, const RunChartInput& in,
                         std::size_t p, double y) {
  const RunResult& r = *in.r;
  const PollutantSpec& ps = in.c->pollutants[p];
  const auto total = t.stats([&](std::size_t i) { return r.total(i, p) / ps.unit.to_g_m3; });
  const auto band = ensemble_band(in, t, p);
  double top = highest({&total.max});
  if (band) top = std::max(top, highest({&band->hi}));
  std::vector<Level> levels = levels_of(in, p), shown, off_scale;
  for (auto& l : levels) (l.value <= 2.0 * top || top <= 0.0 ? shown : off_scale).push_back(l);
  for (const auto& l : shown) top = std::max(top, l.value);
  const Panel pn{y + kLegendRow, kConcentrationPanel, nice_axis(0.0, top * 1.05)};
  const bool any_episode = shade_episodes(w, t, in, p, pn);
  draw_frame(w, t, pn, ps.name + " [" + ps.unit.canonical + "]");
  std::vector<LegendItem> legend = {{"line:" + std::string(kPaletteLine) + ":",
                                     t.hourly() ? "this run" : "this run (band to highest hour)"}};
  if (band) draw_ensemble(w, t, pn, *band, legend);
  draw_series(w, t, pn, total, "stroke=\"" + std::string(kPaletteLine) + "\" stroke-width=\"1.4\"",
              "fill=\"#7a7a7a\" fill-opacity=\"0.35\"");
  draw_levels_and_notes(w, pn, shown, off_scale, legend);
  if (any_episode) legend.push_back({"fill:" + std::string(kPaletteEpisode), "alert episode"});
  mark_issue_time(w, t, in, pn, true);
  draw_legend(w, y + 13, legend);
}

void stack_panel(svg::Writer& w, const TimeCanvas& t, const RunChartInput& in, std::size_t p,
                 double y) {
  const RunResult& r = *in.r;
  const PollutantSpec& ps = in.c->pollutants[p];
  std::vector<std::vector<double>> layers;
  std::vector<std::size_t> parts;
  for (std::size_t j = 0; j < r.n_parts; ++j) {
    auto m = t.stats([&](std::size_t i) { return r.mean(i, p, j) / ps.unit.to_g_m3; }).mean;
    if (highest({&m}) <= 0.0) continue;  // the initial state after a spin-up, a silent sector
    if (!layers.empty()) {
      for (std::size_t k = 0; k < m.size(); ++k) m[k] += layers.back()[k];
    }
    layers.push_back(std::move(m));
    parts.push_back(j);
  }
  const Panel pn{y + kLegendRow, kStackPanel,
                 nice_axis(0.0, layers.empty() ? 1.0 : highest({&layers.back()}) * 1.02)};
  draw_frame(w, t, pn, ps.name + " parts [" + ps.unit.canonical + "]");
  std::vector<LegendItem> legend;
  // Each layer's cumulative area from the base, the top one first: half the points of bands.
  for (std::size_t k = layers.size(); k-- > 0;) {
    const char* colour = kPaletteStack[parts[k] % std::size(kPaletteStack)];
    draw_area(w, t, pn, layers[k], "fill=\"" + std::string(colour) + "\"");
  }
  for (std::size_t k = 0; k < layers.size(); ++k) {
    const char* colour = kPaletteStack[parts[k] % std::size(kPaletteStack)];
    legend.push_back({"fill:" + std::string(colour), part_name(*in.c, parts[k])});
  }
  legend.insert(legend.begin(), {"none", "stacked by part:"});
  mark_issue_time(w, t, in, pn, false);
  draw_legend(w, y + 13, legend);
}

}  // namespace

std::string render_run_chart_svg(const RunChartInput& in) {
  if (!in.c || !in.r || in.r->hours.empty())
    throw InternalError("render_run_chart_svg: incomplete input");
  const TimeCanvas t(in.r->hours, in.c->zone);
  const std::size_t P = in.r->n_pollutants;
  const double header = 118.0;
  const double height = header + block(kLidPanel) +
                        static_cast<double>(P) * (block(kConcentrationPanel) + block(kStackPanel)) +
                        20;
  svg::Writer w(kWidth, static_cast<int>(height), kFont);
  double y = draw_header(w, in.c->name + ": " + in.c->title, t);
  y = std::max(y, header);
  lid_and_wind_panel(w, t, in, y);
  y += block(kLidPanel);
  for (std::size_t p = 0; p < P; ++p) {
    concentration_panel(w, t, in, p, y);
    y += block(kConcentrationPanel);
    stack_panel(w, t, in, p, y);
    y += block(kStackPanel);
  }
  w.text(kLeft, height - 10,
         "lidbox " LIDBOX_VERSION " - hour means of a single well-mixed box; local civil time, " +
             t.zone_name,
         "font-size=\"11\" fill=\"#444\"");
  return w.finish();
}

}  // namespace lidbox
