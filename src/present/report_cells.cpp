// The trial report in words: the typed trial analysis (breathbeat/trial/analysis.hpp)
// made into cells, labels and sentences. The area presenters word each area's
// results, with fields named as trial-file keys; this file words what the trial
// adds (the preload statement, the heart-lung comparison, the findings).
#include <algorithm>
#include <variant>

#include "breathbeat/body.hpp"
#include "breathbeat/cautions.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/present/echo.hpp"
#include "breathbeat/present/haemodynamics.hpp"
#include "breathbeat/present/heart_lung.hpp"
#include "breathbeat/present/infusion.hpp"
#include "breathbeat/present/ivc.hpp"
#include "breathbeat/present/mechanics.hpp"
#include "breathbeat/present/oxygen.hpp"
#include "breathbeat/trial/preload_next.hpp"
#include "report_view.hpp"

namespace bb::report {

namespace {

constexpr FieldContext kContext = FieldContext::trial_file;

std::string safety_word(const FluidChallengeOutcome& o);

Cell number_cell(std::string key, std::string label, Shown shown, std::string note = "") {
  return Cell{std::move(key), std::move(label), std::move(shown), "", std::move(note)};
}
Cell word_cell(std::string key, std::string label, std::string text, std::string note = "") {
  return Cell{std::move(key), std::move(label), std::nullopt, std::move(text), std::move(note)};
}
// The results of an area's Answer as cells, leaving out those another section shows.
std::vector<Cell> cells_of(const std::vector<Item>& items,
                           const std::vector<std::string>& shown_elsewhere = {}) {
  std::vector<Cell> out;
  for (const Item& i : items) {
    if (std::find(shown_elsewhere.begin(), shown_elsewhere.end(), i.key) != shown_elsewhere.end())
      continue;
    out.push_back(number_cell(i.key, i.label, i.shown, i.note));
  }
  return out;
}
void append(std::vector<Cell>& to, std::vector<Cell> cells) {
  for (Cell& c : cells) to.push_back(std::move(c));
}
template <class Q, class P>
void add_if(std::vector<Cell>& cells, const char* key, const char* label, const std::optional<Q>& v,
            P present, const std::string& note = "") {
  if (v) cells.push_back(number_cell(key, label, present(*v), note));
}
std::string yes_no(bool b) {
  return b ? "yes" : "no";
}
std::string join(const std::vector<std::string>& v) {
  std::string out;
  for (const auto& x : v) out += (out.empty() ? "" : ", ") + x;
  return out;
}
std::string safety_limit_name(SafetyLimit l);  // "CVP ceiling", below
// "not_assessable" -> "not assessable" for sentences people read.
std::string plain_words(std::string word) {
  for (char& c : word) {
    if (c == '_') c = ' ';
  }
  return word;
}
std::string percent_text(Ratio r, int decimals = 0) {
  const double v = in_percent(r);
  return (v > 0 ? "+" : "") + format_number(v, decimals) + " %";
}
// A change in percentage points, as the report shows it.
Shown as_points(Ratio points) {
  return as_percentage_points(points);
}

// ---- the sections of one step ---------------------------------------------------

void settings_cells(const StepAnalysis& s, Step& out) {
  const TrialVentilator& v = s.recorded.ventilator;
  auto& c = out.settings;
  if (v.mode) c.push_back(word_cell("mode", "Mode", to_string(*v.mode)));
  add_if(c, "set_peep", "Set PEEP", v.set_peep, [](Pressure p) { return as_cmH2O(p, 0); });
  add_if(c, "vt", "Tidal volume", v.vt, [](Volume x) { return as_mL(x); });
  add_if(c, "vt_per_kg_pbw", "VT per kg PBW", s.mechanics_results.vt_per_kg,
         [](VolumePerMass x) { return as_mL_per_kg(x); });
  add_if(c, "pc_pressure_total", "PC pressure, total", v.pc_pressure_total,
         [](Pressure p) { return as_cmH2O(p, 0); });
  add_if(c, "pc_pressure_above_peep", "PC pressure above PEEP", v.pc_pressure_above_peep,
         [](Pressure p) { return as_cmH2O(p, 0); });
  add_if(c, "rr", "Respiratory rate", v.rr, [](Frequency f) { return as_per_min(f); });
  add_if(
      c, "ti", "Inspiratory time", s.ti, [](Time t) { return as_seconds(t); },
      v.ti ? "" : "from I:E and RR");
  if (v.ie_expiratory)
    c.push_back(word_cell("ie", "I:E", "1:" + format_number(*v.ie_expiratory, 1)));
  add_if(c, "fio2", "FiO2", v.fio2, [](Ratio r) { return as_percent(r, 0); });
  add_if(c, "flow", "Inspiratory flow", v.flow, [](Flow f) { return as_L_per_min(f, 0); });
  add_if(c, "pmean", "Mean airway pressure (measured)", v.pmean,
         [](Pressure p) { return as_cmH2O(p, 1); });
}

void mechanics_cells(const StepAnalysis& s, const Thresholds& limits, Step& out) {
  const TrialHold& h = s.recorded.hold;
  auto& c = out.mechanics;
  add_if(c, "ppeak", "Peak pressure", h.ppeak, [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "pplat", "Plateau pressure", h.pplat, [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "peep_total", "Total PEEP (expiratory hold)", h.peep_total,
         [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "pes_ee", "Oesophageal pressure, end-exp.", h.pes_ee,
         [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "pes_ei", "Oesophageal pressure, end-insp.", h.pes_ei,
         [](Pressure p) { return as_cmH2O(p); });
  const Answer a = describe_mechanics(s.mechanics_inputs, s.mechanics_results, limits, kContext);
  // PBW is with the patient, VT per kg PBW with the settings.
  append(c, cells_of(a.results, {"pbw", "vt_per_kg_pbw"}));
  out.flags.insert(out.flags.end(), a.flags.begin(), a.flags.end());
  out.notes.insert(out.notes.end(), a.notes.begin(), a.notes.end());
}

void gas_cells(const StepAnalysis& s, const Thresholds& limits, Step& out) {
  const TrialGases& g = s.recorded.gases;
  auto& c = out.gas_exchange;
  add_if(c, "pao2", "PaO2", g.pao2, [](Pressure p) { return as_mmHg(p); });
  add_if(c, "paco2", "PaCO2", g.paco2, [](Pressure p) { return as_mmHg(p); });
  add_if(c, "sao2", "SaO2", g.sao2, [](Ratio x) { return as_percent(x, 0); });
  add_if(c, "spo2", "SpO2", g.spo2, [](Ratio x) { return as_percent(x, 0); });
  add_if(c, "svo2", "SvO2 (mixed venous)", g.svo2, [](Ratio x) { return as_percent(x, 0); });
  add_if(c, "scvo2", "ScvO2 (central venous)", g.scvo2, [](Ratio x) { return as_percent(x, 0); });
  add_if(c, "pvo2", "PvO2", g.pvo2, [](Pressure p) { return as_mmHg(p); });
  add_if(c, "hb", "Haemoglobin", g.hb, [](MassConcentration x) { return as_g_per_dL(x); });
  add_if(c, "lactate", "Lactate", g.lactate,
         [](AmountConcentration x) { return as_mmol_per_L(x); });
  const Answer a = describe_oxygen(s.oxygen_inputs, s.oxygen_results, limits, kContext);
  // BSA is with the patient, CO and CI with the circulation.
  append(c, cells_of(a.results, {"bsa", "co", "co_used", "cardiac_index"}));
  if (a.reading)
    c.push_back(word_cell("berlin_category", "Berlin oxygenation band", a.reading->category));
  out.flags.insert(out.flags.end(), a.flags.begin(), a.flags.end());
  if (!g.svo2 && g.scvo2)
    out.notes.push_back("ScvO2 (central venous) stands in for SvO2 in the venous O2 content.");
  out.notes.insert(out.notes.end(), a.notes.begin(), a.notes.end());
}

// The echo module's results, prefixed so they stand apart from the monitor's CO and CI.
std::vector<Cell> echo_cells(const StepEcho& e, Step& out) {
  const Answer a = describe_echo(e.inputs, e.results, kContext);
  for (const auto& n : a.notes) out.notes.push_back("Echo: " + n);
  std::vector<Cell> cells;
  for (const Item& i : a.results) {
    if (i.key == "bsa") continue;  // with the patient
    cells.push_back(number_cell("echo_" + i.key, "Echo " + i.label, i.shown, i.note));
  }
  return cells;
}

void circulation_cells(const StepAnalysis& s, Step& out) {
  const TrialCirculation& k = s.recorded.circulation;
  auto& c = out.circulation;
  add_if(c, "hr", "Heart rate", k.hr, [](Frequency f) { return as_per_min(f); });
  if (k.rhythm_regular) {
    c.push_back(word_cell("regular_rhythm", "Rhythm",
                          !*k.rhythm_regular      ? "irregular"
                          : k.rhythm_from_signals ? "regular by the signals (not proven)"
                                                  : "regular"));
  }
  add_if(c, "sbp", "Systolic pressure", k.sbp, [](Pressure p) { return as_mmHg(p); });
  add_if(c, "dbp", "Diastolic pressure", k.dbp, [](Pressure p) { return as_mmHg(p); });
  add_if(
      c, "map", "Mean arterial pressure", s.map, [](Pressure p) { return as_mmHg(p); },
      s.map_estimated ? "estimated DBP + (SBP - DBP)/3" : "");
  add_if(c, "cvp", "Central venous pressure", k.cvp, [](Pressure p) { return as_mmHg(p); });
  add_if(c, "pmsf", "Mean systemic filling pressure", k.pmsf,
         [](Pressure p) { return as_mmHg(p); });
  add_if(
      c, "co", "Cardiac output", k.co, [](Flow f) { return as_L_per_min(f, 2); },
      k.co_method.value_or(""));
  // Flags in the registry's polarity, under its id and label.
  if (k.spontaneous_effort)
    c.push_back(word_cell("passive", std::string(field_spec("passive").label),
                          k.passive_from_signals ? "no effort seen in the signals (not proven)"
                                                 : yes_no(!*k.spontaneous_effort)));
  if (k.chest_open)
    c.push_back(word_cell("closed_chest", std::string(field_spec("closed_chest").label),
                          yes_no(!*k.chest_open)));
  if (k.intra_abdominal_hypertension) {
    c.push_back(word_cell("iah", std::string(field_spec("iah").label),
                          yes_no(*k.intra_abdominal_hypertension)));
  }
  if (k.rv_failure)
    c.push_back(word_cell("rv_failure", std::string(field_spec("rv_failure").label),
                          yes_no(*k.rv_failure)));
  add_if(c, "ci", "Cardiac index", s.oxygen_results.ci_used, [](FlowPerArea f) {
    return Shown{in_L_per_min_per_m2(f), "L/min/m2", "L/min/m2", 2, {}, {}};
  });
  const TrialUltrasound& u = s.recorded.ultrasound;
  add_if(c, "lvot_diameter", "LVOT diameter", u.lvot_diameter,
         [](Length l) { return as_cm(l, 2); });
  add_if(c, "vti", "LVOT VTI", u.vti, [](Length l) { return as_cm(l); });
  if (s.echo) append(c, echo_cells(*s.echo, out));
  if (s.infusions) {
    const Answer a = describe_infusions(s.infusions->set, s.infusions->results, kContext);
    append(c, cells_of(a.results));
    out.flags.insert(out.flags.end(), a.flags.begin(), a.flags.end());
    for (const auto& n : a.notes) out.notes.push_back("Infusions: " + n);
  }
}

// ---- preload ----------------------------------------------------------------------

Index index_of(const PreloadIndexReading& r, std::string label, std::vector<Cell> values) {
  return Index{r.key, std::move(label), std::move(values), &r};
}

void ppv_cells(const StepAnalysis& s, Step& out) {
  const TrialCirculation& k = s.recorded.circulation;
  if (s.ppv_cycles_rejected) {
    out.notes.push_back("PPV from pulse-pressure cycles not computed: " +
                        std::string(s.ppv_cycles_rejected->what()));
  }
  if (k.signals_origin && k.ppv_monitor) out.notes.push_back(*k.signals_origin);
  if (s.ppv) {
    out.circulation.push_back(number_cell("ppv", "Pulse pressure variation", as_percent(*s.ppv),
                                          !k.pp_cycles.empty() ? "per-breath mean"
                                          : k.signals_origin   ? "recorded waveform"
                                                               : "monitor"));
  }
  if (k.svv)
    out.circulation.push_back(number_cell("svv", "Stroke volume variation", as_percent(*k.svv)));
}

// A step with an analysed record: which values came from the record and which typed values took
// precedence over it, in the step's notes and in the notes of its heart-rate and PPV cells.
void record_provenance(const StepAnalysis& s, Step& out) {
  const auto& w = s.recorded.waveform;
  if (!w || !w->analysed) return;
  const TrialCirculation& k = s.recorded.circulation;
  auto seconds = [](const std::optional<Time>& t, const char* otherwise) {
    return t ? format_number(in_seconds(*t), 0) + " s" : std::string(otherwise);
  };
  auto percent = [](Ratio r) { return format_shown(as_percent(r)); };
  auto rate = [](Frequency f) { return format_shown(as_per_min(f)); };
  std::vector<std::string> from_record, typed, outweighed;
  if (w->ppv_typed && s.ppv && w->record_ppv) {
    typed.push_back("PPV " + percent(*s.ppv) + " (the record's " + percent(*w->record_ppv) + ")");
  } else if (w->record_ppv && k.signals_origin) {
    from_record.push_back("PPV " + percent(*w->record_ppv));
  }
  if (w->hr_typed && k.hr && w->record_hr) {
    typed.push_back("heart rate " + rate(*k.hr) + " (the record's " + rate(*w->record_hr) + ")");
  } else if (w->record_hr && k.hr) {
    from_record.push_back("heart rate " + rate(*w->record_hr));
  }
  if (k.rhythm_from_signals)
    from_record.push_back("a regular rhythm (not contradicted, not proven)");
  if (k.passive_from_signals)
    from_record.push_back("no breathing effort (not contradicted, not proven)");
  if (w->rhythm_overridden) outweighed.push_back("an irregular rhythm over the typed 'regular'");
  if (w->passive_overridden) outweighed.push_back("breathing effort over the typed 'passive'");
  std::string text = "Record " + w->file + " (" + seconds(w->start, "start") + " to " +
                     seconds(w->end, "end") + "): ";
  std::vector<std::string> parts;
  if (!from_record.empty()) parts.push_back("from the record: " + join(from_record));
  if (!typed.empty()) parts.push_back("typed, taking precedence over the record: " + join(typed));
  if (!outweighed.empty())
    parts.push_back("the record shows " + join(outweighed) + " (a failed condition seen wins)");
  if (parts.empty()) parts.push_back("no value taken from it");
  for (std::size_t i = 0; i < parts.size(); ++i) text += (i ? "; " : "") + parts[i];
  out.notes.push_back(text + ".");
  for (Cell& c : out.circulation) {
    if (c.key == "hr" && w->record_hr)
      c.note =
          w->hr_typed ? "typed (the record's " + rate(*w->record_hr) + ")" : "recorded waveform";
    if (c.key == "ppv" && w->ppv_typed && w->record_ppv)
      c.note += ", typed (the record's " + percent(*w->record_ppv) + ")";
  }
}

// The IVC cells of the circulation section; the same results are the IVC index's values.
std::vector<Cell> ivc_cells(const StepAnalysis& s, const Thresholds& limits, Step& out) {
  if (!s.ivc) return {};
  const StepIvc& ivc = *s.ivc;
  const Answer a = describe_ivc(ivc.inputs, ivc.results, limits, kContext);
  out.circulation.push_back(
      number_cell("ivc_dmax", "IVC diameter, widest", as_cm(*ivc.inputs.dmax)));
  out.circulation.push_back(
      number_cell("ivc_dmin", "IVC diameter, narrowest", as_cm(*ivc.inputs.dmin)));
  std::vector<Cell> values = cells_of(a.results);
  for (const Cell& v : values) out.circulation.push_back(v);
  for (const std::string& n : a.notes) out.notes.push_back("IVC: " + n);
  return values;
}

void preload_indices(const StepAnalysis& s, const Thresholds& limits,
                     const std::vector<Cell>& ivc_values, Step& out) {
  for (const PreloadIndexReading& r : s.preload) {
    switch (r.index) {
      case PreloadIndex::ppv:
        out.preload.push_back(index_of(r, "Pulse pressure variation (per breath)",
                                       {number_cell("ppv", "PPV", as_percent(*r.value))}));
        break;
      case PreloadIndex::ppv_monitor:
        out.preload.push_back(
            index_of(r, "Pulse pressure variation (monitor)",
                     {number_cell("ppv_monitor", "PPV (monitor)", as_percent(*r.value))}));
        break;
      case PreloadIndex::ppv_signals:
        out.preload.push_back(
            index_of(r, "Pulse pressure variation (from recorded signals)",
                     {number_cell("ppv_signals", "PPV (signals)", as_percent(*r.value))}));
        break;
      case PreloadIndex::svv:
        out.preload.push_back(index_of(r, "Stroke volume variation",
                                       {number_cell("svv", "SVV", as_percent(*r.value))}));
        break;
      case PreloadIndex::ivc:
        out.preload.push_back(index_of(r, "IVC respiratory change", ivc_values));
        break;
      case PreloadIndex::preload_test: {
        const Answer a = describe_preload_test(*r.test_inputs, *r.test, limits, kContext);
        out.preload.push_back(index_of(r, a.title, cells_of(a.results)));
        out.flags.insert(out.flags.end(), a.flags.begin(), a.flags.end());
        for (const std::string& n : a.notes) out.notes.push_back(r.key + ": " + n);
        break;
      }
      case PreloadIndex::vt_challenge:
        out.preload.push_back(index_of(
            r, "Tidal-volume challenge ('" + r.from_step + "' -> '" + r.to_step + "')",
            {number_cell("ppv_change", "PPV change", as_points(r.test->change), "points")}));
        break;
      case PreloadIndex::manoeuvre: {
        // Read against the step before; the cut-off cells carry their sources.
        const Answer a = describe_preload_test(*r.test_inputs, *r.test, limits, kContext);
        std::string title = display_name(r.test_inputs->kind);
        title[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(title[0])));
        std::vector<Cell> cells = cells_of(a.results);
        if (r.fluid) {
          cells.push_back(word_cell("objective", "Objective", to_string(r.fluid->objective.state)));
          cells.push_back(word_cell("safety_limit", "Safety limit", safety_word(*r.fluid)));
        }
        out.preload.push_back(
            index_of(r, title + " ('" + r.from_step + "' -> '" + r.to_step + "')", cells));
        out.flags.insert(out.flags.end(), a.flags.begin(), a.flags.end());
        for (const std::string& n : a.notes) out.notes.push_back(r.key + ": " + n);
        break;
      }
    }
  }
}

const char* measurement_name(PreloadMeasurement m) {
  switch (m) {
    case PreloadMeasurement::arterial_swing:
      return "the arterial pressure swing";
    case PreloadMeasurement::ivc_diameters:
      return "the IVC diameters";
    case PreloadMeasurement::end_expiratory_occlusion:
      return "an end-expiratory occlusion";
    case PreloadMeasurement::passive_leg_raising:
      return "a passive leg raise";
    case PreloadMeasurement::fluid_challenge:
      return "a fluid challenge";
    case PreloadMeasurement::mini_fluid_challenge:
      return "a mini fluid challenge";
  }
  return "";
}

// An index id in people's words ("ppv" -> "PPV", "vt_challenge" -> "tidal-volume challenge").
std::string index_words(const std::string& key) {
  static const std::pair<const char*, const char*> kWords[] = {
      {"ppv", "PPV"},
      {"ppv_monitor", "PPV from the monitor"},
      {"ppv_signals", "PPV from the signals"},
      {"svv", "SVV"},
      {"ivc", "IVC change"},
      {"vt_challenge", "tidal-volume challenge"},
      {"eeo", "end-expiratory occlusion"},
      {"plr", "passive leg raising"},
      {"fluid_challenge", "fluid challenge"},
      {"mini_fluid", "mini fluid challenge"},
      {"eeo_steps", "end-expiratory occlusion between steps"},
      {"plr_steps", "passive leg raising between steps"},
      {"fluid_challenge_steps", "fluid challenge between steps"},
      {"mini_fluid_steps", "mini fluid challenge between steps"},
  };
  for (const auto& [k, w] : kWords) {
    if (key == k) return w;
  }
  return plain_words(key);
}
std::string index_words(const std::vector<std::string>& keys) {
  std::vector<std::string> words;
  words.reserve(keys.size());
  for (const auto& k : keys) words.push_back(index_words(k));
  return join(words);
}

// "2 independent measurements: the arterial pressure swing (PPV, SVV) and the IVC
// diameters (IVC change)".
std::string measurements_text(const std::vector<MeasurementSupport>& ms) {
  std::string out = ms.size() == 1 ? "1 measurement: "
                                   : std::to_string(ms.size()) + " independent measurements: ";
  for (std::size_t i = 0; i < ms.size(); ++i) {
    if (i > 0) out += i + 1 == ms.size() ? " and " : ", ";
    out +=
        std::string(measurement_name(ms[i].measurement)) + " (" + index_words(ms[i].indices) + ")";
  }
  return out;
}

// "Conditional on regular cardiac rhythm, which was not recorded: " (the open
// conditions lead the statement).
std::string conditional_lead(const PreloadStatement& s) {
  if (!s.conditional) return "";
  std::vector<std::string> unrecorded, unproven;
  for (const OpenCondition& o : s.open_conditions) {
    std::string l = gate_label(o.condition);
    if (l.size() > 1 && l[0] >= 'A' && l[0] <= 'Z' && !(l[1] >= 'A' && l[1] <= 'Z'))
      l[0] = static_cast<char>(l[0] - 'A' + 'a');
    (o.state == GateState::not_contradicted ? unproven : unrecorded).push_back(l);
  }
  std::string out = "Conditional on ";
  if (!unrecorded.empty())
    out += join(unrecorded) +
           (unrecorded.size() == 1 ? ", which was not recorded" : ", which were not recorded");
  if (!unrecorded.empty() && !unproven.empty()) out += ", and on ";
  if (!unproven.empty())
    out += join(unproven) + ", which the signals do not contradict but cannot prove";
  return out + ": ";
}

// The statement's sentence after a conditional lead starts in lower case.
std::string after_lead(const std::string& lead, std::string text) {
  if (!lead.empty() && !text.empty() && text[0] >= 'A' && text[0] <= 'Z')
    text[0] = static_cast<char>(text[0] - 'A' + 'a');
  return lead + text;
}

Statement statement_of(const PreloadStatement& s) {
  Statement out;
  out.category = to_string(s.category);
  out.conditional = s.conditional;
  out.open_conditions = s.open_conditions;
  out.measurements = s.measurements;
  out.supporting = s.supporting;
  out.grey_zone = s.grey_zone;
  for (const FailedGate& g : s.failed_gates) out.failed_gates.push_back(g.index + ": " + g.gate);
  const std::string grey =
      s.grey_zone.empty() ? "" : "; in the grey zone: " + index_words(s.grey_zone);
  switch (s.category) {
    case PreloadCategory::not_assessable:
      out.text = s.any_index
                     ? "Not assessable: no index is valid under its conditions at this step."
                     : "Not assessable: no preload index was recorded at this step.";
      break;
    case PreloadCategory::indeterminate:
      if (!s.responsive.empty() && !s.unresponsive.empty()) {
        out.text =
            "Indeterminate: valid indices disagree (responsive: " + index_words(s.responsive) +
            "; not responsive: " + index_words(s.unresponsive) + ")" + grey + ".";
      } else {
        out.text = "Indeterminate: the valid indices sit in their grey zone (" +
                   index_words(s.grey_zone) + ").";
      }
      break;
    case PreloadCategory::likely_responsive:
      out.text = "Likely preload responsive, supported by " + measurements_text(s.measurements) +
                 grey + ".";
      break;
    case PreloadCategory::unlikely:
      out.text = "Preload responsiveness unlikely, supported by " +
                 measurements_text(s.measurements) + grey + ".";
      break;
  }
  out.text = after_lead(conditional_lead(s), out.text);
  return out;
}

Step step_of(const StepAnalysis& s, const Thresholds& limits) {
  Step out;
  out.label = s.label;
  out.time = s.time;
  settings_cells(s, out);
  if (s.vt_challenge_from) {
    out.settings.push_back(
        word_cell("vt_challenge_step", "Tidal-volume challenge step", "challenge",
                  "brief manoeuvre from '" + *s.vt_challenge_from + "', not a candidate setting"));
  }
  if (s.manoeuvre_from && s.recorded.manoeuvre) {
    const std::string from = s.manoeuvre_from->empty() ? std::string("no step before")
                                                       : "of '" + *s.manoeuvre_from + "'";
    out.settings.push_back(word_cell("manoeuvre_step", "Manoeuvre step",
                                     id_of(*s.recorded.manoeuvre),
                                     std::string(display_name(*s.recorded.manoeuvre)) + " " + from +
                                         ", not a candidate setting"));
  }
  mechanics_cells(s, limits, out);
  gas_cells(s, limits, out);
  circulation_cells(s, out);
  ppv_cells(s, out);
  record_provenance(s, out);
  const std::vector<Cell> ivc_values = ivc_cells(s, limits, out);
  preload_indices(s, limits, ivc_values, out);
  if (!s.not_read_during_manoeuvre.empty() && s.recorded.manoeuvre) {
    std::vector<std::string> keys;
    for (const PreloadIndexReading& r : s.not_read_during_manoeuvre) keys.push_back(r.key);
    const bool eeo = *s.recorded.manoeuvre == PreloadTestKind::end_expiratory_occlusion;
    out.notes.push_back("Not read: " + index_words(keys) + " (measured during " +
                        (eeo ? "an end-expiratory occlusion, which holds ventilation"
                             : "a passive leg raise, which changes preload") +
                        "): not a statement about the patient; only the " +
                        display_name(*s.recorded.manoeuvre) +
                        " against the step before it is read here.");
  }
  out.statement = statement_of(s.preload_statement);
  // A fluid challenge that reached a safety limit says so first, whatever its objective did.
  for (const PreloadIndexReading& r : s.preload) {
    if (!r.fluid || !r.fluid->stop) continue;
    std::vector<std::string> reached;
    for (const SafetyCheck& c : r.fluid->safety) {
      if (c.state == LimitState::reached) reached.push_back(safety_limit_name(c.limit));
    }
    out.statement.text = "Stop: safety limit reached (" + join(reached) +
                         "), whatever the objective did. " + out.statement.text;
  }
  return out;
}

// A step that is the baseline of a manoeuvre read at the next step says so; the reading stays at
// the manoeuvre step (it is the change between the two).
void mark_manoeuvre_baselines(const TrialAnalysis& a, View& v) {
  for (const StepAnalysis& t : a.steps) {
    for (const PreloadIndexReading& r : t.preload) {
      if (r.index != PreloadIndex::manoeuvre || !r.test_inputs || r.from_step == r.to_step)
        continue;
      for (std::size_t i = 0; i < a.steps.size() && i < v.steps.size(); ++i) {
        if (a.steps[i].label != r.from_step) continue;
        const std::string what = std::string("the ") + display_name(r.test_inputs->kind) +
                                 " read at step '" + r.to_step + "'";
        v.steps[i].settings.push_back(word_cell("manoeuvre_baseline", "Baseline of a manoeuvre",
                                                id_of(r.test_inputs->kind),
                                                "baseline of " + what + " (its reading is there)"));
        const PreloadStatement& own = a.steps[i].preload_statement;
        std::string& text = v.steps[i].statement.text;
        if (own.category == PreloadCategory::not_assessable && !own.any_index) {
          text = "Baseline of " + what +
                 ": the reading is there. No preload index of its own was recorded at this step.";
        } else {
          text += " This step is also the baseline of " + what + " (its reading is there).";
        }
      }
    }
  }
}

// ---- trials side by side ------------------------------------------------------------

std::string best_settings_text(const BestStepSettings& b) {
  std::vector<std::string> parts;
  if (b.set_peep)
    parts.push_back("set PEEP " + format_shown(as_cmH2O(*b.set_peep, 0)));
  else if (b.peep_total)
    parts.push_back("total PEEP " + format_shown(as_cmH2O(*b.peep_total)));
  if (b.vt) {
    std::string vt = "VT " + format_shown(as_mL(*b.vt));
    if (b.vt_per_kg) vt += " = " + format_number(in_mL_per_kg(*b.vt_per_kg), 1) + " mL/kg PBW";
    parts.push_back(vt);
  }
  return parts.empty() ? "settings not recorded" : join(parts);
}

std::string signed_text(double v, int decimals, const std::string& unit) {
  return (v > 0 ? "+" : "") + format_number(v, decimals) + " " + unit;
}

// What changed from each trial's best setting to the next trial's: "from 2026-12-01 to
// 2026-12-03: set PEEP unchanged, VT -40 mL".
std::string best_settings_changes(const std::vector<std::string>& trials,
                                  const BestAcrossTrials& b) {
  std::vector<std::string> out;
  std::optional<std::size_t> last;
  for (std::size_t i = 0; i < b.settings.size() && i < trials.size(); ++i) {
    if (!b.settings[i]) continue;
    if (last) {
      const BestStepSettings& x = *b.settings[*last];
      const BestStepSettings& y = *b.settings[i];
      std::vector<std::string> parts;
      const bool set = x.set_peep && y.set_peep;
      const auto px = set ? x.set_peep : x.peep_total;
      const auto py = set ? y.set_peep : y.peep_total;
      const std::string peep_name = set ? "set PEEP" : "total PEEP";
      if (px && py) {
        const double d = in_cmH2O(*py) - in_cmH2O(*px);
        parts.push_back(
            peep_name + " " +
            (std::abs(d) < 0.05 ? std::string("unchanged") : signed_text(d, set ? 0 : 1, "cmH2O")));
      }
      if (x.vt && y.vt) {
        const double d = in_mL(*y.vt) - in_mL(*x.vt);
        parts.push_back("VT " +
                        (std::abs(d) < 0.5 ? std::string("unchanged") : signed_text(d, 0, "mL")));
      }
      if (!parts.empty())
        out.push_back("from " + trials[*last] + " to " + trials[i] + ": " + join(parts));
    }
    last = i;
  }
  std::string text;
  for (const std::string& o : out) text += (text.empty() ? "" : "; ") + o;
  return text;
}

// ---- heart-lung estimate --------------------------------------------------------

Shown pressure_range_cm(const PressureRange& r) {
  Shown s = as_cmH2O(r.central);
  if (!r.single()) {
    s.low = in_cmH2O(r.low);
    s.high = in_cmH2O(r.high);
  }
  return s;
}
Shown pressure_range_mmHg(const PressureRange& r) {
  Shown s = as_mmHg(r.central, 1);
  if (!r.single()) {
    s.low = in_mmHg(r.low);
    s.high = in_mmHg(r.high);
  }
  return s;
}
Shown ratio_range(const RatioRange& r, bool percent) {
  Shown s = percent ? as_percent(r.central, 0) : as_fraction(r.central);
  if (!r.single()) {
    s.low = percent ? in_percent(r.low) : in_fraction(r.low);
    s.high = percent ? in_percent(r.high) : in_fraction(r.high);
  }
  return s;
}

HeartLung heart_lung_of(const HeartLungComparison& h) {
  HeartLung out;
  out.step = h.step;
  out.reference = h.reference;
  if (h.not_estimated) {
    out.notes.push_back(std::string("Estimate not made: ") + h.not_estimated->what());
    return out;
  }
  if (!h.estimate) return out;
  const HeartLungEstimate& e = *h.estimate;
  out.origin = e.ecw_ers_origin;
  const bool measured = e.ecw_ers_origin == ElastanceRatioOrigin::measured;
  out.estimated.push_back(number_cell("ecw_ers", "Chest-wall share Ecw/Ers",
                                      ratio_range(e.ecw_ers, false),
                                      measured ? "measured (oesophageal)" : "preset range"));
  if (e.delta_peep)
    out.estimated.push_back(
        number_cell("delta_peep", "PEEP change vs reference", as_cmH2O(*e.delta_peep)));
  if (e.tidal_pleural_swing) {
    out.estimated.push_back(number_cell("tidal_pleural_swing", "Tidal pleural swing",
                                        pressure_range_cm(*e.tidal_pleural_swing)));
  }
  if (e.pleural_pressure_change) {
    out.estimated.push_back(number_cell("pleural_pressure_change", "Change in pleural pressure",
                                        pressure_range_cm(*e.pleural_pressure_change)));
  }
  if (e.right_atrial_pressure_change) {
    out.estimated.push_back(number_cell("right_atrial_pressure_change",
                                        "Change in right-atrial pressure",
                                        pressure_range_mmHg(*e.right_atrial_pressure_change)));
  }
  if (e.venous_return_gradient_change) {
    out.estimated.push_back(
        number_cell("venous_return_gradient_change", "Change in venous-return gradient",
                    ratio_range(*e.venous_return_gradient_change, true),
                    e.measured_rap_change ? "upper bound, from the measured CVP" : "upper bound"));
  }
  for (const HeartLungNote n : e.notes) {
    const bool per_step = n == HeartLungNote::peep_change_transmitted ||
                          n == HeartLungNote::venous_return_from_measured_rap;
    // The step's own PEEP change means nothing at the reference step itself.
    if (per_step && h.step == h.reference) continue;
    out.notes.push_back(per_step ? "'" + h.step + "': " + heart_lung_note_text(n, e)
                                 : heart_lung_note_text(n, e));
    out.once_only.push_back(false);
  }
  if (h.observed_co_change) {
    out.observed.push_back(number_cell("observed_co_change", "Observed change in CO",
                                       as_percent(*h.observed_co_change, 1)));
  }
  if (h.observed_map_change) {
    out.observed.push_back(number_cell("observed_map_change", "Observed change in MAP",
                                       as_percent(*h.observed_map_change, 1)));
  }
  if (h.observed_ppv_change) {
    out.observed.push_back(number_cell("observed_ppv_change", "Observed change in PPV",
                                       as_points(*h.observed_ppv_change), "percentage points"));
  } else if (h.ppv_not_read) {
    const bool eeo = h.ppv_not_read->manoeuvre == PreloadTestKind::end_expiratory_occlusion;
    out.observed.push_back(
        word_cell("observed_ppv_change", "Observed change in PPV", "not read",
                  "PPV at '" + h.ppv_not_read->step + "' was measured during " +
                      (eeo ? "an end-expiratory occlusion, which holds ventilation"
                           : "a passive leg raise, which changes preload") +
                      ": not the patient's state"));
  }
  if (h.observed_cvp_change) {
    out.observed.push_back(number_cell("observed_cvp_change", "Observed change in CVP",
                                       as_mmHg(*h.observed_cvp_change, 1)));
  }
  return out;
}

// ---- findings ---------------------------------------------------------------------

const char* measure_name(CostMeasure m) {
  switch (m) {
    case CostMeasure::co:
      return "CO";
    case CostMeasure::do2:
      return "DO2";
    case CostMeasure::map:
      return "MAP";
  }
  return "";
}
Shown measure_shown(CostMeasure m, const std::variant<Flow, Pressure>& v) {
  if (m == CostMeasure::map) return as_mmHg(std::get<Pressure>(v), 0);
  if (m == CostMeasure::do2) return as_mL_per_min(std::get<Flow>(v), 0);
  return as_L_per_min(std::get<Flow>(v), 2);
}

// The message of the mechanics flag of a limit at a step.
Flag mechanics_flag(const StepAnalysis& s, MechanicsLimit limit, const Thresholds& limits) {
  const auto breaches = mechanics_breaches(s.mechanics_inputs, s.mechanics_results, limits);
  const auto flags = mechanics_flags(s.mechanics_inputs, s.mechanics_results, limits, kContext);
  for (std::size_t i = 0; i < breaches.size() && i < flags.size(); ++i) {
    if (breaches[i] == limit) return flags[i];
  }
  return {};
}

const StepAnalysis* step_named(const TrialAnalysis& a, const std::string& label) {
  for (const auto& s : a.steps) {
    if (s.label == label) return &s;
  }
  return nullptr;
}

// A value printed with the digits that decide its comparison with a cut-off: more decimals
// (up to 3) while it would print as the cut-off itself.
std::string deciding(double value, double cut, int decimals) {
  while (decimals < 3 && value != cut &&
         format_number(value, decimals) == format_number(cut, decimals))
    ++decimals;
  return format_number(value, decimals);
}

std::string quoted(const std::string& label) {
  return "'" + label + "'";
}

std::string minutes_text(Time t) {
  return format_number(t.value() / 60.0, 0) + " min";
}

Shown step_value_shown(const StepValue& v) {
  if (const auto* c = std::get_if<Compliance>(&v)) return as_mL_per_cmH2O(*c);
  if (const auto* f = std::get_if<Flow>(&v)) return as_mL_per_min(*f);
  return as_cmH2O(std::get<Pressure>(v));
}

Shown resolution_shown(const std::variant<Compliance, Flow, Pressure, Ratio>& r) {
  if (const auto* x = std::get_if<Ratio>(&r)) return as_percent(*x, 0);
  if (const auto* c = std::get_if<Compliance>(&r)) return as_mL_per_cmH2O(*c, 0);
  if (const auto* f = std::get_if<Flow>(&r)) return as_mL_per_min(*f);
  return as_cmH2O(std::get<Pressure>(r), 0);
}

// "Highest ... at 'X' (v)" and the steps tied with it within the preset resolution.
void best_step_text(const char* what, const char* key, const char* label, const bb::Finding& f,
                    Finding& out) {
  const auto& d = std::get<BestStepFinding>(f.detail);
  const Shown v = step_value_shown(d.value);
  out.text = std::string(what) + " at '" + f.steps.front() + "' (" + format_shown(v) + ")";
  out.values = {number_cell(key, label, v)};
  if (!d.tied.empty()) {
    out.text += "; tied with it within the " + format_shown(resolution_shown(d.resolution)) +
                " resolution:";
    for (std::size_t i = 0; i < d.tied.size() && i + 1 < f.steps.size(); ++i) {
      out.text += (i ? ", " : " ") + quoted(f.steps[i + 1]) + " (" +
                  format_shown(step_value_shown(d.tied[i])) + ")";
    }
    out.values.push_back(number_cell("resolution", "Resolution", resolution_shown(d.resolution)));
  }
  out.text += ".";
}

// The conditions of a test across two steps (a tidal-volume challenge or a manoeuvre) that
// failed or are unknown, by step: gate keys starting with `first_key` belong to the first step,
// with `second_key` to the second, any other to the test itself.
std::string two_step_conditions_text(const std::vector<Gate>& gates, std::string_view first_key,
                                     std::string_view second_key, const std::string& first,
                                     const std::string& second) {
  auto list = [&](GateState state) {
    std::string at_first, at_second, own;
    for (const Gate& g : gates) {
      if (g.state != state) continue;
      std::string& to = g.key.rfind(first_key, 0) == 0    ? at_first
                        : g.key.rfind(second_key, 0) == 0 ? at_second
                                                          : own;
      to += (to.empty() ? "" : "; ") + gate_label(g);
    }
    std::string out;
    if (!own.empty()) out += "the manoeuvre: " + own;
    if (!at_first.empty())
      out += (out.empty() ? "" : "; ") + std::string("at ") + quoted(first) + ": " + at_first;
    if (!at_second.empty())
      out += (out.empty() ? "" : "; ") + std::string("at ") + quoted(second) + ": " + at_second;
    return out;
  };
  std::string out;
  const std::string failed = list(GateState::failed);
  const std::string unknown = list(GateState::unknown);
  if (!failed.empty()) out += " Failed conditions (" + failed + ").";
  if (!unknown.empty()) out += " Not recorded (" + unknown + ").";
  return out;
}

std::string vt_challenge_text(const VtChallengeFinding& d, const std::string& low,
                              const std::string& high, std::vector<Cell>& values) {
  const std::string pair = quoted(low) + " -> " + quoted(high);
  if (d.refused) {
    switch (*d.refused) {
      case VtChallengeRefusal::wrong_order:
        return "Steps " + quoted(high) + " (about 8 mL/kg PBW) and " + quoted(low) +
               " (about 6 mL/kg PBW) differ only in VT, but the higher VT comes first: the "
               "tidal-volume challenge raises VT from 6 to 8 mL/kg PBW; not read as one.";
      case VtChallengeRefusal::not_consecutive:
        return "Steps " + pair +
               " differ only in VT (6 -> 8 mL/kg PBW), but other steps lie between them: the "
               "tidal-volume challenge is two consecutive steps; not read as one.";
      case VtChallengeRefusal::voided_between:
        return "Steps " + pair +
               " differ only in VT (6 -> 8 mL/kg PBW), but a voided step lies between them in the "
               "file: the tidal-volume challenge is two consecutive steps; not read as one.";
      case VtChallengeRefusal::too_far_apart:
        return "Steps " + pair + " differ only in VT (6 -> 8 mL/kg PBW), but are " +
               (d.interval ? minutes_text(*d.interval) : std::string("?")) +
               " apart, more than the " + minutes_text(d.max_interval) +
               " of a tidal-volume challenge; not read as one.";
    }
  }
  if (!d.result) {
    return "Steps " + quoted(low) + " and " + quoted(high) +
           " differ only in VT (6 -> 8 mL/kg PBW) but PPV was not recorded at both: no "
           "tidal-volume challenge result.";
  }
  values = {number_cell("ppv_change", "PPV change", as_points(d.result->change), "points")};
  std::string text =
      "Tidal-volume challenge " + pair + ": PPV " + format_number(in_percent(*d.ppv_low), 1) +
      " -> " + format_number(in_percent(*d.ppv_high), 1) + " % (change " +
      format_number(in_percent(d.result->change), 1) + " points): " + reading_text(d.result->reading);
  text +=
      two_step_conditions_text(d.conditions, kVtChallengeLowStep, kVtChallengeHighStep, low, high);
  text += d.interval ? " The steps are " + minutes_text(*d.interval) + " apart."
                     : " Times not recorded at both steps: the interval was not checked.";
  text += " " + quoted(high) + " is a brief manoeuvre, not a candidate setting.";
  return text;
}

// ---- a manoeuvre between two steps ----

std::string preload_test_article_name(PreloadTestKind k);
std::string and_list(const std::vector<std::string>& v, const char* last);

Shown as_minutes_shown(Time t) {
  return Shown{in_minutes(t), "min", "min", 0, std::nullopt, std::nullopt};
}

Shown preload_value_shown(const PreloadValue& v) {
  return std::visit(
      [](const auto& q) -> Shown {
        using Q = std::decay_t<decltype(q)>;
        if constexpr (std::is_same_v<Q, Ratio>) return as_percent(q);
        if constexpr (std::is_same_v<Q, Flow>) return as_L_per_min(q, 2);
        if constexpr (std::is_same_v<Q, Volume>) return as_mL(q);
        if constexpr (std::is_same_v<Q, Length>) return as_cm(q);
      },
      v);
}

// "CO, SV or LVOT VTI": what the test is read by (never a measure it is not read by).
std::string measures_text(const std::vector<PreloadMeasure>& ms) {
  std::vector<std::string> words;
  words.reserve(ms.size());
  for (PreloadMeasure m : ms) {
    words.push_back(m == PreloadMeasure::cardiac_output  ? "CO"
                    : m == PreloadMeasure::stroke_volume ? "SV"
                    : m == PreloadMeasure::vti           ? "LVOT VTI"
                                                         : "PPV");
  }
  return and_list(words, "or");
}

std::string objective_name(FluidObjective o) {
  switch (o) {
    case FluidObjective::co:
      return "cardiac output";
    case FluidObjective::sv:
      return "stroke volume";
    case FluidObjective::vti:
      return "LVOT VTI";
    case FluidObjective::ppv:
      return "PPV";
    case FluidObjective::map:
      return "MAP";
    case FluidObjective::hr:
      return "heart rate";
    case FluidObjective::urine_output:
      return "urine output";
  }
  return "";
}

std::string objective_text(const FluidChallengeOutcome& o, const Thresholds& limits) {
  const ObjectiveResult& r = o.objective;
  std::string out = "Objective (" + objective_name(r.objective) +
                    (o.objective_stated ? "" : ", not stated: the measure compared") + ")";
  if (r.surrogate) out += ", a weaker surrogate of a cardiac-output response";
  std::string cut;
  if (!r.cut_off_key.empty()) {
    const double v = in_percent(limits.get<Ratio>(r.cut_off_key));
    cut = format_number(v, 0) + " %";
  }
  switch (r.state) {
    case ObjectiveState::met:
      out += ": met";
      break;
    case ObjectiveState::not_met:
      out += ": not met";
      break;
    case ObjectiveState::between_cut_offs:
      out += r.objective == FluidObjective::ppv ? ": PPV still in its grey zone"
                                                : ": between the two cut-offs";
      break;
    case ObjectiveState::not_readable:
      out += ": cannot be judged (a condition failed)";
      break;
    case ObjectiveState::not_measured:
      out += ": not measured at both steps";
      break;
    case ObjectiveState::not_judged:
      out += ": not judged between two steps (urine output answers over hours)";
      break;
  }
  if (r.change && r.state != ObjectiveState::not_measured) {
    out += r.objective == FluidObjective::ppv
               ? " (change " + format_number(in_percent(*r.change), 1) + " points"
               : " (change " + percent_text(*r.change, 1);
    if (r.objective == FluidObjective::map && !cut.empty())
      out += "; a rise of " + cut + " is the objective";
    if (r.objective == FluidObjective::hr && !cut.empty())
      out += "; a fall of " + cut + " is the objective";
    if (r.objective == FluidObjective::ppv) out += "; met when PPV no longer reads responsive";
    out += ")";
  }
  if (!r.cut_off_key.empty()) out += " [" + limits.source(r.cut_off_key) + "]";
  return out + ".";
}

std::string safety_limit_name(SafetyLimit l) {
  switch (l) {
    case SafetyLimit::cvp_ceiling:
      return "CVP ceiling";
    case SafetyLimit::pf_ratio_fall:
      return "fall in PaO2/FiO2";
    case SafetyLimit::spo2_fall:
      return "fall in SpO2";
    case SafetyLimit::pulmonary_oedema:
      return "new signs of pulmonary oedema";
  }
  return "";
}

// "reached", "none reached", or "none reached of those checked" (some not recorded).
std::string safety_word(const FluidChallengeOutcome& o) {
  if (o.stop) return "reached";
  for (const SafetyCheck& c : o.safety) {
    if (c.state == LimitState::not_checked) return "none reached of those checked";
  }
  return "none reached";
}

std::string safety_value_text(const SafetyCheck& c, const SafetyValue& v) {
  if (const auto* p = std::get_if<Pressure>(&v)) return format_shown(as_mmHg(*p));
  const double x = in_percent(std::get<Ratio>(v));
  return format_number(x, 0) + (c.limit == SafetyLimit::spo2_fall ? " points" : " %");
}

std::string safety_text(const FluidChallengeOutcome& o, std::vector<Cell>& values) {
  std::string reached, clear, unchecked;
  for (const SafetyCheck& c : o.safety) {
    std::string what;
    const std::string limit = c.limit_value ? safety_value_text(c, *c.limit_value) +
                                                  (c.stated ? ", stated" : ", site preset")
                                            : "";
    switch (c.limit) {
      case SafetyLimit::cvp_ceiling:
        what = "CVP" + (c.value ? " " + safety_value_text(c, *c.value) : std::string()) +
               " against a ceiling of " + limit;
        if (c.value)
          values.push_back(
              number_cell("cvp_after", "CVP after", as_mmHg(std::get<Pressure>(*c.value))));
        break;
      case SafetyLimit::pf_ratio_fall:
        what = "PaO2/FiO2 fall" + (c.value ? " " + safety_value_text(c, *c.value) : std::string()) +
               " against " + limit;
        if (c.value)
          values.push_back(number_cell("pf_ratio_fall", "Fall in PaO2/FiO2",
                                       as_percent(std::get<Ratio>(*c.value), 0)));
        break;
      case SafetyLimit::spo2_fall:
        what = "SpO2 fall" + (c.value ? " " + safety_value_text(c, *c.value) : std::string()) +
               " against " + limit;
        if (c.value)
          values.push_back(number_cell("spo2_fall", "Fall in SpO2",
                                       as_points(std::get<Ratio>(*c.value)), "points"));
        break;
      case SafetyLimit::pulmonary_oedema:
        what = c.state == LimitState::reached ? "new signs of pulmonary oedema"
                                              : "signs of pulmonary oedema";
        break;
    }
    std::string& to = c.state == LimitState::reached       ? reached
                      : c.state == LimitState::not_reached ? clear
                                                           : unchecked;
    to += (to.empty() ? "" : "; ") + what + " [" + c.source + "]";
  }
  values.push_back(word_cell("safety_limit", "Safety limit", safety_word(o)));
  std::string out;
  if (o.stop) out += " Safety limit reached: " + reached + ".";
  if (!clear.empty()) out += " Not reached: " + clear + ".";
  if (!unchecked.empty()) out += " Not checked (not recorded at both steps): " + unchecked + ".";
  return out;
}

std::string manoeuvre_text(const ManoeuvreFinding& d, const Thresholds& limits,
                           const std::string& before, const std::string& after,
                           std::vector<Cell>& values) {
  const std::string name = display_name(d.kind);
  const std::string pair = quoted(before) + " -> " + quoted(after);
  if (d.refused) {
    switch (*d.refused) {
      case ManoeuvreRefusal::no_step_before:
        return quoted(before) + " is marked as " + preload_test_article_name(d.kind) +
               ", but it is the first step: there is no step before it to compare with; not read.";
      case ManoeuvreRefusal::before_is_manoeuvre:
        return quoted(after) + " is marked as " + preload_test_article_name(d.kind) + " of " +
               quoted(before) + ", but " + quoted(before) +
               " is itself a manoeuvre, not a baseline: the test compares two consecutive steps, "
               "the first at baseline; not read.";
      case ManoeuvreRefusal::settings_changed: {
        std::vector<std::string> labels;
        for (const std::string& id : d.changed_settings) labels.emplace_back(field_spec(id).label);
        return quoted(after) + " is marked as " + preload_test_article_name(d.kind) + " of " +
               quoted(before) + ", but the ventilator settings differ (" + join(labels) +
               "): a change of setting moves the measures on its own; not read.";
      }
      case ManoeuvreRefusal::before_voided:
        return quoted(after) + " is marked as " + preload_test_article_name(d.kind) + " of " +
               quoted(before) +
               ", but the step before it was voided: its baseline is gone, and "
               "an earlier step is not a baseline of it; not read.";
      case ManoeuvreRefusal::too_far_apart:
        return "Steps " + pair + " are marked as " + preload_test_article_name(d.kind) +
               ", but are " + (d.interval ? minutes_text(*d.interval) : std::string("?")) +
               " apart, more than the " + minutes_text(d.max_interval) + " allowed; not read.";
    }
  }
  std::string text = name + " " + pair + ": ";
  text[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(text[0])));
  if (d.fluid && d.fluid->stop) text += "stop: safety limit reached. ";
  if (!d.result) {
    text += measures_text(d.accepted) + " not recorded at both steps: no " + name + " result.";
  } else {
    values.push_back(number_cell("change", std::string("Change in ") + display_name(*d.measure),
                                 as_percent(d.result->change),
                                 "relative, (after - before) / before"));
    const char* cut = cut_off_key(d.kind);
    values.push_back(
        number_cell("cut_off", "Cut-off", as_percent(limits.get<Ratio>(cut)), limits.source(cut)));
    std::string measure = display_name(*d.measure);
    measure[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(measure[0])));
    text += measure + " " + format_shown(preload_value_shown(*d.before)) + " -> " +
            format_shown(preload_value_shown(*d.after)) + ": " + reading_text(d.result->reading);
    text += two_step_conditions_text(d.conditions, kManoeuvreBeforeStep, kManoeuvreAfterStep,
                                     before, after);
  }
  if (d.fluid) {
    const FluidChallengeOutcome& o = *d.fluid;
    std::string given = o.fluid.fluid ? *o.fluid.fluid : std::string("fluid not recorded");
    if (o.fluid.volume) given += ", " + format_shown(as_mL(*o.fluid.volume));
    if (o.fluid.duration) given += " over " + format_shown(as_minutes_shown(*o.fluid.duration));
    if (o.rate) given += " (" + format_shown(as_mL_per_min(*o.rate, 1)) + ")";
    if (!o.fluid.volume || !o.fluid.duration) given += "; volume over time not recorded";
    text += " Given: " + given + ". " + objective_text(o, limits);
    values.push_back(
        word_cell("objective", "Objective " + objective_name(o.objective.objective),
                  to_string(o.objective.state),
                  o.objective.surrogate ? "a weaker surrogate of a cardiac-output response" : ""));
    text += safety_text(o, values);
  }
  text += d.interval ? " The steps are " + minutes_text(*d.interval) + " apart."
                     : " Times not recorded at both steps: the interval was not checked.";
  text += " " + quoted(after) + " is a brief manoeuvre, not a candidate setting.";
  return text;
}

// "at 'A' (63), 'B' (58 mmHg)": each step with its value, the unit once at the end.
template <class Q, class Show>
std::string steps_with_values(const bb::Finding& f, const ShockContextFinding& d, double cut,
                              Show show, const std::string& unit,
                              const std::vector<bool>& estimated = {}) {
  std::string out;
  for (std::size_t i = 0; i < f.steps.size() && i < d.values.size(); ++i) {
    const Shown v = show(std::get<Q>(d.values[i]));
    std::string t = deciding(v.value, cut, v.decimals);
    if (i < estimated.size() && estimated[i]) t += ", estimated";
    out += (i ? ", " : "") + quoted(f.steps[i]) + " (" + t + ")";
  }
  return out + " " + unit;
}

Finding finding_of(const TrialAnalysis& a, const bb::Finding& f, const DisplayUnits& display,
                   std::vector<std::string>& notes) {
  // PaO2/FiO2 in the site's blood-gas unit.
  auto pf = [&](Pressure p) { return format_shown(displayed("pf_ratio", as_mmHg(p), display)); };
  Finding out{to_string(f.kind), "", f.steps, {}, f.flagged, f.source};
  const std::string first = f.steps.empty() ? "" : f.steps.front();
  const std::string second = f.steps.size() > 1 ? f.steps[1] : "";
  switch (f.kind) {
    case FindingKind::best_compliance:
      best_step_text("Highest static compliance", "compliance_static", "Static compliance", f, out);
      break;
    case FindingKind::max_do2:
      best_step_text("Highest O2 delivery", "do2", "O2 delivery", f, out);
      break;
    case FindingKind::lowest_driving_pressure:
      best_step_text("Lowest driving pressure", "driving_pressure", "Driving pressure", f, out);
      break;
    case FindingKind::limit_breach: {
      const auto& d = std::get<LimitBreachFinding>(f.detail);
      const StepAnalysis* s = step_named(a, first);
      const Flag flag = s ? mechanics_flag(*s, d.limit, a.limits) : Flag{};
      out.text = "'" + first + "': " + flag.message + ".";
      break;
    }
    case FindingKind::haemodynamic_cost: {
      const auto& d = std::get<HaemodynamicCostFinding>(f.detail);
      const std::string name = measure_name(d.measure);
      out.text = "'" + first + "': " + name + " " +
                 format_shown(measure_shown(d.measure, d.value)) + " is " + percent_text(d.change) +
                 " against the reference step '" + second + "' (" +
                 format_shown(measure_shown(d.measure, d.reference_value)) + "); falls of " +
                 format_number(in_percent(d.flag_at), 0) + " % or more are flagged.";
      out.values = {number_cell(std::string(to_string(d.measure)) + "_change", "Change in " + name,
                                as_percent(d.change, 1))};
      break;
    }
    case FindingKind::oxygenation_gain: {
      const auto& d = std::get<OxygenationGainFinding>(f.detail);
      out.values = {number_cell("pf_ratio_change", "Change in PaO2/FiO2", as_percent(d.gain, 1))};
      if (d.best_is_reference) {
        out.text = "PaO2/FiO2 was highest at the reference step '" + second + "' (" +
                   pf(d.reference) + ").";
      } else {
        out.text = "PaO2/FiO2 highest at '" + first + "': " + pf(d.best) + " against " +
                   pf(d.reference) + " at the reference '" + second + "' (" + percent_text(d.gain) +
                   ").";
      }
      break;
    }
    case FindingKind::recruitment_to_inflation: {
      const auto& d = std::get<RecruitmentFinding>(f.detail);
      if (d.no_tidal_volume) {
        out.text = "'" + first + "': PEEP release recorded but no tidal volume: R/I not computed.";
      } else if (d.not_computed) {
        out.text = "'" + first + "': R/I not computed: " + d.not_computed->what();
      } else if (d.result) {
        const RecruitmentResult& r = *d.result;
        out.values = {
            number_cell("recruited_volume", "Recruited volume", as_mL(r.recruited_volume)),
            number_cell("recruited_compliance", "Compliance of recruited lung",
                        as_mL_per_cmH2O(r.recruited_compliance)),
            number_cell("compliance_low", "Compliance at low PEEP",
                        as_mL_per_cmH2O(r.compliance_low)),
            number_cell("recruitment_to_inflation", "Recruitment-to-inflation ratio",
                        as_fraction(r.ratio)),
            number_cell("predicted_volume", "Volume predicted without recruitment",
                        as_mL(r.predicted_volume)),
            number_cell("volume_tolerance", "Volume measurement error",
                        as_mL(r.measurement_tolerance))};
        if (!r.interpretable) {
          out.text = "'" + first + "': recruitment-to-inflation ratio " +
                     format_number(in_fraction(r.ratio), 2) +
                     " cannot be interpreted: the released volume " +
                     format_number(in_mL(r.recruited_volume + r.predicted_volume), 0) + " mL is " +
                     format_number(-in_mL(r.recruited_volume), 0) + " mL below the " +
                     format_number(in_mL(r.predicted_volume), 0) +
                     " mL the low-PEEP compliance predicts, more than the volume measurement "
                     "error (" +
                     format_number(in_mL(r.measurement_tolerance), 0) +
                     " mL): a measurement problem is likely (leak, incomplete release); repeat the "
                     "release.";
        } else {
          out.text = "'" + first + "': recruitment-to-inflation ratio " +
                     format_number(in_fraction(r.ratio), 2) +
                     (r.high_recruitability ? " (at or above " : " (below ") +
                     format_number(in_fraction(r.high_recruitability_at), 2) + ": " +
                     (r.high_recruitability ? "suggests high recruitability"
                                            : "suggests low recruitability") +
                     ").";
        }
        for (const RecruitmentNote n : r.notes)
          notes.push_back("R/I at '" + first + "': " + recruitment_note_text(n, r));
      }
      break;
    }
    case FindingKind::vt_challenge:
      out.text =
          vt_challenge_text(std::get<VtChallengeFinding>(f.detail), first, second, out.values);
      break;
    case FindingKind::manoeuvre:
      out.text =
          manoeuvre_text(std::get<ManoeuvreFinding>(f.detail), a.limits, first, second, out.values);
      break;
    case FindingKind::trade_off: {
      const auto& d = std::get<TradeOffFinding>(f.detail);
      out.text = "Trade-off: '" + first + "' has the highest PaO2/FiO2 (" + pf(d.pf_ratio) +
                 ") and a haemodynamic cost:";
      for (std::size_t i = 0; i < d.costs.size(); ++i) {
        out.text += (i ? ", " : " ") + std::string(measure_name(d.costs[i].measure)) + " " +
                    percent_text(d.costs[i].change) + " against the reference '" +
                    d.costs[i].against + "'";
      }
      out.text += ".";
      if (d.ppv) {
        out.text += " PPV there is " + format_number(in_percent(*d.ppv), 1) +
                    " % (preload statement: " + plain_words(to_string(d.statement)) +
                    (d.statement_conditional ? ", conditional on conditions not recorded" : "") +
                    ").";
      }
      out.text += " Weighing oxygenation against circulation is a clinical decision.";
      break;
    }
    case FindingKind::map_below_target: {
      const auto& d = std::get<ShockContextFinding>(f.detail);
      const double target = in_mmHg(std::get<Pressure>(d.limit));
      out.text = "MAP below the " + format_number(target, 0) + " mmHg target at " +
                 steps_with_values<Pressure>(
                     f, d, target, [](Pressure p) { return as_mmHg(p); }, "mmHg", d.map_estimated) +
                 ".";
      out.values = {number_cell("map_target", "MAP target", as_mmHg(std::get<Pressure>(d.limit)))};
      break;
    }
    case FindingKind::lactate_above_limit: {
      const auto& d = std::get<ShockContextFinding>(f.detail);
      const double limit = in_mmol_per_L(std::get<AmountConcentration>(d.limit));
      out.text =
          "Lactate above " + format_number(limit, 0) + " mmol/L at " +
          steps_with_values<AmountConcentration>(
              f, d, limit, [](AmountConcentration c) { return as_mmol_per_L(c); }, "mmol/L") +
          ".";
      out.values = {number_cell("lactate_limit", "Lactate limit",
                                as_mmol_per_L(std::get<AmountConcentration>(d.limit), 0))};
      break;
    }
    case FindingKind::lactate_change: {
      const auto& d = std::get<LactateChangeFinding>(f.detail);
      out.text = "Lactate";
      for (std::size_t i = 0; i < d.measurements.size() && i < f.steps.size(); ++i) {
        out.text += (i ? ", " : " ") + format_shown(as_mmol_per_L(d.measurements[i].value)) +
                    " at " + quoted(f.steps[i]) + " (" + d.measurements[i].time + ")";
      }
      out.text += ":";
      for (std::size_t i = 0; i < d.changes.size(); ++i) {
        const LactateStepChange& c = d.changes[i];
        const double v = in_mmol_per_L(c.change);
        out.text += std::string(i ? ";" : "") + " " + (v > 0 ? "+" : "") + format_number(v, 1) +
                    " mmol/L (" + percent_text(c.relative) + ") in " + minutes_text(c.interval);
        Shown shown = as_mmol_per_L(c.change);
        out.values.push_back(
            number_cell("lactate_change" + (i ? "_" + std::to_string(i + 1) : std::string()),
                        "Change in lactate", shown,
                        "from " + quoted(f.steps[i]) + " to " + quoted(f.steps[i + 1])));
      }
      out.text += d.measurements.size() == 2
                      ? ". Two measurements show a change, not a trend."
                      : ". Changes between successive measurements; no trend is claimed.";
      break;
    }
  }
  return out;
}

std::vector<Cell> patient_cells(const TrialAnalysis& a) {
  const TrialPatient& p = a.patient;
  std::vector<Cell> c;
  if (p.sex) c.push_back(word_cell("sex", "Sex", to_string(*p.sex)));
  if (p.height) c.push_back(number_cell("height", "Height", as_cm(*p.height, 0)));
  if (p.weight) c.push_back(number_cell("weight", "Weight", as_kg(*p.weight)));
  if (p.age_years)
    c.push_back(number_cell("age", "Age", Shown{*p.age_years, "a", "years", 0, {}, {}}));
  if (a.pbw)
    c.push_back(number_cell("pbw", "Predicted body weight", as_kg(*a.pbw), "ARDS Network 2000"));
  if (a.bsa) c.push_back(number_cell("bsa", "Body surface area", as_m2(*a.bsa), "Du Bois 1916"));
  return c;
}

// ---- the summary: the answer first -------------------------------------------------

// The cell `key` of one of a step's sections, if recorded.
const Cell* find_cell(const std::vector<Cell>& cells, const std::string& key) {
  for (const Cell& c : cells) {
    if (c.key == key) return &c;
  }
  return nullptr;
}

const std::vector<Cell>& section_of(const Step& s, char section) {
  switch (section) {
    case 'm':
      return s.mechanics;
    case 'g':
      return s.gas_exchange;
    default:
      return s.circulation;
  }
}

// A summary row of `key` (section m, g or c), left out when no step has it.
void summary_row(const std::vector<Step>& steps, char section, const std::string& key,
                 const std::string& label, Summary& out) {
  SummaryRow row{key, label, {}};
  bool any = false;
  for (const Step& s : steps) {
    const Cell* c = find_cell(section_of(s, section), key);
    row.cells.push_back(c ? std::optional<Cell>(*c) : std::nullopt);
    any = any || c;
  }
  if (any) out.rows.push_back(std::move(row));
}

// The vasopressor row: the norepinephrine equivalent of all vasopressors when computed, else
// the dose per kg of the first drug that has one.
void vasopressor_row(const std::vector<Step>& steps, Summary& out) {
  for (const Step& s : steps) {
    if (find_cell(s.circulation, "ne_equivalent")) {
      summary_row(steps, 'c', "ne_equivalent", "NE equivalent", out);
      return;
    }
  }
  for (const Step& s : steps) {
    for (const Cell& c : s.circulation) {
      const std::string tail = "_dose_per_kg";
      if (c.key.size() > tail.size() &&
          c.key.compare(c.key.size() - tail.size(), tail.size(), tail) == 0) {
        std::string label = c.label;
        const std::size_t cut = label.find(" dose per kg");
        if (cut != std::string::npos) label = label.substr(0, cut) + " dose";
        summary_row(steps, 'c', c.key, label, out);
        return;
      }
    }
  }
}

std::string preload_test_name(PreloadTestKind k) {
  switch (k) {
    case PreloadTestKind::vt_challenge:
      return "Tidal-volume challenge";
    case PreloadTestKind::end_expiratory_occlusion:
      return "End-expiratory occlusion";
    case PreloadTestKind::passive_leg_raising:
      return "Passive leg raising";
    case PreloadTestKind::fluid_challenge:
      return "Fluid challenge";
    case PreloadTestKind::mini_fluid_challenge:
      return "Mini fluid challenge";
  }
  return "";
}
std::string preload_test_article_name(PreloadTestKind k) {
  switch (k) {
    case PreloadTestKind::vt_challenge:
      return "a tidal-volume challenge";
    case PreloadTestKind::end_expiratory_occlusion:
      return "an end-expiratory occlusion";
    case PreloadTestKind::passive_leg_raising:
      return "passive leg raising";
    case PreloadTestKind::fluid_challenge:
      return "a fluid challenge";
    case PreloadTestKind::mini_fluid_challenge:
      return "a mini fluid challenge";
  }
  return "";
}

std::string statement_word(PreloadCategory c) {
  switch (c) {
    case PreloadCategory::likely_responsive:
      return "likely";
    case PreloadCategory::unlikely:
      return "unlikely";
    case PreloadCategory::indeterminate:
      return "indeterminate";
    case PreloadCategory::not_assessable:
      break;
  }
  return "n/a";
}

std::string index_short_label(const PreloadIndexReading& r) {
  switch (r.index) {
    case PreloadIndex::ppv:
      return "PPV";
    case PreloadIndex::ppv_monitor:
      return "PPV (monitor)";
    case PreloadIndex::ppv_signals:
      return "PPV (from the signals)";
    case PreloadIndex::svv:
      return "SVV";
    case PreloadIndex::ivc:
      return "IVC change";
    case PreloadIndex::vt_challenge:
      return "The tidal-volume challenge";
    case PreloadIndex::preload_test:
    case PreloadIndex::manoeuvre:
      break;
  }
  return r.test_inputs ? preload_test_name(r.test_inputs->kind) : r.key;
}

// Why an index cannot be read, by the failed condition ("at this tidal volume").
std::string failed_reason(const Gate& g) {
  static const std::pair<const char*, const char*> kReasons[] = {
      {"vt_per_kg_pbw", "at this tidal volume"},
      {"vt_per_kg", "at this tidal volume"},
      {"compliance", "with this compliance"},
      {"passive_ventilation", "with breathing effort"},
      {"passive", "with breathing effort"},
      {"regular_rhythm", "in an irregular rhythm"},
      {"hr_rr_ratio", "at this HR/RR"},
      {"closed_chest", "with the chest open"},
      {"no_intra_abdominal_hypertension", "with intra-abdominal hypertension"},
      {"no_iah", "with intra-abdominal hypertension"},
      {"no_rv_failure", "with right-ventricular failure"},
  };
  for (const auto& [key, words] : kReasons) {
    if (g.key == key) return words;
  }
  return "(" + gate_label(g) + " not met)";
}

std::string and_list(const std::vector<std::string>& v, const char* last) {
  std::string out;
  for (std::size_t i = 0; i < v.size(); ++i)
    out += (i == 0 ? "" : i + 1 == v.size() ? std::string(" ") + last + " " : ", ") + v[i];
  return out;
}

std::string next_step_text(const NextStep& n) {
  std::vector<std::string> tests;
  for (PreloadTestKind k : n.tests) tests.push_back(preload_test_article_name(k));
  const std::string head = n.index.empty()
                               ? "No preload index was recorded"
                               : n.index_label + " cannot be read " + and_list(n.failed, "and");
  if (tests.empty())
    return head +
           "; the conditions recorded also rule out a tidal-volume challenge, an "
           "end-expiratory occlusion and passive leg raising.";
  return head + ": " + and_list(tests, "or") + " still applies.";
}

void add_next_step(NextStep n, Summary& out) {
  n.text = next_step_text(n);
  for (NextStep& m : out.next_steps) {
    if (m.text == n.text) {
      m.steps.push_back(n.steps.front());
      return;
    }
  }
  out.next_steps.push_back(std::move(n));
}

Summary summary_of(const TrialAnalysis& a, const View& v) {
  Summary out;
  summary_row(v.steps, 'm', "peep_total", "Total PEEP", out);
  summary_row(v.steps, 'm', "pplat", "Pplat", out);
  summary_row(v.steps, 'm', "driving_pressure", "Driving pressure", out);
  summary_row(v.steps, 'm', "compliance_static", "Crs", out);
  summary_row(v.steps, 'g', "pf_ratio", "PaO2/FiO2", out);
  summary_row(v.steps, 'g', "paco2", "PaCO2", out);
  summary_row(v.steps, 'c', "map", "MAP", out);
  const bool any_co = std::any_of(v.steps.begin(), v.steps.end(),
                                  [](const Step& s) { return find_cell(s.circulation, "co"); });
  if (any_co) {
    summary_row(v.steps, 'c', "co", "CO", out);
  } else {
    summary_row(v.steps, 'c', "ci", "CI", out);
  }
  summary_row(v.steps, 'g', "do2", "DO2", out);
  vasopressor_row(v.steps, out);
  summary_row(v.steps, 'g', "lactate", "Lactate", out);
  for (std::size_t i = 0; i < a.steps.size(); ++i) {
    const PreloadStatement& p = a.steps[i].preload_statement;
    // Not assessable on its own, the baseline of a manoeuvre points to it.
    const bool baseline = p.category == PreloadCategory::not_assessable &&
                          find_cell(v.steps[i].settings, "manoeuvre_baseline");
    out.preload.push_back(SummaryPreload{to_string(p.category),
                                         baseline ? "baseline" : statement_word(p.category),
                                         p.conditional, v.steps[i].statement.text});
  }
  for (const Finding& f : v.comparison) {
    if (f.key == to_string(FindingKind::trade_off)) out.trade_offs.push_back(f.text);
  }
  for (const bb::Finding& f : a.comparison) {
    const auto* m = std::get_if<ManoeuvreFinding>(&f.detail);
    if (!m || !m->fluid || !m->fluid->stop || f.steps.size() < 2) continue;
    std::vector<std::string> reached;
    for (const SafetyCheck& c : m->fluid->safety) {
      if (c.state == LimitState::reached) reached.push_back(safety_limit_name(c.limit));
    }
    out.stops.push_back(quoted(f.steps[1]) + " (" + display_name(m->kind) + " after " +
                        quoted(f.steps[0]) + "): stop: safety limit reached (" + join(reached) +
                        "), whatever the objective did.");
  }
  // A step that is the baseline of a test across steps (a manoeuvre or a tidal-volume
  // challenge read at the next step) needs no hint: that test is its reading.
  const auto baseline_of_a_test = [&](const StepAnalysis& s) {
    for (const StepAnalysis& t : a.steps) {
      for (const PreloadIndexReading& r : t.preload) {
        if (r.from_step == s.label && t.label != s.label) return true;
      }
    }
    return false;
  };
  for (const StepAnalysis& s : a.steps) {
    if (s.preload_statement.category != PreloadCategory::not_assessable) continue;
    if (!s.preload_statement.any_index && baseline_of_a_test(s)) continue;
    const std::vector<PreloadTestKind> tests = preload_tests_still_applicable(a, s);
    if (!s.preload_statement.any_index) {
      add_next_step(NextStep{{s.label}, "", "", {}, tests, ""}, out);
      continue;
    }
    for (const PreloadIndexReading& r : s.preload) {
      if (r.direction != PreloadDirection::not_valid) continue;
      NextStep n{{s.label}, r.key, index_short_label(r), {}, tests, ""};
      for (const Gate& g : r.gates) {
        if (g.state != GateState::failed) continue;
        const std::string why = failed_reason(g);
        if (std::find(n.failed.begin(), n.failed.end(), why) == n.failed.end())
          n.failed.push_back(why);
      }
      add_next_step(std::move(n), out);
    }
  }
  return out;
}

}  // namespace

View view_of(const TrialAnalysis& a) {
  return view_of(a, DisplayUnits::from(a.limits));
}

View view_of(const TrialAnalysis& a, const DisplayUnits& display) {
  View v;
  v.display = display;
  v.file = a.file;
  v.patient_label = a.patient.label;
  v.patient = patient_cells(a);
  v.reference = a.reference;
  for (const StepAnalysis& s : a.steps) v.steps.push_back(step_of(s, a.limits));
  mark_manoeuvre_baselines(a, v);
  for (const HeartLungComparison& h : a.heart_lung) v.heart_lung.push_back(heart_lung_of(h));
  v.date = a.date;
  v.trials = a.trials;
  v.references = a.references.empty() ? std::vector<std::string>{a.reference} : a.references;
  // Trials side by side: where each trial's best setting was, first.
  for (const BestAcrossTrials& b : a.best_across_trials) {
    const char* what = b.kind == FindingKind::best_compliance ? "Highest static compliance"
                       : b.kind == FindingKind::max_do2       ? "Highest O2 delivery"
                                                              : "Lowest driving pressure";
    std::string text = std::string(what) + ", trial by trial:";
    std::vector<std::string> steps;
    for (std::size_t i = 0; i < b.best.size() && i < a.trials.size(); ++i) {
      text += (i ? "; " : " ") + a.trials[i] +
              (b.best[i].empty() ? std::string(" none found") : " at '" + b.best[i] + "'");
      if (i < b.settings.size() && b.settings[i])
        text += " (" + best_settings_text(*b.settings[i]) + ")";
      if (!b.best[i].empty()) steps.push_back(a.trials[i] + " " + b.best[i]);
    }
    text += b.changed ? ". The best setting differs between the trials"
                      : ". The best setting is the same in each trial";
    const std::string changes = best_settings_changes(a.trials, b);
    text += changes.empty() ? "." : ": " + changes + ".";
    v.comparison.push_back(Finding{
        std::string("best_across_trials.") + to_string(b.kind), text, steps, {}, false, ""});
  }
  for (const bb::Finding& f : a.comparison)
    v.comparison.push_back(finding_of(a, f, display, v.notes));
  for (const UnanalysedWaveform& w : a.unanalysed_waveforms) {
    if (w.window_refused) {
      const InputError& e = *w.window_refused;
      std::string where;
      if (const auto& p = e.where())
        where =
            " (" + p->file + ":" + std::to_string(p->line) + ":" + std::to_string(p->column) + ")";
      v.notes.push_back("'" + w.step + "': waveform window not analysed: its " +
                        (e.field().ends_with("start") ? "start" : "end") + " " + e.value() + where +
                        " " + e.problem() + "; expected " + e.expected() +
                        ". The step is reported without its signals.");
      continue;
    }
    v.notes.push_back("'" + w.step + "': waveform file " + w.file +
                      " is recorded but not analysed in this report (use breathbeat wave).");
  }
  for (const TrialVoid& x : a.voided) {
    const std::string place =
        x.place.file + ":" + std::to_string(x.place.line) + ":" + std::to_string(x.place.column);
    v.voided.push_back(
        {x.step, x.reason, x.at, place, "'" + x.step + "', voided " + x.at + ": " + x.reason});
  }
  v.cautions = standard_cautions();
  // The four standing cautions (breathbeat/cautions.hpp) in a few words each.
  v.cautions_short = {"an aid to clinical judgement, never a substitute for it",
                      "each reading holds only under the conditions shown beside it",
                      "check every number against the patient and the devices",
                      "local protocols and licensed clinicians decide treatment"};
  v.summary = summary_of(a, v);
  for (const auto& [key, e] : a.thresholds_used)
    v.thresholds_used.emplace_back(
        key, format_number(e.value, 1) + " " + e.unit + " (" + e.source + ")");
  return v;
}

}  // namespace bb::report
