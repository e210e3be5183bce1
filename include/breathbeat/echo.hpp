// Echocardiographic stroke volume and cardiac output from the LVOT diameter
// and the LVOT velocity-time integral (pulsed-wave Doppler), and the cardiac
// index with body surface area. Formulas and sources:
// docs/methods.md.
//
// Use from other modules (the trial report calls this per step):
//   EchoInputs in; in.lvot = cm(2.0); in.vti = cm(20); in.hr = per_min(80);
//   validate_echo(in, limits);                 // throws InputError
//   const EchoResults r = analyse_echo(in);
//   const Answer a = describe_echo(in, r);
#pragma once

#include "breathbeat/body.hpp"  // BsaFormula

#include <optional>
#include <string>
#include <vector>

#include "breathbeat/output.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"

namespace bb {


// ---- formulas ---------------------------------------------------------------

// LVOT area = pi (LVOTd / 2)^2; Quinones et al., J Am Soc Echocardiogr 2002;15:167.
Area lvot_area(Length lvot_diameter);
// SV = VTI * pi (LVOTd / 2)^2; Quinones et al., J Am Soc Echocardiogr 2002;15:167.
Volume stroke_volume_from_lvot(Length lvot_diameter, Length vti);
// CO = SV * HR; Quinones et al., J Am Soc Echocardiogr 2002;15:167.
Flow cardiac_output_from_stroke_volume(Volume stroke_volume, Frequency hr);
// CI = CO / BSA; textbook (common practice, no source).
FlowPerArea cardiac_index_from_output(Flow cardiac_output, Area bsa);

// ---- analysis -----------------------------------------------------------------

struct EchoInputs {
  std::optional<Length> lvot;  // LVOT diameter, mid-systole, inner edge to inner edge
  std::optional<Length> vti;   // LVOT velocity-time integral
  std::optional<Frequency> hr;
  std::optional<Length> height;
  std::optional<Mass> weight;
  std::optional<Area> bsa;  // given directly; else from height and weight
  BsaFormula bsa_formula = BsaFormula::du_bois;
};

struct EchoResults {
  std::optional<Area> lvot_area;
  std::optional<Volume> stroke_volume;
  std::optional<Flow> cardiac_output;
  std::optional<Area> bsa;  // the BSA used (given or computed)
  std::optional<FlowPerArea> cardiac_index;
  std::vector<Skipped> skipped;
  std::vector<std::string> notes;
};

// Non-positive values, and values outside their plausible range; throws
// InputError naming the field.
void validate_echo(const EchoInputs& in, const Thresholds& limits);

// Every result the inputs allow; what cannot be computed is listed with what it needs.
EchoResults analyse_echo(const EchoInputs& in);

// The results as an Answer (command "calc echo"); keys stroke_volume (mL),
// cardiac_output (L/min), cardiac_index (L/min/m2), lvot_area (cm2), bsa (m2).
Answer describe_echo(const EchoInputs& in, const EchoResults& r);

}  // namespace bb
