// Unpacking of stored numbers (CF Conventions 8.1 and 2.5.1; NetCDF User Guide, "Attribute
// Conventions": _FillValue, missing_value, valid_min/valid_max/valid_range, _Unsigned,
// scale_factor, add_offset), through File::read_values' hyperslab read, which reads the stored
// type itself and unpacks in one branch-free pass: worked values from those rules, and a seeded
// property test that it gives the same doubles as NetCDF-C's conversion to double followed by
// Packing one number at a time, for every stored type it handles.
#include <doctest/doctest.h>

#include <cmath>
#include <cstring>
#include <random>
#include <string>
#include <vector>

#include "met/netcdf_file.hpp"
#include "netcdf_fixture.hpp"

using lidbox::netcdf::File;
using lidbox::netcdf::Packing;
using lidbox::test::NcWriter;
using lidbox::test::scratch_dir;

namespace {

bool same_double(double a, double b) {
  if (std::isnan(a) || std::isnan(b)) return std::isnan(a) && std::isnan(b);
  return std::memcmp(&a, &b, sizeof a) == 0;
}

// The hyperslab read and the reference path (NetCDF-C to double, then Packing per number).
void read_both(const std::string& path, const std::string& name, std::vector<double>& fast,
               std::vector<double>& reference) {
  const File f(path, "");
  const auto* v = f.find(name);
  REQUIRE(v != nullptr);
  const std::size_t n = f.dim_len(v->dims[0]);
  f.read_values(*v, {0}, {n}, fast);
  reference = f.read_all(*v);
  const Packing unpack(f, *v);
  for (double& x : reference) x = unpack(x);
}

}  // namespace

TEST_CASE("packed shorts unpack by the CF rules: fill, missing, valid range, scale and offset") {
  const std::string path = scratch_dir("unpack-cf") + "/s.nc";
  {
    NcWriter w(path);
    const int d = w.dim("n", 7);
    const int s = w.var("s", NC_SHORT, {d});
    w.number(s, "_FillValue", NC_SHORT, {-32767});
    w.number(s, "missing_value", NC_SHORT, {-1});
    w.number(s, "valid_range", NC_SHORT, {-1000, 1000});
    w.number(s, "scale_factor", NC_DOUBLE, {0.5});
    w.number(s, "add_offset", NC_DOUBLE, {100.0});
    w.end_define();
    w.put(s, {-32767, -1, 0, 7, -1001, 1001, 1000});
  }
  std::vector<double> fast, reference;
  read_both(path, "s", fast, reference);
  // CF 8.1: value = stored * scale_factor + add_offset; CF 2.5.1: _FillValue, missing_value and
  // values outside valid_range are missing (worked by hand).
  REQUIRE(fast.size() == 7);
  CHECK(std::isnan(fast[0]));  // _FillValue
  CHECK(std::isnan(fast[1]));  // missing_value
  CHECK(fast[2] == 100.0);
  CHECK(fast[3] == 103.5);     // 7 * 0.5 + 100
  CHECK(std::isnan(fast[4]));  // below valid_range
  CHECK(std::isnan(fast[5]));  // above valid_range
  CHECK(fast[6] == 600.0);     // the bound itself is valid
  for (std::size_t i = 0; i < 7; ++i) CHECK(same_double(fast[i], reference[i]));
}

TEST_CASE("a signed byte marked _Unsigned reads as unsigned and the default fill is missing") {
  const std::string path = scratch_dir("unpack-unsigned") + "/b.nc";
  {
    NcWriter w(path);
    const int d = w.dim("n", 3);
    const int b = w.var("b", NC_BYTE, {d});
    w.text(b, "_Unsigned", "true");
    w.number(b, "scale_factor", NC_DOUBLE, {2.0});
    const int i = w.var("i", NC_INT, {d});  // no _FillValue: NC_FILL_INT marks missing
    w.end_define();
    w.put(b, {-56, 0, 127});
    w.put(i, {NC_FILL_INT, -5, 5});
  }
  std::vector<double> fast, reference;
  read_both(path, "b", fast, reference);
  // NetCDF User Guide, _Unsigned: -56 stored in a byte is 200; times the scale factor 2.
  CHECK(fast[0] == 400.0);
  CHECK(fast[1] == 0.0);
  CHECK(fast[2] == 254.0);
  read_both(path, "i", fast, reference);
  // NetCDF User Guide / CF 2.5.1: without _FillValue the type's default fill is missing.
  CHECK(std::isnan(fast[0]));
  CHECK(fast[1] == -5.0);
  CHECK(fast[2] == 5.0);
}

TEST_CASE("every stored type unpacks to the same doubles as NetCDF-C's conversion (seeded)") {
  // Property test, seed 20261203: random stored numbers, fills, missing values, bounds, scales
  // and offsets; the hyperslab read must equal the reference path bit for bit.
  std::mt19937_64 rng(20261203);
  const nc_type types[] = {NC_BYTE, NC_UBYTE, NC_SHORT, NC_USHORT, NC_INT, NC_UINT, NC_FLOAT};
  const double lows[] = {-128, 0, -32768, 0, -2147483647, 0, -1e6};
  const double highs[] = {127, 255, 32767, 65535, 2147483647, 4294967294.0, 1e6};
  std::size_t checked = 0;
  for (int trial = 0; trial < 40; ++trial) {
    const std::size_t t = static_cast<std::size_t>(trial) % 7;
    const std::string path =
        scratch_dir("unpack-property") + "/p" + std::to_string(trial) + ".nc";
    std::uniform_real_distribution<double> any(lows[t], highs[t]);
    const bool integer = types[t] != NC_FLOAT;
    auto draw = [&] { return integer ? std::round(any(rng)) : static_cast<float>(any(rng)); };
    const std::size_t n = 257;
    std::vector<double> stored(n);
    for (auto& x : stored) x = draw();
    const double fill = draw(), missing = draw();
    stored[3] = fill;
    stored[7] = missing;
    double lo = draw(), hi = draw();
    if (lo > hi) std::swap(lo, hi);
    const double scale = std::uniform_real_distribution<double>(-3.0, 3.0)(rng);
    const double offset = std::uniform_real_distribution<double>(-500.0, 500.0)(rng);
    {
      NcWriter w(path);
      const int d = w.dim("n", n);
      const int v = w.var("v", types[t], {d});
      if (trial % 3 != 0) w.number(v, "_FillValue", types[t], {fill});
      if (trial % 2 == 0) w.number(v, "missing_value", types[t], {missing});
      if (trial % 4 == 1) w.number(v, "valid_min", types[t], {lo});
      if (trial % 4 == 2) w.number(v, "valid_max", types[t], {hi});
      if (trial % 5 == 3) w.number(v, "valid_range", types[t], {lo, hi});
      if ((types[t] == NC_BYTE || types[t] == NC_SHORT) && trial % 6 == 2)
        w.text(v, "_Unsigned", "true");
      w.number(v, "scale_factor", NC_DOUBLE, {scale});
      w.number(v, "add_offset", NC_DOUBLE, {offset});
      w.end_define();
      w.put(v, stored);
    }
    std::vector<double> fast, reference;
    read_both(path, "v", fast, reference);
    REQUIRE(fast.size() == n);
    for (std::size_t i = 0; i < n; ++i) {
      if (!same_double(fast[i], reference[i])) {
        FAIL("type " << types[t] << " trial " << trial << " value " << i << ": " << fast[i]
                     << " != " << reference[i]);
      }
      ++checked;
    }
  }
  CHECK(checked == 40 * 257);
}
