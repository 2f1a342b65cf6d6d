#include "report/chart_draw.hpp"

#include <algorithm>
#include <cmath>

#include "lidbox/base/text.hpp"

namespace lidbox::chart {

namespace {
// At most one bin per two pixels: a long run's chart is as big as a 2-year one.
constexpr std::size_t kMaxBins = static_cast<std::size_t>(kPlotWidth / 2.0);
constexpr const char* kTickStyle = "text-anchor=\"middle\" fill=\"#222\"";
}  // namespace

TimeCanvas::TimeCanvas(const std::vector<HourRecord>& h, const TimeZone& zone)
    : hours(h),
      bins(make_time_bins(h, kMaxBins)),
      ticks(choose_time_ticks(h, kPlotWidth, kFont)),
      zone_name(zone_display_name(zone)) {}

double TimeCanvas::x_of(double hour) const {
  return kLeft + kPlotWidth * hour / static_cast<double>(std::max<std::size_t>(1, hours.size()));
}

double TimeCanvas::x_of_bin(std::size_t k) const {
  return x_of(0.5 * static_cast<double>(bins.first[k] + bins.first[k + 1]));
}

std::string TimeCanvas::drawn_as() const {
  if (hourly()) return "hour means";
  if (bins.days_per_bin == 1)
    return "daily means of the hour means, band up to the day's highest hour";
  return std::to_string(bins.days_per_bin) +
         "-day means of the hour means, band up to the highest hour";
}

double highest(std::initializer_list<const std::vector<double>*> series) {
  double m = 0.0;
  for (const auto* s : series) {
    for (double v : *s) {
      if (std::isfinite(v)) m = std::max(m, v);
    }
  }
  return m;
}

double draw_header(svg::Writer& w, std::string_view title, const TimeCanvas& t) {
  w.text(kLeft, 24, title, "font-size=\"16\" font-weight=\"bold\"");
  double y = w.caution(kLeft, 42, 150);
  std::string axis = "Time axis: local civil time, " + t.zone_name + "; drawn as " + t.drawn_as();
  w.text(kLeft, y + 2, axis, "font-size=\"12\" fill=\"#222\"");
  return y + 40;
}

void draw_frame(svg::Writer& w, const TimeCanvas& t, const Panel& p, std::string_view title) {
  const double bottom = p.y + p.h;
  // Time grid: at the finer row's ticks.
  const auto& grid = t.ticks.hour_step > 0 ? t.ticks.hour_row : t.ticks.date_row;
  for (const auto& l : grid) {
    const double x = t.x_of(l.hour);
    w.line(x, p.y, x, bottom, "stroke=\"#e4e4e4\"");
  }
  for (const auto& l : t.ticks.date_row) {
    const double x = t.x_of(l.hour);
    w.line(x, p.y, x, bottom + 4, "stroke=\"#b0b0b0\"");
  }
  for (double v = p.axis.lo; v <= p.axis.hi + 0.5 * p.axis.step; v += p.axis.step) {
    const double y = p.y_of(v);
    w.line(kLeft - 4, y, kLeft + kPlotWidth, y, "stroke=\"#e4e4e4\"");
    w.raw("<text x=\"").num(kLeft - 7).raw("\" y=\"").num(y + 4);
    w.raw("\" text-anchor=\"end\">").value(v, 4).raw("</text>\n");
  }
  w.rect(kLeft, p.y, kPlotWidth, p.h, "fill=\"none\" stroke=\"#333\"");
  w.vertical_text(22, p.y + 0.5 * p.h, title, "");
  double row = bottom + 15;
  for (const auto& l : t.ticks.hour_row) w.text(t.x_of(l.hour), row, l.text, kTickStyle, "tick-x");
  if (!t.ticks.hour_row.empty()) row += 14;
  for (const auto& l : t.ticks.date_row) {
    w.text(t.x_of(l.hour), row, l.text, std::string(kTickStyle) + " font-weight=\"bold\"",
           "tick-x");
  }
}

void draw_right_axis(svg::Writer& w, const Panel& p, const NiceAxis& axis, std::string_view title) {
  const Panel q{p.y, p.h, axis};
  for (double v = axis.lo; v <= axis.hi + 0.5 * axis.step; v += axis.step) {
    const double y = q.y_of(v);
    w.line(kLeft + kPlotWidth, y, kLeft + kPlotWidth + 4, y, "stroke=\"#333\"");
    w.raw("<text x=\"").num(kLeft + kPlotWidth + 7).raw("\" y=\"").num(y + 4);
    w.raw("\">").value(v, 4).raw("</text>\n");
  }
  w.vertical_text(kWidth - 16, p.y + 0.5 * p.h, title, "");
}

namespace {
// A line through the finite values; NaN lifts the pen.
void polyline(svg::Writer& w, const TimeCanvas& t, const Panel& p, const std::vector<double>& v,
              std::string_view style) {
  w.path_begin();
  bool pen = false;
  for (std::size_t k = 0; k < v.size(); ++k) {
    if (!std::isfinite(v[k])) {
      pen = false;
      continue;
    }
    if (pen) {
      w.line_to(t.x_of_bin(k), p.y_of(v[k]));
    } else {
      w.move_to(t.x_of_bin(k), p.y_of(v[k]));
    }
    pen = true;
  }
  w.path_end(std::string("fill=\"none\" ") + std::string(style));
}
}  // namespace

void draw_band(svg::Writer& w, const TimeCanvas& t, const Panel& p, const std::vector<double>& lo,
               const std::vector<double>& hi, std::string_view style) {
  // One closed piece per run of bins where both edges are finite.
  w.path_begin();
  std::size_t k = 0;
  const std::size_t n = lo.size();
  while (k < n) {
    if (!std::isfinite(lo[k]) || !std::isfinite(hi[k])) {
      ++k;
      continue;
    }
    std::size_t e = k;
    while (e < n && std::isfinite(lo[e]) && std::isfinite(hi[e])) ++e;
    w.move_to(t.x_of_bin(k), p.y_of(hi[k]));
    for (std::size_t j = k + 1; j < e; ++j) w.line_to(t.x_of_bin(j), p.y_of(hi[j]));
    for (std::size_t j = e; j-- > k;) w.line_to(t.x_of_bin(j), p.y_of(lo[j]));
    w.close_path();
    k = e;
  }
  w.path_end(style);
}

void draw_area(svg::Writer& w, const TimeCanvas& t, const Panel& p, const std::vector<double>& v,
               std::string_view style) {
  // One closed piece per run of finite values: its top edge and two corners on the base.
  const double base = p.y_of(std::max(0.0, p.axis.lo));
  w.path_begin();
  std::size_t k = 0;
  while (k < v.size()) {
    if (!std::isfinite(v[k])) {
      ++k;
      continue;
    }
    w.move_to(t.x_of_bin(k), base);
    for (; k < v.size() && std::isfinite(v[k]); ++k) w.line_to(t.x_of_bin(k), p.y_of(v[k]));
    w.line_to(t.x_of_bin(k - 1), base);
    w.close_path();
  }
  w.path_end(style);
}

void draw_series(svg::Writer& w, const TimeCanvas& t, const Panel& p, const BinStats& s,
                 std::string_view line_style, std::string_view band_style) {
  if (!t.hourly() && !band_style.empty()) draw_band(w, t, p, s.mean, s.max, band_style);
  polyline(w, t, p, s.mean, line_style);
}

void draw_span(svg::Writer& w, const TimeCanvas& t, const Panel& p, double from_hour,
               double to_hour, std::string_view style) {
  const double x0 = t.x_of(from_hour), x1 = t.x_of(to_hour);
  w.rect(x0, p.y, std::max(1.0, x1 - x0), p.h, style);
}

void draw_mark(svg::Writer& w, const TimeCanvas& t, const Panel& p, double hour,
               std::string_view label) {
  const double x = t.x_of(hour);
  w.line(x, p.y, x, p.y + p.h, "stroke=\"#333\" stroke-width=\"1.5\" stroke-dasharray=\"2,3\"");
  if (label.empty()) return;
  const bool right_half = x > kLeft + 0.6 * kPlotWidth;
  w.text(right_half ? x - 4 : x + 4, p.y + p.h - 6, label,
         right_half ? "text-anchor=\"end\" font-size=\"11\"" : "font-size=\"11\"");
}

namespace {
struct Box {
  double left, right, top, bottom;
  [[nodiscard]] bool hits(const Box& o) const {
    return left < o.right && o.left < right && top < o.bottom && o.top < bottom;
  }
};

// Where a level's label goes: right-aligned at the plot's right end just above its line, else
// just below it, else further left beside the labels in the way, so that labels of close levels
// sit side by side rather than on top of each other.
Box place_label(const Panel& p, double y, double width, const std::vector<Box>& placed) {
  const double right_end = kLeft + kPlotWidth - 4;
  const auto box_at = [&](double right, double baseline) {
    return Box{right - width, right, baseline - 9, baseline + 2};
  };
  const auto clear = [&](const Box& b) {
    return b.top >= p.y && b.bottom <= p.y + p.h &&
           std::none_of(placed.begin(), placed.end(), [&](const Box& o) { return b.hits(o); });
  };
  for (double right = right_end; right - width > kLeft + 4;) {
    for (const double baseline : {y - 3, y + 12}) {
      if (clear(box_at(right, baseline))) return box_at(right, baseline);
    }
    double next = right;
    for (const auto& o : placed) {
      if (o.right > right - width && o.left < right) next = std::min(next, o.left - 12);
    }
    if (next >= right) break;
    right = next;
  }
  return box_at(right_end, y - 3);  // nowhere free: above the line, over the others
}
}  // namespace

void draw_levels(svg::Writer& w, const Panel& p, std::vector<Level> levels) {
  std::sort(levels.begin(), levels.end(),
            [](const Level& a, const Level& b) { return a.value < b.value; });
  std::vector<Box> placed;
  for (const auto& l : levels) {
    const double y = p.y_of(l.value);
    w.line(kLeft, y, kLeft + kPlotWidth, y, l.style);
  }
  for (const auto& l : levels) {
    const Box b = place_label(p, p.y_of(l.value), label_width_px(l.label.size(), 11.0), placed);
    placed.push_back(b);
    w.text(b.right, b.bottom - 2, l.label,
           "text-anchor=\"end\" font-size=\"11\" fill=\"" + std::string(kPaletteLevel) +
               "\" stroke=\"white\" stroke-width=\"3\" paint-order=\"stroke\"");
  }
}

void draw_legend(svg::Writer& w, double y, const std::vector<LegendItem>& items, double x) {
  for (const auto& it : items) {
    if (it.text.empty()) continue;
    const std::string& s = it.swatch;
    if (s == "none") {
      w.text(x, y, it.text, "font-size=\"11.5\" font-weight=\"bold\"");
      x += 14 + label_width_px(it.text.size(), 11.5);
      continue;
    }
    if (s.rfind("circle:", 0) == 0) {
      w.raw("<circle cx=\"").num(x + 7).raw("\" cy=\"").num(y - 4);
      w.raw("\" r=\"2.5\" fill=\"none\" stroke=\"").raw(s.substr(7)).raw("\"/>\n");
    } else if (s.rfind("fill:", 0) == 0) {
      w.rect(x, y - 9, 14, 10, "fill=\"" + s.substr(5) + "\" stroke=\"#666\" stroke-width=\"0.5\"");
    } else {
      // "line:#colour:dash" (dash may be empty)
      const std::size_t c2 = s.find(':', 5);
      const std::string colour = s.substr(5, c2 == std::string::npos ? std::string::npos : c2 - 5);
      const std::string dash = c2 == std::string::npos ? "" : s.substr(c2 + 1);
      w.line(x, y - 4, x + 14, y - 4,
             "stroke=\"" + colour + "\" stroke-width=\"2\"" +
                 (dash.empty() ? "" : " stroke-dasharray=\"" + dash + "\""));
    }
    w.text(x + 18, y, it.text, "font-size=\"11.5\"");
    x += 30 + label_width_px(it.text.size(), 11.5) * 0.92;
  }
}

}  // namespace lidbox::chart
