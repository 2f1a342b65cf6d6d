// Private to the report room: a small SVG writer for the charts (chart.hpp). Numbers go through
// std::to_chars into one growing string, with no stream and no printf, so a chart's cost is
// linear in what it draws. Coordinates are written with one decimal (a tenth of a pixel).
// Text is escaped for XML; the SVG refers to nothing outside itself.
#pragma once

#include <string>
#include <string_view>

namespace lidbox::svg {

class Writer {
 public:
  Writer(int width_px, int height_px, double font_px);

  // Raw markup (already escaped).
  Writer& raw(std::string_view s) {
    out_ += s;
    return *this;
  }
  // A coordinate or length with one decimal, "12.3" ("12" when whole).
  Writer& num(double v);
  // A value with `digits` significant digits (labels), as format_number.
  Writer& value(double v, int digits);
  // XML-escaped text.
  Writer& escaped(std::string_view s);

  void line(double x1, double y1, double x2, double y2, std::string_view style);
  void rect(double x, double y, double w, double h, std::string_view style);
  // <text x y class style>escaped</text>; `cls` marks tick labels ("tick-x") for tests.
  void text(double x, double y, std::string_view s, std::string_view style,
            std::string_view cls = {});
  // Text rotated by -90 degrees about (x, y) (vertical axis titles).
  void vertical_text(double x, double y, std::string_view s, std::string_view style);
  // The caution, wrapped at about `chars` characters per line from (x, y); returns the y after.
  double caution(double x, double y, std::size_t chars);

  // A path built point by point: move_to starts a piece, line_to continues it.
  void path_begin();
  void move_to(double x, double y);
  void line_to(double x, double y);
  void close_path() { out_ += 'Z'; }
  void path_end(std::string_view style);

  [[nodiscard]] std::string finish();

 private:
  std::string out_;
  bool in_path_ = false;
};

}  // namespace lidbox::svg
