// Echo stroke volume for a trial step, through the echo module.
#include "trial_echo.hpp"

#include "breathbeat/echo.hpp"

namespace bb {

namespace {
std::optional<EchoInputs> echo_inputs(const TrialPatient& patient, const TrialStep& step) {
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
}  // namespace

std::optional<InputError> trial_echo_check(const TrialPatient& patient, const TrialStep& step,
                                           const Thresholds& limits) {
  const auto in = echo_inputs(patient, step);
  if (!in) return std::nullopt;
  try {
    validate_echo(*in, limits);
  } catch (const InputError& e) {
    return e;
  }
  return std::nullopt;
}

std::vector<Item> trial_echo_items(const TrialPatient& patient, const TrialStep& step,
                                   std::vector<std::string>& notes) {
  const auto in = echo_inputs(patient, step);
  if (!in) return {};
  const EchoResults r = analyse_echo(*in);
  for (const auto& n : r.notes) notes.push_back("Echo: " + n);
  std::vector<Item> items;
  for (const Item& i : describe_echo(*in, r).results) {
    if (i.key == "bsa") continue;
    Item copy = i;
    copy.key = "echo_" + i.key;
    copy.label = "Echo " + i.label;
    items.push_back(copy);
  }
  return items;
}

}  // namespace bb
