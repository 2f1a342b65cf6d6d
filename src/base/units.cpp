#include "lidbox/base/units.hpp"

#include <udunits2.h>

#include <cmath>
#include <memory>
#include <mutex>

#include "lidbox/base/error.hpp"

namespace lidbox {
namespace {

struct SystemDeleter {
  void operator()(ut_system* s) const { ut_free_system(s); }
};
struct UnitDeleter {
  void operator()(ut_unit* u) const { ut_free(u); }
};
struct ConverterDeleter {
  void operator()(cv_converter* c) const { cv_free(c); }
};
using UnitPtr = std::unique_ptr<ut_unit, UnitDeleter>;

ut_system* unit_system() {
  static std::unique_ptr<ut_system, SystemDeleter> system;
  static std::once_flag once;
  std::call_once(once, [] {
    // ut_read_xml reports harmless "overrides prefixed-unit" notes on every load; the library
    // never prints, so messages stay off for good.
    ut_set_error_message_handler(ut_ignore);
    system.reset(ut_read_xml(nullptr));
  });
  if (!system) {
    throw InternalError("the UDUNITS-2 unit database could not be loaded (package libudunits2-data)");
  }
  return system.get();
}

std::string translate(std::string_view text) {
  std::string s(text);
  while (!s.empty() && (s.front() == ' ')) s.erase(s.begin());
  while (!s.empty() && (s.back() == ' ')) s.pop_back();
  if (s == "mph" || s == "MPH") return "mile/hour";
  if (s == "kph" || s == "kmh" || s == "km h-1") return "km/h";
  if (s == "deg" || s == "degrees" || s == "Deg") return "degree";
  if (s == "kts" || s == "knots") return "knot";
  if (s == "degC" || s == "deg C" || s == "C" || s == "celsius") return "degree_Celsius";
  if (s == "degF" || s == "deg F" || s == "F") return "degree_Fahrenheit";
  return s;
}

UnitPtr parse(std::string_view text) {
  const std::string s = translate(text);
  if (s.empty()) return nullptr;
  return UnitPtr(ut_parse(unit_system(), s.c_str(), UT_UTF8));
}

}  // namespace

UnitConversion unit_conversion(std::string_view from, std::string_view to,
                               std::string_view quantity, std::string_view where) {
  const std::string expected = "a unit of " + std::string(quantity) + " convertible to \"" +
                               std::string(to) + "\"";
  if (from.empty()) {
    throw InputError(std::string(where), "no unit given", expected);
  }
  UnitPtr u_from = parse(from);
  if (!u_from) {
    throw InputError(std::string(where), "unit \"" + std::string(from) + "\" is not a known unit",
                     expected);
  }
  UnitPtr u_to = parse(to);
  if (!u_to) throw InternalError("target unit \"" + std::string(to) + "\" does not parse");
  if (!ut_are_convertible(u_from.get(), u_to.get())) {
    throw InputError(std::string(where),
                     "unit \"" + std::string(from) + "\" cannot be converted to \"" +
                         std::string(to) + "\"",
                     expected);
  }
  std::unique_ptr<cv_converter, ConverterDeleter> cv(ut_get_converter(u_from.get(), u_to.get()));
  if (!cv) throw InternalError("no converter from \"" + std::string(from) + "\"");
  const double at0 = cv_convert_double(cv.get(), 0.0);
  const double at1 = cv_convert_double(cv.get(), 1.0);
  const double at2 = cv_convert_double(cv.get(), 2.0);
  // UDUNITS also "converts" reciprocal units (1/h -> s as 3600/x): a rate is not a time.
  if (!std::isfinite(at0) || !std::isfinite(at1) ||
      std::fabs((at2 - at1) - (at1 - at0)) > 1e-9 * std::fabs(at1 - at0)) {
    throw InputError(std::string(where),
                     "unit \"" + std::string(from) + "\" is the reciprocal of \"" +
                         std::string(to) + "\", not a multiple of it",
                     expected);
  }
  return {at1 - at0, at0};
}

bool units_convertible(std::string_view from, std::string_view to) {
  UnitPtr a = parse(from);
  UnitPtr b = parse(to);
  return a && b && ut_are_convertible(a.get(), b.get()) != 0;
}

UnitConversion direction_unit_to_degrees(std::string_view from, std::string_view where) {
  const std::string s = translate(from);
  if (s == "degree" || s == "\xC2\xB0" || s == "degrees_true" || s == "degree_true") {
    return {1.0, 0.0};
  }
  if (s == "rad" || s == "radian" || s == "radians") return {57.29577951308232, 0.0};
  throw InputError(std::string(where), "unit \"" + std::string(from) + "\" is not an angle",
                   "degree (deg, \xC2\xB0) or radian");
}

}  // namespace lidbox
