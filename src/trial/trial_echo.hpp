// Echo stroke volume for a trial step (the echo module's part of the analysis).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "breathbeat/output.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/trial.hpp"

namespace bb {

// The echo module's objection to this step's LVOT/VTI values, if any.
std::optional<InputError> trial_echo_check(const TrialPatient& patient, const TrialStep& step,
                                           const Thresholds& limits);

// Echo SV, CO and CI (echo module) when LVOT diameter and VTI were recorded.
std::vector<Item> trial_echo_items(const TrialPatient& patient, const TrialStep& step,
                                   std::vector<std::string>& notes);

}  // namespace bb
