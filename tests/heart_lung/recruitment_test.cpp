// Recruitment-to-inflation ratio, Chen et al., Am J Respir Crit Care Med
// 2020;201:178: expected values worked by hand from the published formulas.
// breathbeat headers first: <gtest/gtest.h> pulls in <signal.h>, whose si_value
// macro breaks a parameter name in thresholds.hpp.
#include "breathbeat/heart_lung.hpp"
#include "breathbeat/present/heart_lung.hpp"

#include <gtest/gtest.h>

namespace bb {
namespace {

constexpr double kRecruitmentTol = 1e-9;

RecruitmentInputs release_15_to_5(double eelv_change_ml) {
  RecruitmentInputs in;
  in.eelv_change = mL(eelv_change_ml);
  in.peep_high = cmH2O(15);
  in.peep_low = cmH2O(5);
  in.pplat_low = cmH2O(25);
  in.vt = mL(400);
  return in;
}

TEST(RecruitmentFormulas, EachStepOfChen2020) {
  // Crs,low = 400 / (25 - 5) = 20 mL/cmH2O; Chen et al. AJRCCM 2020;201:178.
  const Compliance crs = compliance_at_low_peep(mL(400), cmH2O(25), cmH2O(5));
  EXPECT_NEAR(in_mL_per_cmH2O(crs), 20.0, kRecruitmentTol);
  // dVrec = 300 - 20 x (15 - 5) = 100 mL; Chen et al. AJRCCM 2020;201:178.
  const Volume vrec = recruited_volume(mL(300), crs, cmH2O(15), cmH2O(5));
  EXPECT_NEAR(in_mL(vrec), 100.0, kRecruitmentTol);
  // Crec = 100 / 10 = 10 mL/cmH2O; Chen et al. AJRCCM 2020;201:178.
  const Compliance crec = recruited_compliance(vrec, cmH2O(15), cmH2O(5));
  EXPECT_NEAR(in_mL_per_cmH2O(crec), 10.0, kRecruitmentTol);
  // R/I = 10 / 20 = 0.5; Chen et al. AJRCCM 2020;201:178.
  EXPECT_NEAR(in_fraction(recruitment_to_inflation_ratio(crec, crs)), 0.5, kRecruitmentTol);
}

TEST(AssessRecruitment, AtTheCutOffIsHighRecruitability) {
  // R/I 0.5 as above; >= 0.5 suggests high recruitability, Chen et al. AJRCCM 2020;201:178.
  const RecruitmentResult r = assess_recruitment(release_15_to_5(300), Thresholds::built_in());
  EXPECT_NEAR(in_fraction(r.ratio), 0.5, kRecruitmentTol);
  EXPECT_NEAR(in_fraction(r.high_recruitability_at), 0.5, kRecruitmentTol);
  EXPECT_TRUE(r.high_recruitability);
  EXPECT_FALSE(r.airway_opening_pressure_used);
  EXPECT_NEAR(in_cmH2O(r.lower_pressure_used), 5.0, kRecruitmentTol);
}

TEST(AssessRecruitment, LowRatio) {
  // 250 - 200 = 50 mL; 50 / 10 = 5 mL/cmH2O; 5 / 20 = 0.25 < 0.5: Chen et al. AJRCCM 2020;201:178.
  const RecruitmentResult r = assess_recruitment(release_15_to_5(250), Thresholds::built_in());
  EXPECT_NEAR(in_mL(r.recruited_volume), 50.0, kRecruitmentTol);
  EXPECT_NEAR(in_fraction(r.ratio), 0.25, kRecruitmentTol);
  EXPECT_FALSE(r.high_recruitability);
}

TEST(AssessRecruitment, NegativeWithinTheVolumeErrorIsNoRecruitment) {
  // 190 - 200 = -10 mL; -1 / 20 = -0.05: Chen et al. AJRCCM 2020;201:178. The volume error of
  // the 190 mL released is 4 + 0.15 x 190 = 32.5 mL (ISO 80601-2-12, from memory): within it.
  const RecruitmentResult r = assess_recruitment(release_15_to_5(190), Thresholds::built_in());
  EXPECT_NEAR(in_fraction(r.ratio), -0.05, kRecruitmentTol);
  EXPECT_NEAR(in_mL(r.predicted_volume), 200.0, kRecruitmentTol);  // 20 x 10, Chen et al. 2020
  EXPECT_NEAR(in_mL(r.measurement_tolerance), 32.5, 1e-9);
  EXPECT_TRUE(r.interpretable);
  EXPECT_FALSE(r.high_recruitability);
  ASSERT_EQ(r.notes.size(), 1u);
  EXPECT_EQ(r.notes[0], RecruitmentNote::no_recruitment_detected);
  // 300 - 200 = +100 mL: recruitment, no such note (Chen et al. AJRCCM 2020;201:178).
  EXPECT_TRUE(assess_recruitment(release_15_to_5(300), Thresholds::built_in()).notes.empty());
}

TEST(AssessRecruitment, WellBelowThePredictionCannotBeInterpreted) {
  // 150 - 200 = -50 mL (R/I -0.25, Chen et al. 2020), beyond 4 + 0.15 x 150 = 26.5 mL (ISO
  // 80601-2-12, from memory): a release cannot give back less than inflation put in.
  const RecruitmentResult r = assess_recruitment(release_15_to_5(150), Thresholds::built_in());
  EXPECT_NEAR(in_fraction(r.ratio), -0.25, kRecruitmentTol);
  EXPECT_FALSE(r.interpretable);
  EXPECT_FALSE(r.high_recruitability);
  ASSERT_EQ(r.notes.size(), 1u);
  EXPECT_EQ(r.notes[0], RecruitmentNote::released_volume_below_prediction);
  const std::string text = recruitment_note_texts(r)[0];
  EXPECT_NE(text.find("cannot be interpreted"), std::string::npos) << text;
  EXPECT_EQ(text.find("within measurement error"), std::string::npos) << text;
}

TEST(AssessRecruitment, TheVolumeErrorIsTheBoundary) {
  // 200 - x = 4 + 0.15 x at x = 196 / 1.15 = 170.4 mL (arithmetic on the ISO 80601-2-12
  // accuracy, from memory): 171 mL (-29 against 29.65) is within, 170 mL (-30 against 29.5) not.
  EXPECT_TRUE(assess_recruitment(release_15_to_5(171), Thresholds::built_in()).interpretable);
  EXPECT_FALSE(assess_recruitment(release_15_to_5(170), Thresholds::built_in()).interpretable);
  // A site that trusts its sensor less moves the boundary (--thresholds, same keys).
  Thresholds t = Thresholds::built_in();
  t.load_overrides_text(
      "[heart_lung.release_volume_error_relative]\nvalue = 20\nunit = \"%\"\nsource = \"site\"\n",
      "site.toml");
  // 4 + 0.20 x 170 = 38 mL > 30 mL.
  EXPECT_TRUE(assess_recruitment(release_15_to_5(170), t).interpretable);
}

TEST(AssessRecruitment, AirwayOpeningPressureReplacesPeepLow) {
  // AOP 8 replaces PEEPlow 5: Crs,low = 340 / (25 - 8) = 20; dVrec = 300 - 20 x 7 = 160 mL;
  // Crec = 160 / 7 = 22.857; R/I = 1.142857: Chen et al. AJRCCM 2020;201:178.
  RecruitmentInputs in = release_15_to_5(300);
  in.vt = mL(340);
  in.airway_opening_pressure = cmH2O(8);
  const RecruitmentResult r = assess_recruitment(in, Thresholds::built_in());
  EXPECT_TRUE(r.airway_opening_pressure_used);
  EXPECT_NEAR(in_cmH2O(r.lower_pressure_used), 8.0, kRecruitmentTol);
  EXPECT_NEAR(in_mL_per_cmH2O(r.compliance_low), 20.0, kRecruitmentTol);
  EXPECT_NEAR(in_mL(r.recruited_volume), 160.0, kRecruitmentTol);
  EXPECT_NEAR(in_mL_per_cmH2O(r.recruited_compliance), 160.0 / 7.0, kRecruitmentTol);
  EXPECT_NEAR(in_fraction(r.ratio), 1.142857, 1e-6);
  ASSERT_EQ(r.notes.size(), 1u);
  EXPECT_EQ(r.notes[0], RecruitmentNote::airway_opening_pressure_used);
  // The note quotes the pressure used, 8.0 cmH2O (as given).
  EXPECT_NE(recruitment_note_texts(r)[0].find("Airway opening pressure 8.0 cmH2O"),
            std::string::npos);
}

TEST(AssessRecruitment, AirwayOpeningPressureAtOrBelowPeepLowChangesNothing) {
  // AOP 4 < PEEPlow 5: no closure above PEEP, R/I 0.5 as without it (Chen et al. 2020).
  RecruitmentInputs in = release_15_to_5(300);
  in.airway_opening_pressure = cmH2O(4);
  const RecruitmentResult r = assess_recruitment(in, Thresholds::built_in());
  EXPECT_FALSE(r.airway_opening_pressure_used);
  EXPECT_NEAR(in_fraction(r.ratio), 0.5, kRecruitmentTol);
}

TEST(AssessRecruitment, ThresholdOverrideChangesTheCall) {
  Thresholds t = Thresholds::built_in();
  t.load_overrides_text(
      "[heart_lung.recruitment_to_inflation_high]\nvalue = 0.6\nunit = \"\"\nsource = \"site\"\n",
      "site.toml");
  // R/I 0.5 (Chen et al. 2020 arithmetic) is below a site cut-off of 0.6.
  EXPECT_FALSE(assess_recruitment(release_15_to_5(300), t).high_recruitability);
}

TEST(AssessRecruitment, RejectsImpossibleInput) {
  auto field_of = [](const RecruitmentInputs& in) {
    try {
      assess_recruitment(in, Thresholds::built_in());
    } catch (const InputError& e) {
      return e.field();
    }
    return std::string("no error");
  };
  RecruitmentInputs in = release_15_to_5(300);
  in.peep_high = cmH2O(5);
  EXPECT_EQ(field_of(in), "peep_high");

  in = release_15_to_5(300);
  in.pplat_low = cmH2O(5);
  EXPECT_EQ(field_of(in), "pplat_low");

  in = release_15_to_5(0);
  EXPECT_EQ(field_of(in), "delta_eelv");

  in = release_15_to_5(300);
  in.vt = mL(0);
  EXPECT_EQ(field_of(in), "release_vt");

  in = release_15_to_5(300);
  in.airway_opening_pressure = cmH2O(15);
  EXPECT_EQ(field_of(in), "peep_high");
}

}  // namespace
}  // namespace bb
