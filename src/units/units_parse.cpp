#include "breathbeat/units_parse.hpp"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <map>
#include <stdexcept>
#include <string>

#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

using namespace factor;

const std::map<Dimension, std::vector<UnitSpelling>>& unit_table() {
  // Factors: NIST SP 811 (2008), Appendix B; see units.hpp.
  // Left out of line coverage: gcc gives some lines of this initialiser only the
  // clean-up code run if building the table throws (out of memory), never run by
  // a test; the table itself is checked entry by entry in tests/units.
  // GCOVR_EXCL_START
  static const std::map<Dimension, std::vector<UnitSpelling>> table = {
      {Dimension::pressure,
       {{"cm[H2O]", "cmH2O", {"cmh2o", "cm[h2o]", "cmwater"}, kPascalPerCmH2O},
        {"mm[Hg]", "mmHg", {"mmhg", "mm[hg]", "torr"}, kPascalPerMmHg},
        {"kPa", "kPa", {"kpa"}, 1000.0},
        {"hPa", "hPa", {"hpa", "mbar"}, 100.0},
        {"Pa", "Pa", {"pa"}, 1.0}}},
      {Dimension::volume, {{"mL", "mL", {"ml", "cc", "cm3"}, 1e-6}, {"L", "L", {"l"}, 1e-3}}},
      {Dimension::flow,
       {{"L/min", "L/min", {"l/min", "lpm"}, 1e-3 / kSecondPerMinute},
        {"L/s", "L/s", {"l/s"}, 1e-3},
        {"mL/s", "mL/s", {"ml/s"}, 1e-6},
        {"mL/min", "mL/min", {"ml/min"}, 1e-6 / kSecondPerMinute}}},
      {Dimension::time,
       {{"s", "s", {"s", "sec"}, 1.0},
        {"ms", "ms", {"ms"}, 1e-3},
        {"min", "min", {"min"}, kSecondPerMinute},
        {"h", "h", {"h"}, kSecondPerHour},
        {"d", "d", {"d", "day", "days"}, kSecondPerDay}}},
      {Dimension::length,
       {{"cm", "cm", {"cm"}, 1e-2}, {"mm", "mm", {"mm"}, 1e-3}, {"m", "m", {"m"}, 1.0}}},
      {Dimension::area,
       {{"m2", "m2", {"m2", "m^2", "m²"}, 1.0}, {"cm2", "cm2", {"cm2", "cm^2", "cm²"}, 1e-4}}},
      {Dimension::mass, {{"kg", "kg", {"kg"}, 1.0}, {"g", "g", {"g"}, 1e-3}}},
      {Dimension::haemoglobin,
       {{"g/dL", "g/dL", {"g/dl"}, kKgPerM3PerGPerDL},
        {"g/L", "g/L", {"g/l"}, 1.0},
        {"mmol/L", "mmol/L", {"mmol/l"}, kGPerDLPerMmolPerL * kKgPerM3PerGPerDL}}},
      // Lactate: molar mass 90.08 g/mol, so 1 mmol/L = 9.008 mg/dL (common practice, no source).
      {Dimension::lactate,
       {{"mmol/L", "mmol/L", {"mmol/l", "mm"}, 1.0}, {"mg/dL", "mg/dL", {"mg/dl"}, 1.0 / 9.008}}},
      {Dimension::fraction, {{"%", "%", {"%"}, 0.01}}},
      {Dimension::frequency,
       {{"/min",
         "/min",
         {"/min", "1/min", "min-1", "bpm", "breaths/min", "beats/min", "{beats}/min",
          "{breaths}/min"},
         1.0 / kSecondPerMinute},
        {"Hz", "Hz", {"hz", "/s", "1/s"}, 1.0}}},
      {Dimension::power,
       {{"J/min", "J/min", {"j/min"}, 1.0 / kSecondPerMinute}, {"W", "W", {"w"}, 1.0}}},
      {Dimension::compliance,
       {{"mL/cm[H2O]", "mL/cmH2O", {"ml/cmh2o", "ml/cm[h2o]"}, 1e-6 / kPascalPerCmH2O},
        {"L/cm[H2O]", "L/cmH2O", {"l/cmh2o", "l/cm[h2o]"}, 1e-3 / kPascalPerCmH2O},
        {"mL/hPa", "mL/mbar", {"ml/mbar", "ml/hpa"}, 1e-6 / 100.0}}},
      {Dimension::elastance,
       {{"cm[H2O]/L", "cmH2O/L", {"cmh2o/l", "cm[h2o]/l"}, kPascalPerCmH2O / 1e-3},
        {"cm[H2O]/mL", "cmH2O/mL", {"cmh2o/ml", "cm[h2o]/ml"}, kPascalPerCmH2O / 1e-6}}},
      {Dimension::resistance,
       {{"cm[H2O]/L/s",
         "cmH2O/L/s",
         {"cmh2o/l/s", "cm[h2o]/l/s", "cmh2o.s/l", "cmh2o/(l/s)"},
         kPascalPerCmH2O / 1e-3}}},
      {Dimension::volume_per_mass, {{"mL/kg", "mL/kg", {"ml/kg"}, 1e-6}}},
      {Dimension::flow_per_area,
       {{"L/min/m2", "L/min/m2", {"l/min/m2", "l/min/m^2", "l/min/m²"}, 1e-3 / kSecondPerMinute},
        {"mL/min/m2",
         "mL/min/m2",
         {"ml/min/m2", "ml/min/m^2", "ml/min/m²"},
         1e-6 / kSecondPerMinute}}},
      // Infusions. Factors from NIST SP 811 (2008), Appendix B.8 and the SI
      // prefixes (L = 1e-3 m3, h = 3600 s, min = 60 s, ug = 1e-9 kg); UCUM codes
      // from The Unified Code for Units of Measure (Schadow & McDonald, Regenstrief
      // Institute). Text shows "mcg" and "units", clearer at the bedside than "ug"
      // and "U". "U" is kept as the code of a drug's units as breathbeat has always
      // written it (UCUM itself reserves "U" for the enzyme unit and writes the
      // international unit "[iU]").
      {Dimension::infusion_rate,
       {{"mL/h", "mL/h", {"ml/h", "ml/hr"}, 1e-6 / kSecondPerHour},
        {"mL/min", "mL/min", {"ml/min"}, 1e-6 / kSecondPerMinute},
        {"L/h", "L/h", {"l/h", "l/hr"}, 1e-3 / kSecondPerHour}}},
      {Dimension::drug_mass_concentration,
       {{"ug/mL", "mcg/mL", {"ug/ml"}, 1e-3},
        {"mg/mL", "mg/mL", {"mg/ml"}, 1.0},
        {"ng/mL", "ng/mL", {"ng/ml"}, 1e-6},
        {"mg/L", "mg/L", {"mg/l"}, 1e-3},
        {"ug/L", "mcg/L", {"ug/l"}, 1e-6}}},
      // Vasopressin is dosed in international units: UCUM [iU] (Schadow & McDonald, The Unified
      // Code for Units of Measure, Regenstrief Institute); UCUM's U is the enzyme unit.
      {Dimension::drug_unit_concentration,
       {{"[iU]/mL", "units/mL", {"u/ml", "units/ml", "iu/ml", "[iu]/ml"}, 1e6},
        {"[iU]/L", "units/L", {"u/l", "units/l", "iu/l", "[iu]/l"}, 1e3}}},
      {Dimension::dose_per_kg,
       {{"ug/kg/min", "mcg/kg/min", {"ug/kg/min"}, 1e-9 / kSecondPerMinute},
        {"ng/kg/min", "ng/kg/min", {"ng/kg/min"}, 1e-12 / kSecondPerMinute},
        {"ug/kg/h", "mcg/kg/h", {"ug/kg/h", "ug/kg/hr"}, 1e-9 / kSecondPerHour},
        {"mg/kg/h", "mg/kg/h", {"mg/kg/h", "mg/kg/hr"}, 1e-6 / kSecondPerHour}}},
      {Dimension::mass_dose,
       {{"ug/min", "mcg/min", {"ug/min"}, 1e-9 / kSecondPerMinute},
        {"mg/min", "mg/min", {"mg/min"}, 1e-6 / kSecondPerMinute},
        {"ng/min", "ng/min", {"ng/min"}, 1e-12 / kSecondPerMinute},
        {"ug/h", "mcg/h", {"ug/h", "ug/hr"}, 1e-9 / kSecondPerHour},
        {"mg/h", "mg/h", {"mg/h", "mg/hr"}, 1e-6 / kSecondPerHour}}},
      {Dimension::unit_dose,
       {{"[iU]/min", "units/min", {"u/min", "units/min", "iu/min", "[iu]/min"}, 1.0 / kSecondPerMinute},
        {"[iU]/h", "units/h", {"u/h", "u/hr", "units/h", "iu/h", "[iu]/h"}, 1.0 / kSecondPerHour}}},
      {Dimension::number, {}},
  };
  // GCOVR_EXCL_STOP
  return table;
}

// Lower case, no spaces, micro sign and "mcg" read as "u".
std::string normalise_unit(std::string_view unit) {
  std::string out;
  for (std::size_t i = 0; i < unit.size(); ++i) {
    unsigned char c = static_cast<unsigned char>(unit[i]);
    if (std::isspace(c)) continue;
    // U+00B5 MICRO SIGN and U+03BC GREEK SMALL LETTER MU, both two bytes in UTF-8.
    if ((c == 0xC2 && i + 1 < unit.size() && static_cast<unsigned char>(unit[i + 1]) == 0xB5) ||
        (c == 0xCE && i + 1 < unit.size() && static_cast<unsigned char>(unit[i + 1]) == 0xBC)) {
      out += 'u';
      ++i;
      continue;
    }
    out += ascii_lower(static_cast<char>(c));
  }
  for (std::size_t pos = out.find("mcg"); pos != std::string::npos; pos = out.find("mcg")) {
    out.replace(pos, 3, "ug");
  }
  return out;
}

bool is_digit(char c) {
  return c >= '0' && c <= '9';
}

// A decimal comma ("2,1" for 2.1, as typed where a comma is the decimal
// separator): accepted when the number before it is whole, digits follow, and
// it is the only comma of the text; with exactly three digits after it ("2,100")
// it could as well separate thousands and is refused as ambiguous. Returns
// where the number ends and sets `number`; the number as read otherwise.
const char* read_decimal_comma(std::string_view text, const char* begin, const char* comma,
                               const char* end, double& number, const Field& field) {
  const char* digits = comma + 1;
  const char* after = digits;
  while (after != end && is_digit(*after)) ++after;
  const std::string_view whole(begin, static_cast<std::size_t>(comma - begin));
  const bool whole_number = !whole.empty() && std::all_of(whole.begin(), whole.end(), [](char c) {
    return is_digit(c) || c == '-';
  });
  const bool one_comma = std::count(text.begin(), text.end(), ',') == 1;
  if (after == digits || !whole_number || !one_comma) {
    throw InputError(
        std::string(field.name), std::string(text),
        one_comma ? "has a comma that is not a decimal comma" : "has more than one comma",
        "a single number, with a decimal point (2.1) or one decimal comma (2,1)");
  }
  if (after - digits == 3) {
    throw InputError(std::string(field.name), std::string(text),
                     "has a comma that may be a decimal comma or a thousands separator",
                     "a decimal point (" + std::string(whole) + "." + std::string(digits, after) +
                         ") or no separator (" + std::string(whole) + std::string(digits, after) +
                         ")");
  }
  const std::string dotted = std::string(whole) + "." + std::string(digits, after);
  std::from_chars(dotted.data(), dotted.data() + dotted.size(), number);
  return after;
}

std::string expected_text(Dimension dimension, const Field& field) {
  if (dimension == Dimension::number) return "a plain number";
  std::string out = "a number";
  if (dimension == Dimension::fraction) {
    out += " as a fraction (0.95) or a percentage (95 or 95%)";
    return out;
  }
  out += " with one of the units " + accepted_units(dimension);
  if (!field.default_unit.empty())
    out += " (a bare number is taken as " + std::string(field.default_unit) + ")";
  return out;
}

// The unit of a number: the typed one, else the field's default; throws when
// there is none or it is not of the dimension.
const UnitSpelling& unit_of_text(std::string_view text, std::string_view typed, Dimension dimension,
                                 const Field& field) {
  const std::string_view unit_text = typed.empty() ? field.default_unit : typed;
  const UnitSpelling* u = unit_text.empty() ? nullptr : find_unit(unit_text, dimension);
  if (u) return *u;
  throw InputError(
      std::string(field.name), std::string(text),
      typed.empty() ? "needs a unit" : "unknown or wrong unit '" + std::string(typed) + "'",
      expected_text(dimension, field));
}

// A number converted to another unit can leave the range of a double
// ("1e308 kPa" in Pa): refused like an infinity typed in.
double finite_in_range(double value, std::string_view text, Dimension dimension,
                       const Field& field) {
  if (std::isfinite(value)) return value;
  throw InputError(std::string(field.name), std::string(text), "is too large to be a value",
                   expected_text(dimension, field));
}

}  // namespace

const std::vector<UnitSpelling>& units_for(Dimension dimension) {
  return unit_table().at(dimension);
}

const UnitSpelling& unit_of(Dimension dimension, std::string_view ucum) {
  for (const auto& u : units_for(dimension)) {
    if (u.ucum == ucum) return u;
  }
  throw std::logic_error("no unit " + std::string(ucum) + " in the unit table");
}

const UnitSpelling* find_unit(std::string_view spelled, Dimension dimension) {
  const std::string key = normalise_unit(spelled);
  for (const auto& u : units_for(dimension)) {
    for (auto spelling : u.spellings) {
      if (key == spelling) return &u;
    }
  }
  return nullptr;
}

std::string accepted_units(Dimension dimension) {
  std::string out;
  for (const auto& u : units_for(dimension)) {
    if (!out.empty()) out += ", ";
    out += u.shown;
  }
  return out;
}

std::vector<const UnitSpelling*> units_placing_in_range(double number, Dimension dimension,
                                                        double min_si, double max_si,
                                                        std::string_view except) {
  std::vector<const UnitSpelling*> out;
  if (dimension == Dimension::number || dimension == Dimension::fraction) return out;
  const UnitSpelling* skip = find_unit(except, dimension);
  const double eps = 1e-9 * std::max(std::abs(min_si), std::abs(max_si));
  for (const auto& u : units_for(dimension)) {
    if (&u == skip) continue;
    const double v = number * u.to_si;
    if (v >= min_si - eps && v <= max_si + eps) out.push_back(&u);
  }
  return out;
}

double unit_factor(std::string_view unit, Dimension dimension, const Field& field) {
  if (const UnitSpelling* u = find_unit(unit, dimension)) return u->to_si;
  throw InputError(std::string(field.name), std::string(unit), "unknown or wrong unit",
                   expected_text(dimension, field));
}

NumberAndUnit split_number_and_unit(std::string_view text, const Field& field,
                                    const std::string& expected) {
  const std::string_view t = trim_view(text);
  if (t.empty()) {
    throw InputError(std::string(field.name), std::string(text), "no value given", expected);
  }
  const char* begin = t.data();
  const char* end = t.data() + t.size();
  if (*begin == '+') ++begin;
  double number = 0.0;
  auto [ptr, ec] = std::from_chars(begin, end, number);
  if (ec != std::errc() || ptr == begin) {
    throw InputError(std::string(field.name), std::string(text), "is not a number", expected);
  }
  if (ptr != end && *ptr == ',') ptr = read_decimal_comma(t, begin, ptr, end, number, field);
  if (!std::isfinite(number)) {
    throw InputError(std::string(field.name), std::string(text), "is not a finite number",
                     expected);
  }
  return {number, trim_view(std::string_view(ptr, static_cast<std::size_t>(end - ptr)))};
}

double parse_in_si(std::string_view text, Dimension dimension, const Field& field) {
  if (dimension == Dimension::number) return parse_number(text, field);
  const auto [number, unit] = split_number_and_unit(text, field, expected_text(dimension, field));
  if (dimension == Dimension::fraction) {
    if (unit.empty()) return number <= 1.0 ? number : number / 100.0;
    if (unit == "%") return number / 100.0;
    throw InputError(std::string(field.name), std::string(text), "unknown or wrong unit",
                     expected_text(dimension, field));
  }
  return finite_in_range(number * unit_of_text(text, unit, dimension, field).to_si, text, dimension,
                         field);
}

double parse_in_unit(std::string_view text, Dimension dimension, std::string_view ucum,
                     const Field& field) {
  const UnitSpelling& target = unit_of(dimension, ucum);
  const auto [number, unit] = split_number_and_unit(text, field, expected_text(dimension, field));
  const UnitSpelling& typed = unit_of_text(text, unit, dimension, field);
  if (&typed == &target) return number;
  return finite_in_range(number * (typed.to_si / target.to_si), text, dimension, field);
}

double parse_number(std::string_view text, const Field& field) {
  const auto [number, unit] =
      split_number_and_unit(text, field, expected_text(Dimension::number, field));
  if (!unit.empty()) {
    throw InputError(std::string(field.name), std::string(text),
                     "has unexpected text after the number",
                     expected_text(Dimension::number, field));
  }
  return number;
}

}  // namespace bb
