#include "report/svg_writer.hpp"

#include <charconv>
#include <cmath>
#include <sstream>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox::svg {

Writer::Writer(int width_px, int height_px, double font_px) {
  out_.reserve(1 << 16);
  out_ += "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"";
  num(width_px).raw("\" height=\"").num(height_px).raw("\" viewBox=\"0 0 ");
  num(width_px).raw(" ").num(height_px);
  raw("\" font-family=\"DejaVu Sans, Arial, sans-serif\" font-size=\"").num(font_px);
  raw("\">\n<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n");
}

Writer& Writer::num(double v) {
  if (!std::isfinite(v)) throw InternalError("svg: a coordinate that is not finite");
  // Whole tenths, printed without a trailing ".0".
  const long long tenths = std::llround(v * 10.0);
  char buf[32];
  char* p = buf;
  long long a = tenths;
  if (a < 0) {
    *p++ = '-';
    a = -a;
  }
  p = std::to_chars(p, buf + sizeof buf, a / 10).ptr;
  if (a % 10 != 0) {
    *p++ = '.';
    *p++ = static_cast<char>('0' + a % 10);
  }
  out_.append(buf, p);
  return *this;
}

Writer& Writer::value(double v, int digits) {
  out_ += format_number(v, digits);
  return *this;
}

Writer& Writer::escaped(std::string_view s) {
  for (char ch : s) {
    switch (ch) {
      case '<':
        out_ += "&lt;";
        break;
      case '>':
        out_ += "&gt;";
        break;
      case '&':
        out_ += "&amp;";
        break;
      case '"':
        out_ += "&quot;";
        break;
      default:
        out_ += ch;
    }
  }
  return *this;
}

void Writer::line(double x1, double y1, double x2, double y2, std::string_view style) {
  raw("<line x1=\"").num(x1).raw("\" y1=\"").num(y1).raw("\" x2=\"").num(x2);
  raw("\" y2=\"").num(y2).raw("\" ").raw(style).raw("/>\n");
}

void Writer::rect(double x, double y, double w, double h, std::string_view style) {
  raw("<rect x=\"").num(x).raw("\" y=\"").num(y).raw("\" width=\"").num(w);
  raw("\" height=\"").num(h).raw("\" ").raw(style).raw("/>\n");
}

void Writer::text(double x, double y, std::string_view s, std::string_view style,
                  std::string_view cls) {
  raw("<text x=\"").num(x).raw("\" y=\"").num(y).raw("\"");
  if (!cls.empty()) raw(" class=\"").raw(cls).raw("\"");
  if (!style.empty()) raw(" ").raw(style);
  raw(">").escaped(s).raw("</text>\n");
}

void Writer::vertical_text(double x, double y, std::string_view s, std::string_view style) {
  raw("<text x=\"").num(x).raw("\" y=\"").num(y).raw("\" transform=\"rotate(-90 ").num(x);
  raw(" ").num(y).raw(")\" text-anchor=\"middle\" ").raw(style).raw(">").escaped(s);
  raw("</text>\n");
}

double Writer::caution(double x, double y, std::size_t chars) {
  std::string line, word;
  std::istringstream words(std::string("CAUTION: ") + kScreeningCaution);
  const auto flush = [&] {
    text(x, y, line, "font-size=\"11\" fill=\"#444\"");
    line.clear();
    y += 13.0;
  };
  while (words >> word) {
    if (!line.empty() && line.size() + 1 + word.size() > chars) flush();
    line += (line.empty() ? "" : " ") + word;
  }
  if (!line.empty()) flush();
  return y;
}

void Writer::path_begin() {
  out_ += "<path d=\"";
  in_path_ = true;
}

void Writer::move_to(double x, double y) {
  out_ += 'M';
  num(x).raw(",").num(y);
}

void Writer::line_to(double x, double y) {
  out_ += 'L';
  num(x).raw(",").num(y);
}

void Writer::path_end(std::string_view style) {
  if (!in_path_) throw InternalError("svg: path_end without path_begin");
  in_path_ = false;
  raw("\" ").raw(style).raw("/>\n");
}

std::string Writer::finish() {
  out_ += "</svg>\n";
  return std::move(out_);
}

}  // namespace lidbox::svg
