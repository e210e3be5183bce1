// Echo stroke volume for a trial step, through the echo module.
#include "trial_echo.hpp"

#include "breathbeat/echo.hpp"
#include "breathbeat/trial/analysis.hpp"

namespace bb {

std::optional<EchoInputs> trial_echo_inputs(const TrialPatient& patient, const TrialStep& step) {
  const TrialUltrasound& u = step.ultrasound;
  if (!u.lvot_diameter || !u.vti) return std::nullopt;
  EchoInputs in;
  in.lvot = u.lvot_diameter;
  in.vti = u.vti;
  in.hr = step.circulation.hr;
  in.height = patient.height;
  in.weight = patient.weight;
  return in;
}

std::optional<InputError> trial_echo_check(const TrialPatient& patient, const TrialStep& step,
                                           const Thresholds& limits) {
  const auto in = trial_echo_inputs(patient, step);
  if (!in) return std::nullopt;
  try {
    validate_echo(*in, limits);
  } catch (const InputError& e) {
    return e;
  }
  return std::nullopt;
}

}  // namespace bb
