// Per-step analysis: gathers each calculator's inputs from the step, calls the
// calculator and arranges its answer into report cells and preload readings.
#include <algorithm>

#include "breathbeat/body.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "trial_echo.hpp"
#include "trial_internal.hpp"

namespace bb {

// ---- inputs ---------------------------------------------------------------------

MechanicsInputs trial_mechanics_inputs(const TrialPatient& patient, const TrialStep& step) {
  MechanicsInputs in;
  in.sex = patient.sex;
  in.height = patient.height;
  in.mode = step.ventilator.mode;
  in.vt = step.ventilator.vt;
  in.peep_total = step.hold.peep_total;
  in.set_peep = step.ventilator.set_peep;
  in.pplat = step.hold.pplat;
  in.ppeak = step.hold.ppeak;
  in.pinsp = step.ventilator.pinsp;
  in.rr = step.ventilator.rr;
  in.ti = trial_inspiratory_time(step.ventilator);
  in.flow = step.ventilator.flow;
  in.pes_ee = step.hold.pes_ee;
  in.pes_ei = step.hold.pes_ei;
  in.paco2 = step.gases.paco2;
  return in;
}

OxygenInputs trial_oxygen_inputs(const TrialPatient& patient, const TrialStep& step,
                                 std::optional<Pressure> pmean) {
  OxygenInputs in;
  in.hb = step.gases.hb;
  in.sao2 = step.gases.sao2;
  in.spo2 = step.gases.spo2;
  in.pao2 = step.gases.pao2;
  in.paco2 = step.gases.paco2;
  in.fio2 = step.ventilator.fio2;
  in.svo2 = step.gases.svo2 ? step.gases.svo2 : step.gases.scvo2;
  in.pvo2 = step.gases.pvo2;
  in.co = step.circulation.co;
  in.pmean = pmean;
  in.peep = step.hold.peep_total ? step.hold.peep_total : step.ventilator.set_peep;
  in.sex = patient.sex;
  in.height = patient.height;
  in.weight = patient.weight;
  in.age_years = patient.age_years;
  return in;
}

std::optional<IvcInputs> trial_ivc_inputs(const TrialPatient& patient, const TrialStep& step) {
  const TrialUltrasound& u = step.ultrasound;
  if (!u.ivc_dmax && !u.ivc_dmin) return std::nullopt;
  IvcInputs in;
  in.dmax = u.ivc_dmax;
  in.dmin = u.ivc_dmin;
  in.breathing = u.ivc_breathing;
  if (patient.sex && patient.height && step.ventilator.vt) {
    in.vt_per_kg = tidal_volume_per_kg(*step.ventilator.vt,
                                       predicted_body_weight(*patient.sex, *patient.height));
  }
  in.effort_seen = step.circulation.spontaneous_effort;
  in.iah = step.circulation.intra_abdominal_hypertension;
  in.rv_failure = step.circulation.rv_failure;
  return in;
}

InfusionSet trial_infusion_set(const TrialPatient& patient, const TrialStep& step) {
  InfusionSet set;
  set.weight = patient.weight;
  for (const TrialInfusion& inf : step.infusions) {
    if (inf.parsed) set.infusions.push_back(*inf.parsed);
  }
  return set;
}

PpvConditions trial_ppv_conditions(const TrialStep& step, const MechanicsResults& m) {
  const TrialCirculation& c = step.circulation;
  PpvConditions k;
  if (c.spontaneous_effort) k.passive = !*c.spontaneous_effort;
  k.regular_rhythm = c.rhythm_regular;
  k.vt_per_kg = m.vt_per_kg;
  k.hr = c.hr;
  k.rr = step.ventilator.rr;
  k.crs = m.compliance_static;
  if (c.chest_open) k.closed_chest = !*c.chest_open;
  k.intra_abdominal_hypertension = c.intra_abdominal_hypertension;
  k.rv_failure = c.rv_failure;
  return k;
}

const char* to_string(PreloadDirection d) {
  switch (d) {
    case PreloadDirection::responsive:
      return "responsive";
    case PreloadDirection::unresponsive:
      return "unresponsive";
    case PreloadDirection::grey_zone:
      return "grey_zone";
    case PreloadDirection::not_valid:
      return "not_valid";
  }
  return "not_valid";
}

namespace {

Cell number_cell(std::string key, std::string label, Shown shown, std::string note = "") {
  return Cell{std::move(key), std::move(label), std::move(shown), "", std::move(note)};
}
Cell word_cell(std::string key, std::string label, std::string text, std::string note = "") {
  return Cell{std::move(key), std::move(label), std::nullopt, std::move(text), std::move(note)};
}
std::vector<Cell> cells_of(const std::vector<Item>& items,
                           const std::vector<std::string>& skip = {}) {
  std::vector<Cell> out;
  for (const Item& i : items) {
    if (std::find(skip.begin(), skip.end(), i.key) != skip.end()) continue;
    out.push_back(number_cell(i.key, i.label, i.shown, i.note));
  }
  return out;
}
template <class Q, class P>
void add_if(std::vector<Cell>& cells, const char* key, const char* label, const std::optional<Q>& v,
            P present, const std::string& note = "") {
  if (v) cells.push_back(number_cell(key, label, present(*v), note));
}
std::string yes_no(bool b) {
  return b ? "yes" : "no";
}

// ---- sections -------------------------------------------------------------------

void settings_section(const TrialStep& step, const MechanicsResults& m, StepAnalysis& out) {
  const TrialVentilator& v = step.ventilator;
  auto& c = out.settings;
  if (v.mode)
    c.push_back(word_cell("mode", "Mode", *v.mode == VentMode::pressure_control ? "pc" : "vc"));
  add_if(c, "set_peep", "Set PEEP", v.set_peep, [](Pressure p) { return as_cmH2O(p, 0); });
  add_if(c, "vt", "Tidal volume", v.vt, [](Volume x) { return as_mL(x); });
  add_if(c, "vt_per_kg_pbw", "VT per kg PBW", m.vt_per_kg,
         [](VolumePerMass x) { return as_mL_per_kg(x); });
  add_if(c, "pinsp", "Inspiratory pressure (PC)", v.pinsp,
         [](Pressure p) { return as_cmH2O(p, 0); });
  add_if(c, "rr", "Respiratory rate", v.rr, [](Frequency f) { return as_per_min(f); });
  const auto ti = trial_inspiratory_time(v);
  add_if(
      c, "ti", "Inspiratory time", ti, [](Time t) { return as_seconds(t); },
      v.ti ? "" : "from I:E and RR");
  if (v.ie_expiratory)
    c.push_back(word_cell("ie", "I:E", "1:" + format_number(*v.ie_expiratory, 1)));
  add_if(c, "fio2", "FiO2", v.fio2, [](Ratio r) { return as_percent(r, 0); });
  add_if(c, "flow", "Inspiratory flow", v.flow, [](Flow f) { return as_L_per_min(f, 0); });
}

void mechanics_section(const TrialStep& step, const MechanicsInputs& in, const MechanicsResults& m,
                       const Thresholds& limits, StepAnalysis& out) {
  const TrialHold& h = step.hold;
  auto& c = out.mechanics;
  add_if(c, "ppeak", "Peak pressure", h.ppeak, [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "pplat", "Plateau pressure", h.pplat, [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "peep_total", "Total PEEP (expiratory hold)", h.peep_total,
         [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "pes_ee", "Oesophageal pressure, end-exp.", h.pes_ee,
         [](Pressure p) { return as_cmH2O(p); });
  add_if(c, "pes_ei", "Oesophageal pressure, end-insp.", h.pes_ei,
         [](Pressure p) { return as_cmH2O(p); });
  const Answer a = describe_mechanics(in, m, limits);
  for (Cell& cell : cells_of(a.results, {"pbw", "vt_per_kg_pbw"})) c.push_back(std::move(cell));
  for (const Flag& f : a.flags) out.flags.push_back(f);
  for (const std::string& n : m.notes) out.notes.push_back(n);
}

void gas_section(const TrialStep& step, const OxygenInputs& in, const OxygenResults& r,
                 const Thresholds& limits, StepAnalysis& out) {
  const TrialGases& g = step.gases;
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
  const Answer a = describe_oxygen(in, r, limits);
  for (Cell& cell : cells_of(a.results, {"bsa", "co", "co_used", "cardiac_index"}))
    c.push_back(std::move(cell));
  if (a.reading)
    c.push_back(word_cell("berlin_category", "Berlin oxygenation band", a.reading->category));
  for (const Flag& f : a.flags) out.flags.push_back(f);
  if (!g.svo2 && g.scvo2) {
    out.notes.push_back("ScvO2 (central venous) stands in for SvO2 in the venous O2 content.");
  }
  for (const std::string& n : r.notes) out.notes.push_back(n);
}

void circulation_section(const TrialPatient& patient, const TrialStep& step,
                         const OxygenResults& oxy, const Thresholds& limits, StepAnalysis& out) {
  const TrialCirculation& k = step.circulation;
  auto& c = out.circulation;
  add_if(c, "hr", "Heart rate", k.hr, [](Frequency f) { return as_per_min(f); });
  if (k.rhythm_regular)
    c.push_back(word_cell("rhythm", "Rhythm", *k.rhythm_regular ? "regular" : "irregular"));
  add_if(c, "sbp", "Systolic pressure", k.sbp, [](Pressure p) { return as_mmHg(p); });
  add_if(c, "dbp", "Diastolic pressure", k.dbp, [](Pressure p) { return as_mmHg(p); });
  out.map = k.map;
  std::string map_note;
  if (!k.map && k.sbp && k.dbp) {
    out.map = mean_arterial_pressure_estimate(*k.sbp, *k.dbp);
    map_note = "estimated DBP + (SBP - DBP)/3";
  }
  add_if(
      c, "map", "Mean arterial pressure", out.map, [](Pressure p) { return as_mmHg(p); }, map_note);
  add_if(c, "cvp", "Central venous pressure", k.cvp, [](Pressure p) { return as_mmHg(p); });
  add_if(c, "pmsf", "Mean systemic filling pressure", k.pmsf,
         [](Pressure p) { return as_mmHg(p); });
  add_if(
      c, "co", "Cardiac output", k.co, [](Flow f) { return as_L_per_min(f, 2); },
      k.co_method.value_or(""));
  if (k.spontaneous_effort)
    c.push_back(
        word_cell("spontaneous_effort", "Spontaneous effort", yes_no(*k.spontaneous_effort)));
  if (k.chest_open) c.push_back(word_cell("chest_open", "Chest open", yes_no(*k.chest_open)));
  if (k.intra_abdominal_hypertension) {
    c.push_back(word_cell("intra_abdominal_hypertension", "Intra-abdominal hypertension",
                          yes_no(*k.intra_abdominal_hypertension)));
  }
  if (k.rv_failure)
    c.push_back(word_cell("rv_failure", "Right-ventricular failure", yes_no(*k.rv_failure)));
  add_if(c, "ci", "Cardiac index", oxy.ci_used, [](FlowPerArea f) {
    return Shown{in_L_per_min_per_m2(f), "L/min/m2", "L/min/m2", 2, {}, {}};
  });
  const TrialUltrasound& u = step.ultrasound;
  add_if(c, "lvot_diameter", "LVOT diameter", u.lvot_diameter,
         [](Length l) { return as_cm(l, 2); });
  add_if(c, "vti", "LVOT VTI", u.vti, [](Length l) { return as_cm(l); });
  for (Cell& cell : cells_of(trial_echo_items(patient, step, out.notes)))
    c.push_back(std::move(cell));
  const InfusionSet set = trial_infusion_set(patient, step);
  if (set.infusions.empty()) return;
  const InfusionResults r = analyse_infusions(set, limits);
  for (Cell& cell : cells_of(describe_infusions(set, r).results)) c.push_back(std::move(cell));
  for (const auto& n : r.notes) out.notes.push_back("Infusions: " + n);
}

// ---- preload ----------------------------------------------------------------------

PreloadDirection direction_of(const Reading& reading, const std::vector<Gate>& gates) {
  if (any_gate_failed(gates)) return PreloadDirection::not_valid;
  const std::string& k = reading.category;
  if (k == "above_grey_zone" || k == "above_threshold" || k == kIvcResponsive)
    return PreloadDirection::responsive;
  if (k == "below_grey_zone" || k == "below_threshold" || k == kIvcNotResponsive)
    return PreloadDirection::unresponsive;
  if (k == "grey_zone" || k == "device_dependent_zone" || k == "between_cut_offs" ||
      k == kIvcDiscordant) {
    return PreloadDirection::grey_zone;
  }
  return PreloadDirection::not_valid;
}

PreloadIndexReading index_reading(std::string key, std::string label, std::vector<Cell> values,
                                  std::vector<Gate> gates, Reading reading) {
  PreloadIndexReading r;
  r.key = std::move(key);
  r.label = std::move(label);
  r.values = std::move(values);
  r.direction = direction_of(reading, gates);
  r.conditional = r.direction != PreloadDirection::not_valid && any_gate_unknown(gates);
  r.gates = std::move(gates);
  r.reading = std::move(reading);
  return r;
}

void ppv_readings(const TrialStep& step, const MechanicsResults& m, const Thresholds& limits,
                  StepAnalysis& out) {
  const TrialCirculation& k = step.circulation;
  const PpvConditions cond = trial_ppv_conditions(step, m);
  if (!k.pp_cycles.empty()) {
    PpvInputs in;
    in.cycles = k.pp_cycles;
    in.conditions = cond;
    try {
      validate_ppv(in, limits);
      const PpvResults r = analyse_ppv(in, limits);
      if (r.ppv && r.reading) {
        out.ppv = r.ppv;
        out.preload.push_back(index_reading("ppv", "Pulse pressure variation (per breath)",
                                            {number_cell("ppv", "PPV", as_percent(*r.ppv))},
                                            r.gates, *r.reading));
      }
    } catch (const InputError& e) {
      out.notes.push_back("PPV from pulse-pressure cycles not computed: " + std::string(e.what()));
    }
  }
  if (k.ppv_monitor) {
    if (!out.ppv) out.ppv = k.ppv_monitor;
    const std::vector<Gate> gates = ppv_gates(cond, limits);
    const bool from_signals = k.signals_origin.has_value();
    out.preload.push_back(index_reading(
        from_signals ? "ppv_signals" : "ppv_monitor",
        from_signals ? "Pulse pressure variation (from recorded signals)"
                     : "Pulse pressure variation (monitor)",
        {number_cell(from_signals ? "ppv_signals" : "ppv_monitor",
                     from_signals ? "PPV (signals)" : "PPV (monitor)", as_percent(*k.ppv_monitor))},
        gates, read_ppv(*k.ppv_monitor, gates, limits)));
    if (from_signals) out.notes.push_back(*k.signals_origin);
  }
  if (k.svv) {
    const std::vector<Gate> gates = ppv_gates(cond, limits);
    out.preload.push_back(index_reading("svv", "Stroke volume variation",
                                        {number_cell("svv", "SVV", as_percent(*k.svv))}, gates,
                                        read_svv(*k.svv, gates, limits)));
  }
  if (out.ppv) {
    out.circulation.push_back(number_cell("ppv", "Pulse pressure variation", as_percent(*out.ppv),
                                          k.pp_cycles.empty() ? "monitor" : "per-breath mean"));
  }
  if (k.svv)
    out.circulation.push_back(number_cell("svv", "Stroke volume variation", as_percent(*k.svv)));
}

void ivc_reading(const TrialPatient& patient, const TrialStep& step, const Thresholds& limits,
                 StepAnalysis& out) {
  const auto in = trial_ivc_inputs(patient, step);
  if (!in || !in->dmax || !in->dmin) return;
  const IvcResults r = analyse_ivc(*in, limits);
  const Answer a = describe_ivc(*in, r, limits);
  out.circulation.push_back(number_cell("ivc_dmax", "IVC diameter, widest", as_cm(*in->dmax)));
  out.circulation.push_back(number_cell("ivc_dmin", "IVC diameter, narrowest", as_cm(*in->dmin)));
  std::vector<Cell> values = cells_of(a.results);
  for (const Cell& v : values) out.circulation.push_back(v);
  for (const std::string& n : r.notes) out.notes.push_back("IVC: " + n);
  if (r.reading.category == kIvcNotApplicable) return;
  out.preload.push_back(index_reading("ivc", "IVC respiratory change", values, r.gates, r.reading));
}

void preload_test_readings(const TrialStep& step, const Thresholds& limits, StepAnalysis& out) {
  for (const TrialPreloadTest& t : step.preload_tests) {
    const PreloadTestResult r = analyse_preload_test(t.inputs, limits);
    const Answer a = describe_preload_test(t.inputs, r, limits);
    const std::string key = to_string(t.inputs.kind);
    out.preload.push_back(
        index_reading(key, a.title, cells_of(a.results), r.conditions, r.reading));
    for (const Flag& f : r.flags) out.flags.push_back(f);
    for (const std::string& n : r.notes) out.notes.push_back(key + ": " + n);
  }
}

}  // namespace

// ---- the preload statement --------------------------------------------------------

PreloadStatement preload_statement(const std::vector<PreloadIndexReading>& indices) {
  PreloadStatement s;
  std::vector<std::string> responsive, unresponsive;
  for (const auto& i : indices) {
    for (const Gate& g : i.gates) {
      if (g.state == GateState::failed) s.failed_gates.push_back(i.key + ": " + g.key);
    }
    switch (i.direction) {
      case PreloadDirection::responsive:
        responsive.push_back(i.key);
        break;
      case PreloadDirection::unresponsive:
        unresponsive.push_back(i.key);
        break;
      case PreloadDirection::grey_zone:
        s.grey_zone.push_back(i.key);
        break;
      case PreloadDirection::not_valid:
        break;
    }
  }
  auto join = [](const std::vector<std::string>& v) {
    std::string out;
    for (const auto& x : v) out += (out.empty() ? "" : ", ") + x;
    return out;
  };
  const std::string grey = s.grey_zone.empty() ? "" : "; in the grey zone: " + join(s.grey_zone);
  if (responsive.empty() && unresponsive.empty() && s.grey_zone.empty()) {
    s.category = "not_assessable";
    s.text = indices.empty()
                 ? "Not assessable: no preload index was recorded at this step."
                 : "Not assessable: no index is valid under its conditions at this step.";
    return s;
  }
  if (!responsive.empty() && !unresponsive.empty()) {
    s.category = "indeterminate";
    s.supporting = responsive;
    s.supporting.insert(s.supporting.end(), unresponsive.begin(), unresponsive.end());
    s.text = "Indeterminate: valid indices disagree (responsive: " + join(responsive) +
             "; not responsive: " + join(unresponsive) + ")" + grey + ".";
    return s;
  }
  if (responsive.empty() && unresponsive.empty()) {
    s.category = "indeterminate";
    s.supporting = s.grey_zone;
    s.text = "Indeterminate: the valid indices sit in their grey zone (" + join(s.grey_zone) + ").";
    return s;
  }
  const bool yes = !responsive.empty();
  s.category = yes ? "likely_responsive" : "unlikely";
  s.supporting = yes ? responsive : unresponsive;
  s.text = std::string(yes ? "Likely preload responsive" : "Preload responsiveness unlikely") +
           ", supported by: " + join(s.supporting) + grey + ".";
  return s;
}

StepAnalysis analyse_step(const TrialPatient& patient, const TrialStep& step,
                          const Thresholds& limits) {
  StepAnalysis out;
  out.label = step.label;
  out.time = step.time;
  const MechanicsInputs mi = trial_mechanics_inputs(patient, step);
  out.mechanics_results = analyse_mechanics(mi);
  const MechanicsResults& m = out.mechanics_results;
  settings_section(step, m, out);
  mechanics_section(step, mi, m, limits, out);
  const OxygenInputs oi = trial_oxygen_inputs(patient, step, m.mean_airway_pressure);
  out.oxygen_results = analyse_oxygen(oi, limits);
  gas_section(step, oi, out.oxygen_results, limits, out);
  circulation_section(patient, step, out.oxygen_results, limits, out);
  ppv_readings(step, m, limits, out);
  ivc_reading(patient, step, limits, out);
  preload_test_readings(step, limits, out);
  out.preload_statement = preload_statement(out.preload);
  return out;
}

}  // namespace bb
