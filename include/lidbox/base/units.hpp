// Physical units at the boundaries (CSV headers, NetCDF attributes, case-file values), through
// UDUNITS-2 (Unidata), which knows the SI, its prefixes and the usual non-SI units (ft, kt, km/h,
// degC, degF, hPa, ...). The unit database is loaded once per process (about 5 ms).
//
// Every unit lidbox meets is an affine map of the target unit (temperatures have offsets), so a
// conversion is kept as scale and offset: allocation-free and cheap to apply per value.
#pragma once

#include <string>
#include <string_view>

namespace lidbox {

struct UnitConversion {
  double scale = 1.0;
  double offset = 0.0;
  [[nodiscard]] double operator()(double v) const { return v * scale + offset; }
};

// The conversion from `from` to `to`. Common spellings that UDUNITS does not read the way
// meteorological files mean them are translated first: "mph" -> mile/hour (UDUNITS reads
// milli-phot), "kph" -> km/h, "deg"/"degrees" -> degree.
// An empty, unknown or unconvertible unit is an InputError naming `where`, for example
//   met.csv: column "wind_speed [furlong]": unit "furlong" cannot be converted to "m/s";
//   expected a unit of speed such as m/s, km/h, kt or mph
// `quantity` ("speed", "length", ...) words the "expected" part of that message.
UnitConversion unit_conversion(std::string_view from, std::string_view to,
                               std::string_view quantity, std::string_view where);

// True when `from` parses and converts to `to`.
bool units_convertible(std::string_view from, std::string_view to);

// Directions are special: UDUNITS treats angles as dimensionless, so "ppb" would convert to
// "degree". A direction unit must be one of degree, degrees, deg, °, radian, rad.
UnitConversion direction_unit_to_degrees(std::string_view from, std::string_view where);

}  // namespace lidbox
