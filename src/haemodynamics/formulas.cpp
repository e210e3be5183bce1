// Haemodynamic formulas: one function per published definition (sources in
// include/breathbeat/haemodynamics.hpp and docs/methods.md).
#include <stdexcept>

#include "breathbeat/haemodynamics.hpp"

namespace bb {

Pressure pulse_pressure(Pressure sbp, Pressure dbp) {
  return sbp - dbp;
}

Ratio pulse_pressure_variation(Pressure pp_max, Pressure pp_min) {
  return Ratio((pp_max - pp_min) / ((pp_max + pp_min) / 2.0));
}

Pressure systolic_pressure_variation(Pressure sbp_max, Pressure sbp_min) {
  return sbp_max - sbp_min;
}

Ratio stroke_volume_variation(Volume sv_max, Volume sv_min) {
  return Ratio((sv_max - sv_min) / ((sv_max + sv_min) / 2.0));
}

Pressure mean_arterial_pressure_estimate(Pressure sbp, Pressure dbp) {
  return dbp + (sbp - dbp) / 3.0;
}

Ratio heart_rate_to_respiratory_rate_ratio(Frequency hr, Frequency rr) {
  return Ratio(hr / rr);
}

Ratio ppv_absolute_change(Ratio ppv_before, Ratio ppv_after) {
  return ppv_after - ppv_before;
}

BreathExtremes breath_extremes(const BreathBeats& beats) {
  if (beats.empty()) throw std::logic_error("breath_extremes: a breath without beats");
  BreathExtremes e{pulse_pressure(beats.front().sbp, beats.front().dbp),
                   pulse_pressure(beats.front().sbp, beats.front().dbp), beats.front().sbp,
                   beats.front().sbp};
  for (const ArterialBeat& b : beats) {
    const Pressure pp = pulse_pressure(b.sbp, b.dbp);
    if (pp > e.pp_max) e.pp_max = pp;
    if (pp < e.pp_min) e.pp_min = pp;
    if (b.sbp > e.sbp_max) e.sbp_max = b.sbp;
    if (b.sbp < e.sbp_min) e.sbp_min = b.sbp;
  }
  return e;
}

}  // namespace bb
