// IVC indices and the ASE right-atrial pressure table; one function per
// published formula (sources in include/breathbeat/ivc.hpp).
#include "breathbeat/cutoff.hpp"
#include "breathbeat/ivc.hpp"

namespace bb {

const char* to_string(Breathing b) {
  switch (b) {
    case Breathing::passive:
      return "passive";
    case Breathing::assisted:
      return "assisted";
    case Breathing::unassisted:
      return "unassisted";
  }
  return "";
}

std::optional<Breathing> breathing_from_word(std::string_view word) {
  for (Breathing b : {Breathing::passive, Breathing::assisted, Breathing::unassisted}) {
    if (word == to_string(b)) return b;
  }
  return std::nullopt;
}

Ratio ivc_collapsibility(Length dmax, Length dmin) {
  return Ratio((dmax - dmin) / dmax);
}

Ratio ivc_distensibility(Length dmax, Length dmin) {
  return Ratio((dmax - dmin) / dmin);
}

Ratio ivc_respiratory_variation(Length dmax, Length dmin) {
  return Ratio((dmax - dmin) / ((dmax + dmin) / 2.0));
}

namespace {
RapEstimate rap_band(const Thresholds& limits, const std::string& band) {
  const std::string key = "ivc.rap_" + band;
  return RapEstimate{limits.get<Pressure>(key), limits.get<Pressure>(key + "_low"),
                     limits.get<Pressure>(key + "_high"), band};
}
}  // namespace

RapEstimate right_atrial_pressure_from_ivc(Length ivc_diameter, Ratio collapsibility,
                                           const Thresholds& limits) {
  const Length diameter_cutoff = limits.get<Length>("ivc.rap_diameter_cutoff");
  const Ratio collapse_cutoff = limits.get<Ratio>("ivc.rap_collapse_cutoff");
  // A value equal to a cut-off within rounding (21 mm against 2.1 cm, 1.1/2.2)
  // counts as equal: at most 2.1 cm is "small"; exactly 50 % is neither
  // above nor below the collapse cut-off. Diameters are compared in cm, the
  // unit of the table.
  const bool small = cutoff::at_most(in_cm(ivc_diameter), in_cm(diameter_cutoff));
  const bool collapses_more = cutoff::above(collapsibility, collapse_cutoff);
  const bool collapses_less = cutoff::below(collapsibility, collapse_cutoff);
  if (small && collapses_more) return rap_band(limits, "normal");
  if (!small && collapses_less) return rap_band(limits, "high");
  return rap_band(limits, "intermediate");
}

}  // namespace bb
