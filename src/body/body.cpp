#include "breathbeat/body.hpp"

#include <cmath>

namespace bb {

Area body_surface_area_du_bois(Mass weight, Length height) {
  return square_metre(0.007184 * std::pow(in_kg(weight), 0.425) * std::pow(in_cm(height), 0.725));
}

Area body_surface_area_mosteller(Mass weight, Length height) {
  return square_metre(std::sqrt(in_cm(height) * in_kg(weight) / 3600.0));
}

}  // namespace bb
