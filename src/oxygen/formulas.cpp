// Gas exchange and oxygen transport formulas. Each function is one published
// formula; the source is on the line above its declaration in breathbeat/oxygen.hpp.
#include "breathbeat/oxygen.hpp"

#include "breathbeat/cutoff.hpp"

namespace bb {

OxygenConstants oxygen_constants(const Thresholds& limits) {
  OxygenConstants c;
  // k is written in mL/g (1.34 mL/g = 1340 mL/kg); s in mL/dL per mmHg.
  c.hb_binding = mL_per_kg(1000.0 * limits.number("oxygen.hb_binding_ml_per_g"));
  c.o2_solubility = mL_per_dL(limits.number("oxygen.o2_solubility_ml_per_dl_per_mmhg")) / mmHg(1.0);
  c.barometric_pressure = limits.get<Pressure>("oxygen.barometric_pressure_default");
  c.water_vapour = limits.get<Pressure>("oxygen.water_vapour_pressure_default");
  c.respiratory_quotient = limits.get<Ratio>("oxygen.respiratory_quotient_default");
  return c;
}

Ratio haemoglobin_bound_oxygen(MassConcentration hb, Ratio saturation, VolumePerMass k) {
  return Ratio(k * hb * saturation);
}

Ratio oxygen_content(MassConcentration hb, Ratio saturation, Pressure po2, VolumePerMass k,
                     O2Solubility s) {
  return haemoglobin_bound_oxygen(hb, saturation, k) + Ratio(s * po2);
}

Ratio end_capillary_oxygen_content(MassConcentration hb, Pressure pao2_alveolar, VolumePerMass k,
                                   O2Solubility s) {
  return oxygen_content(hb, fraction(1.0), pao2_alveolar, k, s);
}

Flow oxygen_delivery(Flow cardiac_output, Ratio cao2) {
  return cardiac_output * cao2;
}

FlowPerArea oxygen_delivery_index(FlowPerArea cardiac_index, Ratio cao2) {
  return cardiac_index * cao2;
}

Flow oxygen_consumption_fick(Flow cardiac_output, Ratio cao2, Ratio cvo2) {
  return cardiac_output * (cao2 - cvo2);
}

Ratio oxygen_extraction_ratio(Ratio cao2, Ratio cvo2) {
  return (cao2 - cvo2) / cao2;
}

Pressure alveolar_oxygen_pressure(Ratio fio2, Pressure pb, Pressure ph2o, Pressure paco2,
                                  Ratio rq) {
  return fio2 * (pb - ph2o) - paco2 / rq;
}

Pressure alveolar_arterial_gradient(Pressure pao2_alveolar, Pressure pao2) {
  return pao2_alveolar - pao2;
}

Pressure expected_alveolar_arterial_gradient(double age_years) {
  return mmHg(age_years / 4.0 + 4.0);
}

Pressure pao2_fio2_ratio(Pressure pao2, Ratio fio2) {
  return pao2 / fio2;
}

double spo2_fio2_ratio(Ratio spo2, Ratio fio2) {
  return in_percent(spo2) / in_fraction(fio2);
}

double oxygenation_index(Ratio fio2, Pressure pmean, Pressure pao2) {
  return in_fraction(fio2) * in_cmH2O(pmean) * 100.0 / in_mmHg(pao2);
}

double oxygen_saturation_index(Ratio fio2, Pressure pmean, Ratio spo2) {
  return in_fraction(fio2) * in_cmH2O(pmean) * 100.0 / in_percent(spo2);
}

Ratio shunt_fraction(Ratio cco2, Ratio cao2, Ratio cvo2) {
  return (cco2 - cao2) / (cco2 - cvo2);
}

Ratio dead_space_fraction_bohr_enghoff(Pressure paco2, Pressure peco2_mixed_expired) {
  return Ratio((paco2 - peco2_mixed_expired) / paco2);
}

const char* to_string(BerlinCategory c) {
  switch (c) {
    case BerlinCategory::none:
      return "none";
    case BerlinCategory::mild:
      return "mild";
    case BerlinCategory::moderate:
      return "moderate";
    case BerlinCategory::severe:
      return "severe";
  }
  return "none";
}

BerlinCategory berlin_category(Pressure pf_ratio, const Thresholds& limits) {
  // The bands are closed at the top (P/F <= limit), within rounding, so a ratio
  // exactly on a limit does not slip out of its band.
  const double pf = in_mmHg(pf_ratio);
  auto at_or_below = [&](const char* key) {
    return cutoff::at_most(pf, in_mmHg(limits.get<Pressure>(key)));
  };
  if (at_or_below("oxygen.berlin_severe_max")) return BerlinCategory::severe;
  if (at_or_below("oxygen.berlin_moderate_max")) return BerlinCategory::moderate;
  if (at_or_below("oxygen.berlin_mild_max")) return BerlinCategory::mild;
  return BerlinCategory::none;
}

Pressure berlin_sea_level_pressure() {
  return mmHg(760.0);
}

}  // namespace bb
