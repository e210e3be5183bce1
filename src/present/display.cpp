// Display units: the one place where a stored blood-gas or haemoglobin value is shown in the
// site's unit (conversion factors from the unit parser, breathbeat/units_parse.hpp).
#include "breathbeat/present/display.hpp"

#include <algorithm>
#include <array>
#include <cmath>

#include "breathbeat/units_parse.hpp"

namespace bb {

namespace {

constexpr std::array<std::string_view, 6> kBloodGasKeys = {
    "pao2", "paco2", "pvo2", "pao2_alveolar", "aa_gradient", "pf_ratio"};

int decimals_of(const ThresholdEntry& e) {
  return static_cast<int>(std::clamp(std::lround(e.value), 0L, 3L));
}

const char* gas_text(GasUnit u) {
  return u == GasUnit::kPa ? "kPa" : "mmHg";
}
const char* gas_ucum(GasUnit u) {
  return u == GasUnit::kPa ? "kPa" : "mm[Hg]";
}
const char* hb_text(HbUnit u) {
  switch (u) {
    case HbUnit::g_per_L:
      return "g/L";
    case HbUnit::mmol_per_L:
      return "mmol/L";
    case HbUnit::g_per_dL:
      break;
  }
  return "g/dL";
}

// `v` from the unit `from` to the unit `to` of one dimension.
double converted(double v, std::string_view from, std::string_view to, Dimension d) {
  const Field f{"display", ""};
  return v * unit_factor(from, d, f) / unit_factor(to, d, f);
}

Shown converted_shown(const Shown& s, std::string_view to, const char* ucum, int decimals,
                      Dimension d) {
  if (s.unit == to) return s;
  Shown out = s;
  out.value = converted(s.value, s.unit, to, d);
  if (s.low) out.low = converted(*s.low, s.unit, to, d);
  if (s.high) out.high = converted(*s.high, s.unit, to, d);
  out.unit = std::string(to);
  out.ucum = ucum;
  out.decimals = decimals;
  return out;
}

}  // namespace

DisplayUnits DisplayUnits::from(const Thresholds& t) {
  DisplayUnits d;
  if (t.has("display.blood_gas")) {
    const ThresholdEntry& e = t.entry("display.blood_gas");
    if (e.unit == "kPa") {
      d.gas = GasUnit::kPa;
    } else if (e.unit != "mmHg") {
      throw InputError("display.blood_gas.unit", e.unit, "is not a display unit for blood gases",
                       "\"mmHg\" or \"kPa\"");
    }
    d.gas_decimals = decimals_of(e);
  }
  if (t.has("display.haemoglobin")) {
    const ThresholdEntry& e = t.entry("display.haemoglobin");
    if (e.unit == "g/L") {
      d.hb = HbUnit::g_per_L;
    } else if (e.unit == "mmol/L") {
      d.hb = HbUnit::mmol_per_L;
    } else if (e.unit != "g/dL") {
      throw InputError("display.haemoglobin.unit", e.unit, "is not a display unit for haemoglobin",
                       "\"g/dL\", \"g/L\" or \"mmol/L\"");
    }
    d.hb_decimals = decimals_of(e);
  }
  return d;
}

bool is_blood_gas_key(std::string_view key) {
  return std::find(kBloodGasKeys.begin(), kBloodGasKeys.end(), key) != kBloodGasKeys.end();
}
bool is_haemoglobin_key(std::string_view key) {
  return key == "hb";
}

Shown displayed(std::string_view key, const Shown& s, const DisplayUnits& d) {
  if (is_blood_gas_key(key) && (s.unit == "mmHg" || s.unit == "kPa"))
    return converted_shown(s, gas_text(d.gas), gas_ucum(d.gas), d.gas_decimals,
                           Dimension::pressure);
  if (is_haemoglobin_key(key) && (s.unit == "g/dL" || s.unit == "g/L" || s.unit == "mmol/L"))
    return converted_shown(s, hb_text(d.hb), hb_text(d.hb), d.hb_decimals, Dimension::haemoglobin);
  return s;
}

std::string displayed_unit(std::string_view key, const std::string& stored, const DisplayUnits& d) {
  if (is_blood_gas_key(key) && (stored == "mmHg" || stored == "kPa")) return gas_text(d.gas);
  if (is_haemoglobin_key(key) && (stored == "g/dL" || stored == "g/L" || stored == "mmol/L"))
    return hb_text(d.hb);
  return stored;
}

}  // namespace bb
