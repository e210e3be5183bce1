// Small statistics helpers shared by the waveform analysis (internal).
#pragma once

#include <algorithm>
#include <cmath>
#include <vector>

namespace bb::wave {

// Median of `v` (reorders it); NaN when empty.
inline double median_of(std::vector<double>& v) {
  if (v.empty()) return std::nan("");
  const auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  if (v.size() % 2 == 1) return *mid;
  const double upper = *mid;
  const double lower = *std::max_element(v.begin(), mid);
  return 0.5 * (lower + upper);
}

// Quantile q in [0, 1] by linear interpolation between order statistics
// (reorders `v`); NaN when empty.
inline double quantile_of(std::vector<double>& v, double q) {
  if (v.empty()) return std::nan("");
  std::sort(v.begin(), v.end());
  const double pos = q * static_cast<double>(v.size() - 1);
  const auto lo = static_cast<std::size_t>(std::floor(pos));
  const auto hi = std::min(lo + 1, v.size() - 1);
  return v[lo] + (pos - static_cast<double>(lo)) * (v[hi] - v[lo]);
}

}  // namespace bb::wave
