#pragma once
// e^y - 1 for y <= 0, written so that a loop over many arguments vectorises (the grid run steps
// every cell's box with one exponential per hour), to within 3 units in the last place of the
// correctly rounded value (tests/base/test_exponential.cpp checks it against the C library's
// expm1 and against numpy.expm1).
//
// Method (Cody and Waite 1980, "Software Manual for the Elementary Functions", ch. 6): y = k ln2
// + r with k = round(y / ln2) and |r| <= ln2 / 2, ln2 split into a high part exact in k * ln2_hi
// for |k| < 2^11 and a low part; e^r - 1 by its Taylor series to r^13 (the next term is below
// 5e-18 relative for |r| <= ln2 / 2); e^y - 1 = 2^k (e^r - 1) + (2^k - 1), both products exact.
// Below y = -40, e^y is under a quarter of an ulp of 1 and the result is -1.
//
// Contract: y <= 0 and not NaN (the box's -lambda dt, which callers guarantee); the value for
// y > 0 is not e^y - 1 and must not be used.

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstring>

namespace lidbox {

inline double expm1_nonpositive(double y) {
  constexpr double kInvLn2 = 1.4426950408889634074;
  constexpr double kLn2Hi = 6.93147180369123816490e-01;  // ln 2 with its last 21 bits zero
  constexpr double kLn2Lo = 1.90821492927058770002e-10;  // ln 2 - kLn2Hi
  constexpr double kShift = 6755399441055744.0;          // 1.5 * 2^52: adding it rounds to an integer
  // Below -40 the result rounds to -1 (e^-40 < ulp(1) / 4), which the clamped argument gives.
  const double yc = std::max(y, -40.0);
  const double t = yc * kInvLn2 + kShift;
  const double kd = t - kShift;
  const double r = (yc - kd * kLn2Hi) - kd * kLn2Lo;
  // Taylor coefficients 1/n!, n = 2..13.
  const double p =
      r + r * r *
              (1.0 / 2 +
               r * (1.0 / 6 +
                    r * (1.0 / 24 +
                         r * (1.0 / 120 +
                              r * (1.0 / 720 +
                                   r * (1.0 / 5040 +
                                        r * (1.0 / 40320 +
                                             r * (1.0 / 362880 +
                                                  r * (1.0 / 3628800 +
                                                       r * (1.0 / 39916800 +
                                                            r * (1.0 / 479001600 +
                                                                 r * (1.0 / 6227020800.0))))))))))));
  std::uint64_t bits;
  std::memcpy(&bits, &t, sizeof bits);
  // The low bits of t hold k in two's complement; k + 1023 in the exponent field is 2^k.
  const std::uint64_t scale_bits = (bits + 1023u) << 52;
  double two_k;
  std::memcpy(&two_k, &scale_bits, sizeof two_k);
  const double e = two_k * p + (two_k - 1.0);
  return e;
}

// out[i] = expm1_nonpositive(y[i]) for i < n.
void expm1_nonpositive(const double* y, double* out, std::size_t n);

}  // namespace lidbox
