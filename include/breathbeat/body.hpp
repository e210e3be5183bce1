// Body size: sex, the body surface area and the flows indexed to it (cardiac
// index, DO2I, VO2I). Mechanics (predicted body weight), oxygen and echo use it.
#pragma once

#include <optional>

#include "breathbeat/units.hpp"

namespace bb {

// Sex, for predicted body weight (registry field "sex": "male", "female").
enum class Sex { male, female };
const char* to_string(Sex s);  // the registry's choice word: "male", "female"

// Which formula gives the body surface area from height and weight.
enum class BsaFormula { du_bois, mosteller };  // registry field "bsa_formula"

// ---- flow per square metre of body surface, in bedside units ----------------

inline FlowPerArea mL_per_min_per_m2(double v) {
  return mL_per_min(v) / square_metre(1.0);
}
inline FlowPerArea L_per_min_per_m2(double v) {
  return L_per_min(v) / square_metre(1.0);
}
inline double in_mL_per_min_per_m2(FlowPerArea f) {
  return in_mL_per_min(f * square_metre(1.0));
}
inline double in_L_per_min_per_m2(FlowPerArea f) {
  return in_L_per_min(f * square_metre(1.0));
}

// ---- formulas -----------------------------------------------------------------

// BSA = 0.007184 W^0.425 H^0.725 (W kg, H cm) m2; Du Bois & Du Bois, Arch Intern Med 1916;17:863.
Area body_surface_area_du_bois(Mass weight, Length height);
// BSA = sqrt(H W / 3600) (W kg, H cm) m2; Mosteller, N Engl J Med 1987;317:1098.
Area body_surface_area_mosteller(Mass weight, Length height);
// The BSA by the chosen formula (Du Bois or Mosteller, above).
Area body_surface_area(Mass weight, Length height, BsaFormula formula = BsaFormula::du_bois);

// A flow indexed to body surface area, X / BSA (DO2I = DO2/BSA, VO2I = VO2/BSA); textbook
// (common practice, no source).
FlowPerArea indexed_to_bsa(Flow flow, Area bsa);
// CI = CO / BSA; textbook (common practice, no source).
FlowPerArea cardiac_index(Flow co, Area bsa);
// CO = CI x BSA, the same relation read the other way; textbook (common practice, no source).
Flow cardiac_output_from_index(FlowPerArea ci, Area bsa);

// ---- the body surface area used to index flows --------------------------------

// Where the BSA used came from.
enum class BsaOrigin { given, du_bois, mosteller };

struct BodySurfaceArea {
  Area value;
  BsaOrigin origin = BsaOrigin::given;
  // A BSA was given although height and weight were too: they were not used for it.
  bool height_weight_unused = false;
};

// The one choice of BSA: the given BSA when there is one, otherwise `formula`
// (Du Bois by default, or Mosteller) from height and weight; nullopt when
// neither is available. Oxygen and echo both use it.
std::optional<BodySurfaceArea> body_surface_area_used(std::optional<Area> given,
                                                      std::optional<Length> height,
                                                      std::optional<Mass> weight,
                                                      BsaFormula formula = BsaFormula::du_bois);

}  // namespace bb
