// Comparing the steps of a PEEP trial: relative change, the haemodynamic cost
// flag and which step is best by a key (brief section 8).
#include <cmath>

#include "breathbeat/heart_lung.hpp"
#include "breathbeat/output.hpp"

namespace bb {

namespace {
// Comparisons at a cut-off tolerate rounding in the SI conversions, so a fall of
// exactly 10 % entered in bedside units is flagged at a 10 % threshold.
constexpr double kCutOffTolerance = 1e-9;
}  // namespace

Ratio fractional_change_si(double before, double after) {
  if (before == 0.0 || !std::isfinite(before) || !std::isfinite(after)) {
    throw InputError("before", format_number(before, 3), "cannot be compared against",
                     "a finite, non-zero value at the step compared against");
  }
  return fraction((after - before) / before);
}

HaemodynamicCost haemodynamic_cost_from_change(Ratio change, const Thresholds& limits) {
  HaemodynamicCost out;
  out.change = change;
  out.flag_at = limits.get<Ratio>("heart_lung.haemodynamic_cost_fall");
  out.flagged = -in_fraction(change) >= in_fraction(out.flag_at) - kCutOffTolerance;
  return out;
}

std::optional<std::size_t> best_step_index_si(const std::vector<std::optional<double>>& values,
                                              BestBy by) {
  std::optional<std::size_t> best;
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (!values[i]) continue;
    if (!best) {
      best = i;
      continue;
    }
    const double current = *values[*best];
    const bool better = by == BestBy::maximum ? *values[i] > current : *values[i] < current;
    if (better) best = i;
  }
  return best;
}

std::optional<std::size_t> best_compliance_step(const std::vector<std::optional<Compliance>>& crs) {
  return best_step_index(crs, BestBy::maximum);
}

std::optional<std::size_t> best_oxygen_delivery_step(const std::vector<std::optional<Flow>>& do2) {
  return best_step_index(do2, BestBy::maximum);
}

std::optional<std::size_t> lowest_driving_pressure_step(
    const std::vector<std::optional<Pressure>>& dp) {
  return best_step_index(dp, BestBy::minimum);
}

}  // namespace bb
