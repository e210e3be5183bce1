// Vasoactive infusions in words: labels, the input summary, doses as Shown
// values and notes as sentences. The numbers come from src/infusion/.
#include "breathbeat/present/infusion.hpp"

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
  return from_table(in_units_per_min(d), Dimension::unit_dose, "U/min", decimals);
}
Shown as_mL_per_h(Flow f, int decimals) {
  return from_table(in_mL_per_h(f), Dimension::infusion_rate, "mL/h", decimals);
}
Shown as_ug_per_mL(MassConcentration c, int decimals) {
  return from_table(in_ug_per_mL(c), Dimension::drug_mass_concentration, "ug/mL", decimals);
}
Shown as_units_per_mL(UnitConcentration c, int decimals) {
  return from_table(in_units_per_mL(c), Dimension::drug_unit_concentration, "U/mL", decimals);
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
  }
  return "";
}

namespace {

std::string summary(const InfusionInput& in) {
  std::string out(drug_info(in.drug).name);
  if (in.rate) out += " rate=" + format_shown(as_mL_per_h(*in.rate));
  if (in.dose) {
    if (const auto* d = std::get_if<DosePerKg>(&*in.dose))
      out += " dose=" + format_shown(as_ug_per_kg_per_min(*d, drug_info(in.drug).dose_decimals));
    if (const auto* d = std::get_if<MassDose>(&*in.dose))
      out += " dose=" + format_shown(as_ug_per_min(*d));
    if (const auto* d = std::get_if<UnitDose>(&*in.dose))
      out += " dose=" + format_shown(as_units_per_min(*d));
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
                             as_ug_per_kg_per_min(*r.dose_per_kg, info.dose_decimals),
                             how(dose_per_kg_given)});
  }
  if (r.mass_dose) {
    a.results.push_back(Item{r.key + "_dose", label + " dose", as_ug_per_min(*r.mass_dose),
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
  for (InfusionNote n : r.notes) a.notes.push_back(infusion_note_text(n, context));
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
