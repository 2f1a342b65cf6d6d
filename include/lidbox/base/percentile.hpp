#pragma once
// The percentile of a sample, one definition for the whole library (ensembles, grid maps).

#include <vector>

namespace lidbox {

// numpy.percentile(x, q) with its default method: linear interpolation between order statistics
// (Hyndman and Fan 1996, definition 7), with numpy's lerp taken from the nearer end. q in
// [0, 100] (InternalError otherwise); NaN for an empty sample. Sorts `x` in place.
double percentile_linear(std::vector<double>& x, double q);

}  // namespace lidbox
