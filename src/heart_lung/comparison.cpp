// Comparing the steps of a PEEP trial: relative change, the haemodynamic cost
// flag, which step is best by a key and which steps tie with it (sources in docs/methods.md).
#include <cmath>
#include <stdexcept>

#include "breathbeat/cutoff.hpp"
#include "breathbeat/heart_lung.hpp"

namespace bb {

void require_comparable(double before_si, double after_si) {
  if (before_si != 0.0 && std::isfinite(before_si) && std::isfinite(after_si)) return;
  throw std::domain_error("relative change against a zero or non-finite value");
}

HaemodynamicCost haemodynamic_cost_from_change(Ratio change, const Thresholds& limits) {
  HaemodynamicCost out;
  out.change = change;
  out.flag_at = limits.get<Ratio>("heart_lung.haemodynamic_cost_fall");
  // At the cut-off within rounding, so a fall of exactly 10 % entered in bedside
  // units is flagged at a 10 % threshold.
  out.flagged = cutoff::at_least(-in_fraction(change), in_fraction(out.flag_at));
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

std::vector<std::size_t> tied_steps_si(const std::vector<std::optional<double>>& values,
                                       std::size_t best, double resolution, bool relative) {
  std::vector<std::size_t> out;
  if (best >= values.size() || !values[best]) return out;
  const double b = *values[best];
  const double within = relative ? resolution * std::abs(b) : resolution;
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (i == best || !values[i]) continue;
    if (cutoff::below(std::abs(*values[i] - b), within)) out.push_back(i);
  }
  return out;
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
