// Recruitment-to-inflation ratio from a one-breath PEEP release (Chen et al.,
// Am J Respir Crit Care Med 2020;201:178). Formulas first, then the checked
// computation that chooses PEEPlow or the airway opening pressure.
#include "breathbeat/cutoff.hpp"
#include "breathbeat/heart_lung.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

std::string pressure_text(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}
std::string ml_text(Volume v) {
  return format_number(in_mL(v), 0) + " mL";
}

void require_positive_volume(Volume v, const char* field, const char* what) {
  if (v > Volume::from_value(0.0)) return;
  throw InputError(field, ml_text(v), "is not above zero", std::string("a positive ") + what);
}

void require_above(Pressure high, const char* high_field, Pressure low, const std::string& low_name,
                   const std::string& why) {
  if (high > low) return;
  throw InputError(high_field, pressure_text(high),
                   "is not above " + low_name + " (" + pressure_text(low) + ")", why);
}

}  // namespace

Compliance compliance_at_low_peep(Volume vt, Pressure pplat_low, Pressure peep_low) {
  return vt / (pplat_low - peep_low);
}

Volume recruited_volume(Volume delta_eelv, Compliance crs_low, Pressure peep_high,
                        Pressure peep_low) {
  return delta_eelv - crs_low * (peep_high - peep_low);
}

Volume expired_volume_tolerance(Volume measured, Volume fixed, Ratio relative) {
  return fixed + relative * measured;
}

Compliance recruited_compliance(Volume recruited, Pressure peep_high, Pressure peep_low) {
  return recruited / (peep_high - peep_low);
}

Ratio recruitment_to_inflation_ratio(Compliance crec, Compliance crs_low) {
  return Ratio(crec / crs_low);
}

RecruitmentResult assess_recruitment(const RecruitmentInputs& in, const Thresholds& limits) {
  require_positive_volume(in.eelv_change, "delta_eelv",
                          "volume exhaled on release of PEEP (extra over the tidal volume)");
  require_positive_volume(in.vt, "release_vt", "tidal volume");
  require_above(in.peep_high, "peep_high", in.peep_low, "PEEPlow",
                "the higher PEEP of the release manoeuvre");

  RecruitmentResult out;
  out.lower_pressure_used = in.peep_low;
  if (in.airway_opening_pressure) {
    if (*in.airway_opening_pressure > in.peep_low) {
      require_above(in.peep_high, "peep_high", *in.airway_opening_pressure,
                    "the airway opening pressure",
                    "a higher PEEP above the airway opening pressure; below it no volume "
                    "change can be attributed to recruitment");
      out.lower_pressure_used = *in.airway_opening_pressure;
      out.airway_opening_pressure_used = true;
      out.notes.push_back(RecruitmentNote::airway_opening_pressure_used);
    } else {
      out.notes.push_back(RecruitmentNote::airway_opening_pressure_not_used);
    }
  }
  require_above(in.pplat_low, "pplat_low", out.lower_pressure_used,
                out.airway_opening_pressure_used ? "the airway opening pressure" : "PEEPlow",
                "a plateau pressure at low PEEP above the lower pressure");

  out.compliance_low = compliance_at_low_peep(in.vt, in.pplat_low, out.lower_pressure_used);
  out.recruited_volume =
      recruited_volume(in.eelv_change, out.compliance_low, in.peep_high, out.lower_pressure_used);
  out.recruited_compliance =
      recruited_compliance(out.recruited_volume, in.peep_high, out.lower_pressure_used);
  out.ratio = recruitment_to_inflation_ratio(out.recruited_compliance, out.compliance_low);
  out.high_recruitability_at = limits.get<Ratio>("heart_lung.recruitment_to_inflation_high");
  // Tolerates rounding in the SI conversions at the cut-off itself.
  out.high_recruitability =
      cutoff::at_least(in_fraction(out.ratio), in_fraction(out.high_recruitability_at));
  out.predicted_volume = out.compliance_low * (in.peep_high - out.lower_pressure_used);
  out.measurement_tolerance = expired_volume_tolerance(
      in.eelv_change, limits.get<Volume>("heart_lung.release_volume_error_fixed"),
      limits.get<Ratio>("heart_lung.release_volume_error_relative"));
  if (out.recruited_volume < Volume::from_value(0.0)) {
    // Below the prediction: within the volume error no recruitment was detected; beyond it the
    // release gave back less than the lung holds at low compliance, which recruitment cannot
    // explain (losing recruited lung on release adds volume): the reading is not interpretable.
    if (-out.recruited_volume > out.measurement_tolerance) {
      out.interpretable = false;
      out.high_recruitability = false;
      out.notes.push_back(RecruitmentNote::released_volume_below_prediction);
    } else {
      out.notes.push_back(RecruitmentNote::no_recruitment_detected);
    }
  }
  return out;
}

}  // namespace bb
