// Validity conditions of an index and what an index reads as: the domain
// vocabulary every calculator and the waveform engine share. No JSON, no
// command line: presenters (breathbeat/present/) turn these into words.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace bb {

// A validity condition of an index: met, failed, or unknown from what was given.
// `not_contradicted`: only recorded signals speak to it, and they did not show it
// failing; signals can show a condition failing but cannot prove it holds.
enum class GateState { met, not_contradicted, failed, unknown };
inline const char* to_string(GateState s) {
  switch (s) {
    case GateState::met:
      return "met";
    case GateState::not_contradicted:
      return "not_contradicted";
    case GateState::failed:
      return "failed";
    case GateState::unknown:
      return "unknown";
  }
  return "unknown";
}

// Which way an index reads wrong when the condition fails (data: the [bias.*]
// entries of presets/thresholds/*.toml, each with its source).
//   falsely_low:  a low value cannot be read, a high value keeps its meaning;
//   falsely_high: a high value cannot be read, a low value keeps its meaning;
//   either:       no value can be read.
enum class Bias { falsely_low, falsely_high, either };
inline const char* to_string(Bias b) {
  switch (b) {
    case Bias::falsely_low:
      return "falsely_low";
    case Bias::falsely_high:
      return "falsely_high";
    case Bias::either:
      return "either";
  }
  return "either";
}
inline std::optional<Bias> bias_from_word(std::string_view w) {
  for (Bias b : {Bias::falsely_low, Bias::falsely_high, Bias::either}) {
    if (w == to_string(b)) return b;
  }
  return std::nullopt;
}

struct Gate {
  std::string key;  // condition id, e.g. "vt_per_kg_pbw"
  std::string label;
  GateState state = GateState::unknown;
  std::string detail;
  std::string source;
  Bias bias = Bias::either;
  std::string bias_source = {};  // where the direction comes from
  std::string failed_as = {};    // short words for the failure: "a low tidal volume"
};

// Which way an index value points before its conditions are weighed.
enum class Pointing { responsive, unresponsive, neither };

// What the conditions allow a value that points one way to say
// (see docs/methods.md, "Directional validity conditions").
struct Weighed {
  std::vector<const Gate*> spoiling;   // failed, and could push the value this way: cannot be read
  std::vector<const Gate*> one_sided;  // failed, but push the other way: the value keeps meaning
  std::vector<const Gate*> open;       // unknown or only not contradicted, could push this way
};
// A condition could have made a value point `p` falsely: its bias is `either`,
// or falsely_high for a responsive value, or falsely_low for an unresponsive one;
// every condition for a value that points neither way.
inline bool could_mislead(const Gate& g, Pointing p) {
  switch (p) {
    case Pointing::responsive:
      return g.bias != Bias::falsely_low;
    case Pointing::unresponsive:
      return g.bias != Bias::falsely_high;
    case Pointing::neither:
      return true;
  }
  return true;
}
inline Weighed weigh(Pointing p, const std::vector<Gate>& gates) {
  Weighed w;
  for (const Gate& g : gates) {
    const bool misleads = could_mislead(g, p);
    if (g.state == GateState::failed) (misleads ? w.spoiling : w.one_sided).push_back(&g);
    const bool open = g.state == GateState::unknown || g.state == GateState::not_contradicted;
    if (open && misleads) w.open.push_back(&g);
  }
  return w;
}

// The interpretation of an index or of a set of indices.
struct Reading {
  std::string key;                 // which index, e.g. "ppv"
  std::string category;            // machine word, e.g. "grey_zone", "not_interpretable"
  std::string text;                // sentence for people
  std::vector<std::string> basis;  // indices or gates it rests on
  // The reading holds only if these conditions (gate keys), unknown or only not
  // contradicted by signals, are met: each could have made it point this way.
  bool conditional = false;
  std::vector<std::string> open_conditions = {};
  // Failed conditions that bias the other way: the reading keeps its meaning but
  // the opposite reading could not have been made (gate keys).
  std::vector<std::string> one_sided = {};
};

// What a result that could not be computed needs: a field of the registry
// (breathbeat/fields/registry.hpp) by id, optionally with the value it must
// have ("mode" = "vc"), or another set of fields that would do instead.
struct Need {
  std::string field;
  std::string value = {};
  std::vector<std::string> or_fields = {};  // "ve, or vt and rr"
};

// A result the inputs did not allow, and what it needs.
struct Skipped {
  std::string key;    // result key, e.g. "driving_pressure"
  std::string label;  // people's name of the result
  std::vector<Need> needs;
};

}  // namespace bb
