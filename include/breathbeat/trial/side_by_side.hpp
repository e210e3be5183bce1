// Several trials of one patient side by side (breathbeat report A.toml B.toml):
// each trial analysed on its own (its own weight, reference and thresholds),
// then joined, every step named "<trial> <label>" where <trial> is its date.
#pragma once

#include <string>
#include <vector>

#include "breathbeat/trial/analysis.hpp"

namespace bb {

// What names a trial beside the others: its [trial] date, else its file name.
std::string trial_name(const Trial& trial);

// Whether `other` is of the patient of `first`: the same sex and height (within
// 0.5 cm: the rounding of a height typed in inches). Throws InputError naming
// the field "file" (value: other's file) and both patients otherwise.
void check_same_patient(const Trial& first, const Trial& other);

// The trials' analyses (analyses[i] of trials[i], in the order given) as one:
// steps, heart-lung estimates, findings and voided steps in trial order, each
// step label prefixed with its trial's name (names made unique); the patient,
// reference step and thresholds of the first; and, per best-setting finding,
// where each trial's best step was (TrialAnalysis::best_across_trials).
TrialAnalysis side_by_side(const std::vector<const Trial*>& trials,
                           std::vector<TrialAnalysis> analyses);

}  // namespace bb
