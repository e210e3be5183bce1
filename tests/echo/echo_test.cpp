// Echo stroke volume, cardiac output and index.
#include <gtest/gtest.h>

#include <numbers>

#include "breathbeat/echo.hpp"
#include "breathbeat/present/echo.hpp"

namespace bb {
namespace {

const Thresholds& limits() {
  static const Thresholds t = Thresholds::built_in();
  return t;
}

TEST(EchoFormulas, LvotAreaOfATwoCentimetreOutflowTract) {
  // pi (2.0/2)^2 = 3.1416 cm2; hand-worked on Quinones et al., JASE 2002;15:167.
  EXPECT_NEAR(in_square_cm(lvot_area(cm(2.0))), 3.14159, 1e-5);
}

TEST(EchoFormulas, StrokeVolumeHandWorked) {
  // LVOT 2.0 cm, VTI 20 cm: SV = 20 cm x 3.1416 cm2 = 62.83 mL; hand-worked on
  // Quinones et al., JASE 2002;15:167.
  EXPECT_NEAR(in_mL(stroke_volume_from_lvot(cm(2.0), cm(20.0))), 62.83, 0.005);
  // LVOT 2.2 cm, VTI 18 cm: 18 x pi x 1.1^2 = 68.42 mL; hand-worked, same source.
  EXPECT_NEAR(in_mL(stroke_volume_from_lvot(cm(2.2), cm(18.0))), 68.42, 0.005);
}

TEST(EchoFormulas, MillimetresGiveTheSameStrokeVolume) {
  // Same hand-worked value as above (Quinones et al., JASE 2002;15:167).
  EXPECT_NEAR(in_mL(stroke_volume_from_lvot(mm(20), mm(200))), 62.83, 0.005);
}

TEST(EchoFormulas, CardiacOutputAndIndex) {
  // SV 62.83 mL x HR 80 /min = 5.027 L/min (Quinones et al., JASE 2002;15:167, hand-worked).
  const Flow co = cardiac_output_from_stroke_volume(mL(62.83), per_min(80));
  EXPECT_NEAR(in_L_per_min(co), 5.0264, 1e-4);
  // CI = CO / BSA: 5.0264 / 2.0 = 2.513 L/min/m2 (common practice, no source); the one
  // CI formula is body's cardiac_index.
  const FlowPerArea ci = cardiac_index(co, square_metre(2.0));
  EXPECT_NEAR(in_L_per_min(Flow(ci * square_metre(1.0))), 2.5132, 1e-4);
}

TEST(EchoAnalysis, IndexWithMostellerArea) {
  EchoInputs in;
  in.lvot = cm(2.0);
  in.vti = cm(20.0);
  in.hr = per_min(80);
  in.height = cm(170);
  in.weight = kg(70);
  in.bsa_formula = BsaFormula::mosteller;
  const EchoResults r = analyse_echo(in);
  // Mosteller, NEJM 1987;317:1098: sqrt(170 x 70 / 3600) = 1.8181 m2 (hand-worked).
  ASSERT_TRUE(r.bsa.has_value());
  EXPECT_NEAR(in_square_metre(r.bsa->value), 1.8181, 1e-4);
  EXPECT_EQ(r.bsa->origin, BsaOrigin::mosteller);
  // CI = 5.0265 / 1.8181 = 2.7647 L/min/m2 (hand-worked on Quinones 2002 and Mosteller 1987).
  ASSERT_TRUE(r.cardiac_index.has_value());
  EXPECT_NEAR(in_L_per_min(Flow(*r.cardiac_index * square_metre(1.0))), 2.7647, 1e-3);
}

TEST(EchoAnalysis, WithoutHeartRateOnlyStrokeVolume) {
  EchoInputs in;
  in.lvot = cm(2.0);
  in.vti = cm(20.0);
  const EchoResults r = analyse_echo(in);
  EXPECT_TRUE(r.stroke_volume.has_value());
  EXPECT_FALSE(r.cardiac_output.has_value());
  EXPECT_FALSE(r.cardiac_index.has_value());
  EXPECT_EQ(r.skipped.size(), 2u);
}

TEST(EchoAnalysis, GivenBsaIsUsedAndNotComputed) {
  EchoInputs in;
  in.lvot = cm(2.0);
  in.vti = cm(20.0);
  in.hr = per_min(80);
  in.height = cm(170);
  in.weight = kg(70);
  in.bsa = square_metre(2.0);
  const EchoResults r = analyse_echo(in);
  ASSERT_TRUE(r.bsa && r.cardiac_index);
  EXPECT_EQ(r.bsa->origin, BsaOrigin::given);
  // 5.0265 / 2.0 = 2.513 L/min/m2 (hand-worked on Quinones 2002; CI = CO/BSA, common practice).
  EXPECT_NEAR(in_L_per_min_per_m2(*r.cardiac_index), 2.5133, 1e-4);
  EXPECT_EQ(r.notes, std::vector<EchoNote>{EchoNote::lvot_squared});  // no BSA formula note
}

TEST(EchoAnalysis, SkippedResultsNeedRegistryFields) {
  const EchoResults r = analyse_echo(EchoInputs{});
  ASSERT_EQ(r.skipped.size(), 3u);
  // Registry: lvot_diameter is --lvot-diameter (old --lvot an alias); a BSA or height and weight.
  EXPECT_EQ(need_texts(r.skipped[2], FieldContext::command_line),
            (std::vector<std::string>{"--lvot-diameter", "--vti", "--hr",
                                      "--bsa (or --height and --weight)"}));
}

TEST(EchoAnswer, BsaNoteNamesTheFormula) {
  EchoInputs in;
  in.lvot = cm(2.0);
  in.vti = cm(20.0);
  in.hr = per_min(80);
  in.height = cm(170);
  in.weight = kg(70);
  const Answer a = describe_echo(in, analyse_echo(in));
  ASSERT_EQ(a.notes.size(), 2u);
  EXPECT_EQ(a.notes[0], "BSA by Du Bois & Du Bois (1916).");  // the default formula
  EXPECT_EQ(a.inputs[0].key, "lvot_diameter");                // input keys are field ids
}

TEST(EchoValidation, ImplausibleLvotNamesTheFieldById) {
  // LVOT 1.0-4.0 cm (presets/plausibility.toml, common practice, no source).
  EchoInputs in;
  in.lvot = cm(20.0);
  try {
    validate_echo(in, limits());
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "lvot_diameter");
  }
}

TEST(EchoValidation, NegativeVtiNamesTheField) {
  EchoInputs in;
  in.lvot = cm(2.0);
  in.vti = cm(-20.0);
  Thresholds lax = Thresholds::built_in();
  lax.allow_implausible(true);  // refused even when implausible values are allowed
  try {
    validate_echo(in, lax);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "vti");
  }
}

TEST(EchoValidation, ImplausibleLvotIsRefused) {
  // LVOT 1.0-4.0 cm (common practice, no source): 20 cm is a unit slip.
  EchoInputs in;
  in.lvot = cm(20.0);
  in.vti = cm(20.0);
  EXPECT_THROW(validate_echo(in, limits()), InputError);
}

}  // namespace
}  // namespace bb
