// Body size: the surface area used to index flows (cardiac index, DO2I).
#pragma once

#include "breathbeat/units.hpp"

namespace bb {

// Which formula gives the body surface area used to index flows.
enum class BsaFormula { du_bois, mosteller };

// BSA = 0.007184 W^0.425 H^0.725 (W kg, H cm) m2; Du Bois & Du Bois, Arch Intern Med 1916;17:863.
Area body_surface_area_du_bois(Mass weight, Length height);
// BSA = sqrt(H W / 3600) (W kg, H cm) m2; Mosteller, N Engl J Med 1987;317:1098.
Area body_surface_area_mosteller(Mass weight, Length height);

}  // namespace bb
