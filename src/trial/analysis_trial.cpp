// Across the steps of a trial: the heart-lung estimate against the reference
// step, the tidal-volume challenge between two steps, and the comparison of the
// steps (methods and sources: docs/methods.md, "Heart–lung estimates and comparing PEEP steps").
// Formulas come from heart_lung.hpp and haemodynamics.hpp; this file only chooses the steps and
// keeps what they show as typed findings (the presenters word them).
#include <algorithm>
#include <cmath>

#include "breathbeat/body.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "trial_internal.hpp"

namespace bb {

const char* to_string(FindingKind k) {
  switch (k) {
    case FindingKind::best_compliance:
      return "best_compliance";
    case FindingKind::max_do2:
      return "max_do2";
    case FindingKind::lowest_driving_pressure:
      return "lowest_driving_pressure";
    case FindingKind::limit_breach:
      return "limit_breach";
    case FindingKind::haemodynamic_cost:
      return "haemodynamic_cost";
    case FindingKind::oxygenation_gain:
      return "oxygenation_gain";
    case FindingKind::recruitment_to_inflation:
      return "recruitment_to_inflation";
    case FindingKind::vt_challenge:
      return "vt_challenge";
    case FindingKind::trade_off:
      return "trade_off";
  }
  return "";
}

const char* to_string(CostMeasure m) {
  switch (m) {
    case CostMeasure::co:
      return "co";
    case CostMeasure::do2:
      return "do2";
    case CostMeasure::map:
      return "map";
  }
  return "";
}

namespace {

// ---- reference step -------------------------------------------------------------

std::size_t reference_index(const Trial& trial, const std::optional<std::string>& reference) {
  if (!reference) return 0;
  std::vector<std::string> labels;
  for (std::size_t i = 0; i < trial.steps.size(); ++i) {
    if (trial.steps[i].label == *reference) return i;
    labels.push_back(trial.steps[i].label);
  }
  std::string expected = "the label of a step in " + trial.file + ":";
  for (const auto& l : labels) expected += " '" + l + "'";
  if (auto near = closest_match(*reference, labels)) expected += " (did you mean '" + *near + "'?)";
  throw InputError("reference", *reference, "is not the label of any step", expected);
}

// ---- heart-lung estimate (docs/methods.md, "Heart–lung estimates", sections 1-5)
// ------------------------------------------------

HeartLungComparison heart_lung_for(const Trial& trial, const TrialAnalysis& a, std::size_t ref,
                                   std::size_t i, const Thresholds& limits) {
  const StepAnalysis& r = a.steps[ref];
  const StepAnalysis& s = a.steps[i];
  HeartLungComparison out;
  out.step = s.label;
  out.reference = r.label;
  HeartLungInputs in;
  in.peep_reference = r.mechanics_results.peep_used;
  in.peep_step = s.mechanics_results.peep_used;
  in.driving_pressure = s.mechanics_results.driving_pressure;
  in.measured_ecw_ers = s.mechanics_results.elastance_ratio_cw_rs
                            ? s.mechanics_results.elastance_ratio_cw_rs
                            : r.mechanics_results.elastance_ratio_cw_rs;
  in.pmsf = trial.steps[ref].circulation.pmsf;
  in.rap = trial.steps[ref].circulation.cvp;
  try {
    out.estimate = estimate_peep_effect(in, limits);
  } catch (const InputError& e) {
    out.not_estimated = e;
    return out;
  }
  if (i == ref) return out;
  const auto& co_r = trial.steps[ref].circulation.co;
  const auto& co_s = trial.steps[i].circulation.co;
  if (co_r && co_s) out.observed_co_change = fractional_change(*co_r, *co_s);
  if (r.map && s.map) out.observed_map_change = fractional_change(*r.map, *s.map);
  if (r.ppv && s.ppv) out.observed_ppv_change = ppv_absolute_change(*r.ppv, *s.ppv);
  return out;
}

// ---- tidal-volume challenge between two steps ---------------------------------------

bool same_except_vt(const TrialStep& a, const TrialStep& b, const Thresholds& limits) {
  const Pressure tol = limits.get<Pressure>("trial.same_peep_tolerance");
  auto near = [&](const std::optional<Pressure>& x, const std::optional<Pressure>& y) {
    if (!x && !y) return true;
    if (!x || !y) return false;
    return std::abs(x->value() - y->value()) <= tol.value();
  };
  const auto peep_a = a.hold.peep_total ? a.hold.peep_total : a.ventilator.set_peep;
  const auto peep_b = b.hold.peep_total ? b.hold.peep_total : b.ventilator.set_peep;
  if (!peep_a || !near(peep_a, peep_b) || !near(a.ventilator.set_peep, b.ventilator.set_peep))
    return false;
  auto same_ratio = [](const std::optional<Ratio>& x, const std::optional<Ratio>& y) {
    return (!x && !y) || (x && y && std::abs(x->value() - y->value()) < 1e-9);
  };
  auto same_rate = [](const std::optional<Frequency>& x, const std::optional<Frequency>& y) {
    return (!x && !y) || (x && y && std::abs(x->value() - y->value()) < 1e-9);
  };
  return a.ventilator.mode == b.ventilator.mode &&
         same_ratio(a.ventilator.fio2, b.ventilator.fio2) &&
         same_rate(a.ventilator.rr, b.ventilator.rr);
}

// Steps i (low VT) and j (high VT) at the VT challenge's volumes (6 and 8 mL/kg PBW).
bool challenge_volumes(const StepAnalysis& lo, const StepAnalysis& hi, const Thresholds& limits) {
  const auto& vlo = lo.mechanics_results.vt_per_kg;
  const auto& vhi = hi.mechanics_results.vt_per_kg;
  if (!vlo || !vhi) return false;
  const double tol = in_mL_per_kg(limits.get<VolumePerMass>("trial.vt_challenge_tolerance"));
  const double want_lo =
      in_mL_per_kg(limits.get<VolumePerMass>("preload_tests.vt_challenge_vt_low"));
  const double want_hi =
      in_mL_per_kg(limits.get<VolumePerMass>("preload_tests.vt_challenge_vt_high"));
  return std::abs(in_mL_per_kg(*vlo) - want_lo) <= tol &&
         std::abs(in_mL_per_kg(*vhi) - want_hi) <= tol;
}

void vt_challenges(const Trial& trial, TrialAnalysis& a, const Thresholds& limits) {
  for (std::size_t i = 0; i < a.steps.size(); ++i) {
    for (std::size_t j = 0; j < a.steps.size(); ++j) {
      if (i == j || !challenge_volumes(a.steps[i], a.steps[j], limits)) continue;
      if (!same_except_vt(trial.steps[i], trial.steps[j], limits)) continue;
      StepAnalysis& hi = a.steps[j];
      const StepAnalysis& lo = a.steps[i];
      Finding f;
      f.kind = FindingKind::vt_challenge;
      f.steps = {lo.label, hi.label};
      f.source = "Myatra et al., Crit Care Med 2017;45:415";
      VtChallengeFinding detail{lo.ppv, hi.ppv, std::nullopt};
      if (!lo.ppv || !hi.ppv) {
        f.detail = detail;
        a.comparison.push_back(f);
        continue;
      }
      PreloadTestInputs in;
      in.kind = PreloadTestKind::vt_challenge;
      in.measure = PreloadMeasure::ppv;
      in.before = *lo.ppv;
      in.after = *hi.ppv;
      in.vt_before_per_kg = lo.mechanics_results.vt_per_kg;
      in.vt_after_per_kg = hi.mechanics_results.vt_per_kg;
      if (trial.steps[j].circulation.spontaneous_effort)
        in.passive = !*trial.steps[j].circulation.spontaneous_effort;
      const PreloadTestResult r = analyse_preload_test(in, limits);
      PreloadIndexReading idx =
          preload_reading("vt_challenge", PreloadIndex::vt_challenge, r.conditions, r.reading);
      idx.test_inputs = in;
      idx.test = r;
      idx.from_step = lo.label;
      idx.to_step = hi.label;
      f.flagged = idx.direction == PreloadDirection::responsive;
      hi.preload.push_back(std::move(idx));
      hi.preload_statement = preload_statement(hi.preload);
      detail.result = r;
      f.detail = detail;
      a.comparison.push_back(f);
    }
  }
}

// ---- comparison (docs/methods.md, "Comparing steps of a PEEP trial") ----

template <class Q, class Get>
std::vector<std::optional<Q>> collect(const TrialAnalysis& a, Get get) {
  std::vector<std::optional<Q>> v;
  for (const auto& s : a.steps) v.push_back(get(s));
  return v;
}

void best_steps(TrialAnalysis& a) {
  const auto crs = collect<Compliance>(
      a, [](const StepAnalysis& s) { return s.mechanics_results.compliance_static; });
  if (auto i = best_compliance_step(crs)) {
    a.comparison.push_back({FindingKind::best_compliance,
                            {a.steps[*i].label},
                            false,
                            "Suter, Fairley & Isenberg, N Engl J Med 1975;292:284",
                            BestStepFinding{*crs[*i]}});
  }
  const auto do2 = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.do2; });
  if (auto i = best_oxygen_delivery_step(do2)) {
    a.comparison.push_back({FindingKind::max_do2,
                            {a.steps[*i].label},
                            false,
                            "Suter, Fairley & Isenberg, N Engl J Med 1975;292:284",
                            BestStepFinding{*do2[*i]}});
  }
  const auto dp = collect<Pressure>(
      a, [](const StepAnalysis& s) { return s.mechanics_results.driving_pressure; });
  if (auto i = lowest_driving_pressure_step(dp)) {
    a.comparison.push_back({FindingKind::lowest_driving_pressure,
                            {a.steps[*i].label},
                            false,
                            "Amato et al., N Engl J Med 2015;372:747",
                            BestStepFinding{*dp[*i]}});
  }
}

// The lung-protective limits the mechanics breach, repeated as findings (the
// VT/PBW limit stays with the step).
void limit_breaches(TrialAnalysis& a, const Thresholds& limits) {
  for (const auto& s : a.steps) {
    for (const MechanicsLimit l :
         mechanics_breaches(s.mechanics_inputs, s.mechanics_results, limits)) {
      if (l == MechanicsLimit::vt_per_kg_pbw) continue;
      a.comparison.push_back({FindingKind::limit_breach,
                              {s.label},
                              true,
                              limits.source(threshold_key(l)),
                              LimitBreachFinding{l}});
    }
  }
}

// Fall in CO, DO2 or MAP at each step against the step where it was highest.
template <class Q>
void costs_of(TrialAnalysis& a, const std::vector<std::optional<Q>>& values, CostMeasure measure,
              const Thresholds& limits) {
  const auto best = best_step_index(values, BestBy::maximum);
  if (!best) return;
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (i == *best || !values[i]) continue;
    const HaemodynamicCost c = haemodynamic_cost(*values[*best], *values[i], limits);
    if (!c.flagged) continue;
    a.comparison.push_back(
        {FindingKind::haemodynamic_cost,
         {a.steps[i].label, a.steps[*best].label},
         true,
         limits.source("heart_lung.haemodynamic_cost_fall"),
         HaemodynamicCostFinding{measure, *values[i], *values[*best], c.change, c.flag_at}});
  }
}

void haemodynamic_costs(TrialAnalysis& a, const Thresholds& limits) {
  const auto co = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.co_used; });
  costs_of<Flow>(a, co, CostMeasure::co, limits);
  const auto do2 = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.do2; });
  costs_of<Flow>(a, do2, CostMeasure::do2, limits);
  const auto map = collect<Pressure>(a, [](const StepAnalysis& s) { return s.map; });
  costs_of<Pressure>(a, map, CostMeasure::map, limits);
}

void oxygenation_gain(TrialAnalysis& a, std::size_t ref) {
  const auto pf =
      collect<Pressure>(a, [](const StepAnalysis& s) { return s.oxygen_results.pf_ratio; });
  const auto best = best_step_index(pf, BestBy::maximum);
  if (!best || !pf[ref]) return;
  a.comparison.push_back(
      {FindingKind::oxygenation_gain,
       {a.steps[*best].label, a.steps[ref].label},
       false,
       "ARDS Definition Task Force, JAMA 2012;307:2526 (PaO2/FiO2)",
       OxygenationGainFinding{*pf[*best], *pf[ref], fractional_change(*pf[ref], *pf[*best]),
                              *best == ref}});
}

void recruitment(const Trial& trial, TrialAnalysis& a, const Thresholds& limits) {
  for (std::size_t i = 0; i < trial.steps.size(); ++i) {
    const auto& pr = trial.steps[i].peep_release;
    if (!pr) continue;
    const std::optional<Volume> vt = pr->vt ? pr->vt : trial.steps[i].ventilator.vt;
    Finding f{FindingKind::recruitment_to_inflation,
              {a.steps[i].label},
              false,
              "Chen et al., Am J Respir Crit Care Med 2020;201:178",
              RecruitmentFinding{}};
    RecruitmentFinding& detail = std::get<RecruitmentFinding>(f.detail);
    if (!vt) {
      detail.no_tidal_volume = true;
      a.comparison.push_back(f);
      continue;
    }
    try {
      detail.result = assess_recruitment({pr->delta_eelv, pr->peep_high, pr->peep_low,
                                          pr->pplat_low, *vt, pr->airway_opening_pressure},
                                         limits);
      f.flagged = detail.result->high_recruitability;
    } catch (const InputError& e) {
      detail.not_computed = e;
    }
    a.comparison.push_back(f);
  }
}

// The trade-off the user must weigh: the best-oxygenating step against its circulatory cost.
void trade_off(TrialAnalysis& a) {
  const auto pf =
      collect<Pressure>(a, [](const StepAnalysis& s) { return s.oxygen_results.pf_ratio; });
  const auto best = best_step_index(pf, BestBy::maximum);
  if (!best) return;
  const StepAnalysis& s = a.steps[*best];
  TradeOffFinding detail{*pf[*best], {}, s.ppv, s.preload_statement.category};
  for (const Finding& f : a.comparison) {
    if (f.kind != FindingKind::haemodynamic_cost || f.steps.size() < 2 ||
        f.steps.front() != s.label)
      continue;
    const auto& cost = std::get<HaemodynamicCostFinding>(f.detail);
    detail.costs.push_back({cost.measure, cost.change, f.steps[1]});
  }
  if (detail.costs.empty()) return;
  a.comparison.push_back({FindingKind::trade_off, {s.label}, true, "", detail});
}

}  // namespace

TrialAnalysis analyse_trial(const Trial& trial, const Thresholds& limits,
                            const std::optional<std::string>& reference) {
  TrialAnalysis a;
  a.file = trial.file;
  a.patient = trial.patient;
  const TrialPatient& p = trial.patient;
  if (p.sex && p.height) a.pbw = predicted_body_weight(*p.sex, *p.height);
  if (p.weight && p.height) a.bsa = body_surface_area_du_bois(*p.weight, *p.height);
  a.limits = limits;
  if (trial.steps.empty())
    throw InputError("step", "", "the trial has no steps", "at least one [[step]]");
  const std::size_t ref = reference_index(trial, reference);
  a.reference = trial.steps[ref].label;
  for (const TrialStep& step : trial.steps)
    a.steps.push_back(analyse_step(trial.patient, step, limits));
  for (std::size_t i = 0; i < a.steps.size(); ++i)
    a.heart_lung.push_back(heart_lung_for(trial, a, ref, i, limits));
  best_steps(a);
  limit_breaches(a, limits);
  haemodynamic_costs(a, limits);
  oxygenation_gain(a, ref);
  recruitment(trial, a, limits);
  vt_challenges(trial, a, limits);
  trade_off(a);
  for (const TrialStep& s : trial.steps) {
    if (s.waveform && !s.waveform->analysed)
      a.unanalysed_waveforms.push_back({s.label, s.waveform->file});
  }
  for (const char* key :
       {"mechanics.pplat_max", "mechanics.driving_pressure_max", "mechanics.mechanical_power_max",
        "heart_lung.haemodynamic_cost_fall", "ppv.grey_zone_low", "ppv.grey_zone_high"}) {
    if (limits.has(key)) a.thresholds_used.emplace_back(key, limits.entry(key));
  }
  return a;
}

}  // namespace bb
