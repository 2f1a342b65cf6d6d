#include "lidbox/base/time.hpp"

#include <date/tz.h>

#include <algorithm>
#include <cstdio>
#include <fstream>
#include <limits>
#include <sstream>
#include <vector>

#include "base/posix_tz.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

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

std::string format_utc(UtcSeconds t) {
  return format_civil(civil_from_utc_seconds(t)) + "Z";
}

std::string format_with_offset(UtcSeconds t, int offset_s) {
  return format_civil(civil_from_utc_seconds(t + offset_s)) + format_utc_offset(offset_s);
}

// ---------------------------------------------------------------------------------------------
// Time zones

namespace {

// Where Debian's tzdata installs the compiled zones, the folder libdate-tz reads (USE_OS_TZDB).
constexpr const char* kZoneinfoDir = "/usr/share/zoneinfo";

}  // namespace

struct TimeZone::Rules {
  posix_tz::Zone posix;  // a POSIX string's rules, or an IANA zone's TZif footer rule
  const date::time_zone* iana = nullptr;
  // For an IANA zone: from this instant on the footer rule applies. libdate-tz reads only the
  // explicit transitions of the TZif file (up to 2037 in Debian's files) and would freeze the
  // last offset after them; RFC 8536, section 3.3, says the footer extends the table.
  UtcSeconds footer_from = std::numeric_limits<UtcSeconds>::max();
};

namespace {

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

// The POSIX string after the last newline of a TZif v2+ file (RFC 8536, section 3.3), or "".
std::string tzif_footer(const std::string& zone_name) {
  std::ifstream in(std::string(kZoneinfoDir) + "/" + zone_name, std::ios::binary);
  if (!in) return "";
  std::ostringstream all;
  all << in.rdbuf();
  const std::string bytes = all.str();
  if (bytes.size() < 2 || bytes.back() != '\n') return "";
  const std::size_t open = bytes.rfind('\n', bytes.size() - 2);
  if (open == std::string::npos) return "";
  return bytes.substr(open + 1, bytes.size() - open - 2);
}

// An IANA zone name from the system database (libdate-tz lists every file under the zoneinfo
// folder, links such as "US/Mountain" included), or null. Throws InputError only when the database
// itself cannot be read.
const date::time_zone* find_iana(std::string_view spec, std::string_view where,
                                 std::vector<std::string>* names) {
  try {
    const date::tzdb& db = date::get_tzdb();
    for (const auto& z : db.zones) {
      if (z.name() == spec) return &z;
    }
    if (names) {
      for (const auto& z : db.zones) names->push_back(z.name());
    }
    return nullptr;
  } catch (const std::exception& e) {
    throw InputError(std::string(where),
                     "the system's time-zone database in " + std::string(kZoneinfoDir) +
                         " could not be read (" + e.what() + ")",
                     "the tzdata package installed, or a fixed offset or POSIX TZ string");
  }
}

}  // namespace

std::string tzdata_version() {
  try {
    const std::string& v = date::get_tzdb().version;
    if (!v.empty() && v != "unknown") return v;
  } catch (const std::exception&) {
    return "unknown";
  }
  // Debian ships no "+VERSION" file, which is where libdate-tz looks; tzdata.zi starts with
  // "# version 2026f" (tzfile(5) / zic(8) text form).
  std::ifstream in(std::string(kZoneinfoDir) + "/tzdata.zi");
  std::string line;
  if (in && std::getline(in, line) && line.rfind("# version ", 0) == 0) {
    return std::string(trim(line.substr(10)));
  }
  return "unknown";
}

TimeZone::TimeZone() = default;

TimeZone TimeZone::parse(std::string_view spec, std::string_view where) {
  TimeZone z;
  z.spec_ = std::string(spec);
  int fixed = 0;
  if (parse_fixed(spec, fixed)) {
    z.standard_offset_s_ = fixed;
    return z;
  }
  auto rules = std::make_shared<Rules>();
  const std::string posix_error = posix_tz::parse(spec, true, rules->posix);
  if (posix_error.empty()) {
    z.kind_ = Kind::posix;
    z.standard_offset_s_ = rules->posix.std_east_s;
    z.has_dst_ = rules->posix.has_dst;
    if (z.has_dst_) z.rules_ = std::move(rules);
    return z;
  }
  std::vector<std::string> names;
  const date::time_zone* iana = find_iana(spec, where, &names);
  if (!iana) {
    const std::string shown =
        spec.size() > 80 ? std::string(spec.substr(0, 80)) + "..." : std::string(spec);
    const bool looks_like_name = spec.find('/') != std::string_view::npos;
    throw InputError(
        std::string(where),
        "time zone \"" + shown + "\" " +
            (looks_like_name
                 ? "is not in the system's time-zone database" + did_you_mean(spec, names)
                 : posix_error),
        "a fixed offset such as \"+01:00\" or \"UTC\", an IANA zone name such as "
        "\"Europe/Paris\", or a POSIX TZ string such as \"CET-1CEST,M3.5.0,M10.5.0/3\" (POSIX "
        "sign: hours WEST of Greenwich are positive)");
  }
  z.kind_ = Kind::iana;
  rules->iana = iana;
  const date::sys_info last = iana->get_info(date::sys_days{date::year{9999} / date::January / 1});
  posix_tz::Zone footer;
  const std::string text = tzif_footer(iana->name());
  if (!text.empty() && posix_tz::parse(text, false, footer).empty()) {
    rules->posix = footer;
    rules->footer_from = last.begin.time_since_epoch().count();
    z.standard_offset_s_ = footer.std_east_s;
    z.has_dst_ = footer.has_dst;
  } else {
    z.standard_offset_s_ = static_cast<int>(last.offset.count());
  }
  z.rules_ = std::move(rules);
  return z;
}

int TimeZone::civil_offset_s(UtcSeconds t) const {
  if (!rules_) return standard_offset_s_;
  if (!rules_->iana || t >= rules_->footer_from) return posix_tz::civil_offset_s(rules_->posix, t);
  // date::year holds -32767..32767; every lidbox reader stays within -9999..9999.
  const UtcSeconds bounded = std::clamp<UtcSeconds>(t, -400'000'000'000LL, 400'000'000'000LL);
  return static_cast<int>(
      rules_->iana->get_info(date::sys_seconds{std::chrono::seconds{bounded}}).offset.count());
}

std::string TimeZone::kind_label() const {
  switch (kind_) {
    case Kind::iana:
      return "IANA tzdata " + tzdata_version();
    case Kind::posix:
      return "POSIX TZ string";
    case Kind::fixed:
      break;
  }
  return "fixed offset";
}

CivilTime TimeZone::civil(UtcSeconds t) const {
  return civil_from_utc_seconds(t + civil_offset_s(t));
}

CivilTime TimeZone::standard(UtcSeconds t) const {
  return civil_from_utc_seconds(t + standard_offset_s_);
}

UtcSeconds TimeZone::from_civil(const CivilTime& local, std::string_view where) const {
  const UtcSeconds as_utc = utc_seconds_from_civil(local);
  if (!rules_) return as_utc - standard_offset_s_;
  // The offsets in force a day either side are the only candidates (clock changes are more than
  // a day apart in every rule and in tzdata); a candidate holds when the zone agrees with it.
  const int before = civil_offset_s(as_utc - kSecondsPerDay);
  const int after = civil_offset_s(as_utc + kSecondsPerDay);
  const UtcSeconds a = as_utc - before;
  const UtcSeconds b = as_utc - after;
  const bool a_ok = civil_offset_s(a) == before;
  const bool b_ok = civil_offset_s(b) == after;
  if (a_ok && b_ok && a != b) {
    throw InputError(std::string(where),
                     "local time " + format_civil(local) + " occurs twice in zone \"" + spec_ +
                         "\" (clocks go back)",
                     "a time with an explicit UTC offset such as \"" + format_civil(local) +
                         format_utc_offset(std::max(before, after)) + "\"");
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
    return InputError(std::string(where), "time \"" + excerpt(text) + "\" " + why, expected);
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
