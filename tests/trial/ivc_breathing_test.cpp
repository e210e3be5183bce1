// The trial file's IVC breathing state takes the same words as `calc ivc`
// (field ivc_breathing): passive, assisted or unassisted. The old word
// "spontaneous" is refused, asking which of the two breathing states is meant:
// the right-atrial pressure table applies to unassisted breathing only (Rudski
// et al., J Am Soc Echocardiogr 2010;23:685).
#include <gtest/gtest.h>

#include <string>

#include "breathbeat/errors.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"

#include "trial_problems.hpp"

namespace bb {
namespace {

std::string trial_with_ivc(const std::string& breathing) {
  return "[patient]\n"
         "sex = \"female\"\n"
         "height = 165\n"
         "\n"
         "[[step]]\n"
         "label = \"PSV 8\"\n"
         "[step.ventilator]\n"
         "vt = 400\n"
         "[step.ultrasound]\n"
         "ivc_dmax = \"2.5 cm\"\n"
         "ivc_dmin = \"2.0 cm\"\n"
         "ivc_breathing = \"" +
         breathing + "\"\n";
}

std::vector<std::string> problems(const std::string& text) {
  return test::trial_problems(text);
}

TEST(TrialIvcBreathing, SpontaneousIsRefusedAskingWhichOfTheTwo) {
  const auto ps = problems(trial_with_ivc("spontaneous"));
  ASSERT_EQ(ps.size(), 1u) << (ps.empty() ? std::string("accepted") : ps.front());
  EXPECT_EQ(ps[0].rfind("step[1].ultrasound.ivc_breathing: may mean 'assisted' or 'unassisted'; "
                        "say which is meant",
                        0),
            0u)
      << ps[0];
  EXPECT_NE(ps[0].find("pressure support, CPAP"), std::string::npos) << ps[0];
}

TEST(TrialIvcBreathing, TheThreeStatesAreRead) {
  for (const auto& [word, state] :
       {std::pair{"passive", Breathing::passive}, std::pair{"assisted", Breathing::assisted},
        std::pair{"Unassisted", Breathing::unassisted}}) {
    const LoadedTrial t = load_trial_text(trial_with_ivc(word), "t.toml", {});
    ASSERT_EQ(t.trial.steps.size(), 1u);
    EXPECT_EQ(t.trial.steps[0].ultrasound.ivc_breathing, state) << word;
  }
}

TEST(TrialIvcBreathing, RapEstimateOnlyForUnassistedBreathing) {
  // 2.5 / 2.0 cm: > 2.1 cm and 20 % < 50 % collapse -> 15 (10-20) mmHg in unassisted
  // breathing (Rudski et al., J Am Soc Echocardiogr 2010;23:685); none with assisted breathing.
  for (const auto& [word, has_rap] :
       {std::pair{"unassisted", true}, std::pair{"assisted", false}, std::pair{"passive", false}}) {
    const LoadedTrial t = load_trial_text(trial_with_ivc(word), "t.toml", {});
    const TrialAnalysis a = analyse_trial(t.trial, t.limits);
    ASSERT_EQ(a.steps.size(), 1u);
    ASSERT_TRUE(a.steps[0].ivc.has_value()) << word;
    const IvcResults& r = a.steps[0].ivc->results;
    EXPECT_EQ(r.rap.has_value(), has_rap) << word;
    if (has_rap) EXPECT_NEAR(in_mmHg(r.rap->value), 15.0, 1e-9);
  }
}

}  // namespace
}  // namespace bb
