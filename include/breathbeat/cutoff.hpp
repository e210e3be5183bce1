// Comparing a value with a published cut-off, tolerating the rounding of unit
// conversion, so that a value equal to the cut-off on paper compares equal
// here. The one comparison every module uses (mechanics, oxygen, PPV gates,
// preload tests, IVC, heart-lung).
#pragma once

#include <algorithm>
#include <cmath>

namespace bb::cutoff {

inline double tolerance(double cut_off) { return 1e-9 * std::max(1.0, std::abs(cut_off)); }
// value >= cut_off, within rounding.
inline bool at_least(double value, double cut_off) { return value >= cut_off - tolerance(cut_off); }
// value > cut_off, beyond rounding.
inline bool above(double value, double cut_off) { return value > cut_off + tolerance(cut_off); }
// value <= cut_off, within rounding.
inline bool at_most(double value, double cut_off) { return value <= cut_off + tolerance(cut_off); }
// value < cut_off, beyond rounding.
inline bool below(double value, double cut_off) { return value < cut_off - tolerance(cut_off); }

// The same for quantities of one dimension (compared in SI).
template <class Q>
bool at_least(Q value, Q cut_off) { return at_least(value.value(), cut_off.value()); }
template <class Q>
bool above(Q value, Q cut_off) { return above(value.value(), cut_off.value()); }
template <class Q>
bool at_most(Q value, Q cut_off) { return at_most(value.value(), cut_off.value()); }
template <class Q>
bool below(Q value, Q cut_off) { return below(value.value(), cut_off.value()); }

}  // namespace bb::cutoff
