// Reading lists of arterial pressures typed by the user: PPmax/PPmin per breath
// ("62/48,60/47,63/50") or SBP/DBP per beat grouped by breath
// ("120/70,118/69;119/70,116/68"). Every number goes through parse_quantity.
#include <stdexcept>
#include <string>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb {

namespace {

// The pieces between separators, each without surrounding spaces.
std::vector<std::string_view> split(std::string_view text, char sep) {
  std::vector<std::string_view> parts = split_view(text, sep);
  if (parts.empty()) parts.push_back(text);  // "" is one empty piece here
  for (std::string_view& p : parts) p = trim_view(p);
  return parts;
}

// One number of a pair; an error names `field` and, in its problem, the place
// in the list ("breath 2, PPmin").
Pressure parse_one(std::string_view text, std::string_view field, const std::string& place,
                   std::string_view unit) {
  try {
    return parse_quantity<Pressure>(text, Field{field, unit});
  } catch (const InputError& e) {
    throw InputError(std::string(field), e.value(), place + " " + e.problem(), e.expected());
  }
}

// "62/48" -> two pressures; `what` names the pair in messages ("breath 2").
std::pair<Pressure, Pressure> parse_pair(std::string_view pair, std::string_view field,
                                         const std::string& what, const char* first,
                                         const char* second, std::string_view unit,
                                         const std::string& expected) {
  const std::vector<std::string_view> halves = split(pair, '/');
  if (pair.empty() || halves.size() != 2 || halves[0].empty() || halves[1].empty()) {
    throw InputError(std::string(field), std::string(pair),
                     what + " is not a " + first + "/" + second + " pair", expected);
  }
  return {parse_one(halves[0], field, what + ", " + first, unit),
          parse_one(halves[1], field, what + ", " + second, unit)};
}

}  // namespace

std::vector<BreathPulsePressures> parse_pulse_pressure_cycles(std::string_view text,
                                                              std::string_view field,
                                                              std::string_view default_unit) {
  const std::string expected =
      "PPmax/PPmin pairs per breath separated by commas, e.g. 62/48,60/47,63/50 (" +
      std::string(default_unit) + " unless a unit is written)";
  if (trim_view(text).empty())
    throw InputError(std::string(field), std::string(text), "is empty", expected);
  std::vector<BreathPulsePressures> cycles;
  int n = 0;
  for (std::string_view pair : split(text, ',')) {
    const std::string what = "breath " + std::to_string(++n);
    const auto [pp_max, pp_min] =
        parse_pair(pair, field, what, "PPmax", "PPmin", default_unit, expected);
    cycles.push_back({pp_max, pp_min});
  }
  return cycles;
}

std::vector<BreathBeats> parse_beats_by_breath(std::string_view text, std::string_view field,
                                               std::string_view default_unit) {
  const std::string expected =
      "SBP/DBP pairs per beat separated by commas, breaths separated by ';', e.g. "
      "120/70,118/69,121/71;119/70,116/68,122/72 (" +
      std::string(default_unit) + " unless a unit is written)";
  if (trim_view(text).empty())
    throw InputError(std::string(field), std::string(text), "is empty", expected);
  std::vector<BreathBeats> breaths;
  int b = 0;
  for (std::string_view breath : split(text, ';')) {
    ++b;
    if (breath.empty()) {
      throw InputError(std::string(field), std::string(text),
                       "breath " + std::to_string(b) + " has no beats", expected);
    }
    BreathBeats beats;
    int n = 0;
    for (std::string_view pair : split(breath, ',')) {
      const std::string what = "breath " + std::to_string(b) + ", beat " + std::to_string(++n);
      const auto [sbp, dbp] = parse_pair(pair, field, what, "SBP", "DBP", default_unit, expected);
      beats.push_back({sbp, dbp});
    }
    breaths.push_back(std::move(beats));
  }
  return breaths;
}

// A bare number is percent; one between 0 and 1 is refused, as it may have been meant as
// a fraction (common practice, no source). Written with "%" ("0.5%") it is taken as typed.
Ratio parse_percent_points(std::string_view text, std::string_view field) {
  const std::string_view t = trim_view(text);
  const bool bare = t.empty() || t.back() != '%';
  const std::string with_unit = bare ? std::string(t) + "%" : std::string(t);
  Ratio value;
  try {
    value = parse_quantity<Ratio>(with_unit, Field{field, "%"});
  } catch (const InputError& e) {
    throw InputError(e.field(), std::string(text), e.problem(), "a percentage, e.g. 12 or 12%");
  }
  const double points = in_percent(value);
  if (bare && points > 0.0 && points < 1.0) {
    std::string as_percent = format_number(points * 100.0, 2);  // 0.15 -> "15", 0.125 -> "12.5"
    while (as_percent.back() == '0') as_percent.pop_back();
    if (as_percent.back() == '.') as_percent.pop_back();
    throw InputError(std::string(field), std::string(text),
                     "is a bare number below 1, which may be a fraction; a bare number is read "
                     "as percent",
                     as_percent + "% if the fraction " + std::string(t) + " was meant, or " +
                         std::string(t) + "% for " + std::string(t) + " percent");
  }
  return value;
}

PreloadValue parse_preload_value(std::string_view text, PreloadMeasure measure,
                                 std::string_view field) {
  switch (measure) {
    case PreloadMeasure::ppv:
      return parse_percent_points(text, field);
    case PreloadMeasure::cardiac_output:
      return parse_quantity<Flow>(text, Field{field, "L/min"});
    case PreloadMeasure::stroke_volume:
      return parse_quantity<Volume>(text, Field{field, "mL"});
    case PreloadMeasure::vti:
      return parse_quantity<Length>(text, Field{field, "cm"});
  }
  throw std::logic_error("parse_preload_value: unknown measure");
}

}  // namespace bb
