// Helpers shared by the trial analysis files (not part of the public API).
#pragma once

#include <string>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/analysis.hpp"

namespace bb {

// How a reading reads, from its category (the reading weighed its conditions by direction).
PreloadDirection preload_direction(const Reading& reading);

// A reading of one index, with its direction and whether it is conditional.
PreloadIndexReading preload_reading(std::string key, PreloadIndex index, std::vector<Gate> gates,
                                    Reading reading);

// The overall statement from the readings of the indices of one step.
PreloadStatement preload_statement(const std::vector<PreloadIndexReading>& indices);

// Everything one step shows on its own (no comparison with other steps).
StepAnalysis analyse_step(const TrialPatient& patient, const TrialStep& step,
                          const Thresholds& limits);

// Steps marked as a manoeuvre of the step before them (TrialStep::manoeuvre): mark_manoeuvre_steps
// sets StepAnalysis::manoeuvre_from (before the best-step findings leave them out);
// manoeuvre_findings reads each against the step before, adds the reading to the manoeuvre
// step's preload indices and one Finding (src/trial/manoeuvres.cpp).
void mark_manoeuvre_steps(const Trial& trial, TrialAnalysis& a);
void manoeuvre_findings(const Trial& trial, TrialAnalysis& a, const Thresholds& limits);

}  // namespace bb
