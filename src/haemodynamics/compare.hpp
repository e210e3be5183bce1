// Comparisons at a cut-off that tolerate rounding from unit conversion, so a
// value equal to the cut-off on paper compares equal here. Internal to the
// haemodynamics module.
#pragma once

#include <algorithm>
#include <cmath>

namespace bb::haemo {

inline double tolerance(double cut_off) {
  return 1e-9 * std::max(1.0, std::abs(cut_off));
}
inline bool at_least(double value, double cut_off) {
  return value >= cut_off - tolerance(cut_off);
}
inline bool above(double value, double cut_off) {
  return value > cut_off + tolerance(cut_off);
}

}  // namespace bb::haemo
