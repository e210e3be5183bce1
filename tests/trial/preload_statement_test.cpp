// The per-step preload statement: conditional when a condition that could have
// misled a supporting reading was not recorded (text and JSON), and counted by
// independent measurements, not indices. Trial texts are test fixtures; each
// expected value is worked from the published rule named beside it.
#include <gtest/gtest.h>

#include "breathbeat/present/gate_words.hpp"
#include "breathbeat/present/report.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"

namespace bb {
namespace {

TrialAnalysis analyse(const std::string& text) {
  const LoadedTrial t = load_trial_text(text, "fixture.toml", TrialReadOptions{});
  return analyse_trial(t.trial, t.limits, std::nullopt);
}

// Male 170 cm: PBW 50 + 0.91 x (170 - 152.4) = 66.0 kg (ARDS Network, NEJM 2000;342:1301), VT
// 530 mL = 8.0 mL/kg; Crs 530 / (20 - 8) = 44 mL/cmH2O > 30 (Monnet et al., CCM 2012;40:152);
// HR/RR 100/20 = 5 > 3.6 (De Backer et al., Anesthesiology 2009;110:1092). PP 60/48 per breath:
// PPV 12/54 = 22.2 % > 13 % (Michard et al., AJRCCM 2000;162:134).
std::string step_text(const std::string& circulation_extra) {
  return R"(
[patient]
sex = "male"
height = 170
[[step]]
label = "PEEP 8"
[step.ventilator]
set_peep = 8
vt = 530
rr = 20
[step.hold]
peep_total = 8
pplat = 20
[step.circulation]
hr = 100
pp_cycles = "60/48, 60/48, 60/48"
spontaneous_effort = false
chest_open = false
intra_abdominal_hypertension = false
rv_failure = false
)" + circulation_extra;
}

TEST(PreloadStatement, UnknownRhythmMakesTheStatementConditionalInTextAndJson) {
  const TrialAnalysis a = analyse(step_text(""));  // rhythm not recorded
  const PreloadStatement& s = a.steps[0].preload_statement;
  EXPECT_EQ(s.category, PreloadCategory::likely_responsive);
  EXPECT_TRUE(s.conditional);
  ASSERT_EQ(s.open_conditions.size(), 1u);
  EXPECT_EQ(s.open_conditions[0].gate, "regular_rhythm");  // either way (Michard 2000)

  const auto j = report_json(a);
  const auto& js = j["steps"][0]["preload"]["statement"];
  EXPECT_EQ(js["conditional"], true);
  EXPECT_EQ(js["open_conditions"][0]["gate"], "regular_rhythm");
  EXPECT_EQ(js["text"].get<std::string>().rfind(
                "Conditional on regular cardiac rhythm, which was not recorded: likely preload "
                "responsive",
                0),
            0u)
      << js["text"];
  const std::string text = report_text(a);
  EXPECT_NE(text.find("Conditional on regular cardiac rhythm, which was not recorded"),
            std::string::npos);
  EXPECT_NE(text.find("likely?"), std::string::npos);  // the table marks it
}

TEST(PreloadStatement, RecordedRhythmMakesItUnconditional) {
  const TrialAnalysis a = analyse(step_text("rhythm_regular = true\n"));
  const PreloadStatement& s = a.steps[0].preload_statement;
  EXPECT_EQ(s.category, PreloadCategory::likely_responsive);
  EXPECT_FALSE(s.conditional);
  EXPECT_TRUE(s.open_conditions.empty());
  EXPECT_EQ(report_json(a)["steps"][0]["preload"]["statement"]["conditional"], false);
}

TEST(PreloadStatement, IndicesOfOneMeasurementCountOnce) {
  // PPV from the cycles, the monitor's PPV and SVV all come from the arterial pressure swing
  // (common practice, no source): one measurement. A leg raise is another: CO 5.0 -> 5.6 L/min
  // is +12 % >= 10 % (Monnet et al., Crit Care Med 2006;34:1402).
  const TrialAnalysis a = analyse(step_text(R"(rhythm_regular = true
ppv = "20%"
svv = "18%"
[step.preload.plr]
before = "5.0 L/min"
after = "5.6 L/min"
)"));
  const PreloadStatement& s = a.steps[0].preload_statement;
  EXPECT_EQ(s.category, PreloadCategory::likely_responsive);
  EXPECT_EQ(s.supporting.size(), 4u);
  ASSERT_EQ(s.measurements.size(), 2u);
  EXPECT_EQ(s.measurements[0].measurement, PreloadMeasurement::arterial_swing);
  EXPECT_EQ(s.measurements[0].indices, (std::vector<std::string>{"ppv", "ppv_monitor", "svv"}));
  EXPECT_EQ(s.measurements[1].measurement, PreloadMeasurement::passive_leg_raising);
  const std::string text = report_json(a)["steps"][0]["preload"]["statement"]["text"];
  EXPECT_NE(text.find("2 independent measurements"), std::string::npos) << text;
}

TEST(PreloadStatement, ATidalVolumeChallengeAndPpvAreOneMeasurement) {
  // A recorded challenge at the step: PPV 10 -> 14 %, +4 points >= 3.5 (Myatra et al., Crit Care
  // Med 2017;45:415), VT 396 -> 530 mL = 6.0 -> 8.0 mL/kg PBW, with the step's own PPV: both
  // from the arterial swing.
  const TrialAnalysis a = analyse(step_text(R"(rhythm_regular = true
[step.preload.vt_challenge]
before = "10%"
after = "14%"
vt_before = 396
vt_after = 530
)"));
  const PreloadStatement& s = a.steps[0].preload_statement;
  EXPECT_EQ(s.category, PreloadCategory::likely_responsive);
  ASSERT_EQ(s.measurements.size(), 1u);
  EXPECT_EQ(s.measurements[0].indices, (std::vector<std::string>{"ppv", "vt_challenge"}));
}

TEST(PreloadStatement, AChallengeAtAnIrregularStepCannotBeRead) {
  // A challenge recorded at a step in an irregular rhythm: +4 points would be responsive (Myatra
  // et al., Crit Care Med 2017;45:415), but the rhythm makes it unreadable either way.
  const TrialAnalysis a = analyse(step_text(R"(rhythm_regular = false
[step.preload.vt_challenge]
before = "10%"
after = "14%"
vt_before = 396
vt_after = 530
)"));
  for (const auto& i : a.steps[0].preload) {
    if (i.key == "vt_challenge") EXPECT_EQ(i.direction, PreloadDirection::not_valid);
  }
  EXPECT_EQ(a.steps[0].preload_statement.category, PreloadCategory::not_assessable);
}

TEST(PreloadStatement, EndExpiratoryOcclusionWithEffortIsNotInterpretable) {
  // No breath may be triggered during the hold (Monnet et al., Crit Care Med 2009;37:951): with
  // breathing effort stated, a rise of 8 % (>= 5 %) is not read.
  const std::string text = R"(
[patient]
sex = "male"
height = 170
[[step]]
label = "PSV"
[step.ventilator]
set_peep = 8
[step.circulation]
spontaneous_effort = true
[step.preload.eeo]
before = "5.0 L/min"
after = "5.4 L/min"
hold = "15 s"
)";
  const TrialAnalysis a = analyse(text);
  ASSERT_EQ(a.steps[0].preload.size(), 1u);
  const PreloadIndexReading& eeo = a.steps[0].preload[0];
  EXPECT_EQ(eeo.key, "eeo");
  EXPECT_EQ(eeo.direction, PreloadDirection::not_valid);
  // In the presenter's words (src/present/gate_words.cpp).
  EXPECT_NE(reading_text(eeo.reading).find("breathing effort makes it unreadable"),
            std::string::npos)
      << reading_text(eeo.reading);
  EXPECT_EQ(a.steps[0].preload_statement.category, PreloadCategory::not_assessable);
}

}  // namespace
}  // namespace bb
