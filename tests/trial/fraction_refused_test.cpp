// A trial file's PPV and SVV are percentages: a bare number is percent, and one
// between 0 and 1 is refused because it may have been meant as a fraction
// (common practice, no source). Same rule as `calc ppv` (parse_percent_points).
#include <gtest/gtest.h>

#include <string>

#include "breathbeat/errors.hpp"
#include "breathbeat/trial/trial_file.hpp"

#include "trial_problems.hpp"

namespace bb {
namespace {

std::string trial_with(const std::string& step_tables) {
  return "[patient]\n"
         "sex = \"female\"\n"
         "height = 165\n"
         "\n"
         "[[step]]\n"
         "label = \"PEEP 8\"\n"
         "[step.ventilator]\n"
         "vt = 400\n" +
         step_tables;
}

std::vector<std::string> problems(const std::string& text) {
  return test::trial_problems(text);
}

bool has_fraction_refusal(const std::vector<std::string>& ps, const std::string& field,
                          const std::string& suggestion) {
  for (const auto& p : ps) {
    if (p.rfind(field + ":", 0) == 0 && p.find("read as percent") != std::string::npos &&
        p.find(suggestion) != std::string::npos)
      return true;
  }
  return false;
}

TEST(TrialFraction, BarePpvBelowOneIsRefused) {
  // ppv = 0.15 was read as 15 %; now refused, suggesting 15% (common practice, no source).
  const auto ps = problems(trial_with("[step.circulation]\nppv = 0.15\n"));
  EXPECT_TRUE(has_fraction_refusal(ps, "step[1].circulation.ppv", "15%"))
      << (ps.empty() ? std::string("accepted") : ps.front());
}

TEST(TrialFraction, BareSvvBelowOneInQuotesIsRefused) {
  const auto ps = problems(trial_with("[step.circulation]\nsvv = \"0.12\"\n"));
  EXPECT_TRUE(has_fraction_refusal(ps, "step[1].circulation.svv", "12%"))
      << (ps.empty() ? std::string("accepted") : ps.front());
}

TEST(TrialFraction, PercentagesAndPercentSignsAreAccepted) {
  // 15 is 15 %; "0.5%" is 0.5 % as written (common practice, no source).
  const LoadedTrial a =
      load_trial_text(trial_with("[step.circulation]\nppv = 15\nsvv = \"0.5%\"\n"), "t.toml", {});
  const TrialCirculation& c = a.trial.steps.at(0).circulation;
  ASSERT_TRUE(c.ppv_monitor && c.svv);
  EXPECT_NEAR(in_percent(*c.ppv_monitor), 15.0, 1e-9);
  EXPECT_NEAR(in_percent(*c.svv), 0.5, 1e-9);
}

TEST(TrialFraction, PpvBeforeOfAPreloadTestKeepsTheRule) {
  // A tidal-volume challenge measured by PPV: before = 0.08 is refused as a possible fraction.
  const auto ps =
      problems(trial_with("[step.preload.vt_challenge]\n"
                          "before = 0.08\n"
                          "after = 12\n"
                          "vt_before = 360\n"
                          "vt_after = 480\n"));
  bool found = false;
  for (const auto& p : ps) {
    if (p.find("preload.vt_challenge.before:") != std::string::npos &&
        p.find("read as percent") != std::string::npos && p.find("8%") != std::string::npos)
      found = true;
  }
  EXPECT_TRUE(found) << (ps.empty() ? std::string("accepted") : ps.front());
}

}  // namespace
}  // namespace bb
