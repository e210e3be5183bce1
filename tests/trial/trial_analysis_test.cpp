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
  // flagged at a fall >= 10 % (brief section 8: common practice, no source).
  const auto& cost = std::get<HaemodynamicCostFinding>(costs[0]->detail);
  EXPECT_EQ(cost.measure, CostMeasure::co);
  EXPECT_NEAR(in_percent(cost.change), -15.0, 1e-9);
  EXPECT_NEAR(in_L_per_min(std::get<Flow>(cost.value)), 4.25, 1e-9);
  EXPECT_NEAR(in_L_per_min(std::get<Flow>(cost.best_value)), 5.0, 1e-9);

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
  // dPpl = dPEEP * Ecw/Ers = 5 * 0.2667 = 1.333 cmH2O (brief section 7; Gattinoni et al., AJRCCM
  // 1998, from memory).
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
  // Spontaneous effort and an irregular rhythm fail the PPV conditions (brief section 5;
  // Michard 2000 conditions, common practice); IVC distensibility needs a passive patient
  // (Barbier et al., ICM 2004;30:1740).
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

}  // namespace
}  // namespace bb
