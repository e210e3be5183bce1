// The comparison findings in words: ties named, costs against the reference step, the
// tidal-volume challenge labelled and refused in words, the heart-lung notes, the shock
// context. Trial texts are fixtures; every expected value is worked beside it.
#include <gtest/gtest.h>

#include <string>

#include "breathbeat/present/report.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "cli_runner.hpp"

namespace bb {
namespace {

TrialAnalysis analyse(const std::string& text) {
  const LoadedTrial t = load_trial_text(text, "fixture.toml", TrialReadOptions{});
  return analyse_trial(t.trial, t.limits);
}

// The text of the first finding with `key` in the JSON report.
std::string finding_text(const nlohmann::ordered_json& j, const std::string& key) {
  for (const auto& f : j["comparison"]) {
    if (f["key"] == key) return f["text"].get<std::string>();
  }
  return "";
}

const char* kThreeSteps = R"(
[patient]
sex = "male"
height = 180
[[step]]
label = "a"
time = "08:00"
[step.ventilator]
set_peep = 10
vt = 400
[step.hold]
peep_total = 10
pplat = 23
[step.gases]
lactate = 2.4
[step.circulation]
co = 5.0
map = 70
cvp = 8
pmsf = 20
[[step]]
label = "b"
time = "08:20"
[step.ventilator]
set_peep = 14
vt = 400
[step.hold]
peep_total = 14
pplat = 27.5
[step.circulation]
co = 4.4
sbp = 90
dbp = 52
cvp = 10
[[step]]
label = "c"
time = "08:40"
[step.ventilator]
set_peep = 18
vt = 400
[step.hold]
peep_total = 18
pplat = 33
[step.gases]
lactate = 2.9
[step.circulation]
co = 4.6
map = 61
)";

TEST(ReportFindings, TiedStepsAreNamedWithTheResolution) {
  // dP 13 at 'a' and 13.5 at 'b' (Pplat - PEEP; Amato et al., NEJM 2015;372:747): 0.5 below the
  // 1 cmH2O resolution (common practice, no source), so 'b' ties; 'c' (15) does not.
  const std::string t = finding_text(report_json(analyse(kThreeSteps)), "lowest_driving_pressure");
  EXPECT_NE(t.find("Lowest driving pressure at 'a' (13.0 cmH2O); tied with it within the 1 cmH2O "
                   "resolution: 'b' (13.5 cmH2O)."),
            std::string::npos)
      << t;
  EXPECT_EQ(t.find("'c'"), std::string::npos) << t;
}

TEST(ReportFindings, CostsSayTheyAreAgainstTheReferenceStep) {
  // CO 4.4 against 5.0 L/min at the reference 'a' = -12 %, flagged at a 10 % fall (common
  // practice, no source).
  const std::string t = finding_text(report_json(analyse(kThreeSteps)), "haemodynamic_cost");
  EXPECT_NE(t.find("'b': CO 4.40 L/min is -12 % against the reference step 'a' (5.00 L/min)"),
            std::string::npos)
      << t;
}

TEST(ReportFindings, ShockContextNamesTheStepsAndPrintsTheDigitsThatDecide) {
  const auto j = report_json(analyse(kThreeSteps));
  // MAP at 'b' = 52 + (90 - 52)/3 = 64.67 mmHg (estimated), printed 64.7, not "65", below the
  // 65 mmHg target (Evans et al., Intensive Care Med 2021;47:1181); 'c' 61.
  const std::string map = finding_text(j, "map_below_target");
  EXPECT_NE(map.find("MAP below the 65 mmHg target at 'b' (64.7, estimated), 'c' (61) mmHg."),
            std::string::npos)
      << map;
  // Lactate above 2 mmol/L (Singer et al., JAMA 2016;315:801) at 'a' and 'c'.
  const std::string lac = finding_text(j, "lactate_above_limit");
  EXPECT_NE(lac.find("Lactate above 2 mmol/L at 'a' (2.4), 'c' (2.9) mmol/L."), std::string::npos)
      << lac;
  // 2.4 -> 2.9 mmol/L in 40 min: +0.5 (+21 %); two points, no trend (arithmetic).
  const std::string change = finding_text(j, "lactate_change");
  EXPECT_NE(change.find("+0.5 mmol/L (+21 %) in 40 min"), std::string::npos) << change;
  EXPECT_NE(change.find("Two measurements show a change, not a trend."), std::string::npos)
      << change;
  EXPECT_EQ(change.find("trend."), change.find("not a trend.") + 6) << change;
}

TEST(ReportFindings, HeartLungNotesGiveEachStepsOwnPeepChange) {
  const std::string text = report_text(analyse(kThreeSteps));
  // PEEP changes against the reference 'a' (total PEEP 10): +4 at 'b', +8 at 'c' (arithmetic).
  // The text says the note once for both steps, each step's own number in step order.
  EXPECT_NE(text.find("(b, c; values by step in that order) PEEP change +4.0/+8.0 cmH2O at this"),
            std::string::npos)
      << text;
  EXPECT_EQ(text.find("PEEP change 0.0"), std::string::npos) << text;
  // CVP 8 -> 10 mmHg measured at 'b': observed beside the estimate, and the venous-return
  // gradient from it: -(10 - 8)/(20 - 8) = -16.7 % (van den Berg et al., J Appl Physiol
  // 2002;92:1223, from memory).
  const auto j = report_json(analyse(kThreeSteps));
  const auto& b = j["heart_lung"][1];
  bool above = false, measured = false;
  for (const auto& n : b["notes"]) {
    const std::string s = n.get<std::string>();
    above = above || s.find("in the table above") != std::string::npos;
    measured = measured || s.find(
                               "'b': Change in venous-return gradient from the CVP measured "
                               "at this step (+2.0 mmHg") != std::string::npos;
  }
  EXPECT_TRUE(above) << b["notes"].dump();
  EXPECT_TRUE(measured) << b["notes"].dump();
  EXPECT_NEAR(b["observed"]["observed_cvp_change"]["value"].get<double>(), 2.0, 1e-9);
  EXPECT_NEAR(b["estimated"]["venous_return_gradient_change"]["value"].get<double>(),
              -2.0 / 12.0 * 100.0, 0.005);  // JSON keeps two decimals
  EXPECT_FALSE(b["estimated"]["venous_return_gradient_change"].contains("low"));
}

// A tidal-volume challenge pair: male 170 cm, PBW 66.016 kg (ARDS Network, NEJM 2000;342:1301):
// 396 mL = 6.0 and 530 mL = 8.03 mL/kg PBW.
std::string challenge(const std::string& first_vt, const std::string& second_vt) {
  auto step = [](const std::string& label, const std::string& vt, const std::string& time) {
    return "[[step]]\nlabel = \"" + label + "\"\ntime = \"" + time +
           "\"\n[step.ventilator]\nmode = \"vc\"\nset_peep = 10\nvt = " + vt +
           "\nrr = 20\nfio2 = \"50%\"\n[step.hold]\npeep_total = 10\npplat = 22\n"
           "[step.circulation]\nhr = 100\npp_cycles = \"42/38, 42/38, 42/38\"\nrhythm_regular = "
           "true\n"
           "spontaneous_effort = false\nchest_open = false\n";
  };
  return "[patient]\nsex = \"male\"\nheight = 170\n" + step("first", first_vt, "10:00") +
         step("second", second_vt, "10:02");
}

TEST(ReportFindings, ChallengeStepIsLabelledAndAWrongOrderIsSaid) {
  const TrialAnalysis read = analyse(challenge("396", "530"));
  const auto j = report_json(read);
  // The 8 mL/kg step is labelled as the challenge in the settings table.
  EXPECT_EQ(j["steps"][1]["settings"]["vt_challenge_step"]["text"], "challenge");
  EXPECT_FALSE(j["steps"][0]["settings"].contains("vt_challenge_step"));
  const std::string t = finding_text(j, "vt_challenge");
  EXPECT_NE(t.find("The steps are 2 min apart."), std::string::npos) << t;
  EXPECT_NE(t.find("'second' is a brief manoeuvre, not a candidate setting."), std::string::npos)
      << t;
  EXPECT_NE(report_text(read).find("Tidal-volume challenge step"), std::string::npos);

  // 8 mL/kg first, then 6: refused in words (Myatra et al., Crit Care Med 2017;45:415 raises VT
  // from 6 to 8).
  const auto wrong = report_json(analyse(challenge("530", "396")));
  const std::string w = finding_text(wrong, "vt_challenge");
  EXPECT_NE(w.find("but the higher VT comes first"), std::string::npos) << w;
  EXPECT_FALSE(wrong["steps"][0]["settings"].contains("vt_challenge_step"));
}

}  // namespace
}  // namespace bb
