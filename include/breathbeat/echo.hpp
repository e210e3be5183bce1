// Echocardiographic stroke volume and cardiac output from the LVOT diameter
// and the LVOT velocity-time integral (pulsed-wave Doppler), and the cardiac
// index with body surface area (chosen and indexed by breathbeat/body.hpp).
// Formulas and sources: docs/methods.md.
//
// Use from other modules (the trial report calls this per step):
//   EchoInputs in; in.lvot = cm(2.0); in.vti = cm(20); in.hr = per_min(80);
//   validate_echo(in, limits);                 // throws InputError
//   const EchoResults r = analyse_echo(in);
//   const Answer a = describe_echo(in, r);     // breathbeat/present/echo.hpp
//
// Inputs are named by field id (breathbeat/fields/registry.hpp): lvot_diameter,
// vti, hr, height, weight, bsa, bsa_formula.
#pragma once

#include <optional>
#include <vector>

#include "breathbeat/body.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// ---- formulas ---------------------------------------------------------------

// LVOT area = pi (LVOTd / 2)^2; Quinones et al., J Am Soc Echocardiogr 2002;15:167.
Area lvot_area(Length lvot_diameter);
// SV = VTI * pi (LVOTd / 2)^2; Quinones et al., J Am Soc Echocardiogr 2002;15:167.
Volume stroke_volume_from_lvot(Length lvot_diameter, Length vti);
// CO = SV * HR; Quinones et al., J Am Soc Echocardiogr 2002;15:167.
Flow cardiac_output_from_stroke_volume(Volume stroke_volume, Frequency hr);
// (CI = CO / BSA is cardiac_index in breathbeat/body.hpp.)

// ---- analysis -----------------------------------------------------------------

struct EchoInputs {
  std::optional<Length> lvot;  // field lvot_diameter: mid-systole, inner edge to inner edge
  std::optional<Length> vti;   // field vti: LVOT velocity-time integral
  std::optional<Frequency> hr;
  std::optional<Length> height;
  std::optional<Mass> weight;
  std::optional<Area> bsa;  // given directly; else from height and weight
  BsaFormula bsa_formula = BsaFormula::du_bois;
};

// What the reader of echo results should know (presenters word them).
enum class EchoNote {
  bsa_from_height_weight,  // the BSA was computed (formula in EchoResults::bsa->origin)
  lvot_squared,            // the LVOT diameter enters squared: measure it with care
};

struct EchoResults {
  std::optional<Area> lvot_area;
  std::optional<Volume> stroke_volume;
  std::optional<Flow> cardiac_output;
  std::optional<BodySurfaceArea> bsa;  // the BSA used (given or computed) and its origin
  std::optional<FlowPerArea> cardiac_index;
  std::vector<Skipped> skipped;
  std::vector<EchoNote> notes;
};

// Non-positive values, and values outside their plausible range; throws
// InputError naming the field by id.
void validate_echo(const EchoInputs& in, const Thresholds& limits);

// Every result the inputs allow; what cannot be computed is listed with what it needs.
EchoResults analyse_echo(const EchoInputs& in);

}  // namespace bb
