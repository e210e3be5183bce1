// Echo stroke volume for a trial step (the echo module's part of the check).
#pragma once

#include <optional>

#include "breathbeat/errors.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/trial.hpp"

namespace bb {

// The echo module's objection to this step's LVOT/VTI values, if any.
std::optional<InputError> trial_echo_check(const TrialPatient& patient, const TrialStep& step,
                                           const Thresholds& limits);

}  // namespace bb
