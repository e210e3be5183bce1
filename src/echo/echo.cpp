// Echo stroke volume, cardiac output and index: formulas, validation and the
// analysis (presented by src/present/echo_answer.cpp).
#include "breathbeat/echo.hpp"

#include <cmath>
#include <cstdio>
#include <numbers>
#include <string>

namespace bb {

Area lvot_area(Length lvot_diameter) {
  const Length radius = lvot_diameter / 2.0;
  return Area(std::numbers::pi * radius * radius);
}

Volume stroke_volume_from_lvot(Length lvot_diameter, Length vti) {
  return Volume(lvot_area(lvot_diameter) * vti);
}

Flow cardiac_output_from_stroke_volume(Volume stroke_volume, Frequency hr) {
  return Flow(stroke_volume * hr);
}

namespace {

// A value as an error message shows it ("2.00 cm").
std::string shown(double v, int decimals, const char* unit) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f %s", decimals, v, unit);
  return buf;
}

template <class Q>
void require_positive(const std::optional<Q>& q, const char* field, const std::string& value,
                      const char* expected) {
  if (!q || q->value() > 0.0) return;
  throw InputError(field, value, "is not above zero", expected);
}

// Plausibility (presets/plausibility.toml key `key`), reported on field `id`.
template <class Q>
void check_plausible(const Thresholds& limits, const char* id, const char* key,
                     const std::optional<Q>& value) {
  if (!value) return;
  try {
    limits.check_plausible(key, *value);
  } catch (const InputError& e) {
    throw InputError(id, e.value(), e.problem(), e.expected());
  }
}

}  // namespace

void validate_echo(const EchoInputs& in, const Thresholds& limits) {
  if (in.lvot) {
    require_positive(in.lvot, "lvot_diameter", shown(in_cm(*in.lvot), 2, "cm"),
                     "an LVOT diameter above zero, in cm (default) or mm");
  }
  if (in.vti) {
    require_positive(in.vti, "vti", shown(in_cm(*in.vti), 1, "cm"),
                     "a velocity-time integral above zero, in cm");
  }
  if (in.hr) {
    require_positive(in.hr, "hr", shown(in_per_min(*in.hr), 0, "/min"),
                     "a heart rate above zero, in /min");
  }
  if (in.height) {
    require_positive(in.height, "height", shown(in_cm(*in.height), 0, "cm"),
                     "a height above zero, in cm");
  }
  if (in.weight) {
    require_positive(in.weight, "weight", shown(in_kg(*in.weight), 1, "kg"),
                     "a weight above zero, in kg");
  }
  if (in.bsa) {
    require_positive(in.bsa, "bsa", shown(in_square_metre(*in.bsa), 2, "m2"),
                     "a body surface area above zero, in m2");
  }
  check_plausible(limits, "lvot_diameter", "lvot", in.lvot);
  check_plausible(limits, "vti", "vti", in.vti);
  check_plausible(limits, "hr", "hr", in.hr);
  check_plausible(limits, "height", "height", in.height);
  check_plausible(limits, "weight", "weight", in.weight);
  check_plausible(limits, "bsa", "bsa", in.bsa);
}

EchoResults analyse_echo(const EchoInputs& in) {
  EchoResults r;
  if (in.lvot) r.lvot_area = lvot_area(*in.lvot);
  if (in.lvot && in.vti) {
    r.stroke_volume = stroke_volume_from_lvot(*in.lvot, *in.vti);
  } else {
    r.skipped.push_back(
        Skipped{"stroke_volume", "Stroke volume", {Need{"lvot_diameter"}, Need{"vti"}}});
  }
  if (r.stroke_volume && in.hr) {
    r.cardiac_output = cardiac_output_from_stroke_volume(*r.stroke_volume, *in.hr);
  } else {
    r.skipped.push_back(Skipped{
        "cardiac_output", "Cardiac output", {Need{"lvot_diameter"}, Need{"vti"}, Need{"hr"}}});
  }
  r.bsa = body_surface_area_used(in.bsa, in.height, in.weight, in.bsa_formula);
  if (r.bsa && r.bsa->origin != BsaOrigin::given)
    r.notes.push_back(EchoNote::bsa_from_height_weight);
  if (r.cardiac_output && r.bsa) {
    r.cardiac_index = cardiac_index(*r.cardiac_output, r.bsa->value);
  } else {
    r.skipped.push_back(Skipped{
        "cardiac_index",
        "Cardiac index",
        {Need{"lvot_diameter"}, Need{"vti"}, Need{"hr"}, Need{"bsa", "", {"height", "weight"}}}});
  }
  if (r.stroke_volume) r.notes.push_back(EchoNote::lvot_squared);
  return r;
}

}  // namespace bb
