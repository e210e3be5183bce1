// Respiratory mechanics formulas. Each function is one published formula; the
// source is on the line above its declaration in breathbeat/mechanics.hpp.
#include "breathbeat/mechanics.hpp"

namespace bb {

namespace {
// The factor 0.098 J per (L x cmH2O) as printed in the simplified power
// equations (Gattinoni et al. 2016; Becher et al. 2019): 98.0665 Pa x 1 L
// rounded. We keep the published coefficient so results match published values.
constexpr double kPublishedJoulePerLitreCmH2O = 0.098;
}  // namespace

Mass predicted_body_weight(Sex sex, Length height) {
  const double base_kg = sex == Sex::male ? 50.0 : 45.5;
  return kg(base_kg + 0.91 * (in_cm(height) - 152.4));
}

VolumePerMass tidal_volume_per_kg(Volume vt, Mass pbw) {
  return vt / pbw;
}

Pressure driving_pressure(Pressure pplat, Pressure peep_total) {
  return pplat - peep_total;
}

Compliance static_compliance(Volume vt, Pressure pplat, Pressure peep_total) {
  return vt / (pplat - peep_total);
}

Compliance dynamic_compliance(Volume vt, Pressure ppeak, Pressure peep_total) {
  return vt / (ppeak - peep_total);
}

Resistance airway_resistance(Pressure ppeak, Pressure pplat, Flow inspiratory_flow) {
  return (ppeak - pplat) / inspiratory_flow;
}

Time time_constant(Resistance rrs, Compliance crs) {
  return rrs * crs;
}

Pressure intrinsic_peep(Pressure peep_total, Pressure set_peep) {
  return peep_total - set_peep;
}

Pressure pressure_control_total(Pressure set_peep, Pressure above_peep) {
  return set_peep + above_peep;
}

Time inspiratory_flow_time(Volume vt, Flow inspiratory_flow) {
  return vt / inspiratory_flow;
}

Time breath_period(Frequency rr) {
  return 1.0 / rr;
}

Pressure mean_airway_pressure_volume_control(Pressure peep, Pressure ppeak, Time ti, Time ttot) {
  const double inspiratory_fraction = (ti / ttot).value();
  return peep + 0.5 * (ppeak - peep) * inspiratory_fraction;
}

Pressure mean_airway_pressure_pressure_control(Pressure peep, Pressure pinsp, Time ti, Time ttot) {
  const double inspiratory_fraction = (ti / ttot).value();
  return peep + (pinsp - peep) * inspiratory_fraction;
}

Power mechanical_power_volume_control(Frequency rr, Volume vt, Pressure ppeak, Pressure dp) {
  return J_per_min(kPublishedJoulePerLitreCmH2O * in_per_min(rr) * in_litre(vt) *
                   in_cmH2O(ppeak - 0.5 * dp));
}

Power mechanical_power_pressure_control(Frequency rr, Volume vt, Pressure peep,
                                        Pressure delta_pinsp) {
  return J_per_min(kPublishedJoulePerLitreCmH2O * in_per_min(rr) * in_litre(vt) *
                   in_cmH2O(peep + delta_pinsp));
}

Ratio ventilatory_ratio(Flow ve, Pressure paco2, Mass pbw) {
  const auto predicted_ve_per_kg = mL_per_min(100.0) / kg(1.0);
  return Ratio((ve * paco2) / (pbw * predicted_ve_per_kg * mmHg(37.5)));
}

Elastance chest_wall_elastance(Pressure delta_pes, Volume vt) {
  return delta_pes / vt;
}

Elastance lung_elastance(Pressure dp, Pressure delta_pes, Volume vt) {
  return (dp - delta_pes) / vt;
}

Elastance respiratory_system_elastance(Pressure dp, Volume vt) {
  return dp / vt;
}

Ratio chest_wall_elastance_ratio(Elastance ecw, Elastance ers) {
  return Ratio(ecw / ers);
}

Pressure transpulmonary_pressure_end_expiratory(Pressure peep_total, Pressure pes_ee) {
  return peep_total - pes_ee;
}

Pressure transpulmonary_pressure_end_inspiratory(Pressure pplat, Elastance el, Elastance ers) {
  return pplat * (el / ers).value();
}

Pressure transpulmonary_pressure_end_inspiratory_direct(Pressure pplat, Pressure pes_ei) {
  return pplat - pes_ei;
}

}  // namespace bb
