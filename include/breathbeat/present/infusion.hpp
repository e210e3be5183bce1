// Vasoactive infusions in words: the typed results of analyse_infusions as an
// Answer, and infusion doses as Shown values.
#pragma once

#include <string>
#include <vector>

#include "breathbeat/answer.hpp"
#include "breathbeat/infusion.hpp"

namespace bb {

// Doses as Shown values, UCUM code and text spelling from the unit table
// (breathbeat/units_parse.hpp): text in "mcg" and "units" (clearer at the
// bedside than "µg" and "U"); JSON ug/kg/min, ug/min, [iU]/min, mL/h, ug/mL, [iU]/mL.
Shown as_ug_per_kg_per_min(DosePerKg d, int decimals = 3);
Shown as_ug_per_min(MassDose d, int decimals = 1);
Shown as_units_per_min(UnitDose d, int decimals = 3);
Shown as_mL_per_h(Flow f, int decimals = 1);
Shown as_ug_per_mL(MassConcentration c, int decimals = 1);
Shown as_units_per_mL(UnitConcentration c, int decimals = 2);
// A dose of one drug in the drug's own display unit (DrugInfo: ng/kg/min for angiotensin II).
Shown as_dose_per_kg(DosePerKg d, Drug drug);
Shown as_mass_dose(MassDose d, Drug drug);
Shown as_drug_dose(const DrugDose& d, Drug drug);  // U/min for a UnitDose

// "2.5-20 mcg/kg/min": a drug's usual range in its display unit, numbers as written.
std::string usual_range_text(const UsualDoseRange& range, Drug drug);

// Flags of doses outside their drug's usual range (key <drug>_usual_range), with the source.
std::vector<Flag> infusion_flags(const InfusionResults& r);

// The guideline's suggestion to consider adding vasopressin, as a note.
std::string vasopressin_suggestion_text(const VasopressinSuggestion& s);

// One note as a sentence; a field it names is named as in `context`.
std::string infusion_note_text(InfusionNote note,
                               FieldContext context = FieldContext::command_line);

// The results as an Answer (command "calc infusion"). Keys per infusion:
// <drug>_rate (mL/h), <drug>_dose_per_kg (ug/kg/min; ng/kg/min for angiotensin II),
// <drug>_dose (ug/min, ng/min or U/min), <drug>_ne_equivalent; and ne_equivalent
// (ug/kg/min) over all. Flags: doses outside their usual range; notes: the vasopressin
// suggestion, dopamine's arrhythmias.
Answer describe_infusions(const InfusionSet& set, const InfusionResults& r,
                          FieldContext context = FieldContext::command_line);

}  // namespace bb
