// Per-step analysis: gathers each calculator's inputs from the step, calls the
// calculator and keeps its typed results and the preload readings. No words:
// the presenters (src/present/report_*.cpp) make the report from these.
#include <algorithm>

#include "breathbeat/body.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "trial_internal.hpp"

namespace bb {

// ---- inputs ---------------------------------------------------------------------

std::optional<Time> trial_inspiratory_time(const TrialVentilator& v) {
  if (v.ti) return v.ti;
  if (!v.ie_expiratory || !v.rr) return std::nullopt;
  return breath_period(*v.rr) * (1.0 / (1.0 + *v.ie_expiratory));
}

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
  in.pc_pressure_total = step.ventilator.pc_pressure_total;
  in.pc_pressure_above_peep = step.ventilator.pc_pressure_above_peep;
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
  // The measured mean airway pressure, else the mechanics estimate (marked as such).
  in.pmean = step.ventilator.pmean ? step.ventilator.pmean : pmean;
  in.pmean_estimated = !step.ventilator.pmean && pmean;
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
  in.passive_from_signals = step.circulation.passive_from_signals;
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
  k.passive_from_signals = c.passive_from_signals;
  k.rhythm_from_signals = c.rhythm_from_signals;
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

const char* to_string(PreloadCategory c) {
  switch (c) {
    case PreloadCategory::likely_responsive:
      return "likely_responsive";
    case PreloadCategory::unlikely:
      return "unlikely";
    case PreloadCategory::indeterminate:
      return "indeterminate";
    case PreloadCategory::not_assessable:
      return "not_assessable";
  }
  return "not_assessable";
}

// ---- preload ----------------------------------------------------------------------

// The reading itself weighs its conditions by direction (condition_bias.hpp): a
// failed condition leaves the direction it does not bias.
PreloadDirection preload_direction(const Reading& reading) {
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

PreloadIndexReading preload_reading(std::string key, PreloadIndex index, std::vector<Gate> gates,
                                    Reading reading) {
  PreloadIndexReading r;
  r.key = std::move(key);
  r.index = index;
  r.direction = preload_direction(reading);
  r.conditional = r.direction != PreloadDirection::not_valid && reading.conditional;
  r.gates = std::move(gates);
  r.reading = std::move(reading);
  return r;
}

namespace {

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
      StepPpv ppv{in, analyse_ppv(in, limits)};
      const PpvResults& r = ppv.results;
      if (r.ppv && r.reading) {
        out.ppv = r.ppv;
        PreloadIndexReading idx = preload_reading("ppv", PreloadIndex::ppv, r.gates, *r.reading);
        idx.value = r.ppv;
        out.preload.push_back(std::move(idx));
      }
      out.ppv_cycles = std::move(ppv);
    } catch (const InputError& e) {
      out.ppv_cycles_rejected = e;
    }
  }
  if (k.ppv_monitor) {
    if (!out.ppv) out.ppv = k.ppv_monitor;
    const std::vector<Gate> gates = ppv_gates(cond, limits);
    const bool from_signals = k.signals_origin.has_value();
    PreloadIndexReading idx =
        preload_reading(from_signals ? "ppv_signals" : "ppv_monitor",
                        from_signals ? PreloadIndex::ppv_signals : PreloadIndex::ppv_monitor, gates,
                        read_ppv(*k.ppv_monitor, gates, limits));
    idx.value = k.ppv_monitor;
    out.preload.push_back(std::move(idx));
  }
  if (k.svv) {
    const std::vector<Gate> gates = ppv_gates(cond, limits);
    PreloadIndexReading idx =
        preload_reading("svv", PreloadIndex::svv, gates, read_svv(*k.svv, gates, limits));
    idx.value = k.svv;
    out.preload.push_back(std::move(idx));
  }
}

void ivc_reading(const TrialPatient& patient, const TrialStep& step, const Thresholds& limits,
                 StepAnalysis& out) {
  const auto in = trial_ivc_inputs(patient, step);
  if (!in || !in->dmax || !in->dmin) return;
  out.ivc = StepIvc{*in, analyse_ivc(*in, limits)};
  const IvcResults& r = out.ivc->results;
  if (r.reading.category == kIvcNotApplicable) return;
  out.preload.push_back(preload_reading("ivc", PreloadIndex::ivc, r.gates, r.reading));
}

void preload_test_readings(const TrialStep& step, const MechanicsResults& m,
                           const Thresholds& limits, StepAnalysis& out) {
  const TrialCirculation& c = step.circulation;
  for (const TrialPreloadTest& recorded : step.preload_tests) {
    TrialPreloadTest t = recorded;
    // The step's facts, including what its recorded signals showed, where the test said none.
    if (!t.inputs.passive && c.spontaneous_effort) {
      t.inputs.passive = !*c.spontaneous_effort;
      t.inputs.passive_from_signals = c.passive_from_signals;
    }
    t.inputs.challenge_conditions = trial_ppv_conditions(step, m);
    const PreloadTestResult r = analyse_preload_test(t.inputs, limits);
    PreloadIndexReading idx =
        preload_reading(id_of(t.inputs.kind), PreloadIndex::preload_test, r.conditions, r.reading);
    idx.test_inputs = t.inputs;
    idx.test = r;
    out.preload.push_back(std::move(idx));
  }
}

}  // namespace

// ---- the preload statement --------------------------------------------------------

const char* to_string(PreloadMeasurement m) {
  switch (m) {
    case PreloadMeasurement::arterial_swing:
      return "arterial_swing";
    case PreloadMeasurement::ivc_diameters:
      return "ivc_diameters";
    case PreloadMeasurement::end_expiratory_occlusion:
      return "end_expiratory_occlusion";
    case PreloadMeasurement::passive_leg_raising:
      return "passive_leg_raising";
    case PreloadMeasurement::fluid_challenge:
      return "fluid_challenge";
    case PreloadMeasurement::mini_fluid_challenge:
      return "mini_fluid_challenge";
  }
  return "arterial_swing";
}

PreloadMeasurement measurement_of(const PreloadIndexReading& r) {
  switch (r.index) {
    case PreloadIndex::ppv:
    case PreloadIndex::ppv_monitor:
    case PreloadIndex::ppv_signals:
    case PreloadIndex::svv:
    case PreloadIndex::vt_challenge:
      return PreloadMeasurement::arterial_swing;
    case PreloadIndex::ivc:
      return PreloadMeasurement::ivc_diameters;
    case PreloadIndex::preload_test:
    case PreloadIndex::manoeuvre:  // the same measurement as the test recorded at one step
      break;
  }
  switch (r.test ? r.test->kind : PreloadTestKind::vt_challenge) {
    case PreloadTestKind::vt_challenge:
      return PreloadMeasurement::arterial_swing;
    case PreloadTestKind::end_expiratory_occlusion:
      return PreloadMeasurement::end_expiratory_occlusion;
    case PreloadTestKind::passive_leg_raising:
      return PreloadMeasurement::passive_leg_raising;
    case PreloadTestKind::fluid_challenge:
      return PreloadMeasurement::fluid_challenge;
    case PreloadTestKind::mini_fluid_challenge:
      return PreloadMeasurement::mini_fluid_challenge;
  }
  return PreloadMeasurement::arterial_swing;
}

namespace {

// The supporting indices grouped by measurement, and the open conditions of the
// supporting readings (each condition once).
// Whether a reading is one the statement rests on: by its direction, never by its key (two
// readings may share one, e.g. a challenge within the step and one between steps).
bool supports(const PreloadIndexReading& i, const PreloadStatement& s) {
  switch (i.direction) {
    case PreloadDirection::responsive:
      return s.category != PreloadCategory::unlikely;
    case PreloadDirection::unresponsive:
      return s.category != PreloadCategory::likely_responsive;
    case PreloadDirection::grey_zone:
      return s.responsive.empty() && s.unresponsive.empty();
    case PreloadDirection::not_valid:
      return false;
  }
  return false;
}

void weigh_support(const std::vector<PreloadIndexReading>& indices, PreloadStatement& s) {
  for (const auto& i : indices) {
    if (!supports(i, s)) continue;
    const PreloadMeasurement m = measurement_of(i);
    auto it = std::find_if(s.measurements.begin(), s.measurements.end(),
                           [&](const MeasurementSupport& x) { return x.measurement == m; });
    if (it == s.measurements.end()) {
      s.measurements.push_back({m, {}});
      it = s.measurements.end() - 1;
    }
    it->indices.push_back(i.key);
    if (!i.conditional) continue;
    s.conditional = true;
    for (const std::string& key : i.reading.open_conditions) {
      const auto seen = std::find_if(s.open_conditions.begin(), s.open_conditions.end(),
                                     [&](const OpenCondition& o) { return o.gate == key; });
      if (seen != s.open_conditions.end()) continue;
      for (const Gate& g : i.gates) {
        if (g.key == key) s.open_conditions.push_back({i.key, g.key, g, g.state});
      }
    }
  }
}

}  // namespace

PreloadStatement preload_statement(const std::vector<PreloadIndexReading>& indices) {
  PreloadStatement s;
  s.any_index = !indices.empty();
  for (const auto& i : indices) {
    for (const Gate& g : i.gates) {
      if (g.state == GateState::failed) s.failed_gates.push_back({i.key, g.key});
    }
    switch (i.direction) {
      case PreloadDirection::responsive:
        s.responsive.push_back(i.key);
        break;
      case PreloadDirection::unresponsive:
        s.unresponsive.push_back(i.key);
        break;
      case PreloadDirection::grey_zone:
        s.grey_zone.push_back(i.key);
        break;
      case PreloadDirection::not_valid:
        break;
    }
  }
  if (s.responsive.empty() && s.unresponsive.empty() && s.grey_zone.empty()) {
    s.category = PreloadCategory::not_assessable;
    return s;
  }
  if (!s.responsive.empty() && !s.unresponsive.empty()) {
    s.category = PreloadCategory::indeterminate;
    s.supporting = s.responsive;
    s.supporting.insert(s.supporting.end(), s.unresponsive.begin(), s.unresponsive.end());
  } else if (s.responsive.empty() && s.unresponsive.empty()) {
    s.category = PreloadCategory::indeterminate;
    s.supporting = s.grey_zone;
  } else {
    const bool yes = !s.responsive.empty();
    s.category = yes ? PreloadCategory::likely_responsive : PreloadCategory::unlikely;
    s.supporting = yes ? s.responsive : s.unresponsive;
  }
  weigh_support(indices, s);
  return s;
}

StepAnalysis analyse_step(const TrialPatient& patient, const TrialStep& step,
                          const Thresholds& limits) {
  StepAnalysis out;
  out.label = step.label;
  out.time = step.time;
  out.recorded = step;
  out.mechanics_inputs = trial_mechanics_inputs(patient, step);
  out.mechanics_results = analyse_mechanics(out.mechanics_inputs);
  const MechanicsResults& m = out.mechanics_results;
  out.ti = trial_inspiratory_time(step.ventilator);
  out.oxygen_inputs = trial_oxygen_inputs(patient, step, m.mean_airway_pressure);
  out.oxygen_results = analyse_oxygen(out.oxygen_inputs, limits);

  const TrialCirculation& k = step.circulation;
  out.map = k.map;
  if (!k.map && k.sbp && k.dbp) {
    out.map = mean_arterial_pressure_estimate(*k.sbp, *k.dbp);
    out.map_estimated = true;
  }
  if (const auto echo = trial_echo_inputs(patient, step))
    out.echo = StepEcho{*echo, analyse_echo(*echo)};
  InfusionSet set = trial_infusion_set(patient, step);
  if (!set.infusions.empty()) {
    InfusionResults r = analyse_infusions(set, limits);
    out.infusions = StepInfusions{std::move(set), std::move(r)};
  }
  ppv_readings(step, m, limits, out);
  ivc_reading(patient, step, limits, out);
  preload_test_readings(step, m, limits, out);
  // During a leg raise or an occlusion the step's own indices are not the patient's state (the
  // manoeuvre changes preload, or holds ventilation): only the manoeuvre's reading is read.
  if (step.manoeuvre && (*step.manoeuvre == PreloadTestKind::passive_leg_raising ||
                         *step.manoeuvre == PreloadTestKind::end_expiratory_occlusion)) {
    out.not_read_during_manoeuvre = std::move(out.preload);
    out.preload.clear();
  }
  out.preload_statement = preload_statement(out.preload);
  out.preload_statement.any_index |= !out.not_read_during_manoeuvre.empty();
  return out;
}

}  // namespace bb
