// Inferior vena cava: respiratory change of the IVC diameter as a sign of
// preload responsiveness (passive ventilation) and, in unassisted breathing,
// the right-atrial pressure estimate of the ASE guideline table.
// Formulas, cut-offs and sources: docs/methods.md;
// cut-offs are data in presets/thresholds/ivc.toml.
//
// Use from other modules (the trial report calls this per step):
//   IvcInputs in; in.dmax = cm(2.0); in.dmin = cm(1.6); in.breathing = Breathing::passive;
//   validate_ivc(in, limits);                  // throws InputError
//   const IvcResults r = analyse_ivc(in, limits);
//   const Answer a = describe_ivc(in, r, limits);  // breathbeat/present/ivc.hpp
//
// Inputs are named by field id (breathbeat/fields/registry.hpp): ivc_dmax,
// ivc_dmin, ivc_breathing, vt_per_kg, passive, iah, rv_failure.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// How the patient breathes while the IVC is imaged; the values are the choice
// words of field ivc_breathing (src/fields/registry.cpp), in that order.
//   passive:    controlled ventilation, no breathing effort; the IVC is widest
//               at end-inspiration. Distensibility and variation apply.
//   assisted:   breathing effort on positive pressure (pressure support,
//               CPAP). Neither the passive-ventilation cut-offs nor the RAP
//               table applies.
//   unassisted: breathing without ventilator support; the IVC is narrowest at
//               inspiration. The RAP table of Rudski et al. 2010 applies.
// Dmax and Dmin are the widest and narrowest diameters over the breath in each.
enum class Breathing { passive, assisted, unassisted };
const char* to_string(Breathing b);  // the choice word: "passive", "assisted", "unassisted"
// The state of a choice word (as to_string spells it); nullopt for any other.
std::optional<Breathing> breathing_from_word(std::string_view word);

// ---- formulas ---------------------------------------------------------------

// (Dmax - Dmin) / Dmax; Rudski et al., J Am Soc Echocardiogr 2010;23:685.
Ratio ivc_collapsibility(Length dmax, Length dmin);
// (Dmax - Dmin) / Dmin; Barbier et al., Intensive Care Med 2004;30:1740.
Ratio ivc_distensibility(Length dmax, Length dmin);
// (Dmax - Dmin) / ((Dmax + Dmin) / 2); Feissel et al., Intensive Care Med 2004;30:1834.
Ratio ivc_respiratory_variation(Length dmax, Length dmin);

// A right-atrial pressure band of the ASE table: central value and range.
struct RapEstimate {
  Pressure value;
  Pressure low;
  Pressure high;
  std::string band;  // "normal", "intermediate" or "high"
};

// RAP from IVC size and collapse: <= 2.1 cm and > 50 % -> 3 (0-5) mmHg;
// > 2.1 cm and < 50 % -> 15 (10-20); otherwise 8 (5-10);
// Rudski et al., J Am Soc Echocardiogr 2010;23:685. Cut-offs and bands from `limits` (ivc.rap_*).
RapEstimate right_atrial_pressure_from_ivc(Length ivc_diameter, Ratio collapsibility,
                                           const Thresholds& limits);

// ---- analysis -----------------------------------------------------------------

// What was measured and stated; anything absent is simply not given.
// The three conditions are tri-state: nullopt = not stated.
struct IvcInputs {
  std::optional<Length> dmax;              // field ivc_dmax: widest diameter over the breath
  std::optional<Length> dmin;              // field ivc_dmin: narrowest diameter over the breath
  std::optional<Breathing> breathing;      // field ivc_breathing
  std::optional<VolumePerMass> vt_per_kg;  // field vt_per_kg: tidal volume per kg (PBW)
  // Field passive, inverted: true = breathing effort seen; false = fully passive.
  std::optional<bool> effort_seen;
  // "No effort" that only recorded signals support: the gate is not_contradicted, not met.
  bool passive_from_signals = false;
  std::optional<bool> iah;         // field iah: intra-abdominal hypertension present
  std::optional<bool> rv_failure;  // field rv_failure: severe RV failure or severe TR present
};

// Reading categories (Reading::category).
inline constexpr const char* kIvcResponsive = "responsive";
inline constexpr const char* kIvcNotResponsive = "not_responsive";
inline constexpr const char* kIvcDiscordant =
    "discordant";  // distensibility and variation disagree
inline constexpr const char* kIvcNotInterpretable = "not_interpretable";
inline constexpr const char* kIvcNotApplicable = "not_applicable";

// What the reader of IVC results should know (presenters word them).
enum class IvcNote {
  sniff_collapse,                   // unassisted: the ASE table judges collapse with a sniff
  collapsibility_for_completeness,  // passive: collapsibility shown but does not apply
  distensibility_for_completeness,  // unassisted: distensibility and variation do not apply
  indices_for_completeness,         // assisted: no index has a reading
  measurement_site,                 // where and how to measure the IVC
};

// The gate keys of ivc_gates, and the field each one rests on.
inline constexpr const char* kIvcGatePassive = "passive";            // field passive
inline constexpr const char* kIvcGateVtPerKg = "vt_per_kg";          // field vt_per_kg
inline constexpr const char* kIvcGateNoIah = "no_iah";               // field iah
inline constexpr const char* kIvcGateNoRvFailure = "no_rv_failure";  // field rv_failure

struct IvcResults {
  std::optional<Ratio> collapsibility;
  std::optional<Ratio> distensibility;
  std::optional<Ratio> variation;
  // Which index applies to the breathing state: collapsibility (for the RAP
  // estimate) in unassisted breathing; distensibility and variation in passive
  // ventilation; none in assisted breathing.
  bool collapsibility_applies = false;
  bool distensibility_applies = false;
  bool variation_applies = false;
  std::optional<RapEstimate> rap;  // unassisted breathing only
  std::vector<Gate> gates;
  Reading reading;
  std::vector<Skipped> skipped;
  std::vector<IvcNote> notes;
};

// Dmin > Dmax, non-positive diameters, contradictory statements and values out
// of their plausible range; throws InputError naming the field by id.
void validate_ivc(const IvcInputs& in, const Thresholds& limits);

// The conditions of the reading that applies to the breathing state, each met,
// failed or unknown from what was stated; one list per state:
//   passive:    passive, vt_per_kg, no_iah, no_rv_failure (the conditions the
//               distensibility and variation cut-offs were studied under);
//   assisted:   none (no IVC reading applies);
//   unassisted: none (the RAP table of Rudski et al. 2010 rests on no other
//               stated fact; no tidal volume for an unventilated patient);
//   not stated: none (which list applies is not known).
// An unknown gate's detail says only "not stated" / "not given"; presenters
// name the field it needs.
std::vector<Gate> ivc_gates(const IvcInputs& in, const Thresholds& limits);

// Indices, RAP estimate (unassisted breathing only), gates and the reading. A
// reading that lacks inputs (no diameters, breathing not stated) does not name
// fields; presenters do.
IvcResults analyse_ivc(const IvcInputs& in, const Thresholds& limits);

}  // namespace bb
