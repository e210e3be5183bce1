// The words of validity gates and readings (include/breathbeat/present/gate_words.hpp).
// Physiology returns the facts (src/haemodynamics/gates.cpp, preload_tests.cpp,
// src/ivc/analysis.cpp, src/waveform/analysis/ppv_waveform.cpp); this file words them.
#include "breathbeat/present/gate_words.hpp"

#include <cstdint>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/ivc.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

std::string n(double v, int decimals) {
  return format_number(v, decimals);
}

const std::string& condition_of(const Gate& g) {
  return g.condition.empty() ? g.key : g.condition;
}

// The words of a stated condition: label, detail when met, failed, unknown, failure words.
struct Stated {
  const char* key;
  const char* label;
  const char* met;
  const char* failed;
  const char* unknown;
  const char* failed_as;
};

constexpr Stated kPpvStated[] = {
    {"passive_ventilation", "Controlled ventilation without spontaneous effort",
     "no spontaneous breathing effort",
     "spontaneous breathing effort makes the pressure swing irregular",
     "not stated whether the patient is passive", "breathing effort"},
    {"regular_rhythm", "Regular cardiac rhythm", "regular rhythm",
     "an irregular rhythm varies pulse pressure beat to beat regardless of breathing",
     "rhythm not stated", "an irregular rhythm"},
    {"closed_chest", "Closed chest", "chest closed",
     "with the chest open the tidal swing barely reaches the heart",
     "not stated whether the chest is closed", "an open chest"},
    {"no_intra_abdominal_hypertension", "No intra-abdominal hypertension",
     "no intra-abdominal hypertension",
     "intra-abdominal hypertension changes how the breath loads the heart",
     "intra-abdominal pressure not stated", "intra-abdominal hypertension"},
    {"no_rv_failure", "No right-ventricular failure", "no right-ventricular failure",
     "right-ventricular failure can raise PPV without preload responsiveness "
     "(false positive)",
     "right-ventricular function not stated", "right-ventricular failure"},
};

constexpr Stated kPreloadStated[] = {
    {"passive_ventilation", "Controlled ventilation without spontaneous effort",
     "no spontaneous breathing effort",
     "spontaneous effort changes the tidal swing the test relies on",
     "not stated whether the patient is passive", "breathing effort"},
    {"no_intra_abdominal_hypertension", "No intra-abdominal hypertension",
     "no intra-abdominal hypertension",
     "intra-abdominal hypertension can blunt the venous return shifted by leg raising (false "
     "negative)",
     "intra-abdominal pressure not stated", "intra-abdominal hypertension"},
};

constexpr Stated kIvcStated[] = {
    {kIvcGateNoIah, "No intra-abdominal hypertension", "stated absent",
     "intra-abdominal hypertension is present: raised abdominal pressure compresses the IVC",
     "not stated", "intra-abdominal hypertension"},
    {kIvcGateNoRvFailure, "No severe RV failure or tricuspid regurgitation", "stated absent",
     "severe RV failure or TR is present: a congested IVC varies little whatever the preload",
     "not stated", "RV failure or tricuspid regurgitation"},
};

template <std::size_t N>
const Stated* find_stated(const Stated (&table)[N], const std::string& key) {
  for (const Stated& s : table) {
    if (key == s.key) return &s;
  }
  return nullptr;
}

const Stated* stated_words(const Gate& g) {
  const std::string& key = condition_of(g);
  switch (g.of) {
    case GateOf::ppv:
      return find_stated(kPpvStated, key);
    case GateOf::preload_test:
      return find_stated(kPreloadStated, key);
    case GateOf::ivc:
      return find_stated(kIvcStated, key);
  }
  return nullptr;
}

std::string stated_detail(const Stated& s, GateState state) {
  switch (state) {
    case GateState::met:
    case GateState::not_contradicted:
      return s.met;
    case GateState::failed:
      return s.failed;
    case GateState::unknown:
      break;
  }
  return s.unknown;
}

// ---- measured gates ------------------------------------------------------------

std::string vt_pbw(double v) {
  return n(v, 1) + " mL/kg PBW";
}
std::string vt_step(const Gate& g) {
  return n(g.cut_off, 0) + " to " + n(g.cut_off_to, 0) + " mL/kg PBW";
}

std::string measured_label(const Gate& g, const std::string& key) {
  if (g.of == GateOf::ivc && key == kIvcGateVtPerKg)
    return "Tidal volume at least " + n(g.cut_off, 1) + " mL/kg";
  if (key == "vt_per_kg_pbw") return "Tidal volume at least " + vt_pbw(g.cut_off);
  if (key == "hr_rr_ratio") return "HR/RR above " + n(g.cut_off, 1);
  if (key == "compliance")
    return "Respiratory-system compliance above " + n(g.cut_off, 0) + " mL/cmH2O";
  if (key == "vt_step") return "Tidal volume raised from " + vt_step(g) + " for about one minute";
  if (key == "hold_duration") return "End-expiratory hold of at least " + n(g.cut_off, 0) + " s";
  return key;
}

std::string measured_detail(const Gate& g, const std::string& key) {
  const bool failed = g.state == GateState::failed;
  if (g.of == GateOf::ivc && key == kIvcGateVtPerKg) {
    if (!g.value) return "not given";
    return n(*g.value, 1) + " mL/kg" + (failed ? " (below " : " (at or above ") + n(g.cut_off, 1) +
           " mL/kg)";
  }
  if (key == "vt_per_kg_pbw") {
    if (!g.value) return "tidal volume per kg PBW not given";
    const std::string shown = "VT " + vt_pbw(*g.value);
    return failed ? shown + " is below " + vt_pbw(g.cut_off) +
                        ": the tidal swing may be too small to reveal preload responsiveness"
                  : shown;
  }
  if (key == "hr_rr_ratio") {
    if (!g.value) return "needs heart rate and respiratory rate";
    const std::string shown = "HR/RR " + n(*g.value, 2);
    return failed ? shown + " is not above " + n(g.cut_off, 1) +
                        ": too few beats per breath to sample the swing"
                  : shown;
  }
  if (key == "compliance") {
    if (!g.value) return "static compliance not given";
    const std::string shown = "Crs " + n(*g.value, 1) + " mL/cmH2O";
    return failed ? shown + " is not above " + n(g.cut_off, 0) + " mL/cmH2O" +
                        ": a stiff lung passes little of the tidal swing to the heart"
                  : shown;
  }
  if (key == "vt_step") {
    if (!g.value || !g.value_to) return "tidal volumes before and after not given";
    const std::string shown = "VT " + n(*g.value, 1) + " to " + n(*g.value_to, 1) + " mL/kg PBW";
    return failed ? shown + " is not the " + vt_step(g) + " step the cut-off was found with"
                  : shown;
  }
  if (key == "hold_duration") {
    if (!g.value) return "hold duration not given";
    const std::string shown = "hold " + n(*g.value, 0) + " s";
    return failed ? shown + " is shorter than the hold the cut-off was found with" : shown;
  }
  return "";
}

std::string measured_failed_as(const Gate& g, const std::string& key) {
  if (key == "vt_per_kg_pbw" || (g.of == GateOf::ivc && key == kIvcGateVtPerKg))
    return "a low tidal volume";
  if (key == "hr_rr_ratio") return "a low HR/RR ratio";
  if (key == "compliance") return "a low respiratory-system compliance";
  if (key == "vt_step") return "a tidal-volume step other than " + vt_step(g);
  if (key == "hold_duration") return "a hold shorter than " + n(g.cut_off, 0) + " s";
  return "";
}

// ---- the IVC's passive gate ----------------------------------------------------

std::string ivc_passive_detail(const Gate& g) {
  switch (g.state) {
    case GateState::unknown:
      return "not stated";
    case GateState::failed:
      return "breathing effort was seen";
    case GateState::not_contradicted:
      return "the recorded signals show no breathing effort, which does not prove it";
    case GateState::met:
      break;
  }
  return g.basis == GateBasis::breathing_state
             ? "stated: passive breathing state (controlled ventilation, no breathing effort)"
             : "stated: no breathing effort";
}

// ---- what the signals showed (the waveform engine) -----------------------------

std::string share(const SignalCount& c, const char* what) {
  return std::to_string(c.part) + " of " + std::to_string(c.whole) + " " + what;
}

std::string signal_words(const GateSignals& s) {
  std::string seen;
  if (s.ectopic_beats) seen = share(*s.ectopic_beats, "beats ectopic or irregular");
  if (s.breath_timing_cv) {
    seen = "breath timing CV " + n(100 * *s.breath_timing_cv, 0) + " %";
    if (s.breaths_with_swing)
      seen += ", " + share(*s.breaths_with_swing, "breaths with a negative pressure swing");
  }
  return seen.empty() ? seen : "from the signals: " + seen;
}

std::string signal_extra(const Gate& g) {
  std::string extra;
  if (g.signals.examined) {
    const std::string seen = signal_words(g.signals);
    if (g.basis == GateBasis::stated_contradicted) {
      extra = "stated, but contradicted: " + seen;
    } else if (g.basis == GateBasis::stated) {
      extra = seen.empty() ? std::string("stated") : "stated; " + seen;
    } else {
      extra = seen;
    }
  }
  switch (g.signals.source) {
    case GateValueFrom::none:
      break;
    case GateValueFrom::vt_from_flow:
      extra = "VT from the flow signal, PBW from sex and height";
      break;
    case GateValueFrom::no_vt_in_record:
      extra = "no tidal volume in the record (needs a flow channel)";
      break;
    case GateValueFrom::rr_as_set:
      extra = "RR as set (stated)";
      break;
    case GateValueFrom::rr_from_pulse_modulation:
      extra = "RR found in the pulse-pressure modulation, not measured";
      break;
  }
  return extra;
}

// ---- readings ------------------------------------------------------------------

std::string joined(const std::vector<std::string>& words) {
  std::string out;
  for (std::size_t i = 0; i < words.size(); ++i) {
    if (i > 0) out += i + 1 == words.size() ? " and " : ", ";
    out += words[i];
  }
  return out;
}

// "Regular cardiac rhythm" -> "regular cardiac rhythm"; "HR/RR above 3.6" stays.
std::string as_condition(const std::string& label) {
  std::string out = label;
  if (out.size() > 1 && out[0] >= 'A' && out[0] <= 'Z' && !(out[1] >= 'A' && out[1] <= 'Z'))
    out[0] = static_cast<char>(out[0] - 'A' + 'a');
  return out;
}

std::string failure_words(const Gate& g) {
  std::string what = gate_failed_as(g);
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

std::string pct(double v) {
  return n(v, 1) + " %";
}

// What a reading is about ("PPV 17.0 %") and what it finds ("is above 13 %: ..."), by its key
// and category.
struct Said {
  std::string subject;
  std::string finding;
};

std::optional<PreloadTestKind> test_of(const std::string& key) {
  for (PreloadTestKind k :
       {PreloadTestKind::vt_challenge, PreloadTestKind::end_expiratory_occlusion,
        PreloadTestKind::passive_leg_raising, PreloadTestKind::fluid_challenge,
        PreloadTestKind::mini_fluid_challenge}) {
    if (key == reading_key(k)) return k;
  }
  return std::nullopt;
}

Said ppv_said(const Reading& r, const ReadValue& v) {
  const double low = v.cut_offs.at(0), high = v.cut_offs.at(1);
  Said s{"PPV " + pct(v.value), ""};
  if (r.pointing == Pointing::unresponsive) {
    s.finding = "is below the grey zone (" + n(low, 0) + "-" + n(high, 0) +
                " %): suggests no preload responsiveness";
  } else if (r.pointing == Pointing::neither) {
    s.finding = "is in the grey zone (" + n(low, 0) + "-" + n(high, 0) +
                " %): inconclusive; consider a preload test";
  } else {
    s.finding = "is above " + n(high, 0) + " %: suggests preload responsiveness";
  }
  return s;
}

Said svv_said(const Reading& r, const ReadValue& v) {
  const double low = v.cut_offs.at(0), high = v.cut_offs.at(1);
  Said s{"SVV " + pct(v.value), ""};
  if (r.pointing == Pointing::unresponsive) {
    s.finding = "is below " + n(low, 0) + " %: suggests no preload responsiveness";
  } else if (r.pointing == Pointing::neither) {
    s.finding = "is within " + n(low, 0) + "-" + n(high, 0) +
                " %, where the cut-off depends on the device: inconclusive";
  } else {
    s.finding = "is above " + n(high, 0) + " %: suggests preload responsiveness";
  }
  return s;
}

Said test_said(const Reading& r, PreloadTestKind kind, const ReadValue& v) {
  const bool points = kind == PreloadTestKind::vt_challenge;
  const std::string shown = points ? n(v.value, 1) + " points" : pct(v.value);
  Said s{std::string("The ") + display_name(kind) + " (" + (points ? "PPV change " : "change ") +
             shown + ")",
         ""};
  const std::string cut = n(v.cut_offs.at(0), 1) + (points ? " points" : " %");
  if (v.cut_offs.size() > 1) {
    const std::string high = pct(v.cut_offs.at(1));
    if (r.pointing == Pointing::responsive) {
      s.finding = "is at or above both cut-offs (" + cut + " and " + high + "): preload responsive";
    } else if (r.pointing == Pointing::neither) {
      s.finding = "is responsive by the " + cut + " cut-off but not by the " + high + " cut-off";
    } else {
      s.finding = "is below both cut-offs (" + cut + " and " + high + "): not preload responsive";
    }
    return s;
  }
  s.finding = r.pointing == Pointing::responsive
                  ? "is at or above the " + cut + " cut-off: preload responsive"
                  : "is below the " + cut + " cut-off: not preload responsive";
  return s;
}

Said ivc_said(const Reading& r) {
  const ReadValue& d = r.values.at(0);
  const ReadValue& v = r.values.at(1);
  Said s{"IVC distensibility " + pct(d.value) + (d.above ? " > " : " <= ") + pct(d.cut_offs.at(0)) +
             ", variation " + pct(v.value) + (v.above ? " > " : " <= ") + pct(v.cut_offs.at(0)) +
             ":",
         ""};
  switch (r.pointing) {
    case Pointing::responsive:
      s.finding = "suggests preload responsiveness";
      break;
    case Pointing::unresponsive:
      s.finding = "preload responsiveness not shown by the IVC";
      break;
    case Pointing::neither:
      s.finding = "the two IVC indices disagree; no conclusion from the IVC alone";
      break;
  }
  return s;
}

std::string not_weighed_text(NotWeighed why) {
  switch (why) {
    case NotWeighed::no_values:
      return "No IVC diameters were given.";
    case NotWeighed::breathing_not_stated:
      return "The breathing state was not stated; which index applies depends on it.";
    case NotWeighed::assisted_breathing:
      return "Breathing effort on positive pressure (pressure support, CPAP): the "
             "responsiveness cut-offs of distensibility and variation were found in "
             "passive ventilation and the right-atrial pressure table in unassisted "
             "breathing; neither applies.";
    case NotWeighed::unassisted_breathing:
      return "Unassisted breathing: the responsiveness cut-offs of distensibility and "
             "variation were found in passive ventilation and do not apply. "
             "Collapsibility serves the right-atrial pressure estimate.";
  }
  return "";
}

Said said_of(const Reading& r) {
  if (r.key == "ppv") return ppv_said(r, r.values.at(0));
  if (r.key == "svv") return svv_said(r, r.values.at(0));
  if (r.key == "ivc") return ivc_said(r);
  if (const auto kind = test_of(r.key)) return test_said(r, *kind, r.values.at(0));
  return {r.key, r.category};
}

}  // namespace

std::string gate_label(const Gate& g) {
  const std::string& key = condition_of(g);
  if (g.of == GateOf::ivc && key == kIvcGatePassive)
    return "Fully passive patient (no breathing effort)";
  if (const Stated* s = stated_words(g)) return s->label;
  return measured_label(g, key);
}

std::string gate_detail(const Gate& g) {
  const std::string& key = condition_of(g);
  std::string detail;
  if (g.of == GateOf::ivc && key == kIvcGatePassive) {
    detail = ivc_passive_detail(g);
  } else if (const Stated* s = stated_words(g)) {
    detail = stated_detail(*s, g.state);
  } else {
    detail = measured_detail(g, key);
  }
  const std::string extra = signal_extra(g);
  if (extra.empty()) return detail;
  return detail.empty() ? extra : detail + "; " + extra;
}

std::string gate_failed_as(const Gate& g) {
  const std::string& key = condition_of(g);
  if (g.of == GateOf::ivc && key == kIvcGatePassive) return "breathing effort";
  if (const Stated* s = stated_words(g)) return s->failed_as;
  const std::string words = measured_failed_as(g, key);
  return words.empty() ? as_condition(gate_label(g)) + " not met" : words;
}

std::string reading_text(const Reading& r) {
  if (r.not_weighed) return not_weighed_text(*r.not_weighed);
  const Said said = said_of(r);
  const Weighed w = weigh(r.pointing, r.conditions);
  if (!w.spoiling.empty()) {
    std::vector<std::string> why;
    for (const Gate* g : w.spoiling) why.push_back(failure_words(*g));
    return said.subject + " cannot be read: " + joined(why) + ".";
  }
  std::string text = said.subject + " " + said.finding;
  if (!w.one_sided.empty()) {
    std::vector<std::string> kept;
    for (const Gate* g : w.one_sided) kept.push_back(gate_failed_as(*g));
    text += r.pointing == Pointing::responsive
                ? "; with " + joined(kept) + " a low value could not have excluded it"
                : "; with " + joined(kept) + " a high value could not have shown it";
  }
  text += ".";
  std::vector<std::string> unrecorded, unproven;
  for (const Gate* g : w.open) {
    (g->state == GateState::not_contradicted ? unproven : unrecorded)
        .push_back(as_condition(gate_label(*g)));
  }
  if (w.open.empty()) return text;
  std::string lead = "Conditional on ";
  if (!unrecorded.empty())
    lead += joined(unrecorded) +
            (unrecorded.size() == 1 ? ", which was not recorded" : ", which were not recorded");
  if (!unrecorded.empty() && !unproven.empty()) lead += ", and on ";
  if (!unproven.empty())
    lead += joined(unproven) + ", which the signals do not contradict but cannot prove";
  return lead + ": " + text;
}

ShownGate shown_gate(const Gate& g) {
  return {g.key, gate_label(g), g.state, gate_detail(g), g.source, g.bias, g.bias_source};
}

std::vector<ShownGate> shown_gates(const std::vector<Gate>& gates) {
  std::vector<ShownGate> out;
  out.reserve(gates.size());
  for (const Gate& g : gates) out.push_back(shown_gate(g));
  return out;
}

ShownReading shown_reading(const Reading& r) {
  return {r.key,         r.category,        reading_text(r), r.basis,
          r.conditional, r.open_conditions, r.one_sided};
}

}  // namespace bb
