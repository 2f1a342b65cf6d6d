#include "lidbox/base/exponential.hpp"

namespace lidbox {

void expm1_nonpositive(const double* y, double* out, std::size_t n) {
  for (std::size_t i = 0; i < n; ++i) out[i] = expm1_nonpositive(y[i]);
}

}  // namespace lidbox
