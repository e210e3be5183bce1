// Shown values in bedside units, and the number formatting every presenter shares.
#include "breathbeat/answer.hpp"

#include <cmath>
#include <cstdio>

namespace bb {

namespace {
Shown make(double v, const char* ucum, const char* unit, int decimals) {
  return Shown{v, ucum, unit, decimals, std::nullopt, std::nullopt};
}

}  // namespace

Shown as_cmH2O(Pressure p, int d) {
  return make(in_cmH2O(p), "cm[H2O]", "cmH2O", d);
}
Shown as_mmHg(Pressure p, int d) {
  return make(in_mmHg(p), "mm[Hg]", "mmHg", d);
}
Shown as_mL(Volume v, int d) {
  return make(in_mL(v), "mL", "mL", d);
}
Shown as_L_per_min(Flow f, int d) {
  return make(in_L_per_min(f), "L/min", "L/min", d);
}
Shown as_mL_per_min(Flow f, int d) {
  return make(in_mL_per_min(f), "mL/min", "mL/min", d);
}
Shown as_seconds(Time t, int d) {
  return make(in_seconds(t), "s", "s", d);
}
Shown as_cm(Length l, int d) {
  return make(in_cm(l), "cm", "cm", d);
}
Shown as_m2(Area a, int d) {
  return make(in_square_metre(a), "m2", "m2", d);
}
Shown as_cm2(Area a, int d) {
  return make(in_square_cm(a), "cm2", "cm2", d);
}
Shown as_kg(Mass m, int d) {
  return make(in_kg(m), "kg", "kg", d);
}
Shown as_per_min(Frequency f, int d) {
  return make(in_per_min(f), "/min", "/min", d);
}
Shown as_J_per_min(Power p, int d) {
  return make(in_J_per_min(p), "J/min", "J/min", d);
}
Shown as_g_per_dL(MassConcentration c, int d) {
  return make(in_g_per_dL(c), "g/dL", "g/dL", d);
}
Shown as_mmol_per_L(AmountConcentration c, int d) {
  return make(in_mmol_per_L(c), "mmol/L", "mmol/L", d);
}
Shown as_mL_per_cmH2O(Compliance c, int d) {
  return make(in_mL_per_cmH2O(c), "mL/cm[H2O]", "mL/cmH2O", d);
}
Shown as_cmH2O_per_L(Elastance e, int d) {
  return make(in_cmH2O_per_L(e), "cm[H2O]/L", "cmH2O/L", d);
}
Shown as_cmH2O_per_L_per_s(Resistance r, int d) {
  return make(in_cmH2O_per_L_per_s(r), "cm[H2O]/L/s", "cmH2O/L/s", d);
}
Shown as_mL_per_kg(VolumePerMass v, int d) {
  return make(in_mL_per_kg(v), "mL/kg", "mL/kg", d);
}
Shown as_percent(Ratio r, int d) {
  return make(in_percent(r), "%", "%", d);
}
Shown as_percentage_points(Ratio difference, int decimals) {
  return make(in_percent(difference), "%", "points", decimals);
}
Shown as_fraction(Ratio r, int d) {
  return make(in_fraction(r), "1", "", d);
}
Shown as_number(double v, int d) {
  return make(v, "1", "", d);
}

std::string format_shown(const Shown& s) {
  std::string out = format_number(s.value, s.decimals);
  if (s.low && s.high) {
    out += " (" + format_number(*s.low, s.decimals) + " to " + format_number(*s.high, s.decimals) +
           ")";
  }
  if (!s.unit.empty()) out += " " + s.unit;
  return out;
}

std::string need_text(const Need& need, FieldContext context) {
  std::string out = field_name(need.field, context);
  if (!need.value.empty()) {
    out += context == FieldContext::command_line ? " " + need.value : " = \"" + need.value + "\"";
  }
  if (!need.or_fields.empty()) {
    std::string alt;
    for (std::size_t i = 0; i < need.or_fields.size(); ++i) {
      if (i) alt += i + 1 == need.or_fields.size() ? " and " : ", ";
      alt += field_name(need.or_fields[i], context);
    }
    out += " (or " + alt + ")";
  }
  return out;
}

std::vector<std::string> need_texts(const Skipped& s, FieldContext context) {
  std::vector<std::string> out;
  for (const Need& n : s.needs) out.push_back(need_text(n, context));
  return out;
}

}  // namespace bb
