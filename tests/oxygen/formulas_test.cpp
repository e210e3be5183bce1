// The oxygen formulas against values from outside the project. Beside each
// expected value: where it comes from.
#include <gtest/gtest.h>

#include "breathbeat/body.hpp"
#include "breathbeat/oxygen.hpp"

namespace bb {
namespace {

class OxygenFormulas : public ::testing::Test {
 protected:
  Thresholds limits = Thresholds::built_in();
  OxygenConstants c = oxygen_constants(limits);
};

TEST_F(OxygenFormulas, PresetConstantsAreThePublishedDefaults) {
  // k 1.34 mL/g, s 0.003 mL/dL/mmHg: Marino, The ICU Book; West, Respiratory Physiology
  // (from memory).
  EXPECT_NEAR(in_mL_per_kg(c.hb_binding), 1340.0, 1e-9);
  EXPECT_NEAR(in_mL_per_dL(Ratio(c.o2_solubility * mmHg(1.0))), 0.003, 1e-12);
  // Pb 760 mmHg, PH2O 47 mmHg at 37 degC, R 0.8: textbook (West, Respiratory Physiology).
  EXPECT_NEAR(in_mmHg(c.barometric_pressure), 760.0, 1e-9);
  EXPECT_NEAR(in_mmHg(c.water_vapour), 47.0, 1e-9);
  EXPECT_NEAR(in_fraction(c.respiratory_quotient), 0.8, 1e-12);
}

TEST_F(OxygenFormulas, ArterialContentHandWorkedValue) {
  // Hb 15 g/dL, SaO2 0.98, PaO2 100 mmHg -> 1.34*15*0.98 + 0.003*100 = 19.70 + 0.30 = 20.0 mL/dL
  // (hand-worked check value; arithmetic on Marino, The ICU Book, from memory).
  const Ratio cao2 =
      oxygen_content(g_per_dL(15), fraction(0.98), mmHg(100), c.hb_binding, c.o2_solubility);
  EXPECT_NEAR(in_mL_per_dL(cao2), 19.998, 1e-9);
  EXPECT_NEAR(in_mL_per_dL(haemoglobin_bound_oxygen(g_per_dL(15), fraction(0.98), c.hb_binding)),
              19.698, 1e-9);
}

TEST_F(OxygenFormulas, DeliveryHandWorkedValue) {
  // CO 5 L/min, CaO2 20.0 mL/dL -> DO2 = 5 * 20.0 * 10 = 1000 mL/min (textbook, hand-worked).
  EXPECT_NEAR(in_mL_per_min(oxygen_delivery(L_per_min(5), mL_per_dL(20.0))), 1000.0, 1e-9);
  // CI 3 L/min/m2, CaO2 20 mL/dL -> DO2I 600 mL/min/m2 (same arithmetic, textbook).
  EXPECT_NEAR(in_mL_per_min_per_m2(oxygen_delivery_index(L_per_min_per_m2(3), mL_per_dL(20.0))),
              600.0, 1e-9);
  // DO2 1000 mL/min over BSA 2.0 m2 -> 500 mL/min/m2 (arithmetic).
  EXPECT_NEAR(in_mL_per_min_per_m2(indexed_to_bsa(mL_per_min(1000), square_metre(2.0))), 500.0,
              1e-9);
}

TEST_F(OxygenFormulas, FickConsumptionAndExtraction) {
  // CO 5 L/min, CaO2 20 and CvO2 15 mL/dL -> VO2 = 5 * 5 * 10 = 250 mL/min, within the textbook
  // normal 200-250 mL/min; O2ER = 5/20 = 0.25, within the textbook normal 0.20-0.30
  // (arithmetic on the Fick equation, Marino, The ICU Book).
  EXPECT_NEAR(in_mL_per_min(oxygen_consumption_fick(L_per_min(5), mL_per_dL(20), mL_per_dL(15))),
              250.0, 1e-9);
  EXPECT_NEAR(in_fraction(oxygen_extraction_ratio(mL_per_dL(20), mL_per_dL(15))), 0.25, 1e-12);
}

TEST_F(OxygenFormulas, AlveolarGasHandWorkedValue) {
  // FiO2 0.21, Pb 760, PH2O 47, PaCO2 40, R 0.8 -> 0.21*713 - 50 = 99.73 mmHg
  // (hand-worked check value; West, Respiratory Physiology, from memory).
  const Pressure pa =
      alveolar_oxygen_pressure(fraction(0.21), mmHg(760), mmHg(47), mmHg(40), fraction(0.8));
  EXPECT_NEAR(in_mmHg(pa), 99.73, 1e-9);
  // The same in kPa: 101.325 kPa, 6.266 kPa, 5.333 kPa (1 kPa = 7.50062 mmHg, NIST SP 811).
  const Pressure pa_kpa = alveolar_oxygen_pressure(fraction(0.21), kPa(101.325), mmHg(47),
                                                   kPa(40.0 / 7.50062), fraction(0.8));
  EXPECT_NEAR(in_mmHg(pa_kpa), 99.73, 0.01);
}

TEST_F(OxygenFormulas, AaGradientAndExpectedForAge) {
  // PAO2 99.73 - PaO2 90 = 9.73 mmHg (arithmetic, West).
  EXPECT_NEAR(in_mmHg(alveolar_arterial_gradient(mmHg(99.73), mmHg(90))), 9.73, 1e-9);
  // Expected A-a gradient age/4 + 4: age 40 -> 14 mmHg (textbook rule, from memory).
  EXPECT_NEAR(in_mmHg(expected_alveolar_arterial_gradient(40)), 14.0, 1e-9);
}

TEST_F(OxygenFormulas, RatiosAndIndices) {
  // PaO2 80 mmHg at FiO2 0.4 -> P/F 200 mmHg (arithmetic, ARDS Definition Task Force, JAMA 2012).
  EXPECT_NEAR(in_mmHg(pao2_fio2_ratio(mmHg(80), fraction(0.4))), 200.0, 1e-9);
  // SpO2 95 % at FiO2 0.5 -> S/F 190 (arithmetic, Matthay et al., AJRCCM 2024).
  EXPECT_NEAR(spo2_fio2_ratio(percent(95), fraction(0.5)), 190.0, 1e-9);
  // OI = 0.6 * 20 cmH2O * 100 / 80 mmHg = 15 (arithmetic on the PALICC 2015 formula).
  EXPECT_NEAR(oxygenation_index(fraction(0.6), cmH2O(20), mmHg(80)), 15.0, 1e-9);
  // OSI = 0.6 * 20 * 100 / 92 % = 13.04 (arithmetic on the PALICC 2015 formula).
  EXPECT_NEAR(oxygen_saturation_index(fraction(0.6), cmH2O(20), percent(92)), 1200.0 / 92.0, 1e-9);
}

TEST_F(OxygenFormulas, ShuntFractionWorkedByHand) {
  // Hb 15, FiO2 1.0, Pb 760, PH2O 47, PaCO2 40, R 0.8 -> PAO2 = 713 - 50 = 663 mmHg;
  // Cc'O2 = 1.34*15 + 0.003*663 = 20.1 + 1.989 = 22.089 mL/dL;
  // CaO2 (SaO2 1.0, PaO2 400) = 20.1 + 1.2 = 21.3; CvO2 (SvO2 0.75, PvO2 40) = 15.075 + 0.12
  // = 15.195; Qs/Qt = (22.089 - 21.3) / (22.089 - 15.195) = 0.789 / 6.894 = 0.11445 (hand
  // arithmetic on the shunt equation, West, Respiratory Physiology).
  const Pressure pa =
      alveolar_oxygen_pressure(fraction(1.0), mmHg(760), mmHg(47), mmHg(40), fraction(0.8));
  EXPECT_NEAR(in_mmHg(pa), 663.0, 1e-9);
  const Ratio cc = end_capillary_oxygen_content(g_per_dL(15), pa, c.hb_binding, c.o2_solubility);
  EXPECT_NEAR(in_mL_per_dL(cc), 22.089, 1e-9);
  const Ratio ca =
      oxygen_content(g_per_dL(15), fraction(1.0), mmHg(400), c.hb_binding, c.o2_solubility);
  const Ratio cv =
      oxygen_content(g_per_dL(15), fraction(0.75), mmHg(40), c.hb_binding, c.o2_solubility);
  EXPECT_NEAR(in_fraction(shunt_fraction(cc, ca, cv)), 0.789 / 6.894, 1e-9);
}

TEST_F(OxygenFormulas, DeadSpaceBohrEnghoff) {
  // PaCO2 40, mixed expired PCO2 28 mmHg -> (40 - 28)/40 = 0.30 (arithmetic, Bohr-Enghoff, West).
  EXPECT_NEAR(in_fraction(dead_space_fraction_bohr_enghoff(mmHg(40), mmHg(28))), 0.30, 1e-12);
  // Units cancel: the same in kPa.
  EXPECT_NEAR(in_fraction(dead_space_fraction_bohr_enghoff(kPa(5.0), kPa(3.5))), 0.30, 1e-12);
}

TEST_F(OxygenFormulas, BerlinBandsAtTheirBoundaries) {
  // ARDS Definition Task Force, JAMA 2012;307:2526: mild 200 < P/F <= 300, moderate
  // 100 < P/F <= 200, severe P/F <= 100 (mmHg).
  EXPECT_EQ(berlin_category(mmHg(300.1), limits), BerlinCategory::none);
  EXPECT_EQ(berlin_category(mmHg(300.0), limits), BerlinCategory::mild);
  EXPECT_EQ(berlin_category(mmHg(200.1), limits), BerlinCategory::mild);
  EXPECT_EQ(berlin_category(mmHg(200.0), limits), BerlinCategory::moderate);
  EXPECT_EQ(berlin_category(mmHg(100.1), limits), BerlinCategory::moderate);
  EXPECT_EQ(berlin_category(mmHg(100.0), limits), BerlinCategory::severe);
  EXPECT_EQ(berlin_category(mmHg(45.0), limits), BerlinCategory::severe);
  // Exactly on a limit when computed from PaO2 and FiO2: 150 / 0.5 = 300, 60 / 0.3 = 200.
  EXPECT_EQ(berlin_category(pao2_fio2_ratio(mmHg(150), fraction(0.5)), limits),
            BerlinCategory::mild);
  EXPECT_EQ(berlin_category(pao2_fio2_ratio(mmHg(60), fraction(0.3)), limits),
            BerlinCategory::moderate);
  // 40 kPa is 300.02 mmHg (NIST SP 811): just above the mild limit.
  EXPECT_EQ(berlin_category(kPa(40.0), limits), BerlinCategory::none);
  EXPECT_STREQ(to_string(BerlinCategory::moderate), "moderate");
}

TEST_F(OxygenFormulas, BerlinLimitsAreDataASiteCanChange) {
  Thresholds site = Thresholds::built_in();
  site.load_overrides_text("[oxygen.berlin_mild_max]\nvalue = 40\nunit = \"kPa\"\n", "site.toml");
  // With the mild limit at 40 kPa (300.02 mmHg), 40 kPa is now mild.
  EXPECT_EQ(berlin_category(kPa(40.0), site), BerlinCategory::mild);
}

TEST(BodySurfaceArea, DuBoisAgainstThePublishedFormula) {
  // Du Bois & Du Bois, Arch Intern Med 1916;17:863: BSA = 0.007184 W^0.425 H^0.725.
  // 70 kg, 175 cm worked by hand with base-10 logarithms:
  //   log 0.007184 = -2.14363; 0.425 log 70 = 0.425 * 1.84510 = 0.78417;
  //   0.725 log 175 = 0.725 * 2.24304 = 1.62620; sum 0.26674 -> 10^0.26674 = 1.8481 m2.
  EXPECT_NEAR(in_square_metre(body_surface_area_du_bois(kg(70), cm(175))), 1.8481, 5e-4);
  // 80 kg, 180 cm: -2.14363 + 0.425 * 1.90309 + 0.725 * 2.25527 = -2.14363 + 0.80881 + 1.63507
  //   = 0.30025 -> 10^0.30025 = 1.9964 m2.
  EXPECT_NEAR(in_square_metre(body_surface_area_du_bois(kg(80), cm(180))), 1.9964, 5e-4);
}

TEST(BodySurfaceArea, MostellerAgainstThePublishedFormula) {
  // Mosteller, N Engl J Med 1987;317:1098: BSA = sqrt(H W / 3600).
  // 180 cm, 80 kg: sqrt(14400 / 3600) = sqrt(4) = 2.00 m2 (by hand).
  EXPECT_NEAR(in_square_metre(body_surface_area_mosteller(kg(80), cm(180))), 2.0, 1e-12);
  // 175 cm, 70 kg: sqrt(12250 / 3600) = sqrt(3.40278) = 1.8447 m2 (by hand).
  EXPECT_NEAR(in_square_metre(body_surface_area_mosteller(kg(70), cm(175))), 1.8447, 5e-5);
}

TEST(BodySurfaceArea, OneChoiceGivenOrFromHeightAndWeight) {
  // A given BSA wins; otherwise Du Bois by default (Du Bois & Du Bois 1916: 175 cm, 70 kg ->
  // 1.8481 m2, by hand above) or Mosteller (Mosteller 1987: 180 cm, 80 kg -> 2.00 m2).
  auto used = body_surface_area_used(square_metre(1.7), cm(175), kg(70));
  ASSERT_TRUE(used);
  EXPECT_DOUBLE_EQ(in_square_metre(used->value), 1.7);
  EXPECT_EQ(used->origin, BsaOrigin::given);
  EXPECT_TRUE(used->height_weight_unused);
  used = body_surface_area_used(std::nullopt, cm(175), kg(70));
  ASSERT_TRUE(used);
  EXPECT_NEAR(in_square_metre(used->value), 1.8481, 5e-4);
  EXPECT_EQ(used->origin, BsaOrigin::du_bois);
  EXPECT_FALSE(used->height_weight_unused);
  used = body_surface_area_used(std::nullopt, cm(180), kg(80), BsaFormula::mosteller);
  ASSERT_TRUE(used);
  EXPECT_NEAR(in_square_metre(used->value), 2.0, 1e-12);
  EXPECT_EQ(used->origin, BsaOrigin::mosteller);
  EXPECT_FALSE(body_surface_area_used(std::nullopt, cm(180), std::nullopt));
}

TEST(BodySurfaceArea, CardiacIndexIsOutputOverBsa) {
  // CI = CO / BSA (textbook, common practice, no source): 5 L/min over 2.0 m2 = 2.5 L/min/m2;
  // and back, 2.5 L/min/m2 x 2.0 m2 = 5 L/min.
  const FlowPerArea ci = cardiac_index(L_per_min(5), square_metre(2.0));
  EXPECT_NEAR(in_L_per_min_per_m2(ci), 2.5, 1e-12);
  EXPECT_NEAR(in_L_per_min(cardiac_output_from_index(ci, square_metre(2.0))), 5.0, 1e-12);
}

}  // namespace
}  // namespace bb
