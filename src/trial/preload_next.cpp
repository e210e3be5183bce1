// The paired preload tests that still apply where no index could be read.
#include "breathbeat/trial/preload_next.hpp"

#include <algorithm>

namespace bb {

std::vector<PreloadTestKind> preload_tests_still_applicable(const TrialAnalysis& analysis,
                                                            const StepAnalysis& step) {
  const Thresholds& limits = analysis.limits;
  const TrialCirculation& c = step.recorded.circulation;
  std::vector<PreloadTestKind> out;
  for (const PreloadTestKind kind :
       {PreloadTestKind::vt_challenge, PreloadTestKind::end_expiratory_occlusion,
        PreloadTestKind::passive_leg_raising}) {
    const bool done = std::any_of(step.preload.begin(), step.preload.end(), [&](const auto& r) {
      return (r.test_inputs && r.test_inputs->kind == kind) ||
             (kind == PreloadTestKind::vt_challenge && r.index == PreloadIndex::vt_challenge);
    });
    // A challenge, or a manoeuvre step (manoeuvre = ...), that starts from this step.
    const bool started_here =
        std::any_of(analysis.steps.begin(), analysis.steps.end(), [&](const StepAnalysis& s) {
          return std::any_of(s.preload.begin(), s.preload.end(), [&](const auto& r) {
            if (r.from_step != step.label) return false;
            if (r.index == PreloadIndex::vt_challenge) return kind == PreloadTestKind::vt_challenge;
            return r.index == PreloadIndex::manoeuvre && r.test_inputs &&
                   r.test_inputs->kind == kind;
          });
        });
    if (done || started_here) continue;
    PreloadTestInputs in;
    in.kind = kind;
    if (c.spontaneous_effort) in.passive = !*c.spontaneous_effort;
    in.passive_from_signals = c.passive_from_signals;
    in.intra_abdominal_hypertension = c.intra_abdominal_hypertension;
    in.challenge_conditions = trial_ppv_conditions(step.recorded, step.mechanics_results);
    if (kind == PreloadTestKind::vt_challenge) {
      // From this step's VT (unknown VT leaves the step unjudged) to the challenge's high VT.
      in.vt_before_per_kg = step.mechanics_results.vt_per_kg;
      in.vt_after_per_kg = limits.get<VolumePerMass>("preload_tests.vt_challenge_vt_high");
    }
    const std::vector<Gate> gates = preload_test_conditions(in, limits);
    const bool fails = std::any_of(gates.begin(), gates.end(), [](const Gate& g) {
      return g.state == GateState::failed && g.key != "hold_duration";
    });
    if (!fails) out.push_back(kind);
  }
  return out;
}

}  // namespace bb
