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

namespace detail {

inline std::string joined(const std::vector<std::string>& words) {
  std::string out;
  for (std::size_t i = 0; i < words.size(); ++i) {
    if (i > 0) out += i + 1 == words.size() ? " and " : ", ";
    out += words[i];
  }
  return out;
}

// "Regular cardiac rhythm" -> "regular cardiac rhythm"; "HR/RR above 3.6" stays.
inline std::string as_condition(const std::string& label) {
  std::string out = label;
  if (out.size() > 1 && out[0] >= 'A' && out[0] <= 'Z' && !(out[1] >= 'A' && out[1] <= 'Z'))
    out[0] = static_cast<char>(out[0] - 'A' + 'a');
  return out;
}

inline std::string failure_words(const Gate& g) {
  std::string what = g.failed_as.empty() ? as_condition(g.label) + " not met" : g.failed_as;
  switch (g.bias) {
    case Bias::falsely_low:
      return what + " can make it falsely low";
    case Bias::falsely_high:
      return what + " can make it falsely high";
    case Bias::either:
      return what + " makes it unreadable either way";
  }
  return what;
}

}  // namespace detail

// A reading of `subject` ("PPV 17.0 %") whose value points `p`, said as
// `finding` ("is above 13 %: suggests preload responsiveness") when the
// conditions allow it (docs/methods.md, "Directional validity conditions"):
// - a failed condition that could have pushed the value this way: "cannot be
//   read" (category not_interpretable) naming it;
// - failed conditions that push the other way: the finding stands, and says the
//   opposite reading could not have been made;
// - unknown conditions (or ones only not contradicted by signals) that could have
//   pushed it this way lead the sentence: "Conditional on ...: ".
inline Reading directional_reading(Reading r, Pointing p, const std::string& subject,
                                   const std::string& finding, const std::vector<Gate>& gates) {
  const Weighed w = weigh(p, gates);
  if (!w.spoiling.empty()) {
    std::vector<std::string> why;
    for (const Gate* g : w.spoiling) why.push_back(detail::failure_words(*g));
    r.category = "not_interpretable";
    r.text = subject + " cannot be read: " + detail::joined(why) + ".";
    return r;
  }
  std::string text = subject + " " + finding;
  if (!w.one_sided.empty()) {
    std::vector<std::string> kept;
    for (const Gate* g : w.one_sided) {
      kept.push_back(g->failed_as.empty() ? detail::as_condition(g->label) + " not met"
                                          : g->failed_as);
      r.one_sided.push_back(g->key);
    }
    text += p == Pointing::responsive
                ? "; with " + detail::joined(kept) + " a low value could not have excluded it"
                : "; with " + detail::joined(kept) + " a high value could not have shown it";
  }
  text += ".";
  std::vector<std::string> unrecorded, unproven;
  for (const Gate* g : w.open) {
    r.open_conditions.push_back(g->key);
    (g->state == GateState::not_contradicted ? unproven : unrecorded)
        .push_back(detail::as_condition(g->label));
  }
  r.conditional = !w.open.empty();
  if (r.conditional) {
    std::string lead = "Conditional on ";
    if (!unrecorded.empty())
      lead += detail::joined(unrecorded) +
              (unrecorded.size() == 1 ? ", which was not recorded" : ", which were not recorded");
    if (!unrecorded.empty() && !unproven.empty()) lead += ", and on ";
    if (!unproven.empty())
      lead += detail::joined(unproven) + ", which the signals do not contradict but cannot prove";
    text = lead + ": " + text;
  }
  r.text = std::move(text);
  return r;
}

}  // namespace bb
