// Across the steps of a trial: the heart-lung estimate against the reference
// step, the tidal-volume challenge between two steps, and the comparison of the
// steps (brief sections 7 and 8). Formulas come from heart_lung.hpp and
// haemodynamics.hpp; this file only chooses the steps and words the findings.
#include <cmath>

#include "breathbeat/body.hpp"
#include "breathbeat/cautions.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "trial_internal.hpp"

namespace bb {

namespace {

// "not_assessable" -> "not assessable" for sentences people read.
std::string plain_words(std::string word) {
  for (char& c : word) {
    if (c == '_') c = ' ';
  }
  return word;
}

Cell number_cell(std::string key, std::string label, Shown shown, std::string note = "") {
  return Cell{std::move(key), std::move(label), std::move(shown), "", std::move(note)};
}

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
std::string percent_text(Ratio r, int decimals = 0) {
  const double v = in_percent(r);
  return (v > 0 ? "+" : "") + format_number(v, decimals) + " %";
}

std::optional<Pressure> peep_used(const StepAnalysis& s) {
  return s.mechanics_results.peep_used;
}

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
  throw InputError("--reference", *reference, "is not the label of any step", expected);
}

// ---- heart-lung estimate (brief §7) ------------------------------------------------

HeartLungComparison heart_lung_for(const Trial& trial, const TrialAnalysis& a, std::size_t ref,
                                   std::size_t i, const Thresholds& limits) {
  const StepAnalysis& r = a.steps[ref];
  const StepAnalysis& s = a.steps[i];
  HeartLungComparison out;
  out.step = s.label;
  out.reference = r.label;
  HeartLungInputs in;
  in.peep_reference = peep_used(r);
  in.peep_step = peep_used(s);
  in.driving_pressure = s.mechanics_results.driving_pressure;
  in.measured_ecw_ers = s.mechanics_results.elastance_ratio_cw_rs
                            ? s.mechanics_results.elastance_ratio_cw_rs
                            : r.mechanics_results.elastance_ratio_cw_rs;
  in.pmsf = trial.steps[ref].circulation.pmsf;
  in.rap = trial.steps[ref].circulation.cvp;
  try {
    out.estimate = estimate_peep_effect(in, limits);
  } catch (const InputError& e) {
    out.notes.push_back(std::string("Estimate not made: ") + e.what());
    return out;
  }
  const HeartLungEstimate& e = *out.estimate;
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
  out.notes = e.notes;

  const auto& co_r = trial.steps[ref].circulation.co;
  const auto& co_s = trial.steps[i].circulation.co;
  if (co_r && co_s && i != ref) {
    out.observed.push_back(number_cell("observed_co_change", "Observed change in CO",
                                       as_percent(fractional_change(*co_r, *co_s), 1)));
  }
  if (r.map && s.map && i != ref) {
    out.observed.push_back(number_cell("observed_map_change", "Observed change in MAP",
                                       as_percent(fractional_change(*r.map, *s.map), 1)));
  }
  if (r.ppv && s.ppv && i != ref) {
    out.observed.push_back(number_cell(
        "observed_ppv_change", "Observed change in PPV",
        as_number(in_percent(ppv_absolute_change(*r.ppv, *s.ppv)), 1), "percentage points"));
    out.observed.back().shown->unit = "points";
    out.observed.back().shown->ucum = "%";
  }
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
      f.key = "vt_challenge";
      f.steps = {lo.label, hi.label};
      f.source = "Myatra et al., Crit Care Med 2017;45:415";
      if (!lo.ppv || !hi.ppv) {
        f.text = "Steps '" + lo.label + "' and '" + hi.label +
                 "' differ only in VT (6 -> 8 mL/kg PBW) but PPV was not recorded at both: no "
                 "tidal-volume challenge result.";
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
      PreloadIndexReading idx;
      idx.key = "vt_challenge";
      idx.label = "Tidal-volume challenge ('" + lo.label + "' -> '" + hi.label + "')";
      idx.values.push_back(
          number_cell("ppv_change", "PPV change", as_number(in_percent(r.change), 1), "points"));
      idx.values.back().shown->unit = "points";
      idx.values.back().shown->ucum = "%";
      idx.gates = r.conditions;
      idx.reading = r.reading;
      idx.direction = any_gate_failed(r.conditions)              ? PreloadDirection::not_valid
                      : r.reading.category == "responsive"       ? PreloadDirection::responsive
                      : r.reading.category == "not_responsive"   ? PreloadDirection::unresponsive
                      : r.reading.category == "between_cut_offs" ? PreloadDirection::grey_zone
                                                                 : PreloadDirection::not_valid;
      idx.conditional =
          idx.direction != PreloadDirection::not_valid && any_gate_unknown(r.conditions);
      hi.preload.push_back(idx);
      hi.preload_statement = preload_statement(hi.preload);
      f.values = idx.values;
      f.flagged = idx.direction == PreloadDirection::responsive;
      f.text = "Tidal-volume challenge '" + lo.label + "' -> '" + hi.label + "': PPV " +
               format_number(in_percent(*lo.ppv), 1) + " -> " +
               format_number(in_percent(*hi.ppv), 1) + " % (change " +
               format_number(in_percent(r.change), 1) + " points): " + r.reading.text;
      a.comparison.push_back(f);
    }
  }
}

// ---- comparison (brief §8) ----------------------------------------------------------

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
    a.comparison.push_back(
        {"best_compliance",
         "Highest static compliance at '" + a.steps[*i].label + "' (" +
             format_shown(as_mL_per_cmH2O(*crs[*i])) + ").",
         {a.steps[*i].label},
         {number_cell("compliance_static", "Static compliance", as_mL_per_cmH2O(*crs[*i]))},
         false,
         "Suter, Fairley & Isenberg, N Engl J Med 1975;292:284"});
  }
  const auto do2 = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.do2; });
  if (auto i = best_oxygen_delivery_step(do2)) {
    a.comparison.push_back({"max_do2",
                            "Highest O2 delivery at '" + a.steps[*i].label + "' (" +
                                format_shown(as_mL_per_min(*do2[*i])) + ").",
                            {a.steps[*i].label},
                            {number_cell("do2", "O2 delivery", as_mL_per_min(*do2[*i]))},
                            false,
                            "Suter, Fairley & Isenberg, N Engl J Med 1975;292:284"});
  }
  const auto dp = collect<Pressure>(
      a, [](const StepAnalysis& s) { return s.mechanics_results.driving_pressure; });
  if (auto i = lowest_driving_pressure_step(dp)) {
    a.comparison.push_back(
        {"lowest_driving_pressure",
         "Lowest driving pressure at '" + a.steps[*i].label + "' (" +
             format_shown(as_cmH2O(*dp[*i])) + ").",
         {a.steps[*i].label},
         {number_cell("driving_pressure", "Driving pressure", as_cmH2O(*dp[*i]))},
         false,
         "Amato et al., N Engl J Med 2015;372:747"});
  }
}

void limit_breaches(TrialAnalysis& a) {
  for (const auto& s : a.steps) {
    for (const Flag& f : s.flags) {
      if (f.key != "pplat" && f.key != "driving_pressure" && f.key != "mechanical_power") continue;
      a.comparison.push_back(
          {"limit_breach", "'" + s.label + "': " + f.message + ".", {s.label}, {}, true, f.source});
    }
  }
}

// Fall in CO, DO2 or MAP at each step against the step where it was highest.
template <class Q>
void costs_of(TrialAnalysis& a, const std::vector<std::optional<Q>>& values, const char* key,
              const char* name, Shown (*present)(Q, int), int decimals, const Thresholds& limits) {
  const auto best = best_step_index(values, BestBy::maximum);
  if (!best) return;
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (i == *best || !values[i]) continue;
    const HaemodynamicCost c = haemodynamic_cost(*values[*best], *values[i], limits);
    if (!c.flagged) continue;
    a.comparison.push_back(
        {"haemodynamic_cost",
         "'" + a.steps[i].label + "': " + name + " " + format_shown(present(*values[i], decimals)) +
             " is " + percent_text(c.change) + " against '" + a.steps[*best].label + "' (" +
             format_shown(present(*values[*best], decimals)) + "); falls of " +
             format_number(in_percent(c.flag_at), 0) + " % or more are flagged.",
         {a.steps[i].label, a.steps[*best].label},
         {number_cell(std::string(key) + "_change", std::string("Change in ") + name,
                      as_percent(c.change, 1))},
         true,
         limits.source("heart_lung.haemodynamic_cost_fall")});
  }
}

void haemodynamic_costs(TrialAnalysis& a, const Thresholds& limits) {
  const auto co = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.co_used; });
  costs_of<Flow>(a, co, "co", "CO", &as_L_per_min, 2, limits);
  const auto do2 = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.do2; });
  costs_of<Flow>(a, do2, "do2", "DO2", &as_mL_per_min, 0, limits);
  const auto map = collect<Pressure>(a, [](const StepAnalysis& s) { return s.map; });
  costs_of<Pressure>(a, map, "map", "MAP", &as_mmHg, 0, limits);
}

void oxygenation_gain(TrialAnalysis& a, std::size_t ref) {
  const auto pf =
      collect<Pressure>(a, [](const StepAnalysis& s) { return s.oxygen_results.pf_ratio; });
  const auto best = best_step_index(pf, BestBy::maximum);
  if (!best || !pf[ref]) return;
  const Ratio gain = fractional_change(*pf[ref], *pf[*best]);
  Finding f{"oxygenation_gain",
            "",
            {a.steps[*best].label, a.steps[ref].label},
            {},
            false,
            "ARDS Definition Task Force, JAMA 2012;307:2526 (PaO2/FiO2)"};
  f.values.push_back(number_cell("pf_ratio_change", "Change in PaO2/FiO2", as_percent(gain, 1)));
  if (*best == ref) {
    f.text = "PaO2/FiO2 was highest at the reference step '" + a.steps[ref].label + "' (" +
             format_shown(as_mmHg(*pf[ref])) + ").";
  } else {
    f.text = "PaO2/FiO2 highest at '" + a.steps[*best].label +
             "': " + format_shown(as_mmHg(*pf[*best])) + " against " +
             format_shown(as_mmHg(*pf[ref])) + " at the reference '" + a.steps[ref].label + "' (" +
             percent_text(gain) + ").";
  }
  a.comparison.push_back(f);
}

void recruitment(const Trial& trial, TrialAnalysis& a, const Thresholds& limits) {
  for (std::size_t i = 0; i < trial.steps.size(); ++i) {
    const auto& pr = trial.steps[i].peep_release;
    if (!pr) continue;
    const std::optional<Volume> vt = pr->vt ? pr->vt : trial.steps[i].ventilator.vt;
    Finding f{"recruitment_to_inflation",
              "",
              {a.steps[i].label},
              {},
              false,
              "Chen et al., Am J Respir Crit Care Med 2020;201:178"};
    if (!vt) {
      f.text = "'" + a.steps[i].label +
               "': PEEP release recorded but no tidal volume: R/I not computed.";
      a.comparison.push_back(f);
      continue;
    }
    try {
      const RecruitmentResult r =
          assess_recruitment({pr->delta_eelv, pr->peep_high, pr->peep_low, pr->pplat_low, *vt,
                              pr->airway_opening_pressure},
                             limits);
      f.values = {number_cell("recruited_volume", "Recruited volume", as_mL(r.recruited_volume)),
                  number_cell("recruited_compliance", "Compliance of recruited lung",
                              as_mL_per_cmH2O(r.recruited_compliance)),
                  number_cell("compliance_low", "Compliance at low PEEP",
                              as_mL_per_cmH2O(r.compliance_low)),
                  number_cell("recruitment_to_inflation", "Recruitment-to-inflation ratio",
                              as_fraction(r.ratio))};
      f.flagged = r.high_recruitability;
      f.text =
          "'" + a.steps[i].label + "': recruitment-to-inflation ratio " +
          format_number(in_fraction(r.ratio), 2) +
          (r.high_recruitability ? " (at or above " : " (below ") +
          format_number(in_fraction(r.high_recruitability_at), 2) + ": " +
          (r.high_recruitability ? "suggests high recruitability" : "suggests low recruitability") +
          ").";
      for (const auto& n : r.notes) a.notes.push_back("R/I at '" + a.steps[i].label + "': " + n);
    } catch (const InputError& e) {
      f.text = "'" + a.steps[i].label + "': R/I not computed: " + e.what();
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
  const std::string& label = a.steps[*best].label;
  std::vector<std::string> costs;
  for (const Finding& f : a.comparison) {
    if (f.key != "haemodynamic_cost" || f.steps.size() < 2 || f.steps.front() != label ||
        f.values.empty())
      continue;
    costs.push_back(f.values.front().label.substr(std::string("Change in ").size()) + " " +
                    percent_text(fraction(f.values.front().shown->value / 100.0)) + " against '" +
                    f.steps[1] + "'");
  }
  if (costs.empty()) return;
  Finding f{"trade_off", "", {label}, {}, true, ""};
  f.text = "Trade-off: '" + label + "' has the highest PaO2/FiO2 (" +
           format_shown(as_mmHg(*pf[*best])) + ") and a haemodynamic cost:";
  for (std::size_t i = 0; i < costs.size(); ++i) f.text += (i ? ", " : " ") + costs[i];
  f.text += ".";
  const StepAnalysis& s = a.steps[*best];
  if (s.ppv) {
    f.text += " PPV there is " + format_number(in_percent(*s.ppv), 1) +
              " % (preload statement: " + plain_words(s.preload_statement.category) + ").";
  }
  f.text += " Weighing oxygenation against circulation is a clinical decision.";
  a.comparison.push_back(f);
}

std::vector<Cell> patient_cells(const TrialPatient& p) {
  std::vector<Cell> c;
  if (p.sex)
    c.push_back(Cell{"sex", "Sex", std::nullopt, *p.sex == Sex::male ? "male" : "female", ""});
  if (p.height) c.push_back(number_cell("height", "Height", as_cm(*p.height, 0)));
  if (p.weight) c.push_back(number_cell("weight", "Weight", as_kg(*p.weight)));
  if (p.age_years)
    c.push_back(number_cell("age", "Age", Shown{*p.age_years, "a", "years", 0, {}, {}}));
  if (p.sex && p.height) {
    c.push_back(number_cell("pbw", "Predicted body weight",
                            as_kg(predicted_body_weight(*p.sex, *p.height)), "ARDS Network 2000"));
  }
  if (p.weight && p.height) {
    c.push_back(number_cell("bsa", "Body surface area",
                            as_m2(body_surface_area_du_bois(*p.weight, *p.height)),
                            "Du Bois 1916"));
  }
  return c;
}

}  // namespace

TrialAnalysis analyse_trial(const Trial& trial, const Thresholds& limits,
                            const std::optional<std::string>& reference) {
  TrialAnalysis a;
  a.file = trial.file;
  a.patient_label = trial.patient.label;
  a.patient = patient_cells(trial.patient);
  if (trial.steps.empty())
    throw InputError("step", "", "the trial has no steps", "at least one [[step]]");
  const std::size_t ref = reference_index(trial, reference);
  a.reference = trial.steps[ref].label;
  for (const TrialStep& step : trial.steps)
    a.steps.push_back(analyse_step(trial.patient, step, limits));
  for (std::size_t i = 0; i < a.steps.size(); ++i)
    a.heart_lung.push_back(heart_lung_for(trial, a, ref, i, limits));
  best_steps(a);
  limit_breaches(a);
  haemodynamic_costs(a, limits);
  oxygenation_gain(a, ref);
  recruitment(trial, a, limits);
  vt_challenges(trial, a, limits);
  trade_off(a);
  for (const TrialStep& s : trial.steps) {
    if (s.waveform && !s.waveform->analysed) {
      a.notes.push_back("'" + s.label + "': waveform file " + s.waveform->file +
                        " is recorded but not analysed in this report (use breathbeat wave).");
    }
  }
  a.cautions = standard_cautions();
  for (const char* key :
       {"mechanics.pplat_max", "mechanics.driving_pressure_max", "mechanics.mechanical_power_max",
        "heart_lung.haemodynamic_cost_fall", "ppv.grey_zone_low", "ppv.grey_zone_high"}) {
    if (!limits.has(key)) continue;
    const ThresholdEntry& e = limits.entry(key);
    a.thresholds_used.emplace_back(
        key, format_number(e.value, 1) + " " + e.unit + " (" + e.source + ")");
  }
  return a;
}

}  // namespace bb
