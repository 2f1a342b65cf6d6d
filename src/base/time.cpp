#include "lidbox/base/time.hpp"

#include <boost/date_time/local_time/local_time.hpp>
#include <boost/date_time/posix_time/posix_time.hpp>
#include <cctype>
#include <cstdio>

#include "lidbox/base/error.hpp"

namespace lidbox {

// Proleptic Gregorian day counting: H. Hinnant, "chrono-Compatible Low-Level Date Algorithms"
// (days_from_civil / civil_from_days), valid far beyond any meteorological record.
std::int64_t days_from_civil(int y, int m, int d) {
  y -= m <= 2 ? 1 : 0;
  const std::int64_t era = (y >= 0 ? y : y - 399) / 400;
  const auto yoe = static_cast<unsigned>(y - era * 400);
  const unsigned doy = (153U * static_cast<unsigned>(m + (m > 2 ? -3 : 9)) + 2U) / 5U +
                       static_cast<unsigned>(d) - 1U;
  const unsigned doe = yoe * 365U + yoe / 4U - yoe / 100U + doy;
  return era * 146097 + static_cast<std::int64_t>(doe) - 719468;
}

namespace {

CivilTime civil_from_days(std::int64_t z) {
  z += 719468;
  const std::int64_t era = (z >= 0 ? z : z - 146096) / 146097;
  const auto doe = static_cast<unsigned>(z - era * 146097);
  const unsigned yoe = (doe - doe / 1460U + doe / 36524U - doe / 146096U) / 365U;
  const unsigned doy = doe - (365U * yoe + yoe / 4U - yoe / 100U);
  const unsigned mp = (5U * doy + 2U) / 153U;
  CivilTime c;
  c.day = static_cast<int>(doy - (153U * mp + 2U) / 5U + 1U);
  c.month = static_cast<int>(mp < 10 ? mp + 3 : mp - 9);
  c.year = static_cast<int>(static_cast<std::int64_t>(yoe) + era * 400 + (c.month <= 2 ? 1 : 0));
  // 1970-01-01 was a Thursday (ISO weekday 3 with Monday = 0).
  const std::int64_t days = z - 719468;
  c.day_of_week = static_cast<int>(((days % 7) + 7 + 3) % 7);
  return c;
}

std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  return a / b - ((a % b != 0) && ((a < 0) != (b < 0)) ? 1 : 0);
}

std::string two(int v) {
  char buf[8];
  std::snprintf(buf, sizeof buf, "%02d", v);
  return buf;
}

}  // namespace

CivilTime civil_from_utc_seconds(UtcSeconds t) {
  const std::int64_t days = floor_div(t, kSecondsPerDay);
  const std::int64_t sod = t - days * kSecondsPerDay;
  CivilTime c = civil_from_days(days);
  c.hour = static_cast<int>(sod / 3600);
  c.minute = static_cast<int>((sod % 3600) / 60);
  c.second = static_cast<int>(sod % 60);
  return c;
}

UtcSeconds utc_seconds_from_civil(const CivilTime& c) {
  return days_from_civil(c.year, c.month, c.day) * kSecondsPerDay + c.hour * 3600LL +
         c.minute * 60LL + c.second;
}

namespace {

std::string format_civil(const CivilTime& c) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%04d-%02d-%02dT%02d:%02d:%02d", c.year, c.month, c.day, c.hour,
                c.minute, c.second);
  return buf;
}

}  // namespace

std::string format_utc_offset(int offset_s) {
  const char sign = offset_s < 0 ? '-' : '+';
  const int a = offset_s < 0 ? -offset_s : offset_s;
  return std::string(1, sign) + two(a / 3600) + ":" + two((a % 3600) / 60);
}

std::string format_utc(UtcSeconds t) { return format_civil(civil_from_utc_seconds(t)) + "Z"; }

std::string format_with_offset(UtcSeconds t, int offset_s) {
  return format_civil(civil_from_utc_seconds(t + offset_s)) + format_utc_offset(offset_s);
}

// ---------------------------------------------------------------------------------------------
// Time zones

struct TimeZone::Rules {
  boost::local_time::time_zone_ptr zone;  // Boost form, sign already corrected
  int dst_offset_s = 0;                   // civil offset while daylight saving is in force
};

namespace {

namespace lt = boost::local_time;
namespace pt = boost::posix_time;

// A tiny cursor over the TZ text, for the POSIX grammar (IEEE Std 1003.1, 8.3):
//   std offset [dst [offset] [,start[/time],end[/time]]]
struct Cursor {
  std::string_view s;
  std::size_t i = 0;
  [[nodiscard]] bool done() const { return i >= s.size(); }
  [[nodiscard]] char peek() const { return done() ? '\0' : s[i]; }
};

bool read_name(Cursor& c, std::string& name) {
  name.clear();
  if (c.peek() == '<') {
    ++c.i;
    while (!c.done() && c.peek() != '>') name.push_back(c.s[c.i++]);
    if (c.peek() != '>') return false;
    ++c.i;
    return name.size() >= 3;
  }
  while (!c.done() && std::isalpha(static_cast<unsigned char>(c.peek()))) name.push_back(c.s[c.i++]);
  return name.size() >= 3;
}

bool read_number(Cursor& c, int max_digits, int& value) {
  int digits = 0;
  value = 0;
  while (!c.done() && std::isdigit(static_cast<unsigned char>(c.peek())) && digits < max_digits) {
    value = value * 10 + (c.s[c.i++] - '0');
    ++digits;
  }
  return digits > 0;
}

// [+|-]hh[:mm[:ss]] -> seconds, POSIX sign (positive = west of Greenwich).
bool read_hms(Cursor& c, int& seconds, bool allow_sign) {
  int sign = 1;
  if (allow_sign && (c.peek() == '+' || c.peek() == '-')) {
    sign = c.peek() == '-' ? -1 : 1;
    ++c.i;
  }
  int h = 0, m = 0, s = 0;
  if (!read_number(c, 3, h) || h > 167) return false;
  if (c.peek() == ':') {
    ++c.i;
    if (!read_number(c, 2, m) || m > 59) return false;
    if (c.peek() == ':') {
      ++c.i;
      if (!read_number(c, 2, s) || s > 59) return false;
    }
  }
  seconds = sign * (h * 3600 + m * 60 + s);
  return true;
}

// Jn | n | Mm.w.d [/time]; returns the rule text in Boost's syntax.
bool read_rule(Cursor& c, std::string& boost_rule) {
  const std::size_t start = c.i;
  int a = 0, b = 0, d = 0;
  if (c.peek() == 'M') {
    ++c.i;
    if (!read_number(c, 2, a) || a < 1 || a > 12 || c.peek() != '.') return false;
    ++c.i;
    if (!read_number(c, 1, b) || b < 1 || b > 5 || c.peek() != '.') return false;
    ++c.i;
    if (!read_number(c, 1, d) || d > 6) return false;
  } else if (c.peek() == 'J') {
    ++c.i;
    if (!read_number(c, 3, a) || a < 1 || a > 365) return false;
  } else {
    if (!read_number(c, 3, a) || a > 365) return false;
  }
  std::string rule(c.s.substr(start, c.i - start));
  int t = 7200;  // POSIX default transition time 02:00:00
  if (c.peek() == '/') {
    ++c.i;
    if (!read_hms(c, t, false)) return false;
  }
  char buf[32];
  std::snprintf(buf, sizeof buf, "/%02d:%02d:%02d", t / 3600, (t % 3600) / 60, t % 60);
  boost_rule = rule + buf;
  return true;
}

// Fixed offsets: "UTC", "GMT", "Z", "+01:00", "-05", "+0530", "UTC+01:00".
bool parse_fixed(std::string_view spec, int& offset_s) {
  std::string_view s = spec;
  if (s == "UTC" || s == "Z" || s == "GMT") {
    offset_s = 0;
    return true;
  }
  if (s.substr(0, 3) == "UTC" && s.size() > 3) s.remove_prefix(3);
  if (s.empty() || (s[0] != '+' && s[0] != '-')) return false;
  const int sign = s[0] == '-' ? -1 : 1;
  s.remove_prefix(1);
  int h = 0, m = 0;
  auto digit = [](char ch) { return ch >= '0' && ch <= '9'; };
  if (s.size() == 2 && digit(s[0]) && digit(s[1])) {
    h = (s[0] - '0') * 10 + (s[1] - '0');
  } else if (s.size() == 4 && digit(s[0]) && digit(s[1]) && digit(s[2]) && digit(s[3])) {
    h = (s[0] - '0') * 10 + (s[1] - '0');
    m = (s[2] - '0') * 10 + (s[3] - '0');
  } else if (s.size() == 5 && s[2] == ':' && digit(s[0]) && digit(s[1]) && digit(s[3]) &&
             digit(s[4])) {
    h = (s[0] - '0') * 10 + (s[1] - '0');
    m = (s[3] - '0') * 10 + (s[4] - '0');
  } else {
    return false;
  }
  if (h > 14 || m > 59) return false;
  offset_s = sign * (h * 3600 + m * 60);
  return true;
}

std::string boost_offset(int east_s) {
  const char sign = east_s < 0 ? '-' : '+';
  const int a = east_s < 0 ? -east_s : east_s;
  char buf[16];
  std::snprintf(buf, sizeof buf, "%c%02d:%02d", sign, a / 3600, (a % 3600) / 60);
  return buf;
}

pt::ptime to_ptime(UtcSeconds t) {
  static const pt::ptime epoch(boost::gregorian::date(1970, 1, 1));
  return epoch + pt::seconds(static_cast<long>(t));
}

}  // namespace

TimeZone::TimeZone() = default;

TimeZone TimeZone::parse(std::string_view spec, std::string_view where) {
  TimeZone z;
  z.spec_ = std::string(spec);
  int fixed = 0;
  if (parse_fixed(spec, fixed)) {
    z.standard_offset_s_ = fixed;
    return z;
  }
  const std::string expected =
      "a fixed offset such as \"+01:00\" or \"UTC\", or a POSIX TZ string such as "
      "\"CET-1CEST,M3.5.0,M10.5.0/3\" (POSIX sign: hours WEST of Greenwich are positive)";
  const auto bad = [&](const std::string& why) {
    return InputError(std::string(where), "time zone \"" + std::string(spec) + "\" " + why,
                      expected);
  };
  Cursor c{spec};
  std::string std_name, dst_name;
  int std_west = 0;
  if (!read_name(c, std_name)) throw bad("does not start with a zone name of 3 or more letters");
  if (!read_hms(c, std_west, true)) throw bad("has no valid offset after its standard-time name");
  z.standard_offset_s_ = -std_west;
  if (c.done()) return z;  // POSIX string without daylight saving: a fixed offset
  if (!read_name(c, dst_name)) throw bad("has an invalid daylight-saving name");
  int dst_west = std_west - 3600;  // POSIX default: one hour ahead of standard time
  if (c.peek() != ',' && !c.done()) {
    if (!read_hms(c, dst_west, true)) throw bad("has an invalid daylight-saving offset");
  }
  std::string start_rule, end_rule;
  if (c.peek() != ',') throw bad("names daylight saving but gives no ',start,end' rule");
  ++c.i;
  if (!read_rule(c, start_rule)) throw bad("has an invalid start rule");
  if (c.peek() != ',') throw bad("has no end rule");
  ++c.i;
  if (!read_rule(c, end_rule)) throw bad("has an invalid end rule");
  if (!c.done()) throw bad("has unexpected text at position " + std::to_string(c.i + 1));

  const int std_east = -std_west;
  const int dst_east = -dst_west;
  // Boost wants east-positive offsets, alphabetic names and the DST offset as the difference.
  const std::string boost_spec = "STD" + boost_offset(std_east) + "DST" +
                                 boost_offset(dst_east - std_east) + "," + start_rule + "," +
                                 end_rule;
  auto rules = std::make_shared<Rules>();
  try {
    rules->zone.reset(new lt::posix_time_zone(boost_spec));
  } catch (const std::exception& e) {
    throw bad(std::string("was refused by the rule parser (") + e.what() + ")");
  }
  rules->dst_offset_s = dst_east;
  z.rules_ = std::move(rules);
  z.has_dst_ = true;
  return z;
}

int TimeZone::civil_offset_s(UtcSeconds t) const {
  if (!rules_) return standard_offset_s_;
  const lt::local_date_time ldt(to_ptime(t), rules_->zone);
  return ldt.is_dst() ? rules_->dst_offset_s : standard_offset_s_;
}

CivilTime TimeZone::civil(UtcSeconds t) const { return civil_from_utc_seconds(t + civil_offset_s(t)); }

CivilTime TimeZone::standard(UtcSeconds t) const {
  return civil_from_utc_seconds(t + standard_offset_s_);
}

UtcSeconds TimeZone::from_civil(const CivilTime& local, std::string_view where) const {
  const UtcSeconds as_utc = utc_seconds_from_civil(local);
  if (!rules_) return as_utc - standard_offset_s_;
  const UtcSeconds a = as_utc - standard_offset_s_;
  const UtcSeconds b = as_utc - rules_->dst_offset_s;
  const bool a_ok = civil_offset_s(a) == standard_offset_s_;
  const bool b_ok = civil_offset_s(b) == rules_->dst_offset_s;
  if (a_ok && b_ok && a != b) {
    throw InputError(std::string(where),
                     "local time " + format_civil(local) + " occurs twice in zone \"" + spec_ +
                         "\" (clocks go back)",
                     "a time with an explicit UTC offset such as \"" + format_civil(local) +
                         format_utc_offset(rules_->dst_offset_s) + "\"");
  }
  if (a_ok) return a;
  if (b_ok) return b;
  throw InputError(std::string(where),
                   "local time " + format_civil(local) + " does not exist in zone \"" + spec_ +
                       "\" (clocks go forward)",
                   "a local time that exists, or a time with an explicit UTC offset");
}

// ---------------------------------------------------------------------------------------------
// ISO 8601

UtcSeconds parse_iso8601(std::string_view text, const TimeZone* zone_for_naive,
                         std::string_view where) {
  const std::string expected =
      "an ISO 8601 time such as 2026-01-05T13:00:00Z or 2026-01-05T14:00+01:00";
  const auto bad = [&](const std::string& why) {
    return InputError(std::string(where), "time \"" + std::string(text) + "\" " + why, expected);
  };
  std::string_view s = text;
  while (!s.empty() && s.front() == ' ') s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\r')) s.remove_suffix(1);
  auto digits = [&](std::size_t pos, std::size_t n, int& out) {
    if (pos + n > s.size()) return false;
    out = 0;
    for (std::size_t k = pos; k < pos + n; ++k) {
      if (s[k] < '0' || s[k] > '9') return false;
      out = out * 10 + (s[k] - '0');
    }
    return true;
  };
  CivilTime c;
  if (!digits(0, 4, c.year) || s.size() < 16 || s[4] != '-' || !digits(5, 2, c.month) ||
      s[7] != '-' || !digits(8, 2, c.day) || (s[10] != 'T' && s[10] != ' ') ||
      !digits(11, 2, c.hour) || s[13] != ':' || !digits(14, 2, c.minute)) {
    throw bad("is not of the form YYYY-MM-DDThh:mm[:ss]");
  }
  std::size_t pos = 16;
  if (pos < s.size() && s[pos] == ':') {
    if (!digits(pos + 1, 2, c.second)) throw bad("has invalid seconds");
    pos += 3;
    if (pos < s.size() && (s[pos] == '.' || s[pos] == ',')) {
      std::size_t k = pos + 1;
      bool nonzero = false;
      while (k < s.size() && s[k] >= '0' && s[k] <= '9') nonzero |= s[k++] != '0';
      if (nonzero) throw bad("has a fraction of a second");
      pos = k;
    }
  }
  if (c.month < 1 || c.month > 12 || c.day < 1 || c.hour > 23 || c.minute > 59 || c.second > 59) {
    throw bad("has a field out of range");
  }
  {
    // Day-of-month check through a round trip.
    CivilTime probe = civil_from_utc_seconds(utc_seconds_from_civil(c));
    if (probe.day != c.day || probe.month != c.month) throw bad("is not a calendar date");
  }
  const std::string_view rest = s.substr(pos);
  if (rest.empty()) {
    if (!zone_for_naive) {
      throw bad("has no UTC offset, and no time zone is given for times without one");
    }
    return zone_for_naive->from_civil(c, where);
  }
  int offset = 0;
  if (rest != "Z" && !parse_fixed(rest, offset)) throw bad("has an invalid UTC offset");
  return utc_seconds_from_civil(c) - offset;
}

}  // namespace lidbox
