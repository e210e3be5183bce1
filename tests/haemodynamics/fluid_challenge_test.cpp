// The objective and safety limits of a fluid challenge (Vincent & Weil, Crit Care Med
// 2006;34:1333), against the built-in presets (presets/thresholds/fluid_challenge.toml).
#include <gtest/gtest.h>

#include "breathbeat/haemodynamics.hpp"

namespace bb {
namespace {

const Thresholds& limits() {
  static const Thresholds t = Thresholds::built_in();
  return t;
}

const SafetyCheck& check(const std::vector<SafetyCheck>& c, SafetyLimit l) {
  for (const SafetyCheck& x : c) {
    if (x.limit == l) return x;
  }
  throw std::logic_error("no such check");
}

TEST(FluidChallengeSafety, NothingRecordedIsNotCheckedNeverNotReached) {
  const auto c = check_fluid_safety({}, limits());
  ASSERT_EQ(c.size(), 4u);
  for (const SafetyCheck& x : c) EXPECT_EQ(x.state, LimitState::not_checked) << to_string(x.limit);
  EXPECT_FALSE(safety_limit_reached(c));
}

TEST(FluidChallengeSafety, CvpReachingTheCeilingIsALimitReached) {
  // Preset ceiling 15 mmHg (common practice, no source): 15 reaches it, 14 does not.
  FluidSafetyInputs in;
  in.cvp_after = mmHg(15);
  EXPECT_EQ(check(check_fluid_safety(in, limits()), SafetyLimit::cvp_ceiling).state,
            LimitState::reached);
  in.cvp_after = mmHg(14);
  EXPECT_EQ(check(check_fluid_safety(in, limits()), SafetyLimit::cvp_ceiling).state,
            LimitState::not_reached);
  // A ceiling stated for this challenge wins over the preset.
  in.cvp_after = mmHg(16);
  in.cvp_max = mmHg(18);
  const SafetyCheck s = check(check_fluid_safety(in, limits()), SafetyLimit::cvp_ceiling);
  EXPECT_EQ(s.state, LimitState::not_reached);
  EXPECT_TRUE(s.stated);
}

TEST(FluidChallengeSafety, OxygenationFalls) {
  // PaO2/FiO2 200 -> 178 mmHg: (200 - 178) / 200 = 11 % >= 10 % (preset, common practice).
  FluidSafetyInputs in;
  in.pf_before = mmHg(200);
  in.pf_after = mmHg(178);
  // SpO2 96 -> 94 %: 2 points < 3 (preset, common practice).
  in.spo2_before = percent(96);
  in.spo2_after = percent(94);
  const auto c = check_fluid_safety(in, limits());
  const SafetyCheck& pf = check(c, SafetyLimit::pf_ratio_fall);
  EXPECT_EQ(pf.state, LimitState::reached);
  EXPECT_NEAR(in_percent(std::get<Ratio>(*pf.value)), 11.0, 1e-9);
  EXPECT_EQ(check(c, SafetyLimit::spo2_fall).state, LimitState::not_reached);
  EXPECT_TRUE(safety_limit_reached(c));
}

TEST(FluidChallengeObjective, SurrogatesAgainstTheirPresets) {
  // MAP +10 % meets the 10 % rise; HR -9 % misses the 10 % fall (common practice, no source).
  EXPECT_EQ(surrogate_objective_state(FluidObjective::map, percent(10), limits()),
            ObjectiveState::met);
  EXPECT_EQ(surrogate_objective_state(FluidObjective::hr, percent(-9), limits()),
            ObjectiveState::not_met);
  EXPECT_EQ(surrogate_objective_state(FluidObjective::hr, percent(-10), limits()),
            ObjectiveState::met);
  EXPECT_EQ(surrogate_objective_state(FluidObjective::urine_output, percent(50), limits()),
            ObjectiveState::not_judged);
  EXPECT_TRUE(is_surrogate(FluidObjective::map));
  EXPECT_FALSE(is_surrogate(FluidObjective::vti));
}

}  // namespace
}  // namespace bb
