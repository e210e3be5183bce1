// Helpers shared by the trial analysis files (not part of the public API).
#pragma once

#include <optional>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/analysis.hpp"

namespace bb {

// Ti as set, or from I:E and RR: Ti = (60/RR) * I/(I+E) (common practice, no source).
inline std::optional<Time> trial_inspiratory_time(const TrialVentilator& v) {
  if (v.ti) return v.ti;
  if (!v.ie_expiratory || !v.rr) return std::nullopt;
  return breath_period(*v.rr) * (1.0 / (1.0 + *v.ie_expiratory));
}

// The overall statement from the readings of the indices of one step.
PreloadStatement preload_statement(const std::vector<PreloadIndexReading>& indices);

// Everything one step shows on its own (no comparison with other steps).
StepAnalysis analyse_step(const TrialPatient& patient, const TrialStep& step,
                          const Thresholds& limits);

}  // namespace bb
