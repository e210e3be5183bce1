// The trial report in words: the typed trial analysis (breathbeat/trial/analysis.hpp)
// made into cells, labels and sentences. The area presenters word each area's
// results, with fields named as trial-file keys; this file words what the trial
// adds (the preload statement, the heart-lung comparison, the findings).
#include <algorithm>
#include <variant>

#include "breathbeat/body.hpp"
#include "breathbeat/cautions.hpp"
#include "breathbeat/present/echo.hpp"
#include "breathbeat/present/haemodynamics.hpp"
#include "breathbeat/present/heart_lung.hpp"
#include "breathbeat/present/infusion.hpp"
#include "breathbeat/present/ivc.hpp"
#include "breathbeat/present/mechanics.hpp"
#include "breathbeat/present/oxygen.hpp"
#include "report_view.hpp"

namespace bb::report {

namespace {

constexpr FieldContext kContext = FieldContext::trial_file;

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
  Shown s = as_number(in_percent(points), 1);
  s.unit = "points";
  s.ucum = "%";
  return s;
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
  add_if(c, "pinsp", "Inspiratory pressure (PC)", v.pinsp,
         [](Pressure p) { return as_cmH2O(p, 0); });
  add_if(c, "rr", "Respiratory rate", v.rr, [](Frequency f) { return as_per_min(f); });
  add_if(
      c, "ti", "Inspiratory time", s.ti, [](Time t) { return as_seconds(t); },
      v.ti ? "" : "from I:E and RR");
  if (v.ie_expiratory)
    c.push_back(word_cell("ie", "I:E", "1:" + format_number(*v.ie_expiratory, 1)));
  add_if(c, "fio2", "FiO2", v.fio2, [](Ratio r) { return as_percent(r, 0); });
  add_if(c, "flow", "Inspiratory flow", v.flow, [](Flow f) { return as_L_per_min(f, 0); });
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
  if (k.rhythm_regular)
    c.push_back(word_cell("regular_rhythm", "Rhythm", *k.rhythm_regular ? "regular" : "irregular"));
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
                          yes_no(!*k.spontaneous_effort)));
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
                                          k.pp_cycles.empty() ? "monitor" : "per-breath mean"));
  }
  if (k.svv)
    out.circulation.push_back(number_cell("svv", "Stroke volume variation", as_percent(*k.svv)));
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
    }
  }
}

Statement statement_of(const PreloadStatement& s) {
  Statement out;
  out.category = to_string(s.category);
  out.supporting = s.supporting;
  out.grey_zone = s.grey_zone;
  for (const FailedGate& g : s.failed_gates) out.failed_gates.push_back(g.index + ": " + g.gate);
  const std::string grey = s.grey_zone.empty() ? "" : "; in the grey zone: " + join(s.grey_zone);
  switch (s.category) {
    case PreloadCategory::not_assessable:
      out.text = s.any_index
                     ? "Not assessable: no index is valid under its conditions at this step."
                     : "Not assessable: no preload index was recorded at this step.";
      break;
    case PreloadCategory::indeterminate:
      if (!s.responsive.empty() && !s.unresponsive.empty()) {
        out.text = "Indeterminate: valid indices disagree (responsive: " + join(s.responsive) +
                   "; not responsive: " + join(s.unresponsive) + ")" + grey + ".";
      } else {
        out.text =
            "Indeterminate: the valid indices sit in their grey zone (" + join(s.grey_zone) + ").";
      }
      break;
    case PreloadCategory::likely_responsive:
      out.text = "Likely preload responsive, supported by: " + join(s.supporting) + grey + ".";
      break;
    case PreloadCategory::unlikely:
      out.text =
          "Preload responsiveness unlikely, supported by: " + join(s.supporting) + grey + ".";
      break;
  }
  return out;
}

Step step_of(const StepAnalysis& s, const Thresholds& limits) {
  Step out;
  out.label = s.label;
  out.time = s.time;
  settings_cells(s, out);
  mechanics_cells(s, limits, out);
  gas_cells(s, limits, out);
  circulation_cells(s, out);
  ppv_cells(s, out);
  const std::vector<Cell> ivc_values = ivc_cells(s, limits, out);
  preload_indices(s, limits, ivc_values, out);
  out.statement = statement_of(s.preload_statement);
  return out;
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
                    ratio_range(*e.venous_return_gradient_change, true), "upper bound"));
  }
  for (const HeartLungNote n : e.notes) {
    out.notes.push_back(heart_lung_note_text(n, e));
    out.once_only.push_back(n == HeartLungNote::peep_change_transmitted);
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

Finding finding_of(const TrialAnalysis& a, const bb::Finding& f, std::vector<std::string>& notes) {
  Finding out{to_string(f.kind), "", f.steps, {}, f.flagged, f.source};
  const std::string first = f.steps.empty() ? "" : f.steps.front();
  const std::string second = f.steps.size() > 1 ? f.steps[1] : "";
  switch (f.kind) {
    case FindingKind::best_compliance: {
      const Shown v =
          as_mL_per_cmH2O(std::get<Compliance>(std::get<BestStepFinding>(f.detail).value));
      out.text = "Highest static compliance at '" + first + "' (" + format_shown(v) + ").";
      out.values = {number_cell("compliance_static", "Static compliance", v)};
      break;
    }
    case FindingKind::max_do2: {
      const Shown v = as_mL_per_min(std::get<Flow>(std::get<BestStepFinding>(f.detail).value));
      out.text = "Highest O2 delivery at '" + first + "' (" + format_shown(v) + ").";
      out.values = {number_cell("do2", "O2 delivery", v)};
      break;
    }
    case FindingKind::lowest_driving_pressure: {
      const Shown v = as_cmH2O(std::get<Pressure>(std::get<BestStepFinding>(f.detail).value));
      out.text = "Lowest driving pressure at '" + first + "' (" + format_shown(v) + ").";
      out.values = {number_cell("driving_pressure", "Driving pressure", v)};
      break;
    }
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
                 " against '" + second + "' (" +
                 format_shown(measure_shown(d.measure, d.best_value)) + "); falls of " +
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
                   format_shown(as_mmHg(d.reference)) + ").";
      } else {
        out.text = "PaO2/FiO2 highest at '" + first + "': " + format_shown(as_mmHg(d.best)) +
                   " against " + format_shown(as_mmHg(d.reference)) + " at the reference '" +
                   second + "' (" + percent_text(d.gain) + ").";
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
                        as_fraction(r.ratio))};
        out.text = "'" + first + "': recruitment-to-inflation ratio " +
                   format_number(in_fraction(r.ratio), 2) +
                   (r.high_recruitability ? " (at or above " : " (below ") +
                   format_number(in_fraction(r.high_recruitability_at), 2) + ": " +
                   (r.high_recruitability ? "suggests high recruitability"
                                          : "suggests low recruitability") +
                   ").";
        for (const RecruitmentNote n : r.notes)
          notes.push_back("R/I at '" + first + "': " + recruitment_note_text(n, r));
      }
      break;
    }
    case FindingKind::vt_challenge: {
      const auto& d = std::get<VtChallengeFinding>(f.detail);
      if (!d.result) {
        out.text = "Steps '" + first + "' and '" + second +
                   "' differ only in VT (6 -> 8 mL/kg PBW) but PPV was not recorded at both: no "
                   "tidal-volume challenge result.";
        break;
      }
      out.values = {number_cell("ppv_change", "PPV change", as_points(d.result->change), "points")};
      out.text = "Tidal-volume challenge '" + first + "' -> '" + second + "': PPV " +
                 format_number(in_percent(*d.ppv_low), 1) + " -> " +
                 format_number(in_percent(*d.ppv_high), 1) + " % (change " +
                 format_number(in_percent(d.result->change), 1) +
                 " points): " + d.result->reading.text;
      break;
    }
    case FindingKind::trade_off: {
      const auto& d = std::get<TradeOffFinding>(f.detail);
      out.text = "Trade-off: '" + first + "' has the highest PaO2/FiO2 (" +
                 format_shown(as_mmHg(d.pf_ratio)) + ") and a haemodynamic cost:";
      for (std::size_t i = 0; i < d.costs.size(); ++i) {
        out.text += (i ? ", " : " ") + std::string(measure_name(d.costs[i].measure)) + " " +
                    percent_text(d.costs[i].change) + " against '" + d.costs[i].against + "'";
      }
      out.text += ".";
      if (d.ppv) {
        out.text += " PPV there is " + format_number(in_percent(*d.ppv), 1) +
                    " % (preload statement: " + plain_words(to_string(d.statement)) + ").";
      }
      out.text += " Weighing oxygenation against circulation is a clinical decision.";
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

}  // namespace

View view_of(const TrialAnalysis& a) {
  View v;
  v.file = a.file;
  v.patient_label = a.patient.label;
  v.patient = patient_cells(a);
  v.reference = a.reference;
  for (const StepAnalysis& s : a.steps) v.steps.push_back(step_of(s, a.limits));
  for (const HeartLungComparison& h : a.heart_lung) v.heart_lung.push_back(heart_lung_of(h));
  for (const bb::Finding& f : a.comparison) v.comparison.push_back(finding_of(a, f, v.notes));
  for (const UnanalysedWaveform& w : a.unanalysed_waveforms) {
    v.notes.push_back("'" + w.step + "': waveform file " + w.file +
                      " is recorded but not analysed in this report (use breathbeat wave).");
  }
  v.cautions = standard_cautions();
  for (const auto& [key, e] : a.thresholds_used)
    v.thresholds_used.emplace_back(
        key, format_number(e.value, 1) + " " + e.unit + " (" + e.source + ")");
  return v;
}

}  // namespace bb::report
