// Display units, a site's choice: blood gases in mmHg or kPa, haemoglobin in g/dL, g/L or
// mmol/L (presets/thresholds/display.toml, overridden like any threshold). Text and HTML print
// displayed() values; JSON and CSV keep the stored unit and its UCUM code.
#pragma once

#include <string>
#include <string_view>

#include "breathbeat/answer.hpp"
#include "breathbeat/thresholds.hpp"

namespace bb {

enum class GasUnit { mmHg, kPa };
enum class HbUnit { g_per_dL, g_per_L, mmol_per_L };

struct DisplayUnits {
  GasUnit gas = GasUnit::mmHg;
  int gas_decimals = 0;
  HbUnit hb = HbUnit::g_per_dL;
  int hb_decimals = 1;
  // From the entries display.blood_gas and display.haemoglobin; throws InputError naming the
  // entry when its unit is not one of the display units.
  static DisplayUnits from(const Thresholds& t);
};

// True for the keys of blood-gas pressures (pao2, paco2, pvo2, pao2_alveolar, aa_gradient,
// pf_ratio) and of haemoglobin (hb).
bool is_blood_gas_key(std::string_view key);
bool is_haemoglobin_key(std::string_view key);

// `s` (the stored value of the cell `key`) in the site's display unit; other keys as they are.
Shown displayed(std::string_view key, const Shown& s, const DisplayUnits& d);
// The unit people read for `key` in the display units ("kPa"), or `stored` for other keys.
std::string displayed_unit(std::string_view key, const std::string& stored, const DisplayUnits& d);

}  // namespace bb
