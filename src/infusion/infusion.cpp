// Vasoactive infusions: dose conversions, the norepinephrine equivalent, and
// the answer shown to the user.
#include "breathbeat/infusion.hpp"

#include <cctype>
#include <map>

#include "breathbeat/cautions.hpp"

namespace bb {

// ---- formulas -----------------------------------------------------------------------

DosePerKg dose_per_kg_from_rate(Flow rate, MassConcentration conc, Mass weight) {
  return ug_per_kg_per_min(in_mL_per_h(rate) * in_ug_per_mL(conc) / (60.0 * in_kg(weight)));
}

Flow rate_from_dose_per_kg(DosePerKg dose, MassConcentration conc, Mass weight) {
  return mL_per_h(in_ug_per_kg_per_min(dose) * 60.0 * in_kg(weight) / in_ug_per_mL(conc));
}

MassDose mass_dose_from_rate(Flow rate, MassConcentration conc) {
  return ug_per_min(in_mL_per_h(rate) * in_ug_per_mL(conc) / 60.0);
}

Flow rate_from_mass_dose(MassDose dose, MassConcentration conc) {
  return mL_per_h(in_ug_per_min(dose) * 60.0 / in_ug_per_mL(conc));
}

UnitDose unit_dose_from_rate(Flow rate, UnitConcentration conc) {
  return units_per_min(in_mL_per_h(rate) * in_units_per_mL(conc) / 60.0);
}

Flow rate_from_unit_dose(UnitDose dose, UnitConcentration conc) {
  return mL_per_h(in_units_per_min(dose) * 60.0 / in_units_per_mL(conc));
}

DosePerKg dose_per_kg_from_mass_dose(MassDose dose, Mass weight) {
  return ug_per_kg_per_min(in_ug_per_min(dose) / in_kg(weight));
}

MassDose mass_dose_from_dose_per_kg(DosePerKg dose, Mass weight) {
  return ug_per_min(in_ug_per_kg_per_min(dose) * in_kg(weight));
}

DosePerKg norepinephrine_equivalent(const std::vector<VasoactiveDose>& doses,
                                    const Thresholds& limits) {
  DosePerKg total = ug_per_kg_per_min(0.0);
  for (const auto& d : doses) {
    const DrugInfo& info = drug_info(d.drug);
    if (info.inotrope_only) continue;
    const double factor = limits.number(info.ne_factor);
    const bool units = info.basis == DoseBasis::units;
    if (units && std::holds_alternative<UnitDose>(d.dose)) {
      total = total + ug_per_kg_per_min(in_units_per_min(std::get<UnitDose>(d.dose)) * factor);
    } else if (!units && std::holds_alternative<DosePerKg>(d.dose)) {
      total = total + std::get<DosePerKg>(d.dose) * factor;
    } else {
      throw InputError(std::string(info.name), "", "dose in the wrong form for the NE equivalent",
                       units ? "a dose in units/min" : "a dose in mcg/kg/min");
    }
  }
  return total;
}

// ---- presenters ---------------------------------------------------------------------

namespace {
Shown shown(double v, const char* ucum, const char* unit, int decimals) {
  return Shown{v, ucum, unit, decimals, std::nullopt, std::nullopt};
}
}  // namespace

Shown as_ug_per_kg_per_min(DosePerKg d, int decimals) {
  return shown(in_ug_per_kg_per_min(d), "ug/kg/min", "mcg/kg/min", decimals);
}
Shown as_ug_per_min(MassDose d, int decimals) {
  return shown(in_ug_per_min(d), "ug/min", "mcg/min", decimals);
}
Shown as_units_per_min(UnitDose d, int decimals) {
  return shown(in_units_per_min(d), "U/min", "units/min", decimals);
}
Shown as_mL_per_h(Flow f, int decimals) {
  return shown(in_mL_per_h(f), "mL/h", "mL/h", decimals);
}
Shown as_ug_per_mL(MassConcentration c, int decimals) {
  return shown(in_ug_per_mL(c), "ug/mL", "mcg/mL", decimals);
}
Shown as_units_per_mL(UnitConcentration c, int decimals) {
  return shown(in_units_per_mL(c), "U/mL", "units/mL", decimals);
}

// ---- validation ---------------------------------------------------------------------

namespace {

std::string infusion_name(std::size_t index, const InfusionInput& in) {
  return "infusion " + std::to_string(index + 1) + " (" + std::string(drug_info(in.drug).name) +
         ")";
}

void check_rate_plausible(const std::string& name, Flow rate, const Thresholds& limits) {
  const auto range = limits.plausible_range("infusion_rate");
  if (!range || limits.implausible_allowed()) return;
  const double v = in_mL_per_h(rate);
  if (v >= range->min && v <= range->max) return;
  throw InputError(name + " rate", format_number(v, 1) + " mL/h", "is outside the plausible range",
                   format_number(range->min, 0) + " to " + format_number(range->max, 0) +
                       " mL/h (" + range->source +
                       "); if the value is real, pass "
                       "--allow-implausible");
}

}  // namespace

void validate_infusions(const InfusionSet& set, const Thresholds& limits) {
  if (set.infusions.empty()) {
    throw InputError("infusion", "", "no infusion given",
                     "--drug with --rate or --dose (and --conc), or --infusion SPEC");
  }
  if (set.weight && set.weight->value() <= 0.0) {
    throw InputError("weight", format_number(in_kg(*set.weight), 1) + " kg", "is not above zero",
                     "the patient's weight above zero, in kg");
  }
  if (set.weight) limits.check_plausible("weight", *set.weight);
  for (std::size_t i = 0; i < set.infusions.size(); ++i) {
    const InfusionInput& in = set.infusions[i];
    const std::string name = infusion_name(i, in);
    if (in.rate && in.dose) {
      throw InputError(name, "rate and dose", "gives both a rate and a dose",
                       "one of them: the other follows from the concentration");
    }
    if (!in.rate && !in.dose) {
      throw InputError(name, "", "gives neither a rate nor a dose",
                       "rate= with conc=, or dose= (conc= to get the rate)");
    }
    if (in.rate) check_rate_plausible(name, *in.rate, limits);
  }
}

// ---- analysis -----------------------------------------------------------------------

namespace {

std::string label_of(const InfusionResult& r) {
  std::string name(drug_info(r.drug).name);
  name[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(name[0])));
  const auto suffix = r.key.rfind('_');
  const bool numbered = suffix != std::string::npos && std::isdigit(r.key.back());
  return numbered ? name + " (line " + r.key.substr(suffix + 1) + ")" : name;
}

void from_rate(const InfusionInput& in, const std::optional<Mass>& weight, InfusionResult& r,
               std::vector<Skipped>& skipped) {
  r.rate = in.rate;
  if (!in.conc) {
    skipped.push_back(Skipped{
        r.key + "_dose", label_of(r) + " dose", {r.key + " concentration (--conc or conc=)"}});
    return;
  }
  if (const auto* units = std::get_if<UnitConcentration>(&*in.conc)) {
    r.unit_dose = unit_dose_from_rate(*in.rate, *units);
    return;
  }
  const auto& mass = std::get<MassConcentration>(*in.conc);
  r.mass_dose = mass_dose_from_rate(*in.rate, mass);
  if (weight) {
    r.dose_per_kg = dose_per_kg_from_rate(*in.rate, mass, *weight);
  } else {
    skipped.push_back(Skipped{r.key + "_dose_per_kg", label_of(r) + " dose per kg", {"--weight"}});
  }
}

void from_dose(const InfusionInput& in, const std::optional<Mass>& weight, InfusionResult& r,
               std::vector<Skipped>& skipped) {
  const auto* mass_conc = in.conc ? std::get_if<MassConcentration>(&*in.conc) : nullptr;
  const auto* unit_conc = in.conc ? std::get_if<UnitConcentration>(&*in.conc) : nullptr;
  if (const auto* per_kg = std::get_if<DosePerKg>(&*in.dose)) {
    r.dose_per_kg = *per_kg;
    if (weight) r.mass_dose = mass_dose_from_dose_per_kg(*per_kg, *weight);
    if (weight && mass_conc) r.rate = rate_from_dose_per_kg(*per_kg, *mass_conc, *weight);
  } else if (const auto* mass = std::get_if<MassDose>(&*in.dose)) {
    r.mass_dose = *mass;
    if (weight) r.dose_per_kg = dose_per_kg_from_mass_dose(*mass, *weight);
    if (mass_conc) r.rate = rate_from_mass_dose(*mass, *mass_conc);
  } else {
    r.unit_dose = std::get<UnitDose>(*in.dose);
    if (unit_conc) r.rate = rate_from_unit_dose(*r.unit_dose, *unit_conc);
  }
  if (!r.rate) {
    std::vector<std::string> needs;
    if (!in.conc) needs.push_back(r.key + " concentration (--conc or conc=)");
    if (std::holds_alternative<DosePerKg>(*in.dose) && !weight) needs.push_back("--weight");
    skipped.push_back(Skipped{r.key + "_rate", label_of(r) + " pump rate", needs});
  }
  if (!r.dose_per_kg && !r.unit_dose) {
    skipped.push_back(Skipped{r.key + "_dose_per_kg", label_of(r) + " dose per kg", {"--weight"}});
  }
}

std::optional<VasoactiveDose> ne_form(const InfusionResult& r) {
  if (r.unit_dose) return VasoactiveDose{r.drug, *r.unit_dose};
  if (r.dose_per_kg) return VasoactiveDose{r.drug, *r.dose_per_kg};
  return std::nullopt;
}

}  // namespace

InfusionResults analyse_infusions(const InfusionSet& set, const Thresholds& limits) {
  InfusionResults out;
  std::map<Drug, int> lines;
  std::vector<VasoactiveDose> vasopressors;
  bool all_known = true;
  bool any_inotrope = false;
  for (const InfusionInput& in : set.infusions) {
    const DrugInfo& info = drug_info(in.drug);
    InfusionResult r;
    r.drug = in.drug;
    const int line = ++lines[in.drug];
    r.key = std::string(info.key) + (line > 1 ? "_" + std::to_string(line) : "");
    if (in.rate) {
      from_rate(in, set.weight, r, out.skipped);
    } else {
      from_dose(in, set.weight, r, out.skipped);
    }
    if (info.inotrope_only) {
      any_inotrope = true;
    } else if (const auto dose = ne_form(r)) {
      r.ne_equivalent = norepinephrine_equivalent({*dose}, limits);
      vasopressors.push_back(*dose);
    } else {
      all_known = false;
    }
    out.infusions.push_back(r);
  }
  if (all_known) {
    out.ne_equivalent = norepinephrine_equivalent(vasopressors, limits);
  } else {
    out.skipped.push_back(Skipped{"ne_equivalent",
                                  "Norepinephrine equivalent",
                                  {"every vasopressor's dose per kg (--weight, conc=)"}});
  }
  if (any_inotrope) {
    out.notes.push_back(
        "Dobutamine and milrinone are inotropes and do not count toward the norepinephrine "
        "equivalent.");
  }
  out.notes.push_back(
      "Norepinephrine-equivalent factors: Goradia et al., J Crit Care 2021;61:233 (from memory); "
      "equivalence between vasopressors is approximate.");
  out.notes.push_back(
      "Doses per kg use the weight given (--weight). Concentrations are taken as labelled: "
      "norepinephrine labelled as the tartrate salt holds about half as much base (from memory).");
  return out;
}

// ---- the answer ---------------------------------------------------------------------

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
  const std::string label = label_of(r);
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

Answer describe_infusions(const InfusionSet& set, const InfusionResults& r) {
  Answer a;
  a.command = "calc infusion";
  a.title = "vasoactive infusions";
  if (set.weight) a.inputs.push_back({"weight", as_kg(*set.weight)});
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
  a.notes = r.notes;
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
