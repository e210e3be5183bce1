// Analysis of hand-built trials. The trial texts are test fixtures; every
// expected value is worked from the published formula named beside it.
#include <gtest/gtest.h>

#include <algorithm>
#include <variant>

#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"

namespace bb {
namespace {

TrialAnalysis analyse(const std::string& text,
                      std::optional<std::string> reference = std::nullopt) {
  const LoadedTrial t = load_trial_text(text, "fixture.toml", TrialReadOptions{});
  return analyse_trial(t.trial, t.limits, reference);
}

std::vector<const Finding*> findings(const TrialAnalysis& a, FindingKind kind) {
  std::vector<const Finding*> out;
  for (const auto& f : a.comparison) {
    if (f.kind == kind) out.push_back(&f);
  }
  return out;
}

bool has_failed_gate(const PreloadStatement& s, const std::string& index, const std::string& gate) {
  return std::any_of(s.failed_gates.begin(), s.failed_gates.end(),
                     [&](const FailedGate& g) { return g.index == index && g.gate == gate; });
}

const PreloadIndexReading* index_of(const StepAnalysis& s, const std::string& key) {
  for (const auto& i : s.preload) {
    if (i.key == key) return &i;
  }
  return nullptr;
}

// Passive, regular rhythm, closed chest: every PPV condition but VT and Crs stated.
const char* kPassive = R"(
spontaneous_effort = false
rhythm_regular = true
chest_open = false
intra_abdominal_hypertension = false
rv_failure = false
)";

// ---- a PEEP step lowering CO by 15 % ----------------------------------------------

TEST(TrialAnalysis, PeepStepLoweringCardiacOutputBy15PercentIsFlagged) {
  const std::string text = R"(
[patient]
sex = "female"
height = 165

[[step]]
label = "PEEP 5"
[step.ventilator]
set_peep = 5
vt = 400
fio2 = "50%"
[step.hold]
pplat = 20
peep_total = 5
[step.circulation]
co = "5.0 L/min"
map = 70

[[step]]
label = "PEEP 15"
[step.ventilator]
set_peep = 15
vt = 400
fio2 = "50%"
[step.hold]
pplat = 28
peep_total = 15
[step.circulation]
co = "4.25 L/min"
map = 66
)";
  const TrialAnalysis a = analyse(text);
  const auto costs = findings(a, FindingKind::haemodynamic_cost);
  ASSERT_EQ(costs.size(), 1u);  // MAP fell 5.7 %, below the 10 % flag: only CO is flagged
  EXPECT_EQ(costs[0]->steps.front(), "PEEP 15");
  EXPECT_TRUE(costs[0]->flagged);
  // (4.25 - 5.0) / 5.0 = -15 %: fractional change, common practice, no source;
  // flagged at a fall >= 10 % (heart_lung.haemodynamic_cost_fall: common practice, no source).
  const auto& cost = std::get<HaemodynamicCostFinding>(costs[0]->detail);
  EXPECT_EQ(cost.measure, CostMeasure::co);
  EXPECT_NEAR(in_percent(cost.change), -15.0, 1e-9);
  EXPECT_NEAR(in_L_per_min(std::get<Flow>(cost.value)), 4.25, 1e-9);
  EXPECT_NEAR(in_L_per_min(std::get<Flow>(cost.reference_value)), 5.0, 1e-9);
  EXPECT_EQ(costs[0]->steps[1], "PEEP 5");  // against the reference step

  // The observed change beside the heart-lung estimate is the same -15 %.
  ASSERT_TRUE(a.heart_lung[1].observed_co_change.has_value());
  EXPECT_NEAR(in_percent(*a.heart_lung[1].observed_co_change), -15.0, 1e-9);
  EXPECT_FALSE(a.heart_lung[0].observed_co_change.has_value());  // the reference itself

  // Lowest driving pressure: PEEP 5 has 20-5 = 15, PEEP 15 has 28-15 = 13 cmH2O
  // (dP = Pplat - PEEP; Amato et al., N Engl J Med 2015;372:747).
  const auto lowest = findings(a, FindingKind::lowest_driving_pressure);
  ASSERT_EQ(lowest.size(), 1u);
  EXPECT_EQ(lowest[0]->steps.front(), "PEEP 15");
  EXPECT_NEAR(in_cmH2O(std::get<Pressure>(std::get<BestStepFinding>(lowest[0]->detail).value)),
              13.0, 1e-9);
  // Best compliance: 400/15 = 26.7 against 400/13 = 30.8 mL/cmH2O (Suter et al., NEJM
  // 1975;292:284).
  const auto best = findings(a, FindingKind::best_compliance);
  ASSERT_EQ(best.size(), 1u);
  EXPECT_EQ(best[0]->steps.front(), "PEEP 15");
  EXPECT_NEAR(
      in_mL_per_cmH2O(std::get<Compliance>(std::get<BestStepFinding>(best[0]->detail).value)),
      400.0 / 13.0, 1e-6);
}

TEST(TrialAnalysis, PlateauAboveThirtyIsALimitBreachFinding) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "PEEP 16"
[step.ventilator]
vt = 450
[step.hold]
pplat = 32
peep_total = 16
)";
  // Pplat 32 > 30 cmH2O (ARDS Network, NEJM 2000;342:1301); dP = 32 - 16 = 16 > 15 cmH2O
  // (Amato et al., NEJM 2015;372:747): two limits, in the mechanics module's order.
  const TrialAnalysis a = analyse(text);
  const auto breaches = findings(a, FindingKind::limit_breach);
  ASSERT_EQ(breaches.size(), 2u);
  EXPECT_EQ(std::get<LimitBreachFinding>(breaches[0]->detail).limit, MechanicsLimit::pplat);
  EXPECT_EQ(std::get<LimitBreachFinding>(breaches[1]->detail).limit,
            MechanicsLimit::driving_pressure);
  EXPECT_TRUE(breaches[0]->flagged);
  EXPECT_EQ(breaches[0]->steps, std::vector<std::string>{"PEEP 16"});
}

TEST(TrialAnalysis, FallBelowTenPercentIsNotFlagged) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "a"
[step.circulation]
co = 5.0
[[step]]
label = "b"
[step.circulation]
co = 4.6
)";
  // (4.6 - 5.0)/5.0 = -8 %, under the 10 % flag (common practice, no source).
  EXPECT_TRUE(findings(analyse(text), FindingKind::haemodynamic_cost).empty());
}

// ---- oesophageal pressure: measured Ecw/Ers, the range collapses -----------------------

TEST(TrialAnalysis, OesophagealPressureCollapsesTheRange) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180

[[step]]
label = "PEEP 10"
[step.ventilator]
vt = 500
[step.hold]
pplat = 25
peep_total = 10
pes_ee = 8
pes_ei = 12

[[step]]
label = "PEEP 15"
[step.ventilator]
vt = 500
[step.hold]
pplat = 30
peep_total = 15
pes_ee = 11
pes_ei = 15
)";
  const TrialAnalysis a = analyse(text);
  const HeartLungComparison& h = a.heart_lung[1];
  ASSERT_TRUE(h.estimate.has_value());
  EXPECT_EQ(h.estimate->ecw_ers_origin, ElastanceRatioOrigin::measured);
  // Ecw = dPes/VT = 4/0.5 = 8 cmH2O/L; Ers = dP/VT = 15/0.5 = 30 cmH2O/L; Ecw/Ers = 0.2667
  // (Gattinoni/Chiumello, AJRCCM 2008;178:346, from memory).
  const HeartLungEstimate& e = *h.estimate;
  EXPECT_NEAR(in_fraction(e.ecw_ers.central), 4.0 / 15.0, 1e-9);
  EXPECT_TRUE(e.ecw_ers.single());  // a single value, not a range
  // dPpl = dPEEP * Ecw/Ers = 5 * 0.2667 = 1.333 cmH2O (Gattinoni et al., AJRCCM 1998, from
  // memory).
  ASSERT_TRUE(e.pleural_pressure_change.has_value());
  EXPECT_NEAR(in_cmH2O(e.pleural_pressure_change->central), 5.0 * 4.0 / 15.0, 1e-9);
  EXPECT_TRUE(e.pleural_pressure_change->single());
  // Tidal swing = dP * Ecw/Ers = 15 * 0.2667 = 4.0 cmH2O (same source).
  ASSERT_TRUE(e.tidal_pleural_swing.has_value());
  EXPECT_NEAR(in_cmH2O(e.tidal_pleural_swing->central), 4.0, 1e-9);
}

TEST(TrialAnalysis, WithoutOesophagealPressureTheEstimateIsARange) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "PEEP 10"
[step.ventilator]
vt = 500
[step.hold]
pplat = 25
peep_total = 10
[step.circulation]
cvp = 10
pmsf = 20
[[step]]
label = "PEEP 15"
[step.ventilator]
vt = 500
[step.hold]
pplat = 30
peep_total = 15
)";
  const TrialAnalysis a = analyse(text);
  const HeartLungComparison& h = a.heart_lung[1];
  EXPECT_EQ(h.estimate->ecw_ers_origin, ElastanceRatioOrigin::preset_range);
  const auto& rap = h.estimate->right_atrial_pressure_change;
  ASSERT_TRUE(rap.has_value());
  // dRAP = 5 cmH2O * (0.2 .. 0.8) = 1.0 .. 4.0 cmH2O = 0.7355 .. 2.942 mmHg
  // (preset Ecw/Ers range 0.2-0.8, Gattinoni 1998 from memory; 1 cmH2O = 0.735559 mmHg, NIST SP
  // 811).
  EXPECT_NEAR(in_mmHg(rap->low), 1.0 * 0.735559, 1e-4);
  EXPECT_NEAR(in_mmHg(rap->high), 4.0 * 0.735559, 1e-4);
  // Venous-return gradient change = -dRAP/(Pmsf - RAP) = -(0.7355 .. 2.942)/10 = -7.4 .. -29.4 %
  // (Guyton; van den Berg et al., J Appl Physiol 2002;92:1223, from memory).
  const auto& vr = h.estimate->venous_return_gradient_change;
  ASSERT_TRUE(vr.has_value());
  EXPECT_NEAR(in_percent(vr->low), -4.0 * 0.735559 / 10.0 * 100.0, 1e-3);
  EXPECT_NEAR(in_percent(vr->high), -1.0 * 0.735559 / 10.0 * 100.0, 1e-3);
}

// ---- VT 6 mL/kg fails the PPV gate; the tidal-volume challenge decides ------------------

TEST(TrialAnalysis, TidalVolumeChallengeDecidesWhenPpvAtSixMlPerKgIsNotValid) {
  // Male 170 cm: PBW = 50 + 0.91 (170 - 152.4) = 66.016 kg (ARDS Network, NEJM 2000;342:1301);
  // 6 mL/kg = 396 mL; 530 mL = 8.03 mL/kg (528 mL would be 7.998, just under the gate).
  const std::string text = std::string(R"(
[patient]
sex = "male"
height = 170
[[step]]
label = "VT 6"
[step.ventilator]
mode = "vc"
set_peep = 10
vt = 396
rr = 20
fio2 = "50%"
[step.hold]
peep_total = 10
pplat = 20
[step.circulation]
hr = 100
pp_cycles = "42/38, 42/38, 42/38"
)") + kPassive + R"(
[[step]]
label = "VT 8"
[step.ventilator]
mode = "vc"
set_peep = 10
vt = 530
rr = 20
fio2 = "50%"
[step.hold]
peep_total = 10
pplat = 23
[step.circulation]
hr = 100
pp_cycles = "44/38, 44/38, 44/38"
)" + kPassive;
  const TrialAnalysis a = analyse(text);
  // At 6 mL/kg the PPV gate "VT >= 8 mL/kg PBW" fails (De Backer et al., ICM 2005;31:517).
  const PreloadIndexReading* ppv6 = index_of(a.steps[0], "ppv");
  ASSERT_NE(ppv6, nullptr);
  EXPECT_EQ(ppv6->direction, PreloadDirection::not_valid);
  EXPECT_EQ(a.steps[0].preload_statement.category, PreloadCategory::not_assessable);
  EXPECT_TRUE(has_failed_gate(a.steps[0].preload_statement, "ppv", "vt_per_kg_pbw"));
  // PPV per breath = (PPmax - PPmin)/mean: 4/40 = 10.0 % and 6/41 = 14.63 % (Michard et al., AJRCCM
  // 2000;162:134).
  ASSERT_TRUE(a.steps[0].ppv && a.steps[1].ppv);
  EXPECT_NEAR(in_percent(*a.steps[0].ppv), 10.0, 1e-9);
  EXPECT_NEAR(in_percent(*a.steps[1].ppv), 6.0 / 41.0 * 100.0, 1e-9);
  // The challenge: +4.63 points >= 3.5 -> responsive (Myatra et al., Crit Care Med 2017;45:415).
  const PreloadIndexReading* challenge = index_of(a.steps[1], "vt_challenge");
  ASSERT_NE(challenge, nullptr);
  EXPECT_EQ(challenge->direction, PreloadDirection::responsive);
  ASSERT_TRUE(challenge->test.has_value());
  EXPECT_TRUE(challenge->test->change_is_points);
  EXPECT_NEAR(in_percent(challenge->test->change), 6.0 / 41.0 * 100.0 - 10.0, 1e-6);
  EXPECT_EQ(challenge->from_step, "VT 6");
  EXPECT_EQ(challenge->to_step, "VT 8");
  EXPECT_EQ(a.steps[1].preload_statement.category, PreloadCategory::likely_responsive);
  const auto& supporting = a.steps[1].preload_statement.supporting;
  EXPECT_NE(std::find(supporting.begin(), supporting.end(), "vt_challenge"), supporting.end());
  const auto vt = findings(a, FindingKind::vt_challenge);
  ASSERT_EQ(vt.size(), 1u);
  EXPECT_TRUE(vt[0]->flagged);
  const auto& detail = std::get<VtChallengeFinding>(vt[0]->detail);
  ASSERT_TRUE(detail.result.has_value());
  EXPECT_NEAR(in_percent(detail.result->change), 6.0 / 41.0 * 100.0 - 10.0, 1e-6);
}

// ---- disagreeing indices: indeterminate ------------------------------------------------

TEST(TrialAnalysis, DisagreeingValidIndicesAreIndeterminate) {
  const std::string text = std::string(R"(
[patient]
sex = "male"
height = 170
[[step]]
label = "VT 8"
[step.ventilator]
set_peep = 8
vt = 530
rr = 20
[step.hold]
peep_total = 8
pplat = 22
[step.circulation]
hr = 100
ppv = "16%"
)") + kPassive + R"(
[step.preload.plr]
before = "5.0 L/min"
after = "5.2 L/min"
)";
  const TrialAnalysis a = analyse(text);
  // PPV 16 % > 13 % -> responsive (Michard et al., AJRCCM 2000;162:134); all gates met:
  // VT 8.0 mL/kg (De Backer 2005), HR/RR 5 > 3.6 (De Backer 2009), Crs 530/14 = 37.9 > 30 (Monnet
  // 2012).
  const PreloadIndexReading* ppv = index_of(a.steps[0], "ppv_monitor");
  ASSERT_NE(ppv, nullptr);
  EXPECT_EQ(ppv->direction, PreloadDirection::responsive);
  // PLR: (5.2 - 5.0)/5.0 = +4 % < 10 % -> not responsive (Monnet et al., Crit Care Med
  // 2006;34:1402).
  const PreloadIndexReading* plr = index_of(a.steps[0], "plr");
  ASSERT_NE(plr, nullptr);
  EXPECT_EQ(plr->direction, PreloadDirection::unresponsive);
  EXPECT_EQ(a.steps[0].preload_statement.category, PreloadCategory::indeterminate);
  EXPECT_EQ(a.steps[0].preload_statement.supporting.size(), 2u);
  EXPECT_EQ(a.steps[0].preload_statement.responsive, std::vector<std::string>{"ppv_monitor"});
  EXPECT_EQ(a.steps[0].preload_statement.unresponsive, std::vector<std::string>{"plr"});
}

// ---- no valid index: not assessable -------------------------------------------------------

TEST(TrialAnalysis, NoValidIndexIsNotAssessable) {
  const std::string text = R"(
[patient]
sex = "female"
height = 160
[[step]]
label = "PSV"
[step.ventilator]
vt = 420
rr = 18
[step.circulation]
hr = 120
rhythm_regular = false
spontaneous_effort = true
ppv = "18%"
[step.ultrasound]
ivc_dmax = 2.0
ivc_dmin = 1.6
ivc_breathing = "passive"
)";
  const TrialAnalysis a = analyse(text);
  // Spontaneous effort and an irregular rhythm fail the PPV conditions (Michard et al., Am J
  // Respir Crit Care Med 2000;162:134: passive patients in regular rhythm); IVC distensibility
  // needs a passive patient (Barbier et al., ICM 2004;30:1740).
  const PreloadStatement& s = a.steps[0].preload_statement;
  EXPECT_EQ(s.category, PreloadCategory::not_assessable);
  EXPECT_TRUE(s.any_index);
  EXPECT_TRUE(s.supporting.empty());
  EXPECT_TRUE(has_failed_gate(s, "ppv_monitor", "passive_ventilation"));
  EXPECT_TRUE(has_failed_gate(s, "ppv_monitor", "regular_rhythm"));
}

// ---- reference step -------------------------------------------------------------------

TEST(TrialAnalysis, UnknownReferenceLabelIsAnInputErrorWithSuggestion) {
  const std::string text = R"(
[patient]
sex = "female"
height = 160
[[step]]
label = "PEEP 8"
[[step]]
label = "PEEP 12"
)";
  try {
    analyse(text, std::string("PEEP 13"));
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "reference");
    EXPECT_NE(std::string(e.what()).find("PEEP 12"), std::string::npos);
  }
  EXPECT_EQ(analyse(text, std::string("PEEP 12")).reference, "PEEP 12");
}

TEST(TrialAnalysis, RecruitmentToInflationRatioFromPeepRelease) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "PEEP 15"
[step.ventilator]
vt = 400
[step.peep_release]
delta_eelv = 300
peep_high = 15
peep_low = 5
pplat_low = 25
)";
  const TrialAnalysis a = analyse(text);
  const auto ri = findings(a, FindingKind::recruitment_to_inflation);
  ASSERT_EQ(ri.size(), 1u);
  // Crs,low = 400/(25-5) = 20 mL/cmH2O; dVrec = 300 - 20*10 = 100 mL; Crec = 10 mL/cmH2O;
  // R/I = 10/20 = 0.5 (Chen et al., AJRCCM 2020;201:178), at the 0.5 cut-off -> high
  // recruitability.
  const auto& r = std::get<RecruitmentFinding>(ri[0]->detail).result;
  ASSERT_TRUE(r.has_value());
  EXPECT_NEAR(in_fraction(r->ratio), 0.5, 1e-9);
  EXPECT_NEAR(in_mL(r->recruited_volume), 100.0, 1e-9);
  EXPECT_NEAR(in_mL_per_cmH2O(r->compliance_low), 20.0, 1e-9);
  EXPECT_TRUE(ri[0]->flagged);
}

// ---- the tidal-volume challenge is a defined manoeuvre ---------------------------------
// Myatra et al., Crit Care Med 2017;45:415: VT raised from 6 to 8 mL/kg PBW for one minute in
// passive patients in regular rhythm; PPV rising by >= 3.5 points reads responsive.

// One step of a challenge fixture: male 170 cm, PBW 66.016 kg (ARDS Network, NEJM
// 2000;342:1301): 396 mL = 6.0, 530 mL = 8.03 mL/kg PBW; PEEP 10, RR 20, HR 100 (HR/RR 5).
std::string challenge_step(const std::string& label, int vt, const std::string& pp_cycles,
                           const std::string& time = "", int peep = 10,
                           const std::string& conditions = kPassive, int hr = 100) {
  std::string s = "\n[[step]]\nlabel = \"" + label + "\"\n";
  if (!time.empty()) s += "time = \"" + time + "\"\n";
  s += "[step.ventilator]\nmode = \"vc\"\nset_peep = " + std::to_string(peep) +
       "\nvt = " + std::to_string(vt) +
       "\nrr = 20\nfio2 = \"50%\"\n[step.hold]\npeep_total = " + std::to_string(peep) +
       "\npplat = " + std::to_string(peep + (vt > 450 ? 13 : 10)) +
       "\n[step.circulation]\nhr = " + std::to_string(hr) + "\npp_cycles = \"" + pp_cycles +
       "\"\n" + conditions;
  return s;
}
const char* kPatient170 = "[patient]\nsex = \"male\"\nheight = 170\n";
// PPV 4/40 = 10.0 % and 6/41 = 14.63 % (Michard et al., AJRCCM 2000;162:134): +4.63 points.
const char* kLowCycles = "42/38, 42/38, 42/38";
const char* kHighCycles = "44/38, 44/38, 44/38";

std::string with(std::string text, const std::string& from, const std::string& to) {
  const auto at = text.find(from);
  if (at != std::string::npos) text.replace(at, from.size(), to);
  return text;
}

const VtChallengeFinding& only_challenge(const TrialAnalysis& a) {
  const auto vt = findings(a, FindingKind::vt_challenge);
  EXPECT_EQ(vt.size(), 1u);
  return std::get<VtChallengeFinding>(vt.at(0)->detail);
}

bool gate_failed(const std::vector<Gate>& gates, const std::string& key) {
  return std::any_of(gates.begin(), gates.end(),
                     [&](const Gate& g) { return g.key == key && g.state == GateState::failed; });
}

TEST(VtChallenge, FailedConditionAtTheLowStepMakesItNotInterpretable) {
  // An irregular rhythm at the 6 mL/kg step: PPV there says nothing about the tidal swing.
  const TrialAnalysis a =
      analyse(std::string(kPatient170) +
              challenge_step("VT 6", 396, kLowCycles, "", 10,
                             with(kPassive, "rhythm_regular = true", "rhythm_regular = false")) +
              challenge_step("VT 8", 530, kHighCycles));
  const PreloadIndexReading* c = index_of(a.steps[1], "vt_challenge");
  ASSERT_NE(c, nullptr);
  EXPECT_EQ(c->direction, PreloadDirection::not_valid);
  EXPECT_TRUE(gate_failed(c->gates, "low_vt_step.regular_rhythm"));
  EXPECT_FALSE(gate_failed(c->gates, "high_vt_step.regular_rhythm"));
  EXPECT_EQ(c->test->reading.category, "not_interpretable");
  EXPECT_TRUE(
      has_failed_gate(a.steps[1].preload_statement, "vt_challenge", "low_vt_step.regular_rhythm"));
  EXPECT_FALSE(findings(a, FindingKind::vt_challenge)[0]->flagged);

  // HR/RR 60/20 = 3.0, not above 3.6 at the low step (De Backer et al., Anesthesiology
  // 2009;110:1092).
  const TrialAnalysis slow = analyse(std::string(kPatient170) +
                                     challenge_step("VT 6", 396, kLowCycles, "", 10, kPassive, 60) +
                                     challenge_step("VT 8", 530, kHighCycles));
  const PreloadIndexReading* s = index_of(slow.steps[1], "vt_challenge");
  ASSERT_NE(s, nullptr);
  EXPECT_EQ(s->direction, PreloadDirection::not_valid);
  EXPECT_TRUE(gate_failed(s->gates, "low_vt_step.hr_rr_ratio"));
  // Each condition of the manoeuvre takes its bias from the presets ([bias.vt_challenge.*]):
  // either way, whatever it would be for PPV alone (Myatra et al., Crit Care Med 2017;45:415).
  for (const Gate& g : s->gates) {
    EXPECT_EQ(g.bias, Bias::either) << g.key;
    EXPECT_NE(g.bias_source.find("Myatra"), std::string::npos) << g.key << ": " << g.bias_source;
  }
}

TEST(VtChallenge, FailedConditionAtTheHighStepMakesItNotInterpretable) {
  // Breathing effort at the 8 mL/kg step, or an open chest there.
  const TrialAnalysis effort = analyse(
      std::string(kPatient170) + challenge_step("VT 6", 396, kLowCycles) +
      challenge_step("VT 8", 530, kHighCycles, "", 10,
                     with(kPassive, "spontaneous_effort = false", "spontaneous_effort = true")));
  const PreloadIndexReading* c = index_of(effort.steps[1], "vt_challenge");
  ASSERT_NE(c, nullptr);
  EXPECT_EQ(c->direction, PreloadDirection::not_valid);
  EXPECT_TRUE(gate_failed(c->gates, "high_vt_step.passive_ventilation"));
  EXPECT_FALSE(gate_failed(c->gates, "low_vt_step.passive_ventilation"));

  const TrialAnalysis open =
      analyse(std::string(kPatient170) + challenge_step("VT 6", 396, kLowCycles) +
              challenge_step("VT 8", 530, kHighCycles, "", 10,
                             with(kPassive, "chest_open = false", "chest_open = true")));
  const PreloadIndexReading* o = index_of(open.steps[1], "vt_challenge");
  ASSERT_NE(o, nullptr);
  EXPECT_EQ(o->direction, PreloadDirection::not_valid);
  EXPECT_TRUE(gate_failed(o->gates, "high_vt_step.closed_chest"));
}

TEST(VtChallenge, HigherVolumeFirstIsRefused) {
  const TrialAnalysis a =
      analyse(std::string(kPatient170) + challenge_step("VT 8", 530, kHighCycles) +
              challenge_step("VT 6", 396, kLowCycles));
  const VtChallengeFinding& d = only_challenge(a);
  ASSERT_TRUE(d.refused.has_value());
  EXPECT_EQ(*d.refused, VtChallengeRefusal::wrong_order);
  EXPECT_FALSE(d.result.has_value());
  const auto f = findings(a, FindingKind::vt_challenge);
  EXPECT_EQ(f[0]->steps, (std::vector<std::string>{"VT 6", "VT 8"}));  // low VT named first
  EXPECT_FALSE(f[0]->flagged);
  EXPECT_EQ(index_of(a.steps[0], "vt_challenge"), nullptr);
  EXPECT_EQ(index_of(a.steps[1], "vt_challenge"), nullptr);
  EXPECT_FALSE(a.steps[0].vt_challenge_from.has_value());
}

TEST(VtChallenge, StepsWithAnotherBetweenAreRefused) {
  const TrialAnalysis a =
      analyse(std::string(kPatient170) + challenge_step("VT 6", 396, kLowCycles) +
              challenge_step("PEEP 14", 396, kLowCycles, "", 14) +
              challenge_step("VT 8", 530, kHighCycles));
  const VtChallengeFinding& d = only_challenge(a);
  ASSERT_TRUE(d.refused.has_value());
  EXPECT_EQ(*d.refused, VtChallengeRefusal::not_consecutive);
  EXPECT_EQ(index_of(a.steps[2], "vt_challenge"), nullptr);
  EXPECT_FALSE(a.steps[2].vt_challenge_from.has_value());
}

TEST(VtChallenge, StepsFurtherApartThanThePresetIntervalAreRefused) {
  // 09:00 -> 09:20 is 20 min, more than trial.vt_challenge_max_interval = 15 min (common
  // practice, no source).
  const TrialAnalysis far =
      analyse(std::string(kPatient170) + challenge_step("VT 6", 396, kLowCycles, "09:00") +
              challenge_step("VT 8", 530, kHighCycles, "09:20"));
  const VtChallengeFinding& d = only_challenge(far);
  ASSERT_TRUE(d.refused.has_value());
  EXPECT_EQ(*d.refused, VtChallengeRefusal::too_far_apart);
  ASSERT_TRUE(d.interval.has_value());
  EXPECT_NEAR(d.interval->value(), 20 * 60.0, 1e-9);
  EXPECT_EQ(index_of(far.steps[1], "vt_challenge"), nullptr);

  // 09:00 -> 09:02 (two minutes) is within it: read.
  const TrialAnalysis near =
      analyse(std::string(kPatient170) + challenge_step("VT 6", 396, kLowCycles, "09:00") +
              challenge_step("VT 8", 530, kHighCycles, "09:02"));
  const VtChallengeFinding& n = only_challenge(near);
  EXPECT_FALSE(n.refused.has_value());
  ASSERT_TRUE(n.interval.has_value());
  EXPECT_NEAR(n.interval->value(), 120.0, 1e-9);
  ASSERT_NE(index_of(near.steps[1], "vt_challenge"), nullptr);
  EXPECT_EQ(index_of(near.steps[1], "vt_challenge")->direction, PreloadDirection::responsive);
}

TEST(VtChallenge, ChallengeStepIsNotACandidateSetting) {
  // Crs 396/10 = 39.6 at VT 6 and 530/13 = 40.8 mL/cmH2O at VT 8 (Suter et al., NEJM
  // 1975;292:284): the challenge step would lead, and would tie within the 2 mL/cmH2O
  // resolution (common practice, no source), but is a brief manoeuvre: only VT 6 is named.
  const TrialAnalysis a =
      analyse(std::string(kPatient170) + challenge_step("VT 6", 396, kLowCycles) +
              challenge_step("VT 8", 530, kHighCycles));
  ASSERT_TRUE(a.steps[1].vt_challenge_from.has_value());
  EXPECT_EQ(*a.steps[1].vt_challenge_from, "VT 6");
  const auto best = findings(a, FindingKind::best_compliance);
  ASSERT_EQ(best.size(), 1u);
  EXPECT_EQ(best[0]->steps, std::vector<std::string>{"VT 6"});
  const auto dp = findings(a, FindingKind::lowest_driving_pressure);
  ASSERT_EQ(dp.size(), 1u);
  EXPECT_EQ(dp[0]->steps, std::vector<std::string>{"VT 6"});
}

// ---- ties within the resolution of each quantity --------------------------------------

TEST(TrialComparison, ValuesWithinTheResolutionAreTiesAndEveryTiedStepIsNamed) {
  // dP 13, 13.5, 14 cmH2O (dP = Pplat - PEEP; Amato et al., NEJM 2015;372:747): against a
  // resolution of 1 cmH2O (trial.resolution_driving_pressure, common practice, no source)
  // 13.5 ties with 13, 14 does not (a difference of 1.0 is not below 1).
  // Crs 400/13 = 30.77, 400/13.5 = 29.63, 400/14 = 28.57 mL/cmH2O: within 2 mL/cmH2O of the
  // best only 29.63 (common practice, no source).
  // DO2 = CO x CaO2 with the same CaO2 at every step (Marino, The ICU Book, from memory): CO
  // 5.0, 4.6 (-8 %), 4.4 (-12 %) L/min; within 10 % of the best only the second
  // (trial.resolution_do2, common practice, no source).
  std::string text = "[patient]\nsex = \"male\"\nheight = 180\n";
  const char* pplat[] = {"23", "23.5", "24"};
  const char* co[] = {"5.0", "4.6", "4.4"};
  const char* label[] = {"a", "b", "c"};
  for (int i = 0; i < 3; ++i) {
    text +=
        std::string("[[step]]\nlabel = \"") + label[i] +
        "\"\n[step.ventilator]\nvt = 400\nfio2 = \"50%\"\n[step.hold]\npeep_total = 10\n"
        "pplat = " +
        pplat[i] +
        "\n[step.gases]\npao2 = 80\nsao2 = \"95%\"\nhb = 10\n[step.circulation]\nco = " + co[i] +
        "\n";
  }
  const TrialAnalysis a = analyse(text);
  const auto dp = findings(a, FindingKind::lowest_driving_pressure);
  ASSERT_EQ(dp.size(), 1u);
  EXPECT_EQ(dp[0]->steps, (std::vector<std::string>{"a", "b"}));
  const auto& d = std::get<BestStepFinding>(dp[0]->detail);
  ASSERT_EQ(d.tied.size(), 1u);
  EXPECT_NEAR(in_cmH2O(std::get<Pressure>(d.tied[0])), 13.5, 1e-9);
  EXPECT_NEAR(in_cmH2O(std::get<Pressure>(d.resolution)), 1.0, 1e-9);
  EXPECT_EQ(findings(a, FindingKind::best_compliance)[0]->steps,
            (std::vector<std::string>{"a", "b"}));
  const auto do2 = findings(a, FindingKind::max_do2);
  ASSERT_EQ(do2.size(), 1u);
  EXPECT_EQ(do2[0]->steps, (std::vector<std::string>{"a", "b"}));
  EXPECT_NEAR(in_percent(std::get<Ratio>(std::get<BestStepFinding>(do2[0]->detail).resolution)),
              10.0, 1e-9);
}

// ---- costs against the reference step -------------------------------------------------

TEST(TrialComparison, CostsAreMeasuredAgainstTheReferenceStep) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "a"
[step.circulation]
co = 5.0
[[step]]
label = "b"
[step.circulation]
co = 6.0
[[step]]
label = "c"
[step.circulation]
co = 5.2
)";
  // Against the reference 'a': +20 % and +4 %, no fall (against the best step 'b', 'c' would
  // be -13.3 %). Fractional change, common practice, no source.
  EXPECT_TRUE(findings(analyse(text), FindingKind::haemodynamic_cost).empty());
  // With 'b' as the reference: 'a' (5.0 - 6.0)/6.0 = -16.7 % and 'c' -13.3 %, both >= 10 %.
  const TrialAnalysis b = analyse(text, std::string("b"));
  const auto costs = findings(b, FindingKind::haemodynamic_cost);
  ASSERT_EQ(costs.size(), 2u);
  EXPECT_EQ(costs[0]->steps, (std::vector<std::string>{"a", "b"}));
  EXPECT_EQ(costs[1]->steps, (std::vector<std::string>{"c", "b"}));
  EXPECT_NEAR(in_percent(std::get<HaemodynamicCostFinding>(costs[1]->detail).change),
              (5.2 - 6.0) / 6.0 * 100.0, 1e-9);
}

// ---- the heart-lung estimate uses the CVP measured at the step ------------------------

TEST(TrialAnalysis, MeasuredCvpAtTheStepGivesTheVenousReturnChange) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "PEEP 10"
[step.ventilator]
vt = 500
[step.hold]
pplat = 25
peep_total = 10
[step.circulation]
cvp = 10
pmsf = 20
[[step]]
label = "PEEP 15"
[step.ventilator]
vt = 500
[step.hold]
pplat = 30
peep_total = 15
[step.circulation]
cvp = 12
)";
  const TrialAnalysis a = analyse(text);
  const HeartLungComparison& h = a.heart_lung[1];
  ASSERT_TRUE(h.observed_cvp_change.has_value());
  EXPECT_NEAR(in_mmHg(*h.observed_cvp_change), 2.0, 1e-9);  // 12 - 10 (arithmetic)
  ASSERT_TRUE(h.estimate && h.estimate->venous_return_gradient_change);
  // -dCVP/(Pmsf - CVP) = -2/(20 - 10) = -20 %, one value (Guyton; van den Berg et al., J Appl
  // Physiol 2002;92:1223, from memory); the estimated dRAP range stays beside it.
  EXPECT_TRUE(h.estimate->venous_return_gradient_change->single());
  EXPECT_NEAR(in_percent(h.estimate->venous_return_gradient_change->central), -20.0, 1e-9);
  EXPECT_FALSE(h.estimate->right_atrial_pressure_change->single());
  const auto& notes = h.estimate->notes;
  EXPECT_NE(std::find(notes.begin(), notes.end(), HeartLungNote::venous_return_from_measured_rap),
            notes.end());
  EXPECT_FALSE(a.heart_lung[0].observed_cvp_change.has_value());  // the reference itself
}

// ---- shock context ----------------------------------------------------------------------

TEST(TrialAnalysis, ShockContextNamesTheStepsAndTheLactateChange) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "a"
time = "08:00"
[step.gases]
lactate = 2.0
[step.circulation]
map = 65
[[step]]
label = "b"
time = "08:30"
[step.gases]
lactate = 3.1
[step.circulation]
map = 64
[[step]]
label = "c"
time = "09:15"
[step.gases]
lactate = 2.6
[step.circulation]
sbp = 90
dbp = 52
)";
  const TrialAnalysis a = analyse(text);
  // MAP below 65 mmHg (Evans et al., Intensive Care Med 2021;47:1181): 'b' 64 and 'c'
  // 52 + (90 - 52)/3 = 64.67 (estimated); 'a' at 65 is not below.
  const auto map = findings(a, FindingKind::map_below_target);
  ASSERT_EQ(map.size(), 1u);
  EXPECT_EQ(map[0]->steps, (std::vector<std::string>{"b", "c"}));
  EXPECT_TRUE(map[0]->flagged);
  const auto& m = std::get<ShockContextFinding>(map[0]->detail);
  EXPECT_EQ(m.map_estimated, (std::vector<bool>{false, true}));
  EXPECT_NEAR(in_mmHg(std::get<Pressure>(m.values[1])), 52 + 38 / 3.0, 1e-9);
  // Lactate above 2 mmol/L (Singer et al., JAMA 2016;315:801): 'b' and 'c'; 2.0 is not above.
  const auto lac = findings(a, FindingKind::lactate_above_limit);
  ASSERT_EQ(lac.size(), 1u);
  EXPECT_EQ(lac[0]->steps, (std::vector<std::string>{"b", "c"}));
  // Between the time-stamped measurements: +1.1 mmol/L in 30 min, then -0.5 in 45 min
  // (arithmetic); no trend is claimed.
  const auto change = findings(a, FindingKind::lactate_change);
  ASSERT_EQ(change.size(), 1u);
  EXPECT_FALSE(change[0]->flagged);
  EXPECT_EQ(change[0]->steps, (std::vector<std::string>{"a", "b", "c"}));
  const auto& c = std::get<LactateChangeFinding>(change[0]->detail);
  ASSERT_EQ(c.changes.size(), 2u);
  EXPECT_NEAR(in_mmol_per_L(c.changes[0].change), 1.1, 1e-9);
  EXPECT_NEAR(c.changes[0].interval.value(), 30 * 60.0, 1e-9);
  EXPECT_NEAR(in_percent(c.changes[0].relative), 1.1 / 2.0 * 100.0, 1e-9);
  EXPECT_NEAR(in_mmol_per_L(c.changes[1].change), -0.5, 1e-9);
  EXPECT_NEAR(c.changes[1].interval.value(), 45 * 60.0, 1e-9);
}

TEST(TrialAnalysis, SiteMapTargetChangesTheStepsNamed) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "a"
[step.circulation]
map = 68
[[step]]
label = "b"
[step.circulation]
map = 72
)";
  const LoadedTrial t = load_trial_text(text, "fixture.toml", TrialReadOptions{});
  // At the default 65 mmHg (Evans et al., Intensive Care Med 2021;47:1181) neither is below.
  EXPECT_TRUE(findings(analyse_trial(t.trial, t.limits), FindingKind::map_below_target).empty());
  // A site target of 70 mmHg names 'a' (68) only.
  Thresholds site = t.limits;
  site.load_overrides_text("[trial.map_target]\nvalue = 70\nunit = \"mmHg\"\nsource = \"site\"\n",
                           "site.toml");
  const TrialAnalysis a = analyse_trial(t.trial, site);
  const auto map = findings(a, FindingKind::map_below_target);
  ASSERT_EQ(map.size(), 1u);
  EXPECT_EQ(map[0]->steps, std::vector<std::string>{"a"});
  EXPECT_EQ(map[0]->source, "site");
}

TEST(TrialAnalysis, LactateWithoutTimesGivesNoChange) {
  const std::string text = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "a"
[step.gases]
lactate = 2.5
[[step]]
label = "b"
time = "after the fluid"
[step.gases]
lactate = 1.5
)";
  const TrialAnalysis a = analyse(text);
  EXPECT_TRUE(findings(a, FindingKind::lactate_change).empty());
  // 2.5 > 2 mmol/L at 'a' only (Singer et al., JAMA 2016;315:801).
  EXPECT_EQ(findings(a, FindingKind::lactate_above_limit).at(0)->steps,
            std::vector<std::string>{"a"});
}

TEST(TrialClock, ReadsClockAndDateTimesAndNothingElse) {
  // Arithmetic on the written clock (common practice, no source).
  EXPECT_NEAR(trial_clock_time("09:10")->value(), 9 * 3600 + 10 * 60, 1e-9);
  EXPECT_NEAR(trial_clock_time("9:10:30")->value(), 9 * 3600 + 10 * 60 + 30, 1e-9);
  EXPECT_FALSE(trial_clock_time("after the fluid").has_value());
  EXPECT_FALSE(trial_clock_time("").has_value());
  EXPECT_FALSE(trial_clock_time("25:00").has_value());
  EXPECT_NEAR(trial_interval("23:55", "00:05")->value(), 600.0, 1e-9);  // past midnight
  EXPECT_NEAR(trial_interval("2026-12-02T09:10:00Z", "2026-12-02T10:10:00+01:00")->value(), 0.0,
              1e-9);
  EXPECT_NEAR(trial_interval("2026-12-01 23:50", "2026-12-02 00:10")->value(), 1200.0, 1e-9);
  EXPECT_FALSE(trial_interval("2026-12-02T09:10:00", "09:20").has_value());  // dated and not
}

}  // namespace
}  // namespace bb
