// Vasoactive infusions in words: labels, the input summary, doses as Shown
// values and notes as sentences. The numbers come from src/infusion/.
#include "breathbeat/present/infusion.hpp"

#include <cstdio>

#include "breathbeat/cautions.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb {

namespace {

// A value in a unit of the unit table: its UCUM code and its spelling for people.
Shown from_table(double v, Dimension dimension, std::string_view ucum, int decimals) {
  const UnitSpelling& u = unit_of(dimension, ucum);
  return Shown{v, std::string(u.ucum), std::string(u.shown), decimals, std::nullopt, std::nullopt};
}

}  // namespace

Shown as_ug_per_kg_per_min(DosePerKg d, int decimals) {
  return from_table(in_ug_per_kg_per_min(d), Dimension::dose_per_kg, "ug/kg/min", decimals);
}
Shown as_ug_per_min(MassDose d, int decimals) {
  return from_table(in_ug_per_min(d), Dimension::mass_dose, "ug/min", decimals);
}
Shown as_units_per_min(UnitDose d, int decimals) {
  return from_table(in_units_per_min(d), Dimension::unit_dose, "[iU]/min", decimals);
}
Shown as_mL_per_h(Flow f, int decimals) {
  return from_table(in_mL_per_h(f), Dimension::infusion_rate, "mL/h", decimals);
}
Shown as_ug_per_mL(MassConcentration c, int decimals) {
  return from_table(in_ug_per_mL(c), Dimension::drug_mass_concentration, "ug/mL", decimals);
}
Shown as_units_per_mL(UnitConcentration c, int decimals) {
  return from_table(in_units_per_mL(c), Dimension::drug_unit_concentration, "[iU]/mL", decimals);
}

Shown as_dose_per_kg(DosePerKg d, Drug drug) {
  const DrugInfo& info = drug_info(drug);
  return from_table(in_dose_unit(d, info.dose_unit), Dimension::dose_per_kg, info.dose_unit,
                    info.dose_decimals);
}
Shown as_mass_dose(MassDose d, Drug drug) {
  const DrugInfo& info = drug_info(drug);
  return from_table(in_dose_unit(d, info.mass_dose_unit), Dimension::mass_dose, info.mass_dose_unit,
                    info.mass_dose_decimals);
}
Shown as_drug_dose(const DrugDose& d, Drug drug) {
  if (const auto* per_kg = std::get_if<DosePerKg>(&d)) return as_dose_per_kg(*per_kg, drug);
  if (const auto* mass = std::get_if<MassDose>(&d)) return as_mass_dose(*mass, drug);
  return as_units_per_min(std::get<UnitDose>(d), drug_info(drug).dose_decimals);
}

namespace {

// A limit as written: "2.5", "20", "0.03" (no trailing zeros).
std::string as_written(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}
std::string value_text(const DrugDose& d, Drug drug) {
  return as_written(as_drug_dose(d, drug).value);
}
std::string unit_text(const DrugDose& d, Drug drug) {
  return as_drug_dose(d, drug).unit;
}
std::string hours_text(Time t) {
  return as_written(t.value() / factor::kSecondPerHour) + " h";
}

}  // namespace

std::string usual_range_text(const UsualDoseRange& range, Drug drug) {
  return value_text(range.low, drug) + "-" + value_text(range.high, drug) + " " +
         unit_text(range.high, drug);
}

std::vector<Flag> infusion_flags(const InfusionResults& r) {
  std::vector<Flag> out;
  for (const InfusionResult& i : r.infusions) {
    if (!i.range || i.range->position == DosePosition::within) continue;
    const DoseRangeCheck& c = *i.range;
    const std::string dose =
        infusion_label(i) + " dose " + format_shown(as_drug_dose(c.dose, i.drug));
    const std::string range = usual_range_text(c.range, i.drug);
    const std::string check = ": check the dose and its unit (a note, not an order)";
    Flag f{i.key + "_usual_range", "", c.range.source_high};
    switch (c.position) {
      case DosePosition::below:
        f.message = dose + " is below the usual range " + range + check;
        f.source = c.range.source_low;
        break;
      case DosePosition::above:
        if (c.range.high_early) {
          f.message = dose + " is above " + value_text(*c.range.high_early, i.drug) + " " +
                      unit_text(*c.range.high_early, i.drug) +
                      ", the usual maximum even in the first " + hours_text(*c.range.early_hours) +
                      " (usual range after that " + range + ")" + check;
          f.source = c.range.source_early;
        } else {
          f.message = dose + " is above the usual range " + range + check;
        }
        break;
      case DosePosition::above_after_early:
        f.message = dose + " is above the usual range " + range + "; up to " +
                    value_text(*c.range.high_early, i.drug) + " " +
                    unit_text(*c.range.high_early, i.drug) + " is usual only in the first " +
                    hours_text(*c.range.early_hours) + " of treatment" + check;
        f.source = c.range.source_early;
        break;
      case DosePosition::within:
        break;
    }
    out.push_back(f);
  }
  return out;
}

std::string vasopressin_suggestion_text(const VasopressinSuggestion& s) {
  const std::string range = as_written(in_ug_per_kg_per_min(s.from)) + "-" +
                            as_written(in_ug_per_kg_per_min(s.to)) + " " +
                            as_dose_per_kg(s.from, Drug::norepinephrine).unit;
  return "Norepinephrine " + format_shown(as_dose_per_kg(s.norepinephrine, Drug::norepinephrine)) +
         (s.above ? " is above " : " is within ") + range +
         ", the dose at which the Surviving Sepsis Campaign guideline suggests considering adding "
         "vasopressin rather than escalating norepinephrine (" +
         s.source + "). A note, not an order.";
}

std::string infusion_note_text(InfusionNote note, FieldContext context) {
  switch (note) {
    case InfusionNote::inotropes_not_counted:
      return "Dobutamine and milrinone are inotropes and do not count toward the norepinephrine "
             "equivalent.";
    case InfusionNote::ne_factors_approximate:
      return "Norepinephrine-equivalent factors: Goradia et al., J Crit Care 2021;61:233 (from "
             "memory); equivalence between vasopressors is approximate.";
    case InfusionNote::weight_and_labelling:
      return "Doses per kg use the weight given (" + field_name("weight", context) +
             "). Concentrations are taken as labelled: norepinephrine labelled as the tartrate "
             "salt holds about half as much base (from memory).";
    case InfusionNote::dopamine_arrhythmias:
      return "Dopamine: in shock it was followed by more arrhythmias than norepinephrine (De "
             "Backer et al., N Engl J Med 2010;362:779).";
    case InfusionNote::usual_ranges:
      return "Doses are set against usual ranges (presets/thresholds/infusion.toml, each with its "
             "source); a dose outside one is a reason to check it, not an order.";
  }
  return "";
}

namespace {

std::string summary(const InfusionInput& in) {
  std::string out(drug_info(in.drug).name);
  if (in.rate) out += " rate=" + format_shown(as_mL_per_h(*in.rate));
  if (in.dose) {
    if (const auto* d = std::get_if<UnitDose>(&*in.dose)) {
      out += " dose=" + format_shown(as_units_per_min(*d));
    } else {
      out += " dose=" + format_shown(as_drug_dose(*in.dose, in.drug));
    }
  }
  if (in.conc) {
    if (const auto* c = std::get_if<MassConcentration>(&*in.conc))
      out += " conc=" + format_shown(as_ug_per_mL(*c));
    if (const auto* c = std::get_if<UnitConcentration>(&*in.conc))
      out += " conc=" + format_shown(as_units_per_mL(*c));
  }
  return out;
}

void add_infusion(const InfusionInput& in, const InfusionResult& r, Answer& a) {
  const DrugInfo& info = drug_info(r.drug);
  const std::string label = infusion_label(r);
  auto how = [](bool given) { return std::string(given ? "given" : "computed"); };
  if (r.rate) {
    a.results.push_back(Item{r.key + "_rate", label + " pump rate", as_mL_per_h(*r.rate),
                             how(in.rate.has_value())});
  }
  const bool dose_per_kg_given = in.dose && std::holds_alternative<DosePerKg>(*in.dose);
  if (r.dose_per_kg) {
    a.results.push_back(Item{r.key + "_dose_per_kg", label + " dose per kg",
                             as_dose_per_kg(*r.dose_per_kg, r.drug), how(dose_per_kg_given)});
  }
  if (r.mass_dose) {
    a.results.push_back(Item{r.key + "_dose", label + " dose", as_mass_dose(*r.mass_dose, r.drug),
                             how(in.dose && std::holds_alternative<MassDose>(*in.dose))});
  }
  if (r.unit_dose) {
    a.results.push_back(Item{r.key + "_dose", label + " dose",
                             as_units_per_min(*r.unit_dose, info.dose_decimals),
                             how(in.dose.has_value())});
  }
  if (r.ne_equivalent) {
    a.results.push_back(Item{r.key + "_ne_equivalent", label + " NE-equivalent share",
                             as_ug_per_kg_per_min(*r.ne_equivalent), "Goradia 2021"});
  }
}

}  // namespace

Answer describe_infusions(const InfusionSet& set, const InfusionResults& r, FieldContext context) {
  Answer a;
  a.command = "calc infusion";
  a.title = "vasoactive infusions";
  a.context = context;
  if (set.weight) a.inputs.push_back({"weight", as_kg(*set.weight)});
  // Field "infusion" is repeatable: one input per line, numbered.
  for (std::size_t i = 0; i < set.infusions.size(); ++i) {
    a.inputs.push_back({"infusion_" + std::to_string(i + 1), summary(set.infusions[i])});
  }
  for (std::size_t i = 0; i < r.infusions.size(); ++i)
    add_infusion(set.infusions[i], r.infusions[i], a);
  if (r.ne_equivalent) {
    a.results.push_back(Item{"ne_equivalent", "Norepinephrine equivalent, all vasopressors",
                             as_ug_per_kg_per_min(*r.ne_equivalent), "Goradia 2021, from memory"});
  }
  a.skipped = r.skipped;
  a.flags = infusion_flags(r);
  if (r.consider_vasopressin)
    a.notes.push_back(vasopressin_suggestion_text(*r.consider_vasopressin));
  for (InfusionNote n : r.notes) a.notes.push_back(infusion_note_text(n, context));
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
