// Pleural and right-atrial pressure transmission, the venous-return gradient
// and the combined PEEP estimate (Gattinoni et al., AJRCCM 1998; van den Berg et al.,
// J Appl Physiol 2002;92:1223; from memory). Every expected value is
// worked by hand from the published formula named beside it; mmHg conversions
// use 1 cmH2O = 98.0665 Pa and 1 mmHg = 133.322387415 Pa (NIST SP 811, 2008).
#include <algorithm>

// breathbeat headers first: <gtest/gtest.h> pulls in <signal.h>, whose si_value
// macro breaks a parameter name in thresholds.hpp.
#include "breathbeat/heart_lung.hpp"
#include "breathbeat/present/heart_lung.hpp"

#include <gtest/gtest.h>

namespace bb {
namespace {

constexpr double kTransmissionTol = 1e-9;

bool has_note(const HeartLungEstimate& e, HeartLungNote note) {
  return std::find(e.notes.begin(), e.notes.end(), note) != e.notes.end();
}

// ---- single formulas --------------------------------------------------------------

TEST(PleuralPressureChange, ScalesAirwayPressureByChestWallShare) {
  // 10 cmH2O x 0.3 = 3 cmH2O: dPpl = dPaw Ecw/Ers, Gattinoni et al. AJRCCM 1998 (from memory).
  EXPECT_NEAR(in_cmH2O(pleural_pressure_change(cmH2O(10), fraction(0.3))), 3.0, kTransmissionTol);
}

TEST(TidalPleuralSwing, IsDrivingPressureTimesChestWallShare) {
  // 14 cmH2O x 0.5 = 7 cmH2O: Chiumello et al. AJRCCM 2008;178:346 (from memory).
  EXPECT_NEAR(in_cmH2O(tidal_pleural_swing(cmH2O(14), fraction(0.5))), 7.0, kTransmissionTol);
}

TEST(RightAtrialPressureChange, ReadsInMmHg) {
  // 10 cmH2O x 0.3 = 3 cmH2O = 2.2067 mmHg: Gattinoni et al. AJRCCM 1998 (from memory),
  // conversion NIST SP 811 (2008).
  const Pressure d = right_atrial_pressure_change(cmH2O(10), fraction(0.3));
  EXPECT_NEAR(in_cmH2O(d), 3.0, kTransmissionTol);
  EXPECT_NEAR(in_mmHg(d), 2.20668, 1e-5);
}

TEST(VenousReturnGradientChange, IsMinusRapRiseOverGradient) {
  // -2 / (20 - 10) = -0.20: Guyton; van den Berg et al. J Appl Physiol 2002;92:1223 (from memory).
  EXPECT_NEAR(in_fraction(venous_return_gradient_change(mmHg(2), mmHg(20), mmHg(10))), -0.20,
              kTransmissionTol);
  // A PEEP fall lowers RAP: +1.5 / 12 = +0.125, same formula (from memory).
  EXPECT_NEAR(in_fraction(venous_return_gradient_change(mmHg(-1.5), mmHg(20), mmHg(8))), 0.125,
              kTransmissionTol);
}

TEST(VenousReturnGradientChange, RejectsPmsfNotAboveRap) {
  // No gradient when Pmsf <= RAP (Guyton; from memory): input error naming Pmsf.
  try {
    venous_return_gradient_change(mmHg(2), mmHg(10), mmHg(12));
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "pmsf");
  }
  EXPECT_THROW(venous_return_gradient_change(mmHg(2), mmHg(10), mmHg(10)), InputError);
}

// ---- ranges -----------------------------------------------------------------------

TEST(ElastanceRatioRange, BuiltInPresetIsThePublishedRange) {
  // 0.2 .. 0.8, typical 0.3 in ARDS: Gattinoni et al. AJRCCM 1998 / Chiumello et al.
  // AJRCCM 2008;178:346 (from memory).
  const RatioRange r = preset_elastance_ratio_range(Thresholds::built_in());
  EXPECT_NEAR(in_fraction(r.low), 0.2, kTransmissionTol);
  EXPECT_NEAR(in_fraction(r.central), 0.3, kTransmissionTol);
  EXPECT_NEAR(in_fraction(r.high), 0.8, kTransmissionTol);
  EXPECT_FALSE(r.single());
}

TEST(ElastanceRatioRange, MeasuredValueCollapsesTheRange) {
  // Ecw/Ers 0.45 measured (Chiumello et al. AJRCCM 2008;178:346, from memory): one value.
  const RatioRange r = measured_elastance_ratio_range(fraction(0.45));
  EXPECT_TRUE(r.single());
  EXPECT_NEAR(in_fraction(r.central), 0.45, kTransmissionTol);
}

TEST(ElastanceRatioRange, RejectsImpossibleShares) {
  // Ecw is part of Ers, so 0 < Ecw/Ers <= 1 (Ers = EL + Ecw, textbook; common practice).
  EXPECT_THROW(measured_elastance_ratio_range(fraction(1.2)), InputError);
  EXPECT_THROW(measured_elastance_ratio_range(fraction(0.0)), InputError);
  EXPECT_NO_THROW(measured_elastance_ratio_range(fraction(1.0)));
}

TEST(ElastanceRatioRange, SiteFileOverridesAndIsChecked) {
  Thresholds t = Thresholds::built_in();
  t.load_overrides_text("[heart_lung.ecw_ers_high]\nvalue = 0.6\nunit = \"\"\nsource = \"site\"\n",
                        "site.toml");
  // 10 cmH2O x 0.6 = 6 cmH2O: dRAP = dPEEP Ecw/Ers, Gattinoni et al. AJRCCM 1998 (from memory).
  const PressureRange d =
      right_atrial_pressure_change_range(cmH2O(10), preset_elastance_ratio_range(t));
  EXPECT_NEAR(in_cmH2O(d.high), 6.0, kTransmissionTol);

  Thresholds bad = Thresholds::built_in();
  bad.load_overrides_text(
      "[heart_lung.ecw_ers_central]\nvalue = 0.9\nunit = \"\"\nsource = \"site\"\n", "site.toml");
  EXPECT_THROW(preset_elastance_ratio_range(bad), InputError);
}

TEST(PressureRanges, AreInNumericOrderForAPeepFall) {
  // -10 cmH2O x (0.2, 0.3, 0.8) = -2, -3, -8 cmH2O -> low -8, high -2:
  // Gattinoni et al. AJRCCM 1998 (from memory).
  const PressureRange d = pleural_pressure_change_range(
      cmH2O(-10), preset_elastance_ratio_range(Thresholds::built_in()));
  EXPECT_NEAR(in_cmH2O(d.low), -8.0, kTransmissionTol);
  EXPECT_NEAR(in_cmH2O(d.central), -3.0, kTransmissionTol);
  EXPECT_NEAR(in_cmH2O(d.high), -2.0, kTransmissionTol);
}

// ---- combined estimate -------------------------------------------------------------

TEST(EstimatePeepEffect, PresetRangeForAPeepRise) {
  HeartLungInputs in;
  in.peep_reference = cmH2O(5);
  in.peep_step = cmH2O(15);
  in.driving_pressure = cmH2O(15);
  in.pmsf = mmHg(25);
  in.rap = mmHg(10);
  const HeartLungEstimate e = estimate_peep_effect(in, Thresholds::built_in());

  EXPECT_EQ(e.ecw_ers_origin, ElastanceRatioOrigin::preset_range);
  ASSERT_TRUE(e.delta_peep);
  EXPECT_NEAR(in_cmH2O(*e.delta_peep), 10.0, kTransmissionTol);  // 15 - 5 (arithmetic)

  // 15 cmH2O x 0.2 / 0.3 / 0.8 = 3 / 4.5 / 12 cmH2O: Chiumello et al. AJRCCM 2008 (from memory).
  ASSERT_TRUE(e.tidal_pleural_swing);
  EXPECT_NEAR(in_cmH2O(e.tidal_pleural_swing->low), 3.0, kTransmissionTol);
  EXPECT_NEAR(in_cmH2O(e.tidal_pleural_swing->central), 4.5, kTransmissionTol);
  EXPECT_NEAR(in_cmH2O(e.tidal_pleural_swing->high), 12.0, kTransmissionTol);

  // 10 cmH2O x 0.2 / 0.3 / 0.8 = 2 / 3 / 8 cmH2O: Gattinoni et al. AJRCCM 1998 (from memory).
  ASSERT_TRUE(e.right_atrial_pressure_change);
  EXPECT_NEAR(in_cmH2O(e.right_atrial_pressure_change->low), 2.0, kTransmissionTol);
  EXPECT_NEAR(in_cmH2O(e.right_atrial_pressure_change->central), 3.0, kTransmissionTol);
  EXPECT_NEAR(in_cmH2O(e.right_atrial_pressure_change->high), 8.0, kTransmissionTol);
  ASSERT_TRUE(e.pleural_pressure_change);
  EXPECT_NEAR(in_cmH2O(e.pleural_pressure_change->high), 8.0, kTransmissionTol);

  // -(8 cmH2O = 5.8845 mmHg)/15 = -0.3923 ... -(2 cmH2O = 1.4711 mmHg)/15 = -0.0981:
  // van den Berg et al. J Appl Physiol 2002;92:1223 (from memory), NIST SP 811 conversion.
  ASSERT_TRUE(e.venous_return_gradient_change);
  EXPECT_NEAR(in_fraction(e.venous_return_gradient_change->low), -0.392298, 1e-6);
  EXPECT_NEAR(in_fraction(e.venous_return_gradient_change->central), -0.147112, 1e-6);
  EXPECT_NEAR(in_fraction(e.venous_return_gradient_change->high), -0.0980746, 1e-6);

  EXPECT_TRUE(has_note(e, HeartLungNote::ecw_ers_assumed_range));
  EXPECT_TRUE(has_note(e, HeartLungNote::venous_return_assumptions));
  // The note quotes the preset range 0.20 to 0.80, typical 0.30 (heart_lung.toml; Gattinoni et
  // al. AJRCCM 1998, from memory) and the PEEP change 10.0 cmH2O (15 - 5, arithmetic).
  const std::string range = heart_lung_note_text(HeartLungNote::ecw_ers_assumed_range, e);
  EXPECT_NE(range.find("between 0.20 and 0.80 (typical 0.30"), std::string::npos) << range;
  const std::string peep = heart_lung_note_text(HeartLungNote::peep_change_transmitted, e);
  EXPECT_NE(peep.find("PEEP change +10.0 cmH2O at this step"), std::string::npos) << peep;
  // The notes follow the table they explain.
  EXPECT_NE(range.find("in the table above"), std::string::npos) << range;
  EXPECT_EQ(heart_lung_note_texts(e).size(), e.notes.size());
}

TEST(EstimatePeepEffect, MeasuredRatioCollapsesEveryRange) {
  HeartLungInputs in;
  in.peep_reference = cmH2O(8);
  in.peep_step = cmH2O(14);
  in.driving_pressure = cmH2O(12);
  in.measured_ecw_ers = fraction(0.5);
  in.pmsf = mmHg(22);
  in.rap = mmHg(12);
  const HeartLungEstimate e = estimate_peep_effect(in, Thresholds::built_in());

  EXPECT_EQ(e.ecw_ers_origin, ElastanceRatioOrigin::measured);
  EXPECT_TRUE(e.ecw_ers.single());
  ASSERT_TRUE(e.tidal_pleural_swing && e.right_atrial_pressure_change &&
              e.venous_return_gradient_change);
  EXPECT_TRUE(e.tidal_pleural_swing->single());
  EXPECT_TRUE(e.right_atrial_pressure_change->single());
  EXPECT_TRUE(e.venous_return_gradient_change->single());
  // 12 x 0.5 = 6 cmH2O; 6 x 0.5 = 3 cmH2O = 2.2067 mmHg; -2.2067 / 10 = -0.22067:
  // Chiumello et al. AJRCCM 2008; van den Berg et al. J Appl Physiol 2002 (both from memory).
  EXPECT_NEAR(in_cmH2O(e.tidal_pleural_swing->central), 6.0, kTransmissionTol);
  EXPECT_NEAR(in_cmH2O(e.right_atrial_pressure_change->central), 3.0, kTransmissionTol);
  EXPECT_NEAR(in_fraction(e.venous_return_gradient_change->central), -0.220668, 1e-6);
  EXPECT_TRUE(has_note(e, HeartLungNote::ecw_ers_measured));
  EXPECT_FALSE(has_note(e, HeartLungNote::ecw_ers_assumed_range));
}

TEST(EstimatePeepEffect, SkipsWhatIsNotGivenAndSaysSo) {
  HeartLungInputs in;
  in.driving_pressure = cmH2O(10);
  HeartLungEstimate e = estimate_peep_effect(in, Thresholds::built_in());
  EXPECT_TRUE(e.tidal_pleural_swing);
  EXPECT_FALSE(e.delta_peep);
  EXPECT_FALSE(e.right_atrial_pressure_change);
  EXPECT_TRUE(has_note(e, HeartLungNote::peep_effect_needs_both_peeps));

  in.peep_reference = cmH2O(5);
  in.peep_step = cmH2O(10);
  in.rap = mmHg(8);  // no Pmsf
  e = estimate_peep_effect(in, Thresholds::built_in());
  EXPECT_TRUE(e.right_atrial_pressure_change);
  EXPECT_FALSE(e.venous_return_gradient_change);
  EXPECT_TRUE(has_note(e, HeartLungNote::venous_return_needs_pmsf_and_rap));
  EXPECT_FALSE(has_note(e, HeartLungNote::peep_effect_needs_both_peeps));
}

TEST(EstimatePeepEffect, RejectsPmsfNotAboveRapAndImpossibleRatio) {
  HeartLungInputs in;
  in.peep_reference = cmH2O(5);
  in.peep_step = cmH2O(12);
  in.pmsf = mmHg(9);
  in.rap = mmHg(11);
  EXPECT_THROW(estimate_peep_effect(in, Thresholds::built_in()), InputError);

  HeartLungInputs ratio;
  ratio.measured_ecw_ers = fraction(1.4);
  EXPECT_THROW(estimate_peep_effect(ratio, Thresholds::built_in()), InputError);
}

TEST(EstimatePeepEffect, WarnsWhenPredictedRapReachesPmsf) {
  // 20 cmH2O x 0.8 = 16 cmH2O = 11.77 mmHg > Pmsf - RAP = 6 mmHg: the linear estimate
  // predicts the gradient gone (van den Berg et al. J Appl Physiol 2002, from memory).
  HeartLungInputs in;
  in.peep_reference = cmH2O(5);
  in.peep_step = cmH2O(25);
  in.pmsf = mmHg(18);
  in.rap = mmHg(12);
  const HeartLungEstimate e = estimate_peep_effect(in, Thresholds::built_in());
  ASSERT_TRUE(e.venous_return_gradient_change);
  EXPECT_LT(in_fraction(e.venous_return_gradient_change->low), -1.0);
  EXPECT_TRUE(has_note(e, HeartLungNote::rap_reaches_pmsf));
}

TEST(EstimatePeepEffect, MeasuredCvpAtTheStepGivesTheVenousReturnChange) {
  // CVP 10 -> 14 mmHg measured, Pmsf 25 mmHg: -(14 - 10)/(25 - 10) = -26.7 %, one value
  // (Guyton; van den Berg et al. J Appl Physiol 2002;92:1223, from memory); the estimated dRAP
  // (10 cmH2O x 0.2 .. 0.8) stays a range beside it.
  HeartLungInputs in;
  in.peep_reference = cmH2O(5);
  in.peep_step = cmH2O(15);
  in.pmsf = mmHg(25);
  in.rap = mmHg(10);
  in.rap_step = mmHg(14);
  const HeartLungEstimate e = estimate_peep_effect(in, Thresholds::built_in());
  ASSERT_TRUE(e.measured_rap_change && e.venous_return_gradient_change);
  EXPECT_NEAR(in_mmHg(*e.measured_rap_change), 4.0, kTransmissionTol);
  EXPECT_TRUE(e.venous_return_gradient_change->single());
  EXPECT_NEAR(in_fraction(e.venous_return_gradient_change->central), -4.0 / 15.0, 1e-9);
  ASSERT_TRUE(e.right_atrial_pressure_change);
  EXPECT_FALSE(e.right_atrial_pressure_change->single());
  EXPECT_TRUE(has_note(e, HeartLungNote::venous_return_from_measured_rap));
  EXPECT_TRUE(has_note(e, HeartLungNote::venous_return_assumptions));
  const std::string note = heart_lung_note_text(HeartLungNote::venous_return_from_measured_rap, e);
  EXPECT_NE(note.find("+4.0 mmHg"), std::string::npos) << note;
}

}  // namespace
}  // namespace bb
