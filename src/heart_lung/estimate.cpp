// The heart-lung estimate for one PEEP step against a reference step: chains
// the section 7 formulas over the Ecw/Ers range (or the measured value) and
// says in plain words what was measured and what was assumed.
#include "breathbeat/heart_lung.hpp"
#include "breathbeat/output.hpp"

namespace bb {

namespace {

std::string cm_text(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}
std::string share_text(Ratio r) {
  return format_number(in_fraction(r), 2);
}

void require_positive(const std::optional<Pressure>& p, const char* field, const char* what) {
  if (!p || *p > Pressure::from_value(0.0)) return;
  throw InputError(field, cm_text(*p), std::string("is not above zero"),
                   std::string("a positive ") + what);
}

std::string ratio_note(ElastanceRatioOrigin origin, const RatioRange& r) {
  if (origin == ElastanceRatioOrigin::measured) {
    return "Chest-wall share of elastance Ecw/Ers = " + share_text(r.central) +
           ", measured from oesophageal pressure swings: each estimate below is a single value.";
  }
  return "No oesophageal pressure: Ecw/Ers is assumed to lie between " + share_text(r.low) +
         " and " + share_text(r.high) + " (typical " + share_text(r.central) +
         ", published ARDS range), so each estimate below is a range, not a single number.";
}

}  // namespace

HeartLungEstimate estimate_peep_effect(const HeartLungInputs& in, const Thresholds& limits) {
  HeartLungEstimate out;
  require_positive(in.driving_pressure, "driving_pressure", "driving pressure (Pplat - PEEP)");

  if (in.measured_ecw_ers) {
    out.ecw_ers_origin = ElastanceRatioOrigin::measured;
    out.ecw_ers = measured_elastance_ratio_range(*in.measured_ecw_ers);
  } else {
    out.ecw_ers_origin = ElastanceRatioOrigin::preset_range;
    out.ecw_ers = preset_elastance_ratio_range(limits);
  }
  out.notes.push_back(ratio_note(out.ecw_ers_origin, out.ecw_ers));

  if (in.driving_pressure) {
    out.tidal_pleural_swing = tidal_pleural_swing_range(*in.driving_pressure, out.ecw_ers);
    out.notes.push_back(
        "Tidal pleural swing = driving pressure x Ecw/Ers: it is what makes preload vary with "
        "each breath (the source of PPV); a low tidal volume or a stiff lung makes it small.");
  }

  if (!in.peep_reference || !in.peep_step) {
    out.notes.push_back(
        "PEEP effect not estimated: needs the total PEEP at both the reference and this step.");
    return out;
  }
  const Pressure delta_peep = *in.peep_step - *in.peep_reference;
  out.delta_peep = delta_peep;
  out.pleural_pressure_change = pleural_pressure_change_range(delta_peep, out.ecw_ers);
  out.right_atrial_pressure_change = right_atrial_pressure_change_range(delta_peep, out.ecw_ers);
  out.notes.push_back("PEEP change " + cm_text(delta_peep) +
                      ": assumed to reach the pleural space and the right atrium in proportion "
                      "to Ecw/Ers (right-atrial pressure rises as much as pleural pressure).");

  if (!in.pmsf || !in.rap) {
    out.notes.push_back(
        "Change in venous-return gradient not estimated: needs Pmsf and RAP (or CVP).");
    return out;
  }
  out.venous_return_gradient_change =
      venous_return_gradient_change_range(*out.right_atrial_pressure_change, *in.pmsf, *in.rap);
  out.notes.push_back(
      "Change in venous-return gradient (Pmsf - RAP) assumes Pmsf and venous resistance stay as "
      "they were; Pmsf also rises with PEEP, so a predicted fall is an upper bound.");
  if (in_fraction(out.venous_return_gradient_change->low) <= -1.0) {
    out.notes.push_back(
        "At the high end the predicted RAP reaches Pmsf: the linear estimate no longer holds "
        "there and says only that the fall may be large.");
  }
  return out;
}

}  // namespace bb
