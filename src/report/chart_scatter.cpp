// Modelled against observed hour means (chart.hpp): one square panel per monitor and pollutant,
// with the 1:1 line and the factor-of-two lines.
#include <algorithm>
#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/report/chart.hpp"
#include "report/chart_draw.hpp"

namespace lidbox {

namespace {

constexpr double kSide = 380.0, kPad = 80.0, kGap = 40.0, kTop = 112.0;

struct Square {
  double x0 = 0.0, y0 = 0.0;
  NiceAxis axis;
  [[nodiscard]] double x(double v) const {
    return x0 + kSide * (v - axis.lo) / (axis.hi - axis.lo);
  }
  [[nodiscard]] double y(double v) const {
    return y0 + kSide - kSide * (v - axis.lo) / (axis.hi - axis.lo);
  }
};

void points(svg::Writer& w, const Square& s, const std::vector<double>& observed,
            const std::vector<double>& modelled, const char* colour) {
  for (std::size_t i = 0; i < modelled.size(); ++i) {
    if (std::isnan(observed[i]) || std::isnan(modelled[i])) continue;
    w.raw("<circle cx=\"").num(s.x(observed[i])).raw("\" cy=\"").num(s.y(modelled[i]));
    w.raw("\" r=\"1.8\" fill=\"").raw(colour).raw("\" fill-opacity=\"0.5\"/>\n");
  }
}

void scatter_panel(svg::Writer& w, const MonitorChartSeries& m, double x0, double y0) {
  double hi = 0.0, lo = 0.0;
  for (std::size_t i = 0; i < m.modelled.size(); ++i) {
    if (std::isnan(m.observed[i])) continue;
    hi = std::max({hi, m.observed[i], m.modelled[i]});
    lo = std::min(lo, m.observed[i]);
    if (!m.fitted.empty()) hi = std::max(hi, m.fitted[i]);
  }
  const Square s{x0, y0, nice_axis(lo, hi)};
  w.rect(x0, y0, kSide, kSide, "fill=\"none\" stroke=\"#333\"");
  for (double v = s.axis.lo; v <= s.axis.hi + 0.5 * s.axis.step; v += s.axis.step) {
    w.raw("<text x=\"").num(x0 - 6).raw("\" y=\"").num(s.y(v) + 4);
    w.raw("\" text-anchor=\"end\">").value(v, 4).raw("</text>\n");
    w.raw("<text x=\"").num(s.x(v)).raw("\" y=\"").num(y0 + kSide + 16);
    w.raw("\" text-anchor=\"middle\">").value(v, 4).raw("</text>\n");
  }
  // 1:1 and factor-of-two lines from the origin, clipped to the square.
  for (const double slope : {1.0, 2.0, 0.5}) {
    const double end = s.axis.hi / std::max(1.0, slope);
    w.line(s.x(0), s.y(0), s.x(end), s.y(end * slope),
           slope == 1.0 ? "stroke=\"#888\"" : "stroke=\"#888\" stroke-dasharray=\"4,3\"");
  }
  points(w, s, m.observed, m.modelled, kPaletteMedian);
  if (!m.fitted.empty()) points(w, s, m.observed, m.fitted, kPaletteAmber);
  w.text(x0, y0 - 8, m.label + " " + m.pollutant, "font-weight=\"bold\"");
  w.text(x0 + kSide / 2, y0 + kSide + 34, "observed [" + m.unit + "]", "text-anchor=\"middle\"");
  w.vertical_text(x0 - 52, y0 + kSide / 2, "modelled [" + m.unit + "]", "");
}

}  // namespace

std::string render_scatter_svg(const MonitorChartInput& in) {
  if (!in.c || in.series.empty()) throw InternalError("render_scatter_svg: incomplete input");
  const std::size_t panels = in.series.size();
  const std::size_t cols = std::min<std::size_t>(panels, 2);
  const std::size_t rows = (panels + cols - 1) / cols;
  const double width = std::max(860.0, kPad + static_cast<double>(cols) * (kSide + kGap + kPad));
  const double height = kTop + static_cast<double>(rows) * (kSide + kGap + 40) + 20;
  svg::Writer w(static_cast<int>(width), static_cast<int>(height), chart::kFont);
  const bool fit = !in.series.front().fitted.empty();
  w.text(kPad, 24, in.c->name + ": modelled against observed hour means",
         "font-size=\"16\" font-weight=\"bold\"");
  const double y = w.caution(kPad, 42, static_cast<std::size_t>((width - kPad) / 6.6));
  chart::draw_legend(
      w, y + 4,
      {{"fill:" + std::string(kPaletteMedian), "model"},
       {fit ? "fill:" + std::string(kPaletteAmber) : "none", fit ? "after the fit" : ""},
       {"line:#888888:", "1:1"},
       {"line:#888888:4,3", "2:1 and 1:2"}},
      kPad);
  for (std::size_t k = 0; k < panels; ++k) {
    scatter_panel(w, in.series[k], kPad + static_cast<double>(k % cols) * (kSide + kGap + kPad),
                  kTop + static_cast<double>(k / cols) * (kSide + kGap + 40));
  }
  return w.finish();
}

}  // namespace lidbox
