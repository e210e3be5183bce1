#include "breathbeat/units_parse.hpp"

#include <cctype>
#include <charconv>
#include <cmath>
#include <map>
#include <string>

namespace bb {

namespace {

using namespace factor;

const std::map<Dimension, std::vector<UnitSpelling>>& unit_table() {
  // Factors: NIST SP 811 (2008), Appendix B; see units.hpp.
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
      {Dimension::number, {}},
  };
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
    out += static_cast<char>(std::tolower(c));
  }
  for (std::size_t pos = out.find("mcg"); pos != std::string::npos; pos = out.find("mcg")) {
    out.replace(pos, 3, "ug");
  }
  return out;
}

std::string_view trim(std::string_view s) {
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.remove_suffix(1);
  return s;
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

struct NumberAndUnit {
  double number;
  std::string_view unit;
};

NumberAndUnit split_number(std::string_view text, Dimension dimension, const Field& field) {
  std::string_view t = trim(text);
  if (t.empty()) {
    throw InputError(std::string(field.name), std::string(text), "no value given",
                     expected_text(dimension, field));
  }
  const char* begin = t.data();
  const char* end = t.data() + t.size();
  if (*begin == '+') ++begin;
  double number = 0.0;
  auto [ptr, ec] = std::from_chars(begin, end, number);
  if (ec != std::errc() || ptr == begin) {
    throw InputError(std::string(field.name), std::string(text), "is not a number",
                     expected_text(dimension, field));
  }
  if (!std::isfinite(number)) {
    throw InputError(std::string(field.name), std::string(text), "is not a finite number",
                     expected_text(dimension, field));
  }
  return {number, trim(std::string_view(ptr, static_cast<std::size_t>(end - ptr)))};
}

}  // namespace

const std::vector<UnitSpelling>& units_for(Dimension dimension) {
  return unit_table().at(dimension);
}

std::string accepted_units(Dimension dimension) {
  std::string out;
  for (const auto& u : units_for(dimension)) {
    if (!out.empty()) out += ", ";
    out += u.shown;
  }
  return out;
}

double unit_factor(std::string_view unit, Dimension dimension, const Field& field) {
  const std::string key = normalise_unit(unit);
  for (const auto& u : units_for(dimension)) {
    for (auto spelling : u.spellings) {
      if (key == spelling) return u.to_si;
    }
  }
  throw InputError(std::string(field.name), std::string(unit), "unknown or wrong unit",
                   expected_text(dimension, field));
}

double parse_in_si(std::string_view text, Dimension dimension, const Field& field) {
  if (dimension == Dimension::number) return parse_number(text, field);
  const auto [number, unit] = split_number(text, dimension, field);
  if (dimension == Dimension::fraction) {
    if (unit.empty()) return number <= 1.0 ? number : number / 100.0;
    if (unit == "%") return number / 100.0;
    throw InputError(std::string(field.name), std::string(text), "unknown or wrong unit",
                     expected_text(dimension, field));
  }
  try {
    const std::string_view unit_text = unit.empty() ? field.default_unit : unit;
    if (unit_text.empty()) {
      throw InputError(std::string(field.name), std::string(text), "needs a unit",
                       expected_text(dimension, field));
    }
    return number * unit_factor(unit_text, dimension, field);
  } catch (const InputError&) {
    throw InputError(
        std::string(field.name), std::string(text),
        unit.empty() ? "needs a unit" : "unknown or wrong unit '" + std::string(unit) + "'",
        expected_text(dimension, field));
  }
}

double parse_number(std::string_view text, const Field& field) {
  const auto [number, unit] = split_number(text, Dimension::number, field);
  if (!unit.empty()) {
    throw InputError(std::string(field.name), std::string(text),
                     "has unexpected text after the number",
                     expected_text(Dimension::number, field));
  }
  return number;
}

}  // namespace bb
