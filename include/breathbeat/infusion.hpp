// Vasoactive infusions: dose conversion both ways (pump rate <-> dose, given
// the concentration and the weight) and the norepinephrine-equivalent dose
// over several infusions. Formulas and sources: docs/methods.md;
// the equivalence factors are data in presets/thresholds/infusion.toml.
//
// Use from other modules (the trial report calls this per step):
//   InfusionSet set;
//   set.weight = kg(80);
//   set.infusions.push_back(parse_infusion_spec("norepinephrine:rate=12mL/h,conc=64ug/mL",
//                                               Field{"infusion", ""}));
//   validate_infusions(set, limits);           // throws InputError
//   const InfusionResults r = analyse_infusions(set, limits);
//   const Answer a = describe_infusions(set, r);   // breathbeat/present/infusion.hpp
//
// Inputs are named by field id (breathbeat/fields/registry.hpp): "drug",
// "rate", "concentration", "dose", "weight", "infusion".
#pragma once

#include <compare>
#include <optional>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/units_parse.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// ---- strong types for drug doses ----------------------------------------------
// A weight-based dose (ug/kg/min) has the dimension 1/time, the same as a heart
// rate, so Boost.Units would let one stand for the other. These types hold one
// number in one fixed unit, do not mix with each other or with Boost
// quantities, and are made and read only through the named functions below.
template <class Tag>
class DoseQuantity {
 public:
  constexpr DoseQuantity() = default;
  static constexpr DoseQuantity from_value(double v) {
    DoseQuantity q;
    q.value_ = v;
    return q;
  }
  constexpr double value() const { return value_; }
  friend constexpr auto operator<=>(DoseQuantity a, DoseQuantity b) = default;
  friend constexpr DoseQuantity operator+(DoseQuantity a, DoseQuantity b) {
    return from_value(a.value_ + b.value_);
  }
  friend constexpr DoseQuantity operator*(DoseQuantity a, double k) {
    return from_value(a.value_ * k);
  }

 private:
  double value_ = 0.0;
};

struct DosePerKgTag {};          // stored in ug/kg/min
struct MassDoseTag {};           // stored in ug/min
struct UnitDoseTag {};           // stored in U/min (international units)
struct UnitConcentrationTag {};  // stored in U/mL

using DosePerKg = DoseQuantity<DosePerKgTag>;
using MassDose = DoseQuantity<MassDoseTag>;
using UnitDose = DoseQuantity<UnitDoseTag>;
using UnitConcentration = DoseQuantity<UnitConcentrationTag>;

inline DosePerKg ug_per_kg_per_min(double v) {
  return DosePerKg::from_value(v);
}
inline DosePerKg ng_per_kg_per_min(double v) {
  return DosePerKg::from_value(v / 1000.0);
}
inline MassDose ug_per_min(double v) {
  return MassDose::from_value(v);
}
inline UnitDose units_per_min(double v) {
  return UnitDose::from_value(v);
}
inline UnitConcentration units_per_mL(double v) {
  return UnitConcentration::from_value(v);
}
inline double in_ug_per_kg_per_min(DosePerKg d) {
  return d.value();
}
inline double in_ug_per_min(MassDose d) {
  return d.value();
}
inline double in_units_per_min(UnitDose d) {
  return d.value();
}
inline double in_units_per_mL(UnitConcentration c) {
  return c.value();
}

// Pump rates are volume flows and mass concentrations are Boost quantities;
// these are their bedside units.
inline Flow mL_per_h(double v) {
  return Flow::from_value(v * 1e-6 / factor::kSecondPerHour);
}
inline double in_mL_per_h(Flow f) {
  return f.value() * 1e6 * factor::kSecondPerHour;
}
// 1 ug/mL = 1e-9 kg / 1e-6 m3 = 1e-3 kg/m3.
inline MassConcentration ug_per_mL(double v) {
  return MassConcentration::from_value(v * 1e-3);
}
inline double in_ug_per_mL(MassConcentration c) {
  return c.value() * 1e3;
}

// What a drug's dose is counted in, given as text to a field.
using DrugConcentration = std::variant<MassConcentration, UnitConcentration>;
using DrugDose = std::variant<DosePerKg, MassDose, UnitDose>;

// ---- drugs ----------------------------------------------------------------------

enum class Drug {
  norepinephrine,
  epinephrine,
  phenylephrine,
  dopamine,
  dobutamine,
  milrinone,
  vasopressin,
  metaraminol,
  angiotensin_ii,
};

enum class DoseBasis { mass, units };  // dosed in ug, or in international units (vasopressin)

struct DrugInfo {
  Drug drug;
  std::string_view name;  // plain generic name, as typed: "angiotensin-ii"
  std::string_view key;   // for result keys: "angiotensin_ii"
  DoseBasis basis;
  bool inotrope_only;          // dobutamine, milrinone: no NE-equivalent
  std::string_view ne_factor;  // threshold key of its NE-equivalence factor, or empty
  // How its doses are shown and read (UCUM codes of the unit table), as labelled at the
  // bedside: a dose per kg in ug/kg/min, angiotensin II in ng/kg/min (Khanna et al., N Engl
  // J Med 2017;377:419); a dose per minute in ug/min (ng/min), or U/min for vasopressin.
  // A bare number typed as a dose is in `dose_unit` (mass-dosed) or U/min (vasopressin).
  std::string_view dose_unit;       // dose per kg (Dimension::dose_per_kg)
  int dose_decimals;                // for the dose in `dose_unit` (or in U/min)
  std::string_view mass_dose_unit;  // dose per minute (Dimension::mass_dose)
  int mass_dose_decimals;
  std::string_view label;  // people's name: "Angiotensin II"
};

const std::vector<DrugInfo>& known_drugs();
const DrugInfo& drug_info(Drug drug);

// The drug for a generic name ("norepinephrine"; "noradrenaline" and
// "adrenaline" are accepted too). Throws InputError with a did-you-mean.
Drug parse_drug(std::string_view text, const Field& field);

// ---- parsing values with infusion units -----------------------------------------
// Units are those of the unit table (breathbeat/units_parse.hpp: Dimension::
// infusion_rate, drug_mass_concentration, drug_unit_concentration, dose_per_kg,
// mass_dose, unit_dose), read without case or spaces; "mcg", "µg" and "ug" are
// the same. `field` names the value in errors as the caller knows it.

// Pump rate: mL/h (default), mL/min, L/h. Rejects negative values.
Flow parse_infusion_rate(std::string_view text, const Field& field);
// ug/mL (default for mass-dosed drugs), mg/mL, ng/mL, mg/L; U/mL (default for
// vasopressin), U/L. The unit must suit the drug's basis. Rejects values <= 0.
DrugConcentration parse_drug_concentration(std::string_view text, DoseBasis basis,
                                           const Field& field);
// ug/kg/min (default for mass-dosed drugs), ng/kg/min, ug/kg/h, mg/kg/h;
// ug/min, mg/min, ug/h, mg/h; U/min (default for vasopressin), U/h.
// The unit must suit the drug's basis. Rejects negative values.
DrugDose parse_drug_dose(std::string_view text, DoseBasis basis, const Field& field);
// The same for one drug: a bare number is in the drug's own dose unit (DrugInfo::dose_unit,
// ng/kg/min for angiotensin II; U/min for vasopressin).
DrugDose parse_drug_dose(std::string_view text, Drug drug, const Field& field);

// A dose in a unit of Dimension::dose_per_kg or mass_dose given by its UCUM code
// ("ng/kg/min"), and back: the number in that unit.
double in_dose_unit(DosePerKg d, std::string_view ucum);
double in_dose_unit(MassDose d, std::string_view ucum);

// ---- formulas -----------------------------------------------------------------------

// dose = rate (mL/h) * conc (ug/mL) / (60 * weight kg) ug/kg/min; common practice, no source.
DosePerKg dose_per_kg_from_rate(Flow rate, MassConcentration conc, Mass weight);
// rate = dose (ug/kg/min) * 60 * weight (kg) / conc (ug/mL) mL/h; common practice, no source.
Flow rate_from_dose_per_kg(DosePerKg dose, MassConcentration conc, Mass weight);
// dose = rate (mL/h) * conc (ug/mL) / 60 ug/min; common practice, no source.
MassDose mass_dose_from_rate(Flow rate, MassConcentration conc);
// rate = dose (ug/min) * 60 / conc (ug/mL) mL/h; common practice, no source.
Flow rate_from_mass_dose(MassDose dose, MassConcentration conc);
// dose = rate (mL/h) * conc (U/mL) / 60 U/min; common practice, no source.
UnitDose unit_dose_from_rate(Flow rate, UnitConcentration conc);
// rate = dose (U/min) * 60 / conc (U/mL) mL/h; common practice, no source.
Flow rate_from_unit_dose(UnitDose dose, UnitConcentration conc);
// ug/kg/min = (ug/min) / weight (kg); common practice, no source.
DosePerKg dose_per_kg_from_mass_dose(MassDose dose, Mass weight);
// ug/min = (ug/kg/min) * weight (kg); common practice, no source.
MassDose mass_dose_from_dose_per_kg(DosePerKg dose, Mass weight);

// One vasoactive dose in the form the NE-equivalent takes it: ug/kg/min, or
// U/min for vasopressin.
struct VasoactiveDose {
  Drug drug;
  std::variant<DosePerKg, UnitDose> dose;
};

// NE-eq = NE + epinephrine + phenylephrine/10 + dopamine/100 + metaraminol/8
//   + vasopressin (U/min) * 2.5 + angiotensin II * 10 (ug/kg/min); Goradia et al., J Crit Care
//   2021;61:233 (from memory). Factors from `limits` (infusion.ne_factor_*); inotropes
//   (dobutamine, milrinone) add nothing. Throws InputError if a dose has the wrong form.
DosePerKg norepinephrine_equivalent(const std::vector<VasoactiveDose>& doses,
                                    const Thresholds& limits);

// ---- analysis -----------------------------------------------------------------------

// One infusion as given: the drug, and a rate or a dose, with the concentration.
// NOLINTNEXTLINE(bugprone-exception-escape): copying a quantity (one double) cannot throw
struct InfusionInput {
  Drug drug = Drug::norepinephrine;
  std::optional<Flow> rate;
  std::optional<DrugConcentration> conc;
  std::optional<DrugDose> dose;
};

// "norepinephrine:rate=12mL/h,conc=64ug/mL" or "vasopressin:dose=0.03U/min";
// parts rate=, conc= (or concentration=), dose= in any order. Throws
// InputError naming the field.
InfusionInput parse_infusion_spec(std::string_view text, const Field& field);

// The parts of such a text as typed, before they are read: the drug name and the
// rate, concentration and dose texts. Checks only the grammar (a drug, key=value
// parts, none unknown or given twice); throws InputError naming the field.
struct InfusionSpecParts {
  std::string drug;
  std::optional<std::string> rate;
  std::optional<std::string> conc;
  std::optional<std::string> dose;
};
InfusionSpecParts split_infusion_spec(std::string_view text, const Field& field);

// All infusions running at one time, and the patient's weight.
struct InfusionSet {
  std::vector<InfusionInput> infusions;
  std::optional<Mass> weight;  // actual body weight, the usual basis of ug/kg/min
};

// ---- usual dose ranges (presets/thresholds/infusion.toml) ---------------------------------

// The doses of one infusion, as far as the inputs allow.
struct InfusionResultDoses {
  std::optional<DosePerKg> dose_per_kg;
  std::optional<MassDose> mass_dose;
  std::optional<UnitDose> unit_dose;
};

// A drug's usual dose range as the presets give it: infusion.usual_<drug>_low and _high,
// and for angiotensin II a higher maximum in the first hours of treatment
// (infusion.usual_angiotensin_ii_high_early over infusion.usual_angiotensin_ii_early_hours).
// The form of the range (per kg, per minute, units per minute) is that of the unit its
// entries are written in.
struct UsualDoseRange {
  DrugDose low;
  DrugDose high;
  std::optional<DrugDose> high_early;  // the maximum in the first hours only
  std::optional<Time> early_hours;     // how long "the first hours" last
  std::string source_low;              // the sources of the entries
  std::string source_high;
  std::string source_early;
};

// The drug's range, or none when the presets give it none.
std::optional<UsualDoseRange> usual_dose_range(Drug drug, const Thresholds& limits);

enum class DosePosition {
  within,
  below,              // below the usual low
  above,              // above the usual high (and above the early maximum, if any)
  above_after_early,  // above the usual high but within the early maximum (first hours only)
};

// Where one infusion's dose stands against its drug's usual range.
struct DoseRangeCheck {
  DosePosition position = DosePosition::within;
  DrugDose dose;  // the dose compared, in the form of the range
  UsualDoseRange range;
};

// The check of a dose against a range; none when the dose is not known in the form of the
// range (a per-kg range without the weight). Doses equal to a limit are within.
std::optional<DoseRangeCheck> check_dose_range(const InfusionResultDoses& doses,
                                               const UsualDoseRange& range);

// The Surviving Sepsis Campaign guideline suggests adding vasopressin rather than escalating
// norepinephrine, usually at a norepinephrine dose of 0.25-0.5 ug/kg/min (Evans et al.,
// Intensive Care Med 2021;47:1181; limits infusion.vasopressin_consider_ne_low/_high).
struct VasopressinSuggestion {
  DosePerKg norepinephrine;  // over all norepinephrine lines
  DosePerKg from;
  DosePerKg to;
  bool above = false;  // the dose is above `to`
  std::string source;
};

// One infusion with whatever the inputs allow filled in.
struct InfusionResult : InfusionResultDoses {
  Drug drug = Drug::norepinephrine;
  std::string key;  // result-key stem: "norepinephrine", "norepinephrine_2" for a second line
  std::optional<Flow> rate;
  std::optional<DosePerKg> ne_equivalent;  // this infusion's share; none for inotropes
  std::optional<DoseRangeCheck> range;     // against the drug's usual range, when both known
};

// People's name of one infusion line: "Norepinephrine", "Norepinephrine (line 2)".
std::string infusion_label(const InfusionResult& r);

// What the reader of infusion results should know (presenters word them).
enum class InfusionNote {
  inotropes_not_counted,   // dobutamine or milrinone given: no NE-equivalent share
  ne_factors_approximate,  // the equivalence factors and their source
  weight_and_labelling,    // doses per kg use the weight given (field "weight");
                           // concentrations taken as labelled (salt vs base)
  dopamine_arrhythmias,    // dopamine given: more arrhythmias than norepinephrine in shock
                           // (De Backer et al., N Engl J Med 2010;362:779)
  usual_ranges,            // doses are set against usual ranges: notes, not orders
};

struct InfusionResults {
  std::vector<InfusionResult> infusions;
  // Total over all vasopressors; absent if any vasopressor's share is unknown.
  std::optional<DosePerKg> ne_equivalent;
  std::vector<Skipped> skipped;  // needs name fields "concentration", "weight"
  std::vector<InfusionNote> notes;
  // Norepinephrine at or above the guideline's range and no vasopressin running.
  std::optional<VasopressinSuggestion> consider_vasopressin;
};

// Weight above zero and plausible, rate plausible, rate or dose (not both) per
// infusion; throws InputError naming the field by id ("weight", "rate",
// "dose", "infusion").
void validate_infusions(const InfusionSet& set, const Thresholds& limits);

InfusionResults analyse_infusions(const InfusionSet& set, const Thresholds& limits);

}  // namespace bb
