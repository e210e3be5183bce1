// Across the steps of a trial: the heart-lung estimate against the reference
// step, the tidal-volume challenge between two consecutive steps, the comparison of the
// steps (best steps with their ties, costs against the reference) and the shock context (methods
// and sources: docs/methods.md, "Heart–lung estimates and comparing PEEP steps"). Formulas come
// from heart_lung.hpp and haemodynamics.hpp; this file only chooses the steps and keeps what they
// show as typed findings (the presenters word them).
#include <algorithm>
#include <cctype>
#include <cmath>
#include <iterator>
#include <regex>
#include <type_traits>

#include "breathbeat/body.hpp"
#include "breathbeat/condition_bias.hpp"
#include "breathbeat/cutoff.hpp"
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
    case FindingKind::manoeuvre:
      return "manoeuvre";
    case FindingKind::trade_off:
      return "trade_off";
    case FindingKind::map_below_target:
      return "map_below_target";
    case FindingKind::lactate_above_limit:
      return "lactate_above_limit";
    case FindingKind::lactate_change:
      return "lactate_change";
  }
  return "";
}

const char* to_string(VtChallengeRefusal r) {
  switch (r) {
    case VtChallengeRefusal::wrong_order:
      return "wrong_order";
    case VtChallengeRefusal::not_consecutive:
      return "not_consecutive";
    case VtChallengeRefusal::voided_between:
      return "voided_between";
    case VtChallengeRefusal::too_far_apart:
      return "too_far_apart";
  }
  return "";
}

// ---- step times ---------------------------------------------------------------------

namespace {

constexpr double kSecondsPerDay = 86400.0;

struct ClockTime {
  double seconds = 0.0;  // since midnight, plus whole days when dated
  bool dated = false;
};

// Days from 1970-01-01 to a civil date (proleptic Gregorian; H. Hinnant's days_from_civil).
long days_from_civil(long y, unsigned m, unsigned d) {
  y -= m <= 2;
  const long era = (y >= 0 ? y : y - 399) / 400;
  const unsigned yoe = static_cast<unsigned>(y - era * 400);
  const unsigned doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
  const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
  return era * 146097 + static_cast<long>(doe) - 719468;
}

// Days in month `m` (1-12) of year `y`, Gregorian calendar (common practice, no source).
int days_in_month(int y, int m) {
  static const int kDays[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  const bool leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
  return m == 2 && leap ? 29 : kDays[m - 1];
}

// Reads `n` digits at `pos` into `out`; false when they are not all digits.
bool digits(const std::string& s, std::size_t pos, std::size_t n, int& out) {
  if (pos + n > s.size()) return false;
  out = 0;
  for (std::size_t k = pos; k < pos + n; ++k) {
    if (!std::isdigit(static_cast<unsigned char>(s[k]))) return false;
    out = out * 10 + (s[k] - '0');
  }
  return true;
}

std::optional<ClockTime> clock_time(const std::string& written) {
  std::string s;
  for (char c : written) {
    if (!std::isspace(static_cast<unsigned char>(c)) || !s.empty()) s += c;
  }
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.pop_back();
  ClockTime t;
  std::size_t pos = 0;
  int y = 0, mo = 0, d = 0;
  if (s.size() >= 10 && s[4] == '-' && s[7] == '-' && digits(s, 0, 4, y) && digits(s, 5, 2, mo) &&
      digits(s, 8, 2, d)) {
    if (mo < 1 || mo > 12 || d < 1 || d > days_in_month(y, mo) || s.size() < 12)
      return std::nullopt;
    if (s[10] != 'T' && s[10] != 't' && s[10] != ' ') return std::nullopt;
    t.dated = true;
    t.seconds = static_cast<double>(
                    days_from_civil(y, static_cast<unsigned>(mo), static_cast<unsigned>(d))) *
                kSecondsPerDay;
    pos = 11;
  }
  int h = 0, mi = 0, sec = 0;
  const std::size_t hour_digits = pos + 1 < s.size() && s[pos + 1] == ':' ? 1 : 2;
  if (!digits(s, pos, hour_digits, h) || pos + hour_digits >= s.size() ||
      s[pos + hour_digits] != ':')
    return std::nullopt;
  pos += hour_digits + 1;
  if (!digits(s, pos, 2, mi)) return std::nullopt;
  pos += 2;
  double frac = 0.0;
  if (pos < s.size() && s[pos] == ':') {
    if (!digits(s, pos + 1, 2, sec)) return std::nullopt;
    pos += 3;
    if (pos < s.size() && s[pos] == '.') {
      double scale = 0.1;
      for (++pos; pos < s.size() && std::isdigit(static_cast<unsigned char>(s[pos])); ++pos) {
        frac += (s[pos] - '0') * scale;
        scale /= 10.0;
      }
    }
  }
  if (h > 23 || mi > 59 || sec > 59) return std::nullopt;
  double offset = 0.0;  // a dated time's UTC offset
  if (pos < s.size()) {
    if (!t.dated) return std::nullopt;
    if ((s[pos] == 'Z' || s[pos] == 'z') && pos + 1 == s.size()) {
      pos = s.size();
    } else if ((s[pos] == '+' || s[pos] == '-') && pos + 6 == s.size() && s[pos + 3] == ':') {
      int oh = 0, om = 0;
      if (!digits(s, pos + 1, 2, oh) || !digits(s, pos + 4, 2, om)) return std::nullopt;
      offset = (s[pos] == '+' ? 1.0 : -1.0) * (oh * 3600.0 + om * 60.0);
    } else {
      return std::nullopt;
    }
  }
  t.seconds += h * 3600.0 + mi * 60.0 + sec + frac - offset;
  return t;
}

}  // namespace

std::optional<Time> trial_clock_time(const std::string& written) {
  const auto t = clock_time(written);
  if (!t) return std::nullopt;
  return Time::from_value(t->seconds);
}

bool trial_time_has_clock_form(const std::string& written) {
  static const std::regex form(
      R"(\s*(\d{4}-\d{1,2}-\d{1,2}[Tt ])?\d{1,2}:\d{1,2}(:\d{1,2}(\.\d+)?)?([Zz]|[+-]\d{2}:\d{2})?\s*)");
  return std::regex_match(written, form);
}

std::optional<Time> trial_interval(const std::string& earlier, const std::string& later) {
  const auto a = clock_time(earlier);
  const auto b = clock_time(later);
  if (!a || !b || a->dated != b->dated) return std::nullopt;
  double d = b->seconds - a->seconds;
  if (!a->dated && d < 0.0) d += kSecondsPerDay;  // past midnight
  return Time::from_value(d);
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
  if (i != ref) in.rap_step = trial.steps[i].circulation.cvp;
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
  if (r.ppv && s.ppv) {
    // A PPV measured during a leg raise or an occlusion is not the patient's state.
    auto during = [](const TrialStep& t) {
      return t.manoeuvre && (*t.manoeuvre == PreloadTestKind::passive_leg_raising ||
                             *t.manoeuvre == PreloadTestKind::end_expiratory_occlusion);
    };
    if (during(s.recorded))
      out.ppv_not_read = HeartLungComparison::PpvNotRead{s.label, *s.recorded.manoeuvre};
    else if (during(r.recorded))
      out.ppv_not_read = HeartLungComparison::PpvNotRead{r.label, *r.recorded.manoeuvre};
    else
      out.observed_ppv_change = ppv_absolute_change(*r.ppv, *s.ppv);
  }
  if (in.rap && in.rap_step) out.observed_cvp_change = *in.rap_step - *in.rap;
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

// Two steps at the challenge's volumes and settings; `refused` when they are not the manoeuvre.
struct ChallengePair {
  std::size_t low = 0;
  std::size_t high = 0;
  std::optional<Time> interval;
  std::optional<VtChallengeRefusal> refused;
};

std::vector<ChallengePair> challenge_pairs(const Trial& trial, const TrialAnalysis& a,
                                           const Thresholds& limits) {
  const Time max = limits.get<Time>("trial.vt_challenge_max_interval");
  std::vector<ChallengePair> out;
  for (std::size_t i = 0; i < a.steps.size(); ++i) {
    for (std::size_t j = 0; j < a.steps.size(); ++j) {
      if (i == j || !challenge_volumes(a.steps[i], a.steps[j], limits)) continue;
      // A step marked as another manoeuvre is read as that one (manoeuvres.cpp).
      if (trial.steps[i].manoeuvre || trial.steps[j].manoeuvre) continue;
      if (!same_except_vt(trial.steps[i], trial.steps[j], limits)) continue;
      ChallengePair p{i, j, std::nullopt, std::nullopt};
      const std::size_t first = std::min(i, j), second = std::max(i, j);
      p.interval = trial_interval(trial.steps[first].time, trial.steps[second].time);
      if (j < i) {
        p.refused = VtChallengeRefusal::wrong_order;
      } else if (j != i + 1) {
        p.refused = VtChallengeRefusal::not_consecutive;
      } else if (trial.steps[j].voided_before) {
        p.refused = VtChallengeRefusal::voided_between;
      } else if (p.interval && cutoff::above(*p.interval, max)) {
        p.refused = VtChallengeRefusal::too_far_apart;
      }
      out.push_back(p);
    }
  }
  return out;
}

// The conditions of the manoeuvre checked at one step (rhythm, effort, HR/RR, closed chest; the
// PPV conditions of haemodynamics.hpp), their keys prefixed with the step's role. Their bias is
// that of the manoeuvre ([bias.vt_challenge.*]: each fails it whichever way it reads), never
// that of PPV alone.
void step_conditions(const TrialStep& step, const StepAnalysis& s, const char* prefix,
                     const Thresholds& limits, std::vector<Gate>& out) {
  static const char* const kKeys[] = {"passive_ventilation", "regular_rhythm", "hr_rr_ratio",
                                      "closed_chest"};
  for (Gate g : ppv_gates(trial_ppv_conditions(step, s.mechanics_results), limits)) {
    if (std::find_if(std::begin(kKeys), std::end(kKeys),
                     [&](const char* k) { return g.key == k; }) == std::end(kKeys))
      continue;
    std::vector<Gate> one{std::move(g)};
    one[0].bias = Bias::either;  // when no entry exists: the reading that never overstates
    one[0].bias_source.clear();
    apply_bias(one, "vt_challenge", limits);
    one[0].key = prefix + one[0].key;
    out.push_back(std::move(one[0]));
  }
}

// Passive at both steps: true; effort at either: false; otherwise unknown.
std::optional<bool> passive_at_both(const TrialStep& a, const TrialStep& b) {
  const auto& ea = a.circulation.spontaneous_effort;
  const auto& eb = b.circulation.spontaneous_effort;
  if ((ea && *ea) || (eb && *eb)) return false;
  if (ea && eb) return true;
  return std::nullopt;
}

// Marks the high-VT step of each challenge that is read (before the best-step findings).
void mark_challenge_steps(TrialAnalysis& a, const std::vector<ChallengePair>& pairs) {
  for (const ChallengePair& p : pairs) {
    if (!p.refused) a.steps[p.high].vt_challenge_from = a.steps[p.low].label;
  }
}

void vt_challenges(const Trial& trial, TrialAnalysis& a, const std::vector<ChallengePair>& pairs,
                   const Thresholds& limits) {
  for (const ChallengePair& p : pairs) {
    StepAnalysis& hi = a.steps[p.high];
    const StepAnalysis& lo = a.steps[p.low];
    Finding f;
    f.kind = FindingKind::vt_challenge;
    f.steps = {lo.label, hi.label};
    f.source = "Myatra et al., Crit Care Med 2017;45:415";
    VtChallengeFinding detail;
    detail.ppv_low = lo.ppv;
    detail.ppv_high = hi.ppv;
    detail.interval = p.interval;
    detail.max_interval = limits.get<Time>("trial.vt_challenge_max_interval");
    detail.refused = p.refused;
    if (p.refused || !lo.ppv || !hi.ppv) {
      step_conditions(trial.steps[p.low], lo, kVtChallengeLowStep, limits, detail.conditions);
      step_conditions(trial.steps[p.high], hi, kVtChallengeHighStep, limits, detail.conditions);
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
    in.passive = passive_at_both(trial.steps[p.low], trial.steps[p.high]);
    PreloadTestResult r = analyse_preload_test(in, limits);
    // The manoeuvre's own conditions, with "no breathing effort" checked at each step instead.
    std::vector<Gate> gates;
    for (const Gate& g : r.conditions) {
      if (g.key != "passive_ventilation") gates.push_back(g);
    }
    step_conditions(trial.steps[p.low], lo, kVtChallengeLowStep, limits, gates);
    step_conditions(trial.steps[p.high], hi, kVtChallengeHighStep, limits, gates);
    r.conditions = gates;
    r.reading = read_preload_change(in.kind, r.change, gates, limits);
    PreloadIndexReading idx =
        preload_reading("vt_challenge", PreloadIndex::vt_challenge, gates, r.reading);
    idx.test_inputs = in;
    idx.test = r;
    idx.from_step = lo.label;
    idx.to_step = hi.label;
    f.flagged = idx.direction == PreloadDirection::responsive;
    hi.preload.push_back(std::move(idx));
    hi.preload_statement = preload_statement(hi.preload);
    detail.result = r;
    detail.conditions = gates;
    f.detail = detail;
    a.comparison.push_back(f);
  }
}

// ---- comparison (docs/methods.md, "Comparing steps of a PEEP trial") ----

template <class Q, class Get>
std::vector<std::optional<Q>> collect(const TrialAnalysis& a, Get get) {
  std::vector<std::optional<Q>> v;
  for (const auto& s : a.steps) v.push_back(get(s));
  return v;
}

// A step that may be chosen as a setting (a tidal-volume challenge step and a step marked as a
// manoeuvre are brief manoeuvres).
bool candidate(const StepAnalysis& s) {
  return !s.vt_challenge_from && !s.manoeuvre_from;
}

// The best candidate step by `by`, with every candidate step tied within `resolution`
// (Q: absolute; Ratio: relative to the best value).
template <class Q, class R>
void best_step(TrialAnalysis& a, FindingKind kind, const char* source,
               const std::vector<std::optional<Q>>& values, BestBy by, R resolution) {
  const auto best = best_step_index(values, by);
  if (!best) return;
  constexpr bool relative = std::is_same_v<R, Ratio>;
  double res = 0.0;
  if constexpr (relative) {
    res = in_fraction(resolution);
  } else {
    res = resolution.value();
  }
  BestStepFinding detail{*values[*best], {}, resolution};
  Finding f{kind, {a.steps[*best].label}, false, source, {}};
  for (const std::size_t i : tied_steps_si(si_values(values), *best, res, relative)) {
    f.steps.push_back(a.steps[i].label);
    detail.tied.push_back(*values[i]);
  }
  f.detail = detail;
  a.comparison.push_back(f);
}

void best_steps(TrialAnalysis& a, const Thresholds& limits) {
  const auto crs = collect<Compliance>(a, [](const StepAnalysis& s) {
    return candidate(s) ? s.mechanics_results.compliance_static : std::nullopt;
  });
  best_step(a, FindingKind::best_compliance, "Suter, Fairley & Isenberg, N Engl J Med 1975;292:284",
            crs, BestBy::maximum, limits.get<Compliance>("trial.resolution_compliance"));
  const auto do2 = collect<Flow>(
      a, [](const StepAnalysis& s) { return candidate(s) ? s.oxygen_results.do2 : std::nullopt; });
  best_step(a, FindingKind::max_do2, "Suter, Fairley & Isenberg, N Engl J Med 1975;292:284", do2,
            BestBy::maximum, limits.get<Ratio>("trial.resolution_do2"));
  const auto dp = collect<Pressure>(a, [](const StepAnalysis& s) {
    return candidate(s) ? s.mechanics_results.driving_pressure : std::nullopt;
  });
  best_step(a, FindingKind::lowest_driving_pressure, "Amato et al., N Engl J Med 2015;372:747", dp,
            BestBy::minimum, limits.get<Pressure>("trial.resolution_driving_pressure"));
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

// Fall in CO, DO2 or MAP at each step against the reference step (as the heart-lung table).
template <class Q>
void costs_of(TrialAnalysis& a, const std::vector<std::optional<Q>>& values, CostMeasure measure,
              std::size_t ref, const Thresholds& limits) {
  if (!values[ref]) return;
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (i == ref || !values[i]) continue;
    const HaemodynamicCost c = haemodynamic_cost(*values[ref], *values[i], limits);
    if (!c.flagged) continue;
    a.comparison.push_back(
        {FindingKind::haemodynamic_cost,
         {a.steps[i].label, a.steps[ref].label},
         true,
         limits.source("heart_lung.haemodynamic_cost_fall"),
         HaemodynamicCostFinding{measure, *values[i], *values[ref], c.change, c.flag_at}});
  }
}

void haemodynamic_costs(TrialAnalysis& a, std::size_t ref, const Thresholds& limits) {
  const auto co = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.co_used; });
  costs_of<Flow>(a, co, CostMeasure::co, ref, limits);
  const auto do2 = collect<Flow>(a, [](const StepAnalysis& s) { return s.oxygen_results.do2; });
  costs_of<Flow>(a, do2, CostMeasure::do2, ref, limits);
  const auto map = collect<Pressure>(a, [](const StepAnalysis& s) { return s.map; });
  costs_of<Pressure>(a, map, CostMeasure::map, ref, limits);
}

void oxygenation_gain(TrialAnalysis& a, std::size_t ref) {
  auto pf = collect<Pressure>(a, [](const StepAnalysis& s) {
    return candidate(s) ? s.oxygen_results.pf_ratio : std::nullopt;
  });
  const auto best = best_step_index(pf, BestBy::maximum);
  pf[ref] = a.steps[ref].oxygen_results.pf_ratio;
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
      // High recruitability, or a release that cannot be interpreted, is worth a look.
      f.flagged = detail.result->high_recruitability || !detail.result->interpretable;
    } catch (const InputError& e) {
      detail.not_computed = e;
    }
    a.comparison.push_back(f);
  }
}

// The trade-off the user must weigh: the best-oxygenating step against its circulatory cost.
void trade_off(TrialAnalysis& a) {
  const auto pf = collect<Pressure>(a, [](const StepAnalysis& s) {
    return candidate(s) ? s.oxygen_results.pf_ratio : std::nullopt;
  });
  const auto best = best_step_index(pf, BestBy::maximum);
  if (!best) return;
  const StepAnalysis& s = a.steps[*best];
  TradeOffFinding detail{
      *pf[*best], {}, s.ppv, s.preload_statement.category, s.preload_statement.conditional};
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

// Shock context: MAP below the target and lactate above the limit, each as one finding naming
// the steps; lactate between time-stamped measurements.
void shock_context(TrialAnalysis& a, const Thresholds& limits) {
  const Pressure target = limits.get<Pressure>("trial.map_target");
  Finding map{FindingKind::map_below_target, {}, true, limits.source("trial.map_target"), {}};
  ShockContextFinding low{{}, target, {}};
  const AmountConcentration high = limits.get<AmountConcentration>("trial.lactate_high");
  Finding lactate{
      FindingKind::lactate_above_limit, {}, true, limits.source("trial.lactate_high"), {}};
  ShockContextFinding raised{{}, high, {}};
  Finding change{FindingKind::lactate_change, {}, false, "", {}};
  LactateChangeFinding changes;
  for (const StepAnalysis& s : a.steps) {
    if (s.map && cutoff::below(*s.map, target)) {
      map.steps.push_back(s.label);
      low.values.push_back(*s.map);
      low.map_estimated.push_back(s.map_estimated);
    }
    const auto& lac = s.recorded.gases.lactate;
    if (!lac) continue;
    if (cutoff::above(*lac, high)) {
      lactate.steps.push_back(s.label);
      raised.values.push_back(*lac);
    }
    if (!trial_clock_time(s.time)) continue;
    if (!changes.measurements.empty()) {
      const auto interval = trial_interval(changes.measurements.back().time, s.time);
      if (!interval) continue;  // a time that cannot be set against the previous one
      const AmountConcentration before = changes.measurements.back().value;
      changes.changes.push_back({*lac - before, fractional_change(before, *lac), *interval});
    }
    change.steps.push_back(s.label);
    changes.measurements.push_back({*lac, s.time});
  }
  if (!map.steps.empty()) {
    map.detail = low;
    a.comparison.push_back(map);
  }
  if (!lactate.steps.empty()) {
    lactate.detail = raised;
    a.comparison.push_back(lactate);
  }
  if (!changes.changes.empty()) {
    change.detail = changes;
    a.comparison.push_back(change);
  }
}

}  // namespace

TrialAnalysis analyse_trial(const Trial& trial, const Thresholds& limits,
                            const std::optional<std::string>& reference) {
  TrialAnalysis a;
  a.file = trial.file;
  a.patient = trial.patient;
  a.voided = trial.voided;
  a.date = trial.date;
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
  const std::vector<ChallengePair> challenges = challenge_pairs(trial, a, limits);
  mark_challenge_steps(a, challenges);
  mark_manoeuvre_steps(trial, a);
  best_steps(a, limits);
  limit_breaches(a, limits);
  haemodynamic_costs(a, ref, limits);
  oxygenation_gain(a, ref);
  recruitment(trial, a, limits);
  vt_challenges(trial, a, challenges, limits);
  manoeuvre_findings(trial, a, limits);
  trade_off(a);
  shock_context(a, limits);
  for (const TrialStep& s : trial.steps) {
    if (s.waveform && !s.waveform->analysed)
      a.unanalysed_waveforms.push_back({s.label, s.waveform->file, s.waveform->window_refused});
  }
  for (const char* key :
       {"mechanics.pplat_max", "mechanics.driving_pressure_max", "mechanics.mechanical_power_max",
        "heart_lung.haemodynamic_cost_fall", "ppv.grey_zone_low", "ppv.grey_zone_high",
        "trial.map_target", "trial.lactate_high"}) {
    if (limits.has(key)) a.thresholds_used.emplace_back(key, limits.entry(key));
  }
  return a;
}

}  // namespace bb
