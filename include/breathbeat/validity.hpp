// Validity conditions of an index and what an index reads as: the domain
// vocabulary every calculator and the waveform engine share. No JSON, no
// command line: presenters (breathbeat/present/) turn these into words.
#pragma once

#include <cstdint>
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

// Which index's conditions a gate is one of: a condition is worded for the
// index it belongs to (present/gate_words.hpp).
enum class GateOf { ppv, preload_test, ivc };

// Why a gate is in its state.
enum class GateBasis {
  not_given,            // nothing given speaks to it (unknown)
  stated,               // stated (a true/false fact)
  breathing_state,      // follows from the stated breathing state (IVC: "passive")
  seen_in_signals,      // only the recorded signals speak to it
  stated_contradicted,  // stated to hold, but the recorded signals show it failing
  measured,             // a value compared with its cut-off
};

// Where the waveform engine took a gate's value from, when it says more than the value.
enum class GateValueFrom {
  none,
  vt_from_flow,              // VT from the flow signal, PBW from sex and height
  no_vt_in_record,           // PBW stated, but no flow channel: no tidal volume
  rr_as_set,                 // RR as stated to be set
  rr_from_pulse_modulation,  // RR found in the pulse-pressure modulation (an estimate)
};

// `part` of `whole` counted in the signals ("3 of 120 beats").
struct SignalCount {
  std::int64_t part = 0;
  std::int64_t whole = 0;
};

// What the recorded signals showed about a gate (the waveform engine).
struct GateSignals {
  bool examined = false;                          // the signals were examined for this condition
  std::optional<SignalCount> ectopic_beats;       // regular_rhythm: beats ectopic or irregular
  std::optional<double> breath_timing_cv;         // passive_ventilation: a fraction
  std::optional<SignalCount> breaths_with_swing;  // passive_ventilation: negative pressure swing
  GateValueFrom source = GateValueFrom::none;
};

// A validity condition and the facts behind its state; present/gate_words.hpp
// makes its label, detail and failure words.
struct Gate {
  std::string key;  // condition id, e.g. "vt_per_kg_pbw" (the trial may prefix it)
  GateState state = GateState::unknown;
  std::string source;
  Bias bias = Bias::either;
  std::string bias_source = {};  // where the direction comes from
  GateOf of = GateOf::ppv;
  std::string condition = {};  // the condition id as the index names it: `key` unprefixed
  GateBasis basis = GateBasis::not_given;
  // measured: the value (for a step, from `value` to `value_to`) and the cut-off (a range:
  // `cut_off` to `cut_off_to`), numbers in the display unit `unit` (UCUM).
  std::optional<double> value = {};
  std::optional<double> value_to = {};
  double cut_off = 0.0;
  double cut_off_to = 0.0;
  std::string unit = {};
  GateSignals signals = {};
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

// A value a reading was made from and the cut-offs it was compared with, as
// numbers in the display unit of the reading (% for PPV, SVV, the IVC indices
// and relative changes; percentage points for a tidal-volume challenge).
struct ReadValue {
  double value = 0.0;
  std::vector<double> cut_offs = {};  // low to high
  bool above = false;                 // above its highest cut-off (cutoff::above)
};

// A reading made without weighing a value, and why (IVC).
enum class NotWeighed { no_values, breathing_not_stated, assisted_breathing, unassisted_breathing };

// The interpretation of an index or of a set of indices; present/gate_words.hpp
// makes its sentence.
struct Reading {
  std::string key;                 // which index, e.g. "ppv"
  std::string category;            // machine word, e.g. "grey_zone", "not_interpretable"
  std::vector<std::string> basis;  // indices or gates it rests on
  // The reading holds only if these conditions (gate keys), unknown or only not
  // contradicted by signals, are met: each could have made it point this way.
  bool conditional = false;
  std::vector<std::string> open_conditions = {};
  // Failed conditions that bias the other way: the reading keeps its meaning but
  // the opposite reading could not have been made (gate keys).
  std::vector<std::string> one_sided = {};
  Pointing pointing = Pointing::neither;  // which way the value points before the weighing
  std::vector<ReadValue> values = {};     // the subject values (IVC: distensibility, variation)
  std::vector<Gate> conditions = {};      // the gates it was weighed with
  std::optional<NotWeighed> not_weighed = {};
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
