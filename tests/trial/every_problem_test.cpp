// `check` promises every problem: a contradiction in a step is reported even
// when another value of that step is refused, and a label used twice points
// at both steps (issue 11).
#include <gtest/gtest.h>

#include <string>

#include "breathbeat/errors.hpp"
#include "breathbeat/trial/trial_file.hpp"

namespace bb {
namespace {

std::vector<InputError> problems_of(const std::string& text) {
  try {
    (void)load_trial_text(text, "t.toml", TrialReadOptions{});
  } catch (const InputErrors& e) {
    return e.errors();
  }
  return {};
}

const std::string kPatient = "[patient]\nsex = \"male\"\nheight = 175\n\n";

TEST(EveryProblem, AContradictionIsFoundBesideAUnitErrorInTheSameStep) {
  const auto errors = problems_of(kPatient +
                                  "[[step]]\nlabel = \"A\"\n\n"
                                  "[step.ventilator]\nset_peep = 8\nvt = \"450 cmH2O\"\n\n"
                                  "[step.hold]\npplat = 6\n");
  ASSERT_EQ(errors.size(), 2u);
  EXPECT_EQ(errors[0].field(), "step[1].ventilator.vt");
  EXPECT_EQ(errors[1].field(), "step[1].hold.pplat");  // 6 below set PEEP 8 (cmH2O)
  ASSERT_TRUE(errors[1].where());
  EXPECT_EQ(errors[1].where()->line, 13);
}

TEST(EveryProblem, AnImplausibleValueIsReportedOnce) {
  const auto errors = problems_of(kPatient +
                                  "[[step]]\nlabel = \"A\"\n\n"
                                  "[step.ventilator]\nvt = \"450 cmH2O\"\n\n"
                                  "[step.hold]\npplat = 200\n");
  int pplat = 0;
  for (const auto& e : errors) pplat += e.field() == "step[1].hold.pplat";
  EXPECT_EQ(pplat, 1);  // range 5 to 60 cmH2O (presets/plausibility.toml)
}

TEST(EveryProblem, ADuplicateLabelNamesTheStepThatHasItFirst) {
  const auto errors =
      problems_of(kPatient + "[[step]]\nlabel = \"A\"\n\n[[step]]\nlabel = \"A\"\n");
  ASSERT_EQ(errors.size(), 1u);
  EXPECT_EQ(errors[0].field(), "step[2].label");
  ASSERT_TRUE(errors[0].where());
  EXPECT_EQ(errors[0].where()->line, 9);
  EXPECT_NE(errors[0].problem().find("step[1] at t.toml:6:9"), std::string::npos)
      << errors[0].problem();
}

TEST(EveryProblem, AnEmptyOrBlankFileSaysSo) {
  for (const char* text : {"", "  \n\t\n"}) {
    const auto errors = problems_of(text);
    ASSERT_EQ(errors.size(), 1u);
    EXPECT_EQ(errors[0].field(), "file");
  }
}

}  // namespace
}  // namespace bb
