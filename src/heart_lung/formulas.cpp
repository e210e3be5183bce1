// Heart-lung formulas (sources in docs/methods.md). Each function is one published
// formula; the source is on the line above its declaration in
// breathbeat/heart_lung.hpp. The *_range functions apply a formula at the low,
// central and high Ecw/Ers and return the results in numeric order.
#include <algorithm>

#include "breathbeat/heart_lung.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

std::string mmhg_text(Pressure p) {
  return format_number(in_mmHg(p), 1) + " mmHg";
}
std::string ratio_text(Ratio r) {
  return format_number(in_fraction(r), 2);
}

PressureRange sorted(Pressure a, Pressure central, Pressure b) {
  return PressureRange{std::min(a, b), central, std::max(a, b)};
}

RatioRange sorted(Ratio a, Ratio central, Ratio b) {
  return RatioRange{std::min(a, b), central, std::max(a, b)};
}

template <class F>
PressureRange over_ratio_range(const RatioRange& ecw_ers, F formula) {
  return sorted(formula(ecw_ers.low), formula(ecw_ers.central), formula(ecw_ers.high));
}

void require_share(Ratio ecw_ers, const std::string& field) {
  const double r = in_fraction(ecw_ers);
  if (r > 0.0 && r <= 1.0) return;
  throw InputError(field, ratio_text(ecw_ers), "is not a possible chest-wall share of elastance",
                   "a fraction above 0 and at most 1 (Ecw cannot exceed Ers); check the "
                   "oesophageal pressure swings");
}

}  // namespace

const char* to_string(ElastanceRatioOrigin origin) {
  switch (origin) {
    case ElastanceRatioOrigin::preset_range:
      return "preset_range";
    case ElastanceRatioOrigin::measured:
      return "measured";
  }
  return "unknown";
}

Pressure pleural_pressure_change(Pressure delta_airway_pressure, Ratio ecw_ers) {
  return delta_airway_pressure * in_fraction(ecw_ers);
}

Pressure tidal_pleural_swing(Pressure driving_pressure, Ratio ecw_ers) {
  return driving_pressure * in_fraction(ecw_ers);
}

Pressure right_atrial_pressure_change(Pressure delta_peep, Ratio ecw_ers) {
  return delta_peep * in_fraction(ecw_ers);
}

Ratio venous_return_gradient_change(Pressure delta_rap, Pressure pmsf, Pressure rap) {
  if (pmsf <= rap) {
    throw InputError("pmsf", mmhg_text(pmsf), "is not above RAP/CVP (" + mmhg_text(rap) + ")",
                     "a mean systemic filling pressure above the right-atrial pressure; "
                     "without that gradient there is no venous return to estimate");
  }
  return Ratio(-delta_rap / (pmsf - rap));
}

RatioRange preset_elastance_ratio_range(const Thresholds& limits) {
  RatioRange r{limits.get<Ratio>("heart_lung.ecw_ers_low"),
               limits.get<Ratio>("heart_lung.ecw_ers_central"),
               limits.get<Ratio>("heart_lung.ecw_ers_high")};
  require_share(r.low, "heart_lung.ecw_ers_low");
  require_share(r.high, "heart_lung.ecw_ers_high");
  if (r.low > r.central || r.central > r.high) {
    throw InputError("heart_lung.ecw_ers_central", ratio_text(r.central),
                     "lies outside heart_lung.ecw_ers_low .. heart_lung.ecw_ers_high (" +
                         ratio_text(r.low) + " .. " + ratio_text(r.high) + ")",
                     "low <= central <= high in the thresholds file");
  }
  return r;
}

RatioRange measured_elastance_ratio_range(Ratio ecw_ers) {
  require_share(ecw_ers, "pes_ei");  // the ratio of the oesophageal to the airway swing
  return RatioRange{ecw_ers, ecw_ers, ecw_ers};
}

PressureRange pleural_pressure_change_range(Pressure delta_airway_pressure,
                                            const RatioRange& ecw_ers) {
  return over_ratio_range(
      ecw_ers, [&](Ratio r) { return pleural_pressure_change(delta_airway_pressure, r); });
}

PressureRange tidal_pleural_swing_range(Pressure driving_pressure, const RatioRange& ecw_ers) {
  return over_ratio_range(ecw_ers,
                          [&](Ratio r) { return tidal_pleural_swing(driving_pressure, r); });
}

PressureRange right_atrial_pressure_change_range(Pressure delta_peep, const RatioRange& ecw_ers) {
  return over_ratio_range(ecw_ers,
                          [&](Ratio r) { return right_atrial_pressure_change(delta_peep, r); });
}

RatioRange venous_return_gradient_change_range(const PressureRange& delta_rap, Pressure pmsf,
                                               Pressure rap) {
  return sorted(venous_return_gradient_change(delta_rap.low, pmsf, rap),
                venous_return_gradient_change(delta_rap.central, pmsf, rap),
                venous_return_gradient_change(delta_rap.high, pmsf, rap));
}

}  // namespace bb
