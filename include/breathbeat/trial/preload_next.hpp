// What still applies at a step where no preload index could be read: the paired preload tests
// whose own conditions are not known to fail there. A fact of the trial analysis, without words
// (the report words it).
#pragma once

#include <vector>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/analysis.hpp"

namespace bb {

// The manoeuvres among the tidal-volume challenge (from this step's VT to the challenge's high
// VT), the end-expiratory occlusion and passive leg raising whose conditions, judged with what
// is recorded at `step` (preload_test_conditions, breathbeat/haemodynamics.hpp), do not fail;
// the hold duration of an occlusion not yet done is not judged. Tests recorded at the step are
// left out: they have their own reading, and so is a tidal-volume challenge started from it. Fluid
// challenges are left out: they give the fluid the test is meant to decide on.
std::vector<PreloadTestKind> preload_tests_still_applicable(const TrialAnalysis& analysis,
                                                            const StepAnalysis& step);

}  // namespace bb
