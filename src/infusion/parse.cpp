// Reading drug names and infusion values (rates, concentrations, doses) typed
// by the user. The units are those of the one unit table (units_parse.hpp):
// Dimension::infusion_rate, drug_*_concentration, dose_per_kg, mass_dose and
// unit_dose, each read in the unit its value is stored in.
#include <stdexcept>

#include "breathbeat/infusion.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

// The stored unit (UCUM code) of each infusion dimension; see infusion.hpp.
constexpr std::string_view kRateUnit = "mL/h";
constexpr std::string_view kMassConcUnit = "ug/mL";
constexpr std::string_view kUnitConcUnit = "[iU]/mL";
constexpr std::string_view kDosePerKgUnit = "ug/kg/min";
constexpr std::string_view kMassDoseUnit = "ug/min";
constexpr std::string_view kUnitDoseUnit = "[iU]/min";

// The value in the stored unit `stored` of `dimension`; text in that very unit
// gives the number as typed.
double in_stored_unit(double number, const UnitSpelling& typed, Dimension dimension,
                      std::string_view stored) {
  const UnitSpelling& target = unit_of(dimension, stored);
  if (&typed == &target) return number;
  return number * (typed.to_si / target.to_si);
}

std::string expected_for(std::initializer_list<Dimension> dimensions, Dimension default_dimension,
                         std::string_view default_ucum, const char* condition) {
  std::string out = std::string("a number ") + condition + " with one of the units ";
  bool first = true;
  for (Dimension d : dimensions) {
    out += (first ? "" : "; ") + accepted_units(d);
    first = false;
  }
  out += " (a bare number is taken as " +
         std::string(unit_of(default_dimension, default_ucum).shown) + ")";
  return out;
}

// The unit typed (or, for a bare number, the default) among `dimensions`.
struct FoundUnit {
  Dimension dimension = Dimension::number;
  const UnitSpelling* unit = nullptr;
};
FoundUnit find_among(std::string_view typed, std::initializer_list<Dimension> dimensions,
                     Dimension default_dimension, std::string_view default_ucum) {
  if (typed.empty()) return {default_dimension, &unit_of(default_dimension, default_ucum)};
  for (Dimension d : dimensions) {
    if (const UnitSpelling* u = find_unit(typed, d)) return {d, u};
  }
  return {};
}

void require_sign(double number, bool zero_allowed, std::string_view text, const Field& field,
                  const std::string& expected) {
  if (number > 0.0 || (zero_allowed && number == 0.0)) return;
  throw InputError(std::string(field.name), std::string(text),
                   zero_allowed ? "is below zero" : "is not above zero", expected);
}

const char* basis_words(DoseBasis basis) {
  return basis == DoseBasis::units ? "this drug is dosed in units (vasopressin)"
                                   : "this drug is dosed by mass (mcg, mg)";
}

// Lower case, without spaces, '_' and ' ' as '-': "Angiotensin_II" -> "angiotensin-ii".
std::string drug_word(std::string_view text) {
  std::string out;
  for (char c : trim_view(text)) {
    if (c == ' ' || c == '\t') continue;
    out += c == '_' ? '-' : ascii_lower(c);
  }
  return out;
}

}  // namespace

const std::vector<DrugInfo>& known_drugs() {
  // Display units: ug/kg/min and ug/min; angiotensin II in ng/kg/min and ng/min as it is
  // labelled and dosed (Khanna et al., N Engl J Med 2017;377:419); vasopressin in U/min.
  static const std::vector<DrugInfo> drugs = {
      {Drug::norepinephrine, "norepinephrine", "norepinephrine", DoseBasis::mass, false,
       "infusion.ne_factor_norepinephrine", "ug/kg/min", 3, "ug/min", 1, "Norepinephrine"},
      {Drug::epinephrine, "epinephrine", "epinephrine", DoseBasis::mass, false,
       "infusion.ne_factor_epinephrine", "ug/kg/min", 3, "ug/min", 1, "Epinephrine"},
      {Drug::phenylephrine, "phenylephrine", "phenylephrine", DoseBasis::mass, false,
       "infusion.ne_factor_phenylephrine", "ug/kg/min", 2, "ug/min", 1, "Phenylephrine"},
      {Drug::dopamine, "dopamine", "dopamine", DoseBasis::mass, false,
       "infusion.ne_factor_dopamine", "ug/kg/min", 1, "ug/min", 1, "Dopamine"},
      {Drug::dobutamine, "dobutamine", "dobutamine", DoseBasis::mass, true, "", "ug/kg/min", 1,
       "ug/min", 1, "Dobutamine"},
      {Drug::milrinone, "milrinone", "milrinone", DoseBasis::mass, true, "", "ug/kg/min", 3,
       "ug/min", 1, "Milrinone"},
      {Drug::vasopressin, "vasopressin", "vasopressin", DoseBasis::units, false,
       "infusion.ne_factor_vasopressin", "ug/kg/min", 3, "ug/min", 1, "Vasopressin"},
      {Drug::metaraminol, "metaraminol", "metaraminol", DoseBasis::mass, false,
       "infusion.ne_factor_metaraminol", "ug/kg/min", 2, "ug/min", 1, "Metaraminol"},
      {Drug::angiotensin_ii, "angiotensin-ii", "angiotensin_ii", DoseBasis::mass, false,
       "infusion.ne_factor_angiotensin_ii", "ng/kg/min", 1, "ng/min", 0, "Angiotensin II"},
  };
  return drugs;
}

const DrugInfo& drug_info(Drug drug) {
  for (const auto& d : known_drugs()) {
    if (d.drug == drug) return d;
  }
  throw std::logic_error("drug without a table entry");
}

Drug parse_drug(std::string_view text, const Field& field) {
  const std::string word = drug_word(text);
  if (word == "noradrenaline") return Drug::norepinephrine;
  if (word == "adrenaline") return Drug::epinephrine;
  if (word == "angiotensin-2" || word == "angiotensinii") return Drug::angiotensin_ii;
  std::vector<std::string> names;
  for (const auto& d : known_drugs()) {
    if (word == d.name) return d.drug;
    names.emplace_back(d.name);
  }
  std::string expected = "one of";
  for (const auto& n : names) expected += " " + n;
  if (const auto near = closest_match(word, names)) {
    expected = "did you mean '" + *near + "'? Known: " + expected.substr(7);
  }
  throw InputError(std::string(field.name), std::string(text), "is not a drug breathbeat knows",
                   expected);
}

Flow parse_infusion_rate(std::string_view text, const Field& field) {
  const Dimension d = Dimension::infusion_rate;
  const std::string expected = expected_for({d}, d, kRateUnit, "at or above zero");
  const NumberAndUnit nu = split_number_and_unit(text, field, expected);
  const FoundUnit u = find_among(nu.unit, {d}, d, kRateUnit);
  if (!u.unit) {
    throw InputError(std::string(field.name), std::string(text), "unknown or wrong unit for a rate",
                     expected);
  }
  require_sign(nu.number, true, text, field, expected);
  return mL_per_h(in_stored_unit(nu.number, *u.unit, d, kRateUnit));
}

DrugConcentration parse_drug_concentration(std::string_view text, DoseBasis basis,
                                           const Field& field) {
  const bool units = basis == DoseBasis::units;
  const Dimension mine =
      units ? Dimension::drug_unit_concentration : Dimension::drug_mass_concentration;
  const Dimension other =
      units ? Dimension::drug_mass_concentration : Dimension::drug_unit_concentration;
  const std::string_view stored = units ? kUnitConcUnit : kMassConcUnit;
  const std::string expected = expected_for({mine}, mine, stored, "above zero");
  const NumberAndUnit nu = split_number_and_unit(text, field, expected);
  const FoundUnit u = find_among(nu.unit, {mine}, mine, stored);
  if (!u.unit) {
    const bool other_basis = find_unit(nu.unit, other) != nullptr;
    throw InputError(std::string(field.name), std::string(text),
                     other_basis
                         ? std::string("has a unit of the wrong kind: ") + basis_words(basis)
                         : "unknown unit for a concentration",
                     expected);
  }
  require_sign(nu.number, false, text, field, expected);
  const double v = in_stored_unit(nu.number, *u.unit, mine, stored);
  if (units) return units_per_mL(v);
  return ug_per_mL(v);
}

namespace {

// A dose of `basis`; a bare number is in `bare_unit` (a UCUM code of the dose dimension
// of the basis).
DrugDose parse_dose(std::string_view text, DoseBasis basis, std::string_view bare_unit,
                    const Field& field) {
  const bool units = basis == DoseBasis::units;
  const Dimension bare_dimension = units ? Dimension::unit_dose : Dimension::dose_per_kg;
  const std::string expected =
      units ? expected_for({Dimension::unit_dose}, bare_dimension, bare_unit, "at or above zero")
            : expected_for({Dimension::dose_per_kg, Dimension::mass_dose}, bare_dimension,
                           bare_unit, "at or above zero");
  const NumberAndUnit nu = split_number_and_unit(text, field, expected);
  const FoundUnit u = units ? find_among(nu.unit, {Dimension::unit_dose}, bare_dimension, bare_unit)
                            : find_among(nu.unit, {Dimension::dose_per_kg, Dimension::mass_dose},
                                         bare_dimension, bare_unit);
  if (u.unit) {
    require_sign(nu.number, true, text, field, expected);
    switch (u.dimension) {
      case Dimension::unit_dose:
        return units_per_min(in_stored_unit(nu.number, *u.unit, u.dimension, kUnitDoseUnit));
      case Dimension::dose_per_kg:
        return ug_per_kg_per_min(in_stored_unit(nu.number, *u.unit, u.dimension, kDosePerKgUnit));
      default:
        return ug_per_min(in_stored_unit(nu.number, *u.unit, u.dimension, kMassDoseUnit));
    }
  }
  const bool other_basis = units ? (find_unit(nu.unit, Dimension::dose_per_kg) ||
                                    find_unit(nu.unit, Dimension::mass_dose))
                                 : find_unit(nu.unit, Dimension::unit_dose) != nullptr;
  throw InputError(std::string(field.name), std::string(text),
                   other_basis ? std::string("has a unit of the wrong kind: ") + basis_words(basis)
                               : "unknown unit for a dose",
                   expected);
}

}  // namespace

DrugDose parse_drug_dose(std::string_view text, DoseBasis basis, const Field& field) {
  return parse_dose(text, basis, basis == DoseBasis::units ? kUnitDoseUnit : kDosePerKgUnit, field);
}

DrugDose parse_drug_dose(std::string_view text, Drug drug, const Field& field) {
  const DrugInfo& info = drug_info(drug);
  return parse_dose(text, info.basis,
                    info.basis == DoseBasis::units ? kUnitDoseUnit : info.dose_unit, field);
}

double in_dose_unit(DosePerKg d, std::string_view ucum) {
  const UnitSpelling& stored = unit_of(Dimension::dose_per_kg, kDosePerKgUnit);
  return in_ug_per_kg_per_min(d) * (stored.to_si / unit_of(Dimension::dose_per_kg, ucum).to_si);
}

double in_dose_unit(MassDose d, std::string_view ucum) {
  const UnitSpelling& stored = unit_of(Dimension::mass_dose, kMassDoseUnit);
  return in_ug_per_min(d) * (stored.to_si / unit_of(Dimension::mass_dose, ucum).to_si);
}

namespace {

const char* const kSpecGrammar =
    "DRUG:rate=VALUE,conc=VALUE or DRUG:dose=VALUE[,conc=VALUE], e.g. "
    "norepinephrine:rate=12mL/h,conc=64ug/mL";

}  // namespace

InfusionSpecParts split_infusion_spec(std::string_view text, const Field& field) {
  const std::string_view t = trim_view(text);
  const auto colon = t.find(':');
  InfusionSpecParts out;
  out.drug = std::string(trim_view(t.substr(0, colon)));
  if (colon == std::string_view::npos) {
    parse_drug(out.drug, field);  // an unknown drug is said first
    throw InputError(std::string(field.name), std::string(text), "gives a drug but no rate or dose",
                     kSpecGrammar);
  }
  std::string_view rest = t.substr(colon + 1);
  while (!rest.empty()) {
    const auto comma = rest.find(',');
    const std::string_view part = trim_view(rest.substr(0, comma));
    rest = comma == std::string_view::npos ? std::string_view() : rest.substr(comma + 1);
    const auto eq = part.find('=');
    if (eq == std::string_view::npos) {
      throw InputError(std::string(field.name), std::string(part), "is not a key=value part",
                       kSpecGrammar);
    }
    std::string key = ascii_lower(trim_view(part.substr(0, eq)));
    if (key == "concentration") key = "conc";
    const std::string value(part.substr(eq + 1));
    std::optional<std::string>* slot = key == "rate"   ? &out.rate
                                       : key == "conc" ? &out.conc
                                       : key == "dose" ? &out.dose
                                                       : nullptr;
    if (!slot || *slot) {
      throw InputError(std::string(field.name), std::string(part),
                       slot ? "gives '" + key + "' twice" : "has an unknown part '" + key + "'",
                       kSpecGrammar);
    }
    *slot = value;
  }
  return out;
}

InfusionInput parse_infusion_spec(std::string_view text, const Field& field) {
  // An unknown drug is said before any problem with the parts.
  const std::string_view t = trim_view(text);
  InfusionInput in;
  in.drug = parse_drug(trim_view(t.substr(0, t.find(':'))), field);
  const InfusionSpecParts parts = split_infusion_spec(text, field);
  const DoseBasis basis = drug_info(in.drug).basis;
  const auto name = [&](const char* key) { return std::string(field.name) + " " + key; };
  if (parts.rate) in.rate = parse_infusion_rate(*parts.rate, Field{name("rate"), kRateUnit});
  if (parts.conc) in.conc = parse_drug_concentration(*parts.conc, basis, Field{name("conc"), ""});
  if (parts.dose) in.dose = parse_drug_dose(*parts.dose, in.drug, Field{name("dose"), ""});
  return in;
}

}  // namespace bb
