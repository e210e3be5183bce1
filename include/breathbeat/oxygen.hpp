// Gas exchange and oxygen transport: one function per published formula, then
// the analysis that computes whatever the given measurements allow.
// Formulas, sources and check values: docs/methods.md.
//
// Units inside the library:
//   O2 content (CaO2, CvO2, Cc'O2) is a Ratio: mL of O2 per mL of blood. The
//     bedside reads it in mL/dL, so 20 mL/dL is the Ratio 0.20 (see mL_per_dL).
//   DO2 and VO2 are Flow; DO2I is FlowPerArea.
//   PaO2/FiO2 is a Pressure (PaO2 divided by a fraction) and is shown in mmHg.
//   SpO2/FiO2, the oxygenation index and the oxygen saturation index are
//     conventional index numbers with mixed units (SpO2 in %, Pmean in cmH2O,
//     PaO2 in mmHg); they are plain doubles, each documented where declared.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "breathbeat/body.hpp"  // Sex, BsaFormula, BSA, flows per m2
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// Dissolved O2 per unit partial pressure: (mL O2 / mL blood) per pascal.
using O2Solubility = bu::quantity<bu::divide_typeof_helper<si::dimensionless, si::pressure>::type>;

// O2 content in the bedside unit: mL O2 per dL blood <-> mL per mL.
inline Ratio mL_per_dL(double v) {
  return fraction(v / 100.0);
}
inline double in_mL_per_dL(Ratio content) {
  return in_fraction(content) * 100.0;
}

// Flow per square metre of body surface (mL_per_min_per_m2, ...): breathbeat/body.hpp.

// ---- constants (presets/thresholds/oxygen.toml) ------------------------------

// The constants the formulas use. Read from the thresholds so a site can change
// them (a site thresholds file) without recompiling.
struct OxygenConstants {
  VolumePerMass hb_binding;      // k, mL O2 bound per g of saturated Hb (preset 1.34 mL/g)
  O2Solubility o2_solubility;    // s, dissolved O2 per mmHg (preset 0.003 mL/dL/mmHg)
  Pressure barometric_pressure;  // Pb when field pb is not given (preset 760 mmHg)
  Pressure water_vapour;         // PH2O when field ph2o is not given (preset 47 mmHg, 37 degC)
  Ratio respiratory_quotient;    // R when field rq is not given (preset 0.8)
};
OxygenConstants oxygen_constants(const Thresholds& limits);

// ---- formulas -------------------------------------------------------------------

// CxO2 = k Hb SxO2 + s PxO2 (mL/dL); Marino, The ICU Book; West, Resp Physiology (from memory).
Ratio oxygen_content(MassConcentration hb, Ratio saturation, Pressure po2, VolumePerMass k,
                     O2Solubility s);
// k Hb SxO2, the Hb-bound part of CxO2 alone; Marino, The ICU Book (from memory).
Ratio haemoglobin_bound_oxygen(MassConcentration hb, Ratio saturation, VolumePerMass k);
// Cc'O2 = k Hb 1.0 + s PAO2 (end-capillary blood fully saturated at alveolar PO2); textbook (West).
Ratio end_capillary_oxygen_content(MassConcentration hb, Pressure pao2_alveolar, VolumePerMass k,
                                   O2Solubility s);
// DO2 = CO CaO2 (= CO[L/min] CaO2[mL/dL] 10 mL/min); textbook (Marino, The ICU Book).
Flow oxygen_delivery(Flow cardiac_output, Ratio cao2);
// DO2I = CI CaO2 (mL/min/m2); textbook (Marino, The ICU Book).
FlowPerArea oxygen_delivery_index(FlowPerArea cardiac_index, Ratio cao2);
// Flows indexed to body surface area (CI = CO/BSA, VO2I = VO2/BSA): indexed_to_bsa and
// cardiac_index in breathbeat/body.hpp.
// VO2 = CO (CaO2 - CvO2) (reverse Fick); textbook (Marino, The ICU Book).
Flow oxygen_consumption_fick(Flow cardiac_output, Ratio cao2, Ratio cvo2);
// O2ER = (CaO2 - CvO2) / CaO2; textbook (Marino, The ICU Book).
Ratio oxygen_extraction_ratio(Ratio cao2, Ratio cvo2);
// PAO2 = FiO2 (Pb - PH2O) - PaCO2 / R (simplified alveolar gas equation); textbook (West).
Pressure alveolar_oxygen_pressure(Ratio fio2, Pressure pb, Pressure ph2o, Pressure paco2, Ratio rq);
// A-a gradient = PAO2 - PaO2; textbook (West).
Pressure alveolar_arterial_gradient(Pressure pao2_alveolar, Pressure pao2);
// Expected A-a gradient on room air = age/4 + 4 mmHg (age in years); textbook rule (from memory).
Pressure expected_alveolar_arterial_gradient(double age_years);
// P/F = PaO2 / FiO2 (read in mmHg); ARDS Definition Task Force, JAMA 2012;307:2526.
Pressure pao2_fio2_ratio(Pressure pao2, Ratio fio2);
// S/F = SpO2[%] / FiO2[fraction], a plain number (95/0.5 = 190); Matthay et al., AJRCCM 2024.
double spo2_fio2_ratio(Ratio spo2, Ratio fio2);
// OI = FiO2[fraction] Pmean[cmH2O] 100 / PaO2[mmHg]; PALICC, Pediatr Crit Care Med 2015.
double oxygenation_index(Ratio fio2, Pressure pmean, Pressure pao2);
// OSI = FiO2[fraction] Pmean[cmH2O] 100 / SpO2[%]; PALICC, Pediatr Crit Care Med 2015.
double oxygen_saturation_index(Ratio fio2, Pressure pmean, Ratio spo2);
// Qs/Qt = (Cc'O2 - CaO2) / (Cc'O2 - CvO2) (shunt equation); textbook (West).
Ratio shunt_fraction(Ratio cco2, Ratio cao2, Ratio cvo2);
// VD/VT = (PaCO2 - PECO2) / PaCO2, PECO2 mixed expired (Bohr-Enghoff); textbook (West).
Ratio dead_space_fraction_bohr_enghoff(Pressure paco2, Pressure peco2_mixed_expired);

// ---- Berlin oxygenation category -------------------------------------------------

// Berlin bands of PaO2/FiO2 (limits from presets/thresholds/oxygen.toml):
// severe <= 100 < moderate <= 200 < mild <= 300 < none (mmHg).
enum class BerlinCategory { none, mild, moderate, severe };
const char* to_string(BerlinCategory c);  // "none", "mild", "moderate", "severe"

// The band of a P/F ratio; ARDS Definition Task Force, JAMA 2012;307:2526.
// Bands are closed at the top (bb::cutoff::at_most).
BerlinCategory berlin_category(Pressure pf_ratio, const Thresholds& limits);

// The band and whether the PEEP condition of the definition holds:
// met (PEEP >= 5 cmH2O given), failed (PEEP below 5 given: the band does not
// apply), unknown (no PEEP given: the band is conditional).
struct BerlinReading {
  BerlinCategory category = BerlinCategory::none;
  GateState peep_condition = GateState::unknown;
};

// ---- analysis -----------------------------------------------------------------

// What was measured at one time (one trial step); anything absent is not given.
// Saturations and FiO2 are fractions (0.98). Pressures are absolute partial
// pressures. svo2/pvo2 are mixed venous (pulmonary artery); a central venous
// sample (ScvO2) may stand in, with a note. Each member is the registry field
// of the same id, except `peep` (field peep_total) and `age_years` (field age).
struct OxygenInputs {
  std::optional<MassConcentration> hb;
  std::optional<Ratio> sao2;
  std::optional<Ratio> spo2;
  std::optional<Pressure> pao2;
  std::optional<Pressure> paco2;
  std::optional<Ratio> fio2;
  std::optional<Pressure> pb;    // barometric pressure; preset when absent
  std::optional<Pressure> ph2o;  // water vapour pressure; preset when absent
  std::optional<Ratio> rq;       // respiratory quotient; preset when absent
  std::optional<Ratio> svo2;
  std::optional<Pressure> pvo2;
  std::optional<Flow> co;         // cardiac output
  std::optional<FlowPerArea> ci;  // cardiac index
  std::optional<Pressure> pmean;  // mean airway pressure
  bool pmean_estimated = false;   // pmean is an estimate from the mechanics, not measured
  std::optional<Pressure> peco2;  // mixed expired PCO2 (not end-tidal)
  std::optional<Pressure> peep;   // total PEEP (field peep_total), for the Berlin condition
  std::optional<Sex> sex;         // recorded; no formula here depends on it
  std::optional<Length> height;
  std::optional<Mass> weight;
  std::optional<Area> bsa;  // given directly; otherwise from height and weight
  BsaFormula bsa_formula = BsaFormula::du_bois;
  std::optional<double> age_years;  // field age, for the expected A-a gradient
};

// What the analysis has to say beside its numbers; presenters word them from
// the results (and the inputs and thresholds) named beside each.
enum class OxygenNote {
  cao2_without_dissolved,  // no pao2: CaO2 is the Hb-bound part only
  cvo2_without_dissolved,  // no pvo2: CvO2 is the Hb-bound part only
  // VO2 and O2 extraction from Hb-bound O2 on both sides (a PO2 is missing; av_content_basis)
  av_difference_haemoglobin_bound,
  bsa_given_over_height_weight,    // bsa given: height and weight not used for it
  co_from_ci_and_bsa,              // no co: co_used = CI x BSA
  ci_differs_from_co_over_bsa,     // CO/BSA (ci_from_co) and the given CI differ by more than 10 %
  alveolar_gas_presets,            // Pb, PH2O or R from the presets (constants)
  pao2_above_alveolar,             // negative A-a gradient
  aa_gradient_expected,            // age rule (aa_gradient_expected), FiO2 at room air
  aa_gradient_expected_on_oxygen,  // the same, with FiO2 above room air
  pf_altitude_adjusted,            // Pb below sea level: pf_ratio_altitude_adjusted
  sf_spo2_above_limit,             // SpO2 above oxygen.sf_spo2_max: S/F not a criterion
  shunt_is_venous_admixture,       // shunt fraction computed: what it means
  shunt_not_computed,              // cco2 not above cao2 (or cvo2)
  pmean_estimated,                 // OI / OSI from an estimated mean airway pressure
};

// What the arterial and venous contents of VO2 and O2 extraction hold; always the same on
// both sides, so that the difference is not biased by dissolved O2 on one side only.
enum class O2ContentBasis {
  with_dissolved,     // PaO2 and PvO2 given: Hb-bound + dissolved O2, both sides
  haemoglobin_bound,  // a PO2 missing: Hb-bound O2 only, both sides
};

struct OxygenResults {
  OxygenConstants constants{};  // k, s and the Pb, PH2O, R actually used
  std::optional<Ratio> cao2;
  std::optional<Ratio> cvo2;
  std::optional<Ratio> cco2;  // end-capillary, for the shunt fraction
  // The contents VO2 and O2 extraction used (cao2 above keeps dissolved O2 for DO2).
  std::optional<O2ContentBasis> av_content_basis;
  std::optional<Area> bsa;
  std::optional<BsaOrigin> bsa_origin;    // given, Du Bois or Mosteller
  std::optional<Flow> co_used;            // CO given, or CI x BSA
  std::optional<FlowPerArea> ci_used;     // CI given, or CO / BSA
  std::optional<FlowPerArea> ci_from_co;  // CO / BSA when CI was given too (for the check)
  std::optional<Flow> do2;
  std::optional<FlowPerArea> do2i;
  std::optional<Flow> vo2;
  std::optional<FlowPerArea> vo2i;
  std::optional<Ratio> o2_extraction;
  std::optional<Pressure> pao2_alveolar;
  std::optional<Pressure> aa_gradient;
  std::optional<Pressure> aa_gradient_expected;  // age/4 + 4, room air (from memory)
  std::optional<Pressure> pf_ratio;
  std::optional<Pressure> pf_ratio_altitude_adjusted;  // P/F x Pb/760, when Pb is below 760
  std::optional<BerlinReading> berlin;
  std::optional<double> sf_ratio;
  std::optional<bool> sf_interpretable;  // SpO2 at or below the preset 97 %
  std::optional<double> oxygenation_index;
  std::optional<double> oxygen_saturation_index;
  std::optional<Ratio> shunt_fraction;
  std::optional<Ratio> dead_space_fraction;
  std::vector<Skipped> skipped;  // needs named by registry id
  std::vector<OxygenNote> notes;
};

// The sea-level pressure the Berlin altitude adjustment divides by (760 mmHg,
// whatever the site's Pb preset; from memory).
Pressure berlin_sea_level_pressure();

// Impossible values (saturation above 100 %, FiO2 above 1, CO not positive),
// contradictions (SvO2 not below SaO2, PvO2 not below PaO2, PECO2 not below
// PaCO2, Pb not above PH2O) and out-of-range values (presets/plausibility.toml);
// throws InputError naming the field by registry id.
void validate_oxygen(const OxygenInputs& in, const Thresholds& limits);

// Every result the inputs allow, using the constants from `limits`; what cannot
// be computed is listed with the fields it needs.
OxygenResults analyse_oxygen(const OxygenInputs& in, const Thresholds& limits);

// A published limit or usual range the results breach (presets/thresholds/oxygen.toml).
enum class OxygenLimit {
  pf_ratio_ards,       // P/F in a Berlin band with the PEEP condition not failed
  sf_ratio_ards,       // S/F at or below oxygen.sf_ratio_ards_max with SpO2 interpretable
  o2_extraction_high,  // above oxygen.o2_extraction_normal_high
  o2_extraction_low,   // below oxygen.o2_extraction_normal_low
  do2i_low,            // below oxygen.do2i_normal_low_ml_per_min_per_m2
};
// The threshold key of a limit ("oxygen.berlin_mild_max").
const char* threshold_key(OxygenLimit l);

// The limits breached, in this order: P/F, S/F, O2 extraction, DO2I.
std::vector<OxygenLimit> oxygen_breaches(const OxygenInputs& in, const OxygenResults& r,
                                         const Thresholds& limits);

}  // namespace bb
