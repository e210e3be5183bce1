// A number with a fixed count of decimals, for the values quoted in gate
// details, readings and error messages of the haemodynamics and heart-lung
// areas. The same text as format_number (breathbeat/answer.hpp), which
// physiology may not include; one copy for both areas until the string
// helpers (breathbeat/text/strings.hpp) carry it.
#pragma once

#include <cmath>
#include <cstdio>
#include <string>

namespace bb::physiology_text {

inline std::string number_text(double v, int decimals) {
  const double scale = std::pow(10.0, decimals);
  const double r = std::round(v * scale) / scale;
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals < 0 ? 0 : decimals, r == 0.0 ? 0.0 : r);
  return buf;
}

}  // namespace bb::physiology_text
