// The heart-lung estimate for one PEEP step against a reference step: chains
// the section 7 formulas over the Ecw/Ers range (or the measured value) and
// says (typed notes) what was measured and what was assumed.
#include "breathbeat/cutoff.hpp"
#include "breathbeat/heart_lung.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

std::string cm_text(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}

// The driving pressure is Pplat - PEEP: a value not above zero is a plateau
// pressure not above PEEP.
void require_positive_driving_pressure(const std::optional<Pressure>& p) {
  if (!p || *p > Pressure::from_value(0.0)) return;
  throw InputError("pplat", cm_text(*p),
                   "gives a driving pressure (Pplat - PEEP) that is not above zero",
                   "a plateau pressure above total PEEP");
}

}  // namespace

HeartLungEstimate estimate_peep_effect(const HeartLungInputs& in, const Thresholds& limits) {
  HeartLungEstimate out;
  require_positive_driving_pressure(in.driving_pressure);

  if (in.measured_ecw_ers) {
    out.ecw_ers_origin = ElastanceRatioOrigin::measured;
    out.ecw_ers = measured_elastance_ratio_range(*in.measured_ecw_ers);
  } else {
    out.ecw_ers_origin = ElastanceRatioOrigin::preset_range;
    out.ecw_ers = preset_elastance_ratio_range(limits);
  }
  out.notes.push_back(out.ecw_ers_origin == ElastanceRatioOrigin::measured
                          ? HeartLungNote::ecw_ers_measured
                          : HeartLungNote::ecw_ers_assumed_range);

  if (in.driving_pressure) {
    out.tidal_pleural_swing = tidal_pleural_swing_range(*in.driving_pressure, out.ecw_ers);
    out.notes.push_back(HeartLungNote::tidal_pleural_swing_meaning);
  }

  if (!in.peep_reference || !in.peep_step) {
    out.notes.push_back(HeartLungNote::peep_effect_needs_both_peeps);
    return out;
  }
  const Pressure delta_peep = *in.peep_step - *in.peep_reference;
  out.delta_peep = delta_peep;
  out.pleural_pressure_change = pleural_pressure_change_range(delta_peep, out.ecw_ers);
  out.right_atrial_pressure_change = right_atrial_pressure_change_range(delta_peep, out.ecw_ers);
  out.notes.push_back(HeartLungNote::peep_change_transmitted);

  if (!in.pmsf || !in.rap) {
    out.notes.push_back(HeartLungNote::venous_return_needs_pmsf_and_rap);
    return out;
  }
  if (in.rap_step) {
    // Measured beats estimated: the gradient from the CVP recorded at the step.
    out.measured_rap_change = *in.rap_step - *in.rap;
    const Ratio g = venous_return_gradient_change(*out.measured_rap_change, *in.pmsf, *in.rap);
    out.venous_return_gradient_change = RatioRange{g, g, g};
    out.notes.push_back(HeartLungNote::venous_return_from_measured_rap);
    out.notes.push_back(HeartLungNote::venous_return_assumptions);
    return out;
  }
  out.venous_return_gradient_change =
      venous_return_gradient_change_range(*out.right_atrial_pressure_change, *in.pmsf, *in.rap);
  out.notes.push_back(HeartLungNote::venous_return_assumptions);
  // RAP rising by the whole gradient (a fall of 100 %), within rounding.
  if (cutoff::at_most(in_fraction(out.venous_return_gradient_change->low), -1.0))
    out.notes.push_back(HeartLungNote::rap_reaches_pmsf);
  return out;
}

}  // namespace bb
