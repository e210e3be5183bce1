// Haemodynamic formulas against their published definitions, with hand-worked values.
#include <gtest/gtest.h>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/thresholds.hpp"

namespace bb {
namespace {

TEST(PulsePressureVariation, MichardDefinitionHandWorked) {
  // (62 - 48) / ((62 + 48) / 2) x 100 = 14 / 55 x 100 = 25.4545 %
  // (definition: Michard et al., AJRCCM 2000;162:134; arithmetic by hand)
  EXPECT_NEAR(in_percent(pulse_pressure_variation(mmHg(62), mmHg(48))), 25.4545, 1e-3);
  // 55/45: 10 / 50 x 100 = 20 % (Michard et al., AJRCCM 2000;162:134; by hand)
  EXPECT_NEAR(in_percent(pulse_pressure_variation(mmHg(55), mmHg(45))), 20.0, 1e-9);
  // Equal extremes: no variation, 0 % (Michard et al., AJRCCM 2000;162:134)
  EXPECT_NEAR(in_percent(pulse_pressure_variation(mmHg(50), mmHg(50))), 0.0, 1e-12);
}

TEST(PulsePressureVariation, SameInKilopascals) {
  // 62/48 mmHg written in kPa (1 kPa = 7.50062 mmHg, NIST SP 811, 2008) gives the same 25.4545 %
  // (Michard et al., AJRCCM 2000;162:134; by hand)
  EXPECT_NEAR(in_percent(pulse_pressure_variation(kPa(62 / 7.50062), kPa(48 / 7.50062))), 25.4545,
              1e-3);
}

TEST(PulsePressureVariation, AveragedOverThreeBreaths) {
  // Breaths 62/48, 60/47, 63/50: 25.4545, 24.2991 (13/53.5), 23.0088 (13/56.5) -> mean 24.2541 %
  // (Michard et al., AJRCCM 2000;162:134: mean of three breaths; arithmetic by hand)
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/47,63/50");
  const Thresholds t = Thresholds::built_in();
  validate_ppv(in, t);
  const PpvResults r = analyse_ppv(in, t);
  ASSERT_TRUE(r.ppv);
  EXPECT_NEAR(in_percent(*r.ppv), (25.4545 + 24.2991 + 23.0088) / 3.0, 1e-3);
  ASSERT_EQ(r.ppv_per_breath.size(), 3u);
  EXPECT_NEAR(in_percent(r.ppv_per_breath[1]), 24.2991, 1e-3);  // 13 / 53.5 x 100, by hand
}

TEST(PulsePressureVariation, FromBeatsTakesExtremesPerBreath) {
  // Breath 1 beats 120/70 (PP 50), 126/70 (PP 56), 116/72 (PP 44): PPmax 56, PPmin 44 -> 12/50 = 24
  // %; SBP extremes 126 - 116 = 10 mmHg (SPV, Perel et al., Anesthesiology 1987;67:498). (PP = SBP
  // - DBP per beat, textbook; PPV: Michard et al., AJRCCM 2000;162:134; arithmetic by hand)
  const auto breaths =
      parse_beats_by_breath("120/70,126/70,116/72;120/70,126/70,116/72;120/70,126/70,116/72");
  ASSERT_EQ(breaths.size(), 3u);
  const BreathExtremes e = breath_extremes(breaths[0]);
  EXPECT_NEAR(in_mmHg(e.pp_max), 56.0, 1e-9);  // by hand
  EXPECT_NEAR(in_mmHg(e.pp_min), 44.0, 1e-9);  // by hand
  PpvInputs in;
  in.beats = breaths;
  const Thresholds t = Thresholds::built_in();
  validate_ppv(in, t);
  const PpvResults r = analyse_ppv(in, t);
  EXPECT_NEAR(in_percent(*r.ppv), 24.0, 1e-9);  // Michard 2000 definition, by hand
  EXPECT_NEAR(in_mmHg(*r.spv), 10.0, 1e-9);     // Perel et al., Anesthesiology 1987;67:498, by hand
  // Mean SBP 120.667, mean DBP 70.667 -> MAP 70.667 + 50/3 = 87.333 mmHg (textbook DBP + PP/3, by
  // hand)
  EXPECT_NEAR(in_mmHg(*r.map_estimate), 87.3333, 1e-3);
}

TEST(SystolicPressureVariation, PerelDefinition) {
  // SBPmax 125 - SBPmin 113 = 12 mmHg (Perel et al., Anesthesiology 1987;67:498; by hand)
  EXPECT_NEAR(in_mmHg(systolic_pressure_variation(mmHg(125), mmHg(113))), 12.0, 1e-9);
}

TEST(StrokeVolumeVariation, PpvDefinitionOnStrokeVolume) {
  // (80 - 60) / 70 x 100 = 28.571 % (PPV formula applied to SV, from memory; by hand)
  EXPECT_NEAR(in_percent(stroke_volume_variation(mL(80), mL(60))), 28.5714, 1e-3);
}

TEST(MeanArterialPressure, EstimateFromSystolicAndDiastolic) {
  // 120/80: 80 + 40/3 = 93.33 mmHg (textbook, common practice, no source)
  EXPECT_NEAR(in_mmHg(mean_arterial_pressure_estimate(mmHg(120), mmHg(80))), 93.3333, 1e-3);
  // 90/60: 60 + 10 = 70 mmHg (textbook, common practice, no source)
  EXPECT_NEAR(in_mmHg(mean_arterial_pressure_estimate(mmHg(90), mmHg(60))), 70.0, 1e-9);
}

TEST(HeartRateRespiratoryRateRatio, BeatsPerBreath) {
  // 72 / 20 = 3.6, the cut-off itself (De Backer et al., Anesthesiology 2009;110:1092)
  EXPECT_NEAR(in_fraction(heart_rate_to_respiratory_rate_ratio(per_min(72), per_min(20))), 3.6,
              1e-12);
  // 60 / 30 = 2.0 (De Backer et al., Anesthesiology 2009;110:1092: low ratio; by hand)
  EXPECT_NEAR(in_fraction(heart_rate_to_respiratory_rate_ratio(per_min(60), per_min(30))), 2.0,
              1e-12);
}

TEST(PreloadChanges, RelativeAndAbsolute) {
  // CO 5.0 -> 5.5 L/min: +10 % (Monnet et al., Crit Care Med 2006;34:1402 measure; by hand)
  EXPECT_NEAR(in_percent(relative_change(L_per_min(5.0), L_per_min(5.5))), 10.0, 1e-9);
  // PPV 7 -> 11 %: +4 points, absolute (Myatra et al., Crit Care Med 2017;45:415; by hand)
  EXPECT_NEAR(in_percent(ppv_absolute_change(percent(7), percent(11))), 4.0, 1e-9);
  // VTI 20 -> 18 cm: -10 % (Muller et al., Anesthesiology 2011;115:541 measure; by hand)
  EXPECT_NEAR(in_percent(relative_change(cm(20), cm(18))), -10.0, 1e-9);
}

}  // namespace
}  // namespace bb
