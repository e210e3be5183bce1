// Manoeuvres across two steps: a step marked as a passive leg raise, fluid or mini fluid
// challenge or end-expiratory occlusion of the step before it (TrialStep::manoeuvre), read as
// that preload test from the two steps' CO, SV or VTI with the rules of the tidal-volume
// challenge between steps (consecutive, within the preset interval, the test's conditions at
// both steps; docs/methods.md, "Manoeuvres between two steps"). The physiology is the preload
// tests' (haemodynamics.hpp); this file only gathers the two steps' values.
#include <algorithm>
#include <cmath>

#include "breathbeat/condition_bias.hpp"
#include "breathbeat/cutoff.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "trial_internal.hpp"

namespace bb {

namespace {

bool fluid_kind(PreloadTestKind k) {
  return k == PreloadTestKind::fluid_challenge || k == PreloadTestKind::mini_fluid_challenge;
}

// The value of one measure at one step: CO as measured, SV from echo (VTI x LVOT area), LVOT VTI,
// PPV (the step's PPV from cycles, else the monitor or signals).
std::optional<PreloadValue> value_at(const StepAnalysis& s, PreloadMeasure m) {
  switch (m) {
    case PreloadMeasure::cardiac_output:
      if (s.recorded.circulation.co) return PreloadValue{*s.recorded.circulation.co};
      break;
    case PreloadMeasure::stroke_volume:
      if (s.echo && s.echo->results.stroke_volume)
        return PreloadValue{*s.echo->results.stroke_volume};
      break;
    case PreloadMeasure::vti:
      if (s.recorded.ultrasound.vti) return PreloadValue{*s.recorded.ultrasound.vti};
      break;
    case PreloadMeasure::ppv:
      if (s.ppv) return PreloadValue{*s.ppv};
      break;
  }
  return std::nullopt;
}

// The ventilator settings recorded at both steps that differ (a setting recorded at one step
// only is taken as unchanged: a manoeuvre step usually records only what was measured).
std::vector<std::string> changed_settings(const TrialStep& a, const TrialStep& b,
                                          const Thresholds& limits) {
  std::vector<std::string> out;
  const double tol = limits.get<Pressure>("trial.same_peep_tolerance").value();
  auto differ = [](const auto& x, const auto& y, double t) {
    return x && y && std::abs(x->value() - y->value()) > t;
  };
  if (differ(a.ventilator.set_peep, b.ventilator.set_peep, tol)) out.emplace_back("set_peep");
  if (differ(a.hold.peep_total, b.hold.peep_total, tol)) out.emplace_back("peep_total");
  if (a.ventilator.mode && b.ventilator.mode && *a.ventilator.mode != *b.ventilator.mode)
    out.emplace_back("mode");
  if (differ(a.ventilator.vt, b.ventilator.vt, 1e-9)) out.emplace_back("vt");
  if (differ(a.ventilator.rr, b.ventilator.rr, 1e-9)) out.emplace_back("rr");
  if (differ(a.ventilator.fio2, b.ventilator.fio2, 1e-9)) out.emplace_back("fio2");
  return out;
}

// The test's inputs as one step knows them (passive, intra-abdominal hypertension, the hold).
PreloadTestInputs inputs_at(PreloadTestKind kind, const TrialStep& step,
                            const std::optional<TrialChallenge>& challenge) {
  PreloadTestInputs in;
  in.kind = kind;
  const TrialCirculation& c = step.circulation;
  if (c.spontaneous_effort) {
    in.passive = !*c.spontaneous_effort;
    in.passive_from_signals = c.passive_from_signals;
  }
  in.intra_abdominal_hypertension = c.intra_abdominal_hypertension;
  if (challenge) {
    in.hold = challenge->hold;
    in.fluid = challenge->fluid;
  }
  return in;
}

// The test's conditions: the manoeuvre's own (the EEO hold) once, those of the patient (breathing
// effort for EEO, intra-abdominal hypertension for PLR) at each step, prefixed with its role. Their
// bias is the test's ([bias.<test id>.*], applied by preload_test_conditions).
std::vector<Gate> conditions_at_both(PreloadTestKind kind, const TrialStep& before,
                                     const TrialStep& after,
                                     const std::optional<TrialChallenge>& challenge,
                                     const Thresholds& limits) {
  std::vector<Gate> out;
  for (const Gate& g : preload_test_conditions(inputs_at(kind, after, challenge), limits)) {
    if (g.key == "hold_duration") out.push_back(g);
  }
  for (const auto& [step, prefix] :
       {std::pair{&before, kManoeuvreBeforeStep}, std::pair{&after, kManoeuvreAfterStep}}) {
    for (Gate g : preload_test_conditions(inputs_at(kind, *step, challenge), limits)) {
      if (g.key == "hold_duration") continue;
      g.key = prefix + g.key;
      out.push_back(std::move(g));
    }
  }
  return out;
}

// The conditions as one gate each (the reading weighs them once): a condition checked at both
// steps takes the worse of its two states (failed, then unknown, then only not contradicted).
std::vector<Gate> merged(const std::vector<Gate>& gates) {
  auto rank = [](GateState s) {
    switch (s) {
      case GateState::failed:
        return 3;
      case GateState::unknown:
        return 2;
      case GateState::not_contradicted:
        return 1;
      case GateState::met:
        break;
    }
    return 0;
  };
  std::vector<Gate> out;
  for (Gate g : gates) {
    for (const char* prefix : {kManoeuvreBeforeStep, kManoeuvreAfterStep}) {
      if (g.key.rfind(prefix, 0) == 0) g.key.erase(0, std::string(prefix).size());
    }
    const auto it =
        std::find_if(out.begin(), out.end(), [&](const Gate& o) { return o.key == g.key; });
    if (it == out.end()) {
      out.push_back(std::move(g));
    } else if (rank(g.state) > rank(it->state)) {
      *it = std::move(g);
    }
  }
  return out;
}

// The objective of a fluid challenge, judged from what the two steps show.
ObjectiveResult objective_of(FluidObjective objective, const ManoeuvreFinding& d,
                             const StepAnalysis& before, const StepAnalysis& after,
                             const Thresholds& limits) {
  ObjectiveResult r;
  r.objective = objective;
  r.surrogate = is_surrogate(objective);
  if (const auto m = objective_measure(objective); m && *m != PreloadMeasure::ppv) {
    // CO, SV or VTI: the test's own reading (its cut-offs), when the steps were compared by it.
    if (!d.result || d.measure != *m) return r;  // not_measured
    r.change = d.result->change;
    r.cut_off_key = cut_off_key(d.kind);
    const std::string& c = d.result->reading.category;
    r.state = c == "responsive"         ? ObjectiveState::met
              : c == "between_cut_offs" ? ObjectiveState::between_cut_offs
              : c == "not_responsive"   ? ObjectiveState::not_met
                                        : ObjectiveState::not_readable;
    return r;
  }
  switch (objective) {
    case FluidObjective::ppv: {
      // PPV after the fluid no longer reading responsive (its own conditions at that step).
      if (before.ppv && after.ppv) r.change = ppv_absolute_change(*before.ppv, *after.ppv);
      const auto it = std::find_if(after.preload.begin(), after.preload.end(), [](const auto& i) {
        return i.index == PreloadIndex::ppv || i.index == PreloadIndex::ppv_monitor ||
               i.index == PreloadIndex::ppv_signals;
      });
      if (it == after.preload.end() || !before.ppv) return r;  // not_measured
      r.cut_off_key = "ppv.grey_zone_low";
      r.state = it->direction == PreloadDirection::unresponsive ? ObjectiveState::met
                : it->direction == PreloadDirection::responsive ? ObjectiveState::not_met
                : it->direction == PreloadDirection::grey_zone  ? ObjectiveState::between_cut_offs
                                                                : ObjectiveState::not_readable;
      return r;
    }
    case FluidObjective::map:
      if (!before.map || !after.map) return r;
      r.change = relative_change(*before.map, *after.map);
      break;
    case FluidObjective::hr: {
      const auto& b = before.recorded.circulation.hr;
      const auto& a = after.recorded.circulation.hr;
      if (!b || !a) return r;
      r.change = relative_change(*b, *a);
      break;
    }
    case FluidObjective::urine_output:
      r.state = ObjectiveState::not_judged;
      return r;
    default:
      return r;
  }
  r.cut_off_key = surrogate_cut_off_key(objective);
  r.state = surrogate_objective_state(objective, *r.change, limits);
  return r;
}

FluidChallengeOutcome fluid_outcome(const ManoeuvreFinding& d, const StepAnalysis& before,
                                    const StepAnalysis& after, const Thresholds& limits) {
  FluidChallengeOutcome out;
  const std::optional<TrialChallenge>& c = after.recorded.challenge;
  if (c) out.fluid = c->fluid;
  if (out.fluid.volume && out.fluid.duration)
    out.rate = Flow(*out.fluid.volume / *out.fluid.duration);
  out.objective_stated = c && c->objective;
  FluidObjective objective = FluidObjective::co;
  if (out.objective_stated) {
    objective = *c->objective;
  } else if (d.measure == PreloadMeasure::stroke_volume) {
    objective = FluidObjective::sv;
  } else if (d.measure == PreloadMeasure::vti) {
    objective = FluidObjective::vti;
  }
  out.objective = objective_of(objective, d, before, after, limits);
  FluidSafetyInputs s;
  s.cvp_after = after.recorded.circulation.cvp;
  s.pf_before = before.oxygen_results.pf_ratio;
  s.pf_after = after.oxygen_results.pf_ratio;
  // A manoeuvre step often records only what was measured: its FiO2 is the step before's (the
  // settings are unchanged, or the pair is refused).
  const auto& fio2 = before.recorded.ventilator.fio2;
  if (!s.pf_after && after.recorded.gases.pao2 && !after.recorded.ventilator.fio2 && fio2)
    s.pf_after = pao2_fio2_ratio(*after.recorded.gases.pao2, *fio2);
  s.spo2_before = before.recorded.gases.spo2;
  s.spo2_after = after.recorded.gases.spo2;
  if (c) {
    s.oedema_signs = c->oedema_signs;
    s.cvp_max = c->cvp_max;
    s.pf_fall_max = c->pf_fall_max;
    s.spo2_fall_max = c->spo2_fall_max;
  }
  out.safety = check_fluid_safety(s, limits);
  out.stop = safety_limit_reached(out.safety);
  return out;
}

}  // namespace

const char* to_string(ManoeuvreRefusal r) {
  switch (r) {
    case ManoeuvreRefusal::no_step_before:
      return "no_step_before";
    case ManoeuvreRefusal::before_is_manoeuvre:
      return "before_is_manoeuvre";
    case ManoeuvreRefusal::settings_changed:
      return "settings_changed";
    case ManoeuvreRefusal::too_far_apart:
      return "too_far_apart";
    case ManoeuvreRefusal::before_voided:
      return "before_voided";
  }
  return "";
}

void mark_manoeuvre_steps(const Trial& trial, TrialAnalysis& a) {
  for (std::size_t i = 0; i < trial.steps.size(); ++i) {
    if (!trial.steps[i].manoeuvre) continue;
    // Of the step just before it in the file, even when that one is voided (then not read).
    a.steps[i].manoeuvre_from = trial.steps[i].voided_before ? *trial.steps[i].voided_before
                                : i                          ? a.steps[i - 1].label
                                                             : "";
  }
}

void manoeuvre_findings(const Trial& trial, TrialAnalysis& a, const Thresholds& limits) {
  for (std::size_t i = 0; i < trial.steps.size(); ++i) {
    const TrialStep& step = trial.steps[i];
    if (!step.manoeuvre) continue;
    const PreloadTestKind kind = *step.manoeuvre;
    Finding f;
    f.kind = FindingKind::manoeuvre;
    f.source = limits.source(cut_off_key(kind));
    ManoeuvreFinding d;
    d.kind = kind;
    d.accepted = accepted_measures(kind);
    d.max_interval = limits.get<Time>(kind == PreloadTestKind::fluid_challenge
                                          ? "trial.fluid_challenge_max_interval"
                                          : "trial.manoeuvre_max_interval");
    if (step.voided_before) {
      // The baseline is the step just before it in the file; voided, there is none.
      f.steps = {*step.voided_before, a.steps[i].label};
      d.refused = ManoeuvreRefusal::before_voided;
      f.detail = d;
      a.comparison.push_back(f);
      continue;
    }
    if (i == 0) {
      f.steps = {a.steps[i].label};
      d.refused = ManoeuvreRefusal::no_step_before;
      f.detail = d;
      a.comparison.push_back(f);
      continue;
    }
    const TrialStep& base = trial.steps[i - 1];
    StepAnalysis& after = a.steps[i];
    const StepAnalysis& before = a.steps[i - 1];
    f.steps = {before.label, after.label};
    d.interval = trial_interval(base.time, step.time);
    d.changed_settings = changed_settings(base, step, limits);
    if (base.manoeuvre) {
      d.refused = ManoeuvreRefusal::before_is_manoeuvre;
    } else if (!d.changed_settings.empty()) {
      d.refused = ManoeuvreRefusal::settings_changed;
    } else if (d.interval && cutoff::above(*d.interval, d.max_interval)) {
      d.refused = ManoeuvreRefusal::too_far_apart;
    }
    d.conditions = conditions_at_both(kind, base, step, step.challenge, limits);
    if (d.refused) {
      f.detail = d;
      a.comparison.push_back(f);
      continue;
    }
    // The measure: the stated objective when it is one of the test's, else the first of the
    // test's measures recorded at both steps.
    std::vector<PreloadMeasure> order = d.accepted;
    if (step.challenge && step.challenge->objective) {
      if (const auto m = objective_measure(*step.challenge->objective);
          m && std::find(order.begin(), order.end(), *m) != order.end())
        order = {*m};
    }
    for (PreloadMeasure m : order) {
      const auto b = value_at(before, m), x = value_at(after, m);
      if (!b || !x) continue;
      d.measure = m;
      d.before = b;
      d.after = x;
      break;
    }
    if (d.measure) {
      PreloadTestInputs in = inputs_at(kind, step, step.challenge);
      in.measure = *d.measure;
      in.before = *d.before;
      in.after = *d.after;
      PreloadTestResult r = analyse_preload_test(in, limits);
      r.conditions = merged(d.conditions);
      r.reading = read_preload_change(kind, r.change, r.conditions, limits);
      PreloadIndexReading idx = preload_reading(std::string(id_of(kind)) + "_steps",
                                                PreloadIndex::manoeuvre, r.conditions, r.reading);
      idx.test_inputs = in;
      idx.test = r;
      idx.from_step = before.label;
      idx.to_step = after.label;
      f.flagged = idx.direction == PreloadDirection::responsive;
      after.preload.push_back(std::move(idx));
      after.preload_statement = preload_statement(after.preload);
      after.preload_statement.any_index |= !after.not_read_during_manoeuvre.empty();
      d.result = r;
    }
    if (fluid_kind(kind)) {
      d.fluid = fluid_outcome(d, before, after, limits);
      if (d.fluid->stop) f.flagged = true;
      if (d.result) after.preload.back().fluid = d.fluid;
    }
    f.detail = d;
    a.comparison.push_back(f);
  }
}

}  // namespace bb
