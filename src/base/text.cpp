#include "lidbox/base/text.hpp"

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "lidbox/base/error.hpp"

namespace lidbox {

std::string_view trim(std::string_view s) {
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.remove_suffix(1);
  return s;
}

std::vector<std::string> split_lines(const std::string& text) {
  std::vector<std::string> out;
  std::size_t start = 0;
  while (start <= text.size()) {
    std::size_t end = text.find('\n', start);
    if (end == std::string::npos) end = text.size();
    std::string line = text.substr(start, end - start);
    if (!line.empty() && line.back() == '\r') line.pop_back();
    out.push_back(std::move(line));
    start = end + 1;
  }
  if (!out.empty() && out.back().empty()) out.pop_back();
  return out;
}

std::vector<std::string> split_csv_row(const std::string& line) {
  std::vector<std::string> out;
  std::string cur;
  bool quoted = false;
  for (std::size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted) {
      if (c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
        cur.push_back('"');
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        cur.push_back(c);
      }
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      out.push_back(cur);
      cur.clear();
    } else {
      cur.push_back(c);
    }
  }
  out.push_back(cur);
  return out;
}

std::vector<std::string> split_csv_row(const std::string& line, const std::string& where) {
  bool quoted = false;
  std::size_t opened = 0;
  for (std::size_t i = 0; i < line.size(); ++i) {
    if (line[i] != '"') continue;
    if (quoted && i + 1 < line.size() && line[i + 1] == '"') {
      ++i;
    } else {
      quoted = !quoted;
      if (quoted) opened = i;
    }
  }
  if (quoted) {
    throw InputError(where,
                     "a quote opened at character " + std::to_string(opened + 1) +
                         " is not closed (" + excerpt(std::string_view(line).substr(opened)) + ")",
                     "a closing quote on the same line");
  }
  return split_csv_row(line);
}

std::string_view strip_utf8_bom(std::string_view text) {
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
  return text;
}

void refuse_cr_only_lines(std::string_view text, const std::string& display_name) {
  const std::size_t cr = text.find('\r');
  if (cr == std::string_view::npos) return;
  if (cr + 1 < text.size() && text[cr + 1] == '\n') return;
  if (cr + 1 == text.size() && text.find('\n') == std::string_view::npos) {
    // One line with a CR at its very end and nothing after: still one line; let the reader judge.
    return;
  }
  const std::size_t lf = text.find('\n');
  if (lf != std::string_view::npos && lf < cr) return;  // a stray CR inside a later LF line
  throw InputError(display_name + ":1", "lines end in a carriage return alone (CR, old Mac style)",
                   "lines ending in LF or CR LF");
}

std::string separator_hint(std::string_view header_line) {
  if (header_line.find(',') != std::string_view::npos) return "";
  if (header_line.find(';') != std::string_view::npos) {
    return " (the header holds semicolons: the separator must be a comma)";
  }
  if (header_line.find('\t') != std::string_view::npos) {
    return " (the header holds tabs: the separator must be a comma)";
  }
  return "";
}

std::string excerpt(std::string_view text, std::size_t max_chars) {
  bool cut = false;
  if (text.size() > max_chars) {
    std::size_t end = max_chars;
    // Back up to the first byte of a UTF-8 sequence.
    while (end > 0 && (static_cast<unsigned char>(text[end]) & 0xC0) == 0x80) --end;
    text = text.substr(0, end);
    cut = true;
  }
  std::string out;
  out.reserve(text.size() + 4);
  for (char ch : text) {
    const auto c = static_cast<unsigned char>(ch);
    if (c == 0) {
      out += "\\0";
    } else if (c < 0x20 && c != '\t') {
      char buf[8];
      std::snprintf(buf, sizeof buf, "\\x%02X", c);
      out += buf;
    } else {
      out.push_back(ch);
    }
  }
  if (cut) out += "\xE2\x80\xA6";  // U+2026 HORIZONTAL ELLIPSIS in UTF-8
  return out;
}

bool parse_double(std::string_view text, double& value) {
  const std::string s(text);
  if (s.empty()) return false;
  char* end = nullptr;
  errno = 0;
  const double v = std::strtod(s.c_str(), &end);
  if (end != s.c_str() + s.size() || errno == ERANGE || !std::isfinite(v)) return false;
  // strtod accepts hex and "inf"/"nan"; a met file should hold plain decimals.
  for (char c : s) {
    if (!(std::isdigit(static_cast<unsigned char>(c)) || c == '.' || c == '-' || c == '+' ||
          c == 'e' || c == 'E')) {
      return false;
    }
  }
  value = v;
  return true;
}

std::string read_text_file(const std::string& path, const std::string& display_name) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) {
    throw InputError(display_name, "the path is a folder", "a file");
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    throw InputError(display_name, "the file cannot be opened", "a readable file");
  }
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

std::string format_number(double v, int digits) {
  if (std::isnan(v)) return "";
  if (v == 0.0) return "0";
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

std::size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<std::vector<std::size_t>> d(a.size() + 1, std::vector<std::size_t>(b.size() + 1));
  for (std::size_t i = 0; i <= a.size(); ++i) d[i][0] = i;
  for (std::size_t j = 0; j <= b.size(); ++j) d[0][j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t cost = a[i - 1] == b[j - 1] ? 0 : 1;
      d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) {
        d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
      }
    }
  }
  return d[a.size()][b.size()];
}

std::string lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

std::string join(const std::vector<std::string>& items, std::string_view separator) {
  std::string out;
  for (std::size_t i = 0; i < items.size(); ++i) {
    if (i) out += separator;
    out += items[i];
  }
  return out;
}

std::string closest_name(std::string_view word, const std::vector<std::string>& candidates) {
  const std::string w = lower(word);
  const std::size_t limit = std::max<std::size_t>(1, w.size() / 3);
  std::size_t best = limit + 1;
  std::string pick;
  for (const auto& c : candidates) {
    // The distance is at least the difference in length: a long text (a whole CSV line taken
    // for a zone name, found by fuzzing) costs nothing instead of a table per candidate.
    const std::size_t gap = w.size() > c.size() ? w.size() - c.size() : c.size() - w.size();
    if (gap >= best) continue;
    const std::size_t d = edit_distance(w, lower(c));
    if (d < best) {
      best = d;
      pick = c;
    }
  }
  return pick;
}

std::string did_you_mean(std::string_view word, const std::vector<std::string>& choices) {
  const std::string pick = closest_name(word, choices);
  return pick.empty() ? std::string() : " (did you mean \"" + pick + "\"?)";
}

}  // namespace lidbox
