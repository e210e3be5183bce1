// The words of the heart-lung notes: what the PEEP-effect estimate and the
// recruitment-to-inflation ratio measured and what they assumed.
#include "breathbeat/answer.hpp"
#include "breathbeat/present/heart_lung.hpp"

namespace bb {

namespace {

std::string cm_text(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}
std::string signed_cm_text(Pressure p) {
  const double v = in_cmH2O(p);
  return (v > 0 ? "+" : "") + cm_text(p);
}
std::string signed_mmHg_text(Pressure p) {
  const double v = in_mmHg(p);
  return (v > 0 ? "+" : "") + format_number(v, 1) + " mmHg";
}
std::string volume_text(Volume v) {
  return format_number(in_mL(v), 0) + " mL";
}
std::string share_text(Ratio r) {
  return format_number(in_fraction(r), 2);
}

}  // namespace

std::string heart_lung_note_text(HeartLungNote note, const HeartLungEstimate& e) {
  const RatioRange& r = e.ecw_ers;
  switch (note) {
    case HeartLungNote::ecw_ers_measured:
      return "Chest-wall share of elastance Ecw/Ers = " + share_text(r.central) +
             ", measured from oesophageal pressure swings: each estimate in the table above is a "
             "single "
             "value.";
    case HeartLungNote::ecw_ers_assumed_range:
      return "No oesophageal pressure: Ecw/Ers is assumed to lie between " + share_text(r.low) +
             " and " + share_text(r.high) + " (typical " + share_text(r.central) +
             ", published ARDS range), so each estimate in the table above is a range, not a "
             "single "
             "number.";
    case HeartLungNote::tidal_pleural_swing_meaning:
      return "Tidal pleural swing = driving pressure x Ecw/Ers: it is what makes preload vary with "
             "each breath (the source of PPV); a low tidal volume or a stiff lung makes it small.";
    case HeartLungNote::peep_effect_needs_both_peeps:
      return "PEEP effect not estimated: needs the total PEEP at both the reference and this step.";
    case HeartLungNote::peep_change_transmitted:
      return "PEEP change " + (e.delta_peep ? signed_cm_text(*e.delta_peep) : std::string("?")) +
             " at this step against the reference: assumed to reach the pleural space and the "
             "right atrium in proportion to Ecw/Ers (right-atrial pressure rises as much as "
             "pleural pressure).";
    case HeartLungNote::venous_return_needs_pmsf_and_rap:
      return "Change in venous-return gradient not estimated: needs Pmsf and RAP (or CVP).";
    case HeartLungNote::venous_return_assumptions:
      return "Change in venous-return gradient (Pmsf - RAP) assumes Pmsf and venous resistance "
             "stay as they were; Pmsf also rises with PEEP, so a predicted fall is an upper bound.";
    case HeartLungNote::venous_return_from_measured_rap:
      return "Change in venous-return gradient from the CVP measured at this step (" +
             (e.measured_rap_change ? signed_mmHg_text(*e.measured_rap_change) : std::string("?")) +
             " against the reference), not from the estimated change in right-atrial pressure.";
    case HeartLungNote::rap_reaches_pmsf:
      return "At the high end the predicted RAP reaches Pmsf: the linear estimate no longer holds "
             "there and says only that the fall may be large.";
  }
  return "";
}

std::vector<std::string> heart_lung_note_texts(const HeartLungEstimate& e) {
  std::vector<std::string> out;
  for (HeartLungNote n : e.notes) out.push_back(heart_lung_note_text(n, e));
  return out;
}

std::string recruitment_note_text(RecruitmentNote note, const RecruitmentResult& r) {
  switch (note) {
    case RecruitmentNote::airway_opening_pressure_used:
      return "Airway opening pressure " + cm_text(r.lower_pressure_used) +
             " is above PEEPlow and replaces it in every formula.";
    case RecruitmentNote::airway_opening_pressure_not_used:
      return "Airway opening pressure is not above PEEPlow: no airway closure above PEEP, "
             "PEEPlow used.";
    case RecruitmentNote::no_recruitment_detected:
      return "Released volume " + volume_text(r.recruited_volume + r.predicted_volume) + " is " +
             volume_text(-r.recruited_volume) + " less than the " +
             volume_text(r.predicted_volume) +
             " the low-PEEP compliance predicts, within the volume measurement error (" +
             volume_text(r.measurement_tolerance) + "): no recruitment detected (R/I about zero).";
    case RecruitmentNote::released_volume_below_prediction:
      return "Released volume " + volume_text(r.recruited_volume + r.predicted_volume) + " is " +
             volume_text(-r.recruited_volume) + " less than the " +
             volume_text(r.predicted_volume) +
             " the low-PEEP compliance predicts, more than the volume measurement error (" +
             volume_text(r.measurement_tolerance) +
             "): a release cannot give back less than inflation put in, so the measurement is "
             "suspect (a leak, a release not done in one breath, an exhalation cut short by the "
             "next breath, or a pressure recorded wrongly). R/I cannot be interpreted; repeat "
             "the release.";
  }
  return "";
}

std::vector<std::string> recruitment_note_texts(const RecruitmentResult& r) {
  std::vector<std::string> out;
  for (RecruitmentNote n : r.notes) out.push_back(recruitment_note_text(n, r));
  return out;
}

}  // namespace bb
