// Reading drug names and infusion values (rates, concentrations, doses) typed
// by the user. These units are not in the shared unit table: a weight-based
// dose would share its dimension with a heart rate there.
#include <cctype>
#include <charconv>
#include <cmath>

#include "breathbeat/infusion.hpp"

namespace bb {

namespace {

// A spelled unit and its factor to the stored unit of its kind.
struct Spelling {
  std::string_view spelled;  // normalised: lower case, no spaces, "ug" for micrograms
  double factor;
};

// Each kind of value: the spellings it accepts and how they are listed to people.
struct UnitKind {
  std::vector<Spelling> spellings;
  std::string_view listed;
};

// Stored units: mL/h, ug/mL, U/mL, ug/kg/min, ug/min, U/min.
const UnitKind kRate{{{"ml/h", 1.0}, {"ml/hr", 1.0}, {"ml/min", 60.0}, {"l/h", 1000.0}},
                     "mL/h, mL/min, L/h"};
const UnitKind kMassConc{
    {{"ug/ml", 1.0}, {"mg/ml", 1000.0}, {"ng/ml", 1e-3}, {"mg/l", 1.0}, {"ug/l", 1e-3}},
    "mcg/mL (ug/mL), mg/mL, ng/mL, mg/L"};
const UnitKind kUnitConc{
    {{"u/ml", 1.0}, {"units/ml", 1.0}, {"iu/ml", 1.0}, {"u/l", 1e-3}, {"units/l", 1e-3}},
    "units/mL (U/mL), U/L"};
const UnitKind kDosePerKg{{{"ug/kg/min", 1.0},
                           {"ng/kg/min", 1e-3},
                           {"ug/kg/h", 1.0 / 60.0},
                           {"ug/kg/hr", 1.0 / 60.0},
                           {"mg/kg/h", 1000.0 / 60.0},
                           {"mg/kg/hr", 1000.0 / 60.0}},
                          "mcg/kg/min (ug/kg/min), ng/kg/min, mcg/kg/h, mg/kg/h"};
const UnitKind kMassDose{{{"ug/min", 1.0},
                          {"mg/min", 1000.0},
                          {"ng/min", 1e-3},
                          {"ug/h", 1.0 / 60.0},
                          {"ug/hr", 1.0 / 60.0},
                          {"mg/h", 1000.0 / 60.0},
                          {"mg/hr", 1000.0 / 60.0}},
                         "mcg/min (ug/min), mg/min, mcg/h, mg/h"};
const UnitKind kUnitDose{{{"u/min", 1.0},
                          {"units/min", 1.0},
                          {"iu/min", 1.0},
                          {"u/h", 1.0 / 60.0},
                          {"u/hr", 1.0 / 60.0},
                          {"units/h", 1.0 / 60.0}},
                         "units/min (U/min), units/h"};

// Lower case, no spaces; the micro sign, Greek mu and "mcg" all read as "ug".
std::string normalised(std::string_view unit) {
  std::string out;
  for (std::size_t i = 0; i < unit.size(); ++i) {
    const auto c = static_cast<unsigned char>(unit[i]);
    if (std::isspace(c)) continue;
    const bool two_byte_micro =
        i + 1 < unit.size() && ((c == 0xC2 && static_cast<unsigned char>(unit[i + 1]) == 0xB5) ||
                                (c == 0xCE && static_cast<unsigned char>(unit[i + 1]) == 0xBC));
    if (two_byte_micro) {
      out += 'u';
      ++i;
      continue;
    }
    out += static_cast<char>(std::tolower(c));
  }
  for (auto pos = out.find("mcg"); pos != std::string::npos; pos = out.find("mcg")) {
    out.replace(pos, 3, "ug");
  }
  return out;
}

std::string_view trimmed(std::string_view s) {
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.remove_suffix(1);
  return s;
}

struct NumberAndUnit {
  double number = 0.0;
  std::string unit;  // normalised; empty if none was typed
};

NumberAndUnit split(std::string_view text, const Field& field, const std::string& expected) {
  const std::string_view t = trimmed(text);
  if (t.empty())
    throw InputError(std::string(field.name), std::string(text), "no value given", expected);
  const char* begin = t.data();
  const char* end = t.data() + t.size();
  if (*begin == '+') ++begin;
  double number = 0.0;
  const auto [ptr, ec] = std::from_chars(begin, end, number);
  if (ec != std::errc() || ptr == begin) {
    throw InputError(std::string(field.name), std::string(text), "is not a number", expected);
  }
  if (!std::isfinite(number)) {
    throw InputError(std::string(field.name), std::string(text), "is not a finite number",
                     expected);
  }
  return {number, normalised(std::string_view(ptr, static_cast<std::size_t>(end - ptr)))};
}

std::optional<double> factor_in(const UnitKind& kind, const std::string& unit) {
  for (const auto& s : kind.spellings) {
    if (unit == s.spelled) return s.factor;
  }
  return std::nullopt;
}

std::string expected_for(const std::vector<const UnitKind*>& kinds, std::string_view default_unit,
                         const char* condition) {
  std::string out = std::string("a number ") + condition + " with one of the units ";
  for (std::size_t i = 0; i < kinds.size(); ++i)
    out += (i ? "; " : "") + std::string(kinds[i]->listed);
  out += " (a bare number is taken as " + std::string(default_unit) + ")";
  return out;
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

}  // namespace

const std::vector<DrugInfo>& known_drugs() {
  static const std::vector<DrugInfo> drugs = {
      {Drug::norepinephrine, "norepinephrine", "norepinephrine", DoseBasis::mass, false,
       "infusion.ne_factor_norepinephrine", 3},
      {Drug::epinephrine, "epinephrine", "epinephrine", DoseBasis::mass, false,
       "infusion.ne_factor_epinephrine", 3},
      {Drug::phenylephrine, "phenylephrine", "phenylephrine", DoseBasis::mass, false,
       "infusion.ne_factor_phenylephrine", 2},
      {Drug::dopamine, "dopamine", "dopamine", DoseBasis::mass, false,
       "infusion.ne_factor_dopamine", 1},
      {Drug::dobutamine, "dobutamine", "dobutamine", DoseBasis::mass, true, "", 1},
      {Drug::milrinone, "milrinone", "milrinone", DoseBasis::mass, true, "", 3},
      {Drug::vasopressin, "vasopressin", "vasopressin", DoseBasis::units, false,
       "infusion.ne_factor_vasopressin", 3},
      {Drug::metaraminol, "metaraminol", "metaraminol", DoseBasis::mass, false,
       "infusion.ne_factor_metaraminol", 2},
      {Drug::angiotensin_ii, "angiotensin-ii", "angiotensin_ii", DoseBasis::mass, false,
       "infusion.ne_factor_angiotensin_ii", 3},
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
  std::string word = normalised(text);
  for (auto& c : word) {
    if (c == '_' || c == ' ') c = '-';
  }
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
  const std::string expected = expected_for({&kRate}, "mL/h", "at or above zero");
  const NumberAndUnit nu = split(text, field, expected);
  const auto f = factor_in(kRate, nu.unit.empty() ? "ml/h" : nu.unit);
  if (!f) {
    throw InputError(std::string(field.name), std::string(text), "unknown or wrong unit for a rate",
                     expected);
  }
  require_sign(nu.number, true, text, field, expected);
  return mL_per_h(nu.number * *f);
}

DrugConcentration parse_drug_concentration(std::string_view text, DoseBasis basis,
                                           const Field& field) {
  const bool units = basis == DoseBasis::units;
  const std::string expected =
      expected_for({units ? &kUnitConc : &kMassConc}, units ? "units/mL" : "mcg/mL", "above zero");
  const NumberAndUnit nu = split(text, field, expected);
  const std::string unit = nu.unit.empty() ? (units ? "u/ml" : "ug/ml") : nu.unit;
  const auto f = factor_in(units ? kUnitConc : kMassConc, unit);
  if (!f) {
    const bool other_basis = factor_in(units ? kMassConc : kUnitConc, unit).has_value();
    throw InputError(std::string(field.name), std::string(text),
                     other_basis
                         ? std::string("has a unit of the wrong kind: ") + basis_words(basis)
                         : "unknown unit for a concentration",
                     expected);
  }
  require_sign(nu.number, false, text, field, expected);
  if (units) return units_per_mL(nu.number * *f);
  return ug_per_mL(nu.number * *f);
}

DrugDose parse_drug_dose(std::string_view text, DoseBasis basis, const Field& field) {
  const bool units = basis == DoseBasis::units;
  const std::string expected =
      units ? expected_for({&kUnitDose}, "units/min", "at or above zero")
            : expected_for({&kDosePerKg, &kMassDose}, "mcg/kg/min", "at or above zero");
  const NumberAndUnit nu = split(text, field, expected);
  const std::string unit = nu.unit.empty() ? (units ? "u/min" : "ug/kg/min") : nu.unit;
  if (units) {
    if (const auto f = factor_in(kUnitDose, unit)) {
      require_sign(nu.number, true, text, field, expected);
      return units_per_min(nu.number * *f);
    }
  } else if (const auto f = factor_in(kDosePerKg, unit)) {
    require_sign(nu.number, true, text, field, expected);
    return ug_per_kg_per_min(nu.number * *f);
  } else if (const auto g = factor_in(kMassDose, unit)) {
    require_sign(nu.number, true, text, field, expected);
    return ug_per_min(nu.number * *g);
  }
  const bool other_basis = units ? (factor_in(kDosePerKg, unit) || factor_in(kMassDose, unit))
                                 : factor_in(kUnitDose, unit).has_value();
  throw InputError(std::string(field.name), std::string(text),
                   other_basis ? std::string("has a unit of the wrong kind: ") + basis_words(basis)
                               : "unknown unit for a dose",
                   expected);
}

InfusionInput parse_infusion_spec(std::string_view text, const Field& field) {
  const std::string grammar =
      "DRUG:rate=VALUE,conc=VALUE or DRUG:dose=VALUE[,conc=VALUE], e.g. "
      "norepinephrine:rate=12mL/h,conc=64ug/mL";
  const std::string_view t = trimmed(text);
  const auto colon = t.find(':');
  InfusionInput in;
  in.drug = parse_drug(trimmed(t.substr(0, colon)), field);
  if (colon == std::string_view::npos) {
    throw InputError(std::string(field.name), std::string(text), "gives a drug but no rate or dose",
                     grammar);
  }
  const DoseBasis basis = drug_info(in.drug).basis;
  std::string_view rest = t.substr(colon + 1);
  while (!rest.empty()) {
    const auto comma = rest.find(',');
    const std::string_view part = trimmed(rest.substr(0, comma));
    rest = comma == std::string_view::npos ? std::string_view() : rest.substr(comma + 1);
    const auto eq = part.find('=');
    if (eq == std::string_view::npos) {
      throw InputError(std::string(field.name), std::string(part), "is not a key=value part",
                       grammar);
    }
    const std::string key = normalised(part.substr(0, eq));
    const std::string name = std::string(field.name) + " " + key;
    const std::string_view value = part.substr(eq + 1);
    if (key == "rate" && !in.rate) {
      in.rate = parse_infusion_rate(value, Field{name, "mL/h"});
    } else if (key == "conc" && !in.conc) {
      in.conc = parse_drug_concentration(value, basis, Field{name, ""});
    } else if (key == "dose" && !in.dose) {
      in.dose = parse_drug_dose(value, basis, Field{name, ""});
    } else {
      const bool repeated = key == "rate" || key == "conc" || key == "dose";
      throw InputError(std::string(field.name), std::string(part),
                       repeated ? "gives '" + key + "' twice" : "has an unknown part '" + key + "'",
                       grammar);
    }
  }
  return in;
}

}  // namespace bb
