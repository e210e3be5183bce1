// The direction each validity condition biases an index, read from the
// [bias.<index>.<gate>] entries of the threshold presets (each with a source).
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// Sets each gate's bias and its source from `bias.<index>.<gate key>`; a gate with
// no entry keeps `either`, the reading that never overstates.
inline void apply_bias(std::vector<Gate>& gates, std::string_view index, const Thresholds& t) {
  for (Gate& g : gates) {
    const BiasEntry* b = t.bias("bias." + std::string(index) + "." + g.key);
    if (!b) continue;
    if (auto d = bias_from_word(b->direction)) g.bias = *d;
    g.bias_source = b->source;
  }
}

// A reading whose value points `p`, weighed with its conditions (docs/methods.md,
// "Directional validity conditions"); present/gate_words.hpp words it:
// - a failed condition that could have pushed the value this way: it cannot be
//   read (category not_interpretable);
// - failed conditions that push the other way: the finding stands, the opposite
//   reading could not have been made (`one_sided`);
// - unknown conditions (or ones only not contradicted by signals) that could have
//   pushed it this way make it conditional (`open_conditions`).
inline Reading weighed_reading(Reading r, Pointing p, const std::vector<Gate>& gates) {
  const Weighed w = weigh(p, gates);
  r.pointing = p;
  r.conditions = gates;
  if (!w.spoiling.empty()) {
    r.category = "not_interpretable";
    return r;
  }
  for (const Gate* g : w.one_sided) r.one_sided.push_back(g->key);
  for (const Gate* g : w.open) r.open_conditions.push_back(g->key);
  r.conditional = !w.open.empty();
  return r;
}

}  // namespace bb
