// Body size formulas and the one choice of body surface area. Each formula's
// source is on the line above its declaration in breathbeat/body.hpp.
#include "breathbeat/body.hpp"

#include <cmath>

namespace bb {

const char* to_string(Sex s) {
  return s == Sex::male ? "male" : "female";
}

Area body_surface_area_du_bois(Mass weight, Length height) {
  return square_metre(0.007184 * std::pow(in_kg(weight), 0.425) * std::pow(in_cm(height), 0.725));
}

Area body_surface_area_mosteller(Mass weight, Length height) {
  return square_metre(std::sqrt(in_cm(height) * in_kg(weight) / 3600.0));
}

Area body_surface_area(Mass weight, Length height, BsaFormula formula) {
  return formula == BsaFormula::mosteller ? body_surface_area_mosteller(weight, height)
                                          : body_surface_area_du_bois(weight, height);
}

FlowPerArea indexed_to_bsa(Flow flow, Area bsa) {
  return flow / bsa;
}

FlowPerArea cardiac_index(Flow co, Area bsa) {
  return indexed_to_bsa(co, bsa);
}

Flow cardiac_output_from_index(FlowPerArea ci, Area bsa) {
  return Flow(ci * bsa);
}

std::optional<BodySurfaceArea> body_surface_area_used(std::optional<Area> given,
                                                      std::optional<Length> height,
                                                      std::optional<Mass> weight,
                                                      BsaFormula formula) {
  const bool measured = height && weight;
  if (given) return BodySurfaceArea{*given, BsaOrigin::given, measured};
  if (!measured) return std::nullopt;
  return BodySurfaceArea{
      body_surface_area(*weight, *height, formula),
      formula == BsaFormula::mosteller ? BsaOrigin::mosteller : BsaOrigin::du_bois, false};
}

}  // namespace bb
