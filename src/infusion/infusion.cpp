// Vasoactive infusions: dose conversions, the norepinephrine equivalent, and
// the checks and the analysis (presented by src/present/infusion_answer.cpp).
#include "breathbeat/infusion.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <map>
#include <stdexcept>

namespace bb {

namespace {
// The plausibility range of a pump rate (presets/plausibility.toml).
constexpr std::string_view kRatePlausibility = "infusion_rate";

std::string format_kg(Mass m) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f kg", in_kg(m));
  return buf;
}
}  // namespace

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
      throw InputError("dose", std::string(info.name), "is in the wrong form for the NE equivalent",
                       units ? "a dose in units/min" : "a dose in mcg/kg/min");
    }
  }
  return total;
}

// ---- validation ---------------------------------------------------------------------

namespace {

std::string infusion_name(std::size_t index, const InfusionInput& in) {
  return "infusion " + std::to_string(index + 1) + " (" + std::string(drug_info(in.drug).name) +
         ")";
}

// Plausibility of a pump rate (presets/plausibility.toml, infusion_rate),
// reported on the field "rate" with the infusion it belongs to.
void check_rate_plausible(const std::string& name, Flow rate, const Thresholds& limits) {
  try {
    limits.check_plausible_si(kRatePlausibility, rate.value(), Dimension::infusion_rate);
  } catch (const InputError& e) {
    throw InputError("rate", e.value(), "of " + name + " " + e.problem(), e.expected());
  }
}

}  // namespace

void validate_infusions(const InfusionSet& set, const Thresholds& limits) {
  if (set.infusions.empty()) {
    throw InputError("infusion", "", "no infusion given",
                     "a drug with a rate or a dose (and its concentration)");
  }
  if (set.weight && set.weight->value() <= 0.0) {
    throw InputError("weight", format_kg(*set.weight), "is not above zero",
                     "the patient's weight above zero, in kg");
  }
  if (set.weight) limits.check_plausible("weight", *set.weight);
  for (std::size_t i = 0; i < set.infusions.size(); ++i) {
    const InfusionInput& in = set.infusions[i];
    const std::string name = infusion_name(i, in);
    if (in.rate && in.dose) {
      throw InputError("dose", "rate and dose", name + " gives both a rate and a dose",
                       "one of them: the other follows from the concentration");
    }
    if (!in.rate && !in.dose) {
      throw InputError("rate", "", name + " gives neither a rate nor a dose",
                       "a rate with its concentration, or a dose (with its concentration to get "
                       "the rate)");
    }
    if (in.rate) check_rate_plausible(name, *in.rate, limits);
  }
}

// ---- usual dose ranges ------------------------------------------------------------------

namespace {

// The number of `value` written in `unit` in the stored unit `stored` of `dimension`.
double in_stored(double value, const UnitSpelling& unit, Dimension dimension,
                 std::string_view stored) {
  return value * (unit.to_si / unit_of(dimension, stored).to_si);
}

// A threshold written in a dose unit, as the dose type of that unit's dimension.
std::optional<DrugDose> dose_threshold(const Thresholds& limits, const std::string& key) {
  if (!limits.has(key)) return std::nullopt;
  const ThresholdEntry& e = limits.entry(key);
  if (const UnitSpelling* u = find_unit(e.unit, Dimension::dose_per_kg))
    return ug_per_kg_per_min(in_stored(e.value, *u, Dimension::dose_per_kg, "ug/kg/min"));
  if (const UnitSpelling* u = find_unit(e.unit, Dimension::mass_dose))
    return ug_per_min(in_stored(e.value, *u, Dimension::mass_dose, "ug/min"));
  if (const UnitSpelling* u = find_unit(e.unit, Dimension::unit_dose))
    return units_per_min(in_stored(e.value, *u, Dimension::unit_dose, "[iU]/min"));
  throw std::logic_error("threshold " + key + " is not written in a dose unit");
}

// The number of a dose in its stored unit.
double stored_value(const DrugDose& d) {
  return std::visit([](auto x) { return x.value(); }, d);
}

// The dose of `doses` in the form (alternative) of `like`, if known.
std::optional<DrugDose> dose_like(const InfusionResultDoses& doses, const DrugDose& like) {
  if (std::holds_alternative<DosePerKg>(like) && doses.dose_per_kg) return *doses.dose_per_kg;
  if (std::holds_alternative<MassDose>(like) && doses.mass_dose) return *doses.mass_dose;
  if (std::holds_alternative<UnitDose>(like) && doses.unit_dose) return *doses.unit_dose;
  return std::nullopt;
}

// a < b, with doses that equal a limit up to rounding counted as equal.
bool clearly_below(double a, double b) {
  return a < b - 1e-9 * std::max(std::abs(a), std::abs(b));
}

}  // namespace

std::optional<UsualDoseRange> usual_dose_range(Drug drug, const Thresholds& limits) {
  const std::string stem = "infusion.usual_" + std::string(drug_info(drug).key);
  const auto low = dose_threshold(limits, stem + "_low");
  const auto high = dose_threshold(limits, stem + "_high");
  if (!low || !high) return std::nullopt;
  if (low->index() != high->index())
    throw std::logic_error(stem + ": low and high are written in different kinds of dose unit");
  UsualDoseRange r{*low,
                   *high,
                   std::nullopt,
                   std::nullopt,
                   limits.source(stem + "_low"),
                   limits.source(stem + "_high"),
                   ""};
  if (const auto early = dose_threshold(limits, stem + "_high_early")) {
    if (early->index() != high->index())
      throw std::logic_error(stem + "_high_early: not the kind of dose unit of the range");
    r.high_early = *early;
    r.source_early = limits.source(stem + "_high_early");
    r.early_hours = limits.get<Time>(stem + "_early_hours");
  }
  return r;
}

std::optional<DoseRangeCheck> check_dose_range(const InfusionResultDoses& doses,
                                               const UsualDoseRange& range) {
  const auto dose = dose_like(doses, range.low);
  if (!dose) return std::nullopt;
  const double v = stored_value(*dose);
  DoseRangeCheck c{DosePosition::within, *dose, range};
  if (clearly_below(v, stored_value(range.low))) {
    c.position = DosePosition::below;
  } else if (clearly_below(stored_value(range.high), v)) {
    c.position = range.high_early && !clearly_below(stored_value(*range.high_early), v)
                     ? DosePosition::above_after_early
                     : DosePosition::above;
  }
  return c;
}

namespace {

// Norepinephrine at or above the range at which the guideline suggests adding vasopressin,
// with no vasopressin running; none when a norepinephrine dose per kg is unknown.
std::optional<VasopressinSuggestion> vasopressin_suggestion(const InfusionResults& r,
                                                            const Thresholds& limits) {
  DosePerKg total = ug_per_kg_per_min(0.0);
  bool any = false;
  for (const InfusionResult& i : r.infusions) {
    if (i.drug == Drug::vasopressin) return std::nullopt;
    if (i.drug != Drug::norepinephrine) continue;
    if (!i.dose_per_kg) return std::nullopt;
    total = total + *i.dose_per_kg;
    any = true;
  }
  if (!any) return std::nullopt;
  const auto from = dose_threshold(limits, "infusion.vasopressin_consider_ne_low");
  const auto to = dose_threshold(limits, "infusion.vasopressin_consider_ne_high");
  if (!from || !to || !std::holds_alternative<DosePerKg>(*from) ||
      !std::holds_alternative<DosePerKg>(*to))
    throw std::logic_error("infusion.vasopressin_consider_ne_*: not doses per kg");
  const DosePerKg lo = std::get<DosePerKg>(*from);
  const DosePerKg hi = std::get<DosePerKg>(*to);
  if (clearly_below(total.value(), lo.value())) return std::nullopt;
  return VasopressinSuggestion{total, lo, hi, clearly_below(hi.value(), total.value()),
                               limits.source("infusion.vasopressin_consider_ne_low")};
}

}  // namespace

// ---- analysis -----------------------------------------------------------------------

std::string infusion_label(const InfusionResult& r) {
  const std::string name(drug_info(r.drug).label);
  const auto suffix = r.key.rfind('_');
  const bool numbered = suffix != std::string::npos && std::isdigit(r.key.back());
  return numbered ? name + " (line " + r.key.substr(suffix + 1) + ")" : name;
}

namespace {

std::string label_of(const InfusionResult& r) {
  return infusion_label(r);
}

void from_rate(const InfusionInput& in, const std::optional<Mass>& weight, InfusionResult& r,
               std::vector<Skipped>& skipped) {
  r.rate = in.rate;
  if (!in.conc) {
    skipped.push_back(Skipped{r.key + "_dose", label_of(r) + " dose", {Need{"concentration"}}});
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
    skipped.push_back(
        Skipped{r.key + "_dose_per_kg", label_of(r) + " dose per kg", {Need{"weight"}}});
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
    std::vector<Need> needs;
    if (!in.conc) needs.push_back(Need{"concentration"});
    if (std::holds_alternative<DosePerKg>(*in.dose) && !weight) needs.push_back(Need{"weight"});
    skipped.push_back(Skipped{r.key + "_rate", label_of(r) + " pump rate", needs});
  }
  if (!r.dose_per_kg && !r.unit_dose) {
    skipped.push_back(
        Skipped{r.key + "_dose_per_kg", label_of(r) + " dose per kg", {Need{"weight"}}});
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
    if (const auto range = usual_dose_range(in.drug, limits)) r.range = check_dose_range(r, *range);
    out.infusions.push_back(r);
  }
  if (all_known) {
    out.ne_equivalent = norepinephrine_equivalent(vasopressors, limits);
  } else {
    // Every vasopressor's dose per kg is needed: the weight, and the concentration
    // of an infusion given by its rate.
    std::vector<Need> needs;
    if (!set.weight) needs.push_back(Need{"weight"});
    for (const InfusionInput& in : set.infusions) {
      if (!drug_info(in.drug).inotrope_only && in.rate && !in.conc) {
        needs.push_back(Need{"concentration"});
        break;
      }
    }
    out.skipped.push_back(Skipped{"ne_equivalent", "Norepinephrine equivalent", needs});
  }
  out.consider_vasopressin = vasopressin_suggestion(out, limits);
  bool dopamine = false;
  bool outside = out.consider_vasopressin.has_value();
  for (const InfusionResult& r : out.infusions) {
    dopamine |= r.drug == Drug::dopamine;
    outside |= r.range && r.range->position != DosePosition::within;
  }
  if (dopamine) out.notes.push_back(InfusionNote::dopamine_arrhythmias);
  if (outside) out.notes.push_back(InfusionNote::usual_ranges);
  if (any_inotrope) out.notes.push_back(InfusionNote::inotropes_not_counted);
  out.notes.push_back(InfusionNote::ne_factors_approximate);
  out.notes.push_back(InfusionNote::weight_and_labelling);
  return out;
}

}  // namespace bb
