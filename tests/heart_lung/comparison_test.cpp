// Comparing the steps of a PEEP trial: relative change, the haemodynamic cost
// flag (a fall >= 10 %: common practice, no source) and the best step by a key.
// breathbeat headers first: <gtest/gtest.h> pulls in <signal.h>, whose si_value
// macro breaks a parameter name in thresholds.hpp.
#include "breathbeat/heart_lung.hpp"

#include <gtest/gtest.h>

namespace bb {
namespace {

constexpr double kTol = 1e-9;

TEST(FractionalChange, IsRelativeToTheFirstValue) {
  // (4.25 - 5) / 5 = -15 %: arithmetic (common practice, no source).
  EXPECT_NEAR(in_percent(fractional_change(L_per_min(5.0), L_per_min(4.25))), -15.0, kTol);
  // (75 - 60) / 60 = +25 %: arithmetic (common practice, no source).
  EXPECT_NEAR(in_percent(fractional_change(mmHg(60), mmHg(75))), 25.0, kTol);
}

TEST(FractionalChange, RejectsAZeroBaseline) {
  EXPECT_THROW(fractional_change(L_per_min(0.0), L_per_min(4.0)), std::domain_error);
}

TEST(HaemodynamicCost, FallOfTenPercentOrMoreIsFlagged) {
  const Thresholds t = Thresholds::built_in();
  // CO 5 -> 4.25 L/min = -15 %, flagged at a 10 % fall (common practice, no source).
  const HaemodynamicCost co = haemodynamic_cost(L_per_min(5.0), L_per_min(4.25), t);
  EXPECT_NEAR(in_percent(co.change), -15.0, kTol);
  EXPECT_NEAR(in_percent(co.flag_at), 10.0, kTol);
  EXPECT_TRUE(co.flagged);
  // MAP 70 -> 63 mmHg = exactly -10 %: flagged (threshold inclusive; common practice, no source).
  EXPECT_TRUE(haemodynamic_cost(mmHg(70), mmHg(63), t).flagged);
  // MAP 70 -> 65 mmHg = -7.1 %: not flagged (common practice, no source).
  EXPECT_FALSE(haemodynamic_cost(mmHg(70), mmHg(65), t).flagged);
  // A rise is never a cost.
  EXPECT_FALSE(haemodynamic_cost(mmHg(70), mmHg(80), t).flagged);
}

TEST(HaemodynamicCost, SiteThresholdChangesTheFlag) {
  Thresholds t = Thresholds::built_in();
  t.load_overrides_text(
      "[heart_lung.haemodynamic_cost_fall]\nvalue = 20\nunit = \"%\"\nsource = \"site\"\n",
      "site.toml");
  // -15 % (arithmetic) is below a site cut-off of a 20 % fall.
  EXPECT_FALSE(haemodynamic_cost(L_per_min(5.0), L_per_min(4.25), t).flagged);
  EXPECT_TRUE(haemodynamic_cost(L_per_min(5.0), L_per_min(3.9), t).flagged);  // -22 %
}

TEST(BestStep, BestComplianceIsTheLargestFirstOnTies) {
  // Best compliance = highest Crs among the steps: Suter, Fairley & Isenberg, NEJM 1975;292:284.
  const std::vector<std::optional<Compliance>> crs = {
      std::nullopt, mL_per_cmH2O(30), mL_per_cmH2O(42), mL_per_cmH2O(42), mL_per_cmH2O(35)};
  EXPECT_EQ(best_compliance_step(crs), std::optional<std::size_t>(2));
}

TEST(BestStep, MaximumOxygenDeliveryAndLowestDrivingPressure) {
  // Maximum O2 transport: Suter, Fairley & Isenberg, NEJM 1975;292:284.
  const std::vector<std::optional<Flow>> do2 = {mL_per_min(820), mL_per_min(900), std::nullopt,
                                                mL_per_min(760)};
  EXPECT_EQ(best_oxygen_delivery_step(do2), std::optional<std::size_t>(1));
  // Lowest driving pressure: Amato et al., NEJM 2015;372:747.
  const std::vector<std::optional<Pressure>> dp = {cmH2O(16), cmH2O(13), cmH2O(12), std::nullopt,
                                                   cmH2O(14)};
  EXPECT_EQ(lowest_driving_pressure_step(dp), std::optional<std::size_t>(2));
}

TEST(BestStep, NothingWhenNoValueIsPresent) {
  const std::vector<std::optional<Compliance>> none = {std::nullopt, std::nullopt};
  EXPECT_FALSE(best_compliance_step(none));
  EXPECT_FALSE(best_compliance_step({}));
}

TEST(TiedSteps, AbsoluteResolutionNamesEveryStepCloserThanIt) {
  // Driving pressures 13.0, 13.6, 14.0, 12.4 cmH2O against the lowest 12.4 with a 1 cmH2O
  // resolution (read to whole cmH2O: common practice, no source): 13.0 (0.6) ties, 13.6 (1.2)
  // and 14.0 (1.6) do not.
  const std::vector<std::optional<Pressure>> dp = {cmH2O(13.0), cmH2O(13.6), std::nullopt,
                                                   cmH2O(14.0), cmH2O(12.4)};
  const auto best = lowest_driving_pressure_step(dp);
  ASSERT_EQ(best, std::optional<std::size_t>(4));
  EXPECT_EQ(tied_steps_si(si_values(dp), *best, cmH2O(1).value(), false),
            std::vector<std::size_t>{0});
  // A difference equal to the resolution is not below it: 13.4 against 12.4 does not tie.
  const std::vector<std::optional<Pressure>> edge = {cmH2O(12.4), cmH2O(13.4)};
  EXPECT_TRUE(tied_steps_si(si_values(edge), 0, cmH2O(1).value(), false).empty());
}

TEST(TiedSteps, RelativeResolutionIsAFractionOfTheBestValue) {
  // DO2 681, 680, 620, 600 mL/min with a 10 % resolution (common practice, no source): within
  // 68.1 of 681 lie 680 (1) and 620 (61); 600 (81) does not.
  const std::vector<std::optional<Flow>> do2 = {mL_per_min(681), mL_per_min(680), mL_per_min(620),
                                                mL_per_min(600)};
  EXPECT_EQ(tied_steps_si(si_values(do2), 0, 0.10, true), (std::vector<std::size_t>{1, 2}));
  EXPECT_TRUE(tied_steps_si(si_values(do2), 0, 0.0, true).empty());  // no resolution, no ties
}

}  // namespace
}  // namespace bb
