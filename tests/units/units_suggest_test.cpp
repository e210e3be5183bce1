// The decimal comma and the units a bare number may have been meant in.
// Expected values follow from the unit definitions alone (NIST SP 811, 2008,
// Appendix B: 1 kPa = 7.50062 mmHg; 1 L = 1000 mL; 1 m = 100 cm = 1000 mm;
// 1 g/dL = 10 g/L) and the plausible ranges used as inputs here (common
// practice, no source).
#include <gtest/gtest.h>

#include "breathbeat/units.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb {
namespace {

std::vector<std::string> shown(const std::vector<const UnitSpelling*>& units) {
  std::vector<std::string> out;
  for (const UnitSpelling* u : units) out.emplace_back(u->shown);
  return out;
}

using V = std::vector<std::string>;

TEST(UnitSuggestion, PaO2OfNinePointOneIsPlausibleInKPaOnly) {
  // 9.1 kPa = 68.3 mmHg, inside 20-700 mmHg; 9.1 cmH2O, hPa or Pa is below 7 mmHg.
  const double lo = mmHg(20).value(), hi = mmHg(700).value();
  EXPECT_EQ(shown(units_placing_in_range(9.1, Dimension::pressure, lo, hi, "mmHg")), V{"kPa"});
  // A plausible number in its default unit is left out: the default unit is skipped.
  // 90 cmH2O = 66 mmHg, 90 kPa = 675 mmHg, 90 hPa = 67.5 mmHg; 90 Pa = 0.68 mmHg.
  EXPECT_EQ(shown(units_placing_in_range(90, Dimension::pressure, lo, hi, "mmHg")),
            (V{"cmH2O", "kPa", "hPa"}));
}

TEST(UnitSuggestion, HbVtHeightAndIvcDiameter) {
  EXPECT_EQ(shown(units_placing_in_range(92, Dimension::haemoglobin, g_per_dL(3).value(),
                                         g_per_dL(25).value(), "g/dL")),
            V{"g/L"});  // 92 g/L = 9.2 g/dL; 92 mmol/L is about 148 g/dL
  EXPECT_EQ(shown(units_placing_in_range(0.36, Dimension::volume, 50e-6, 1500e-6, "mL")),
            V{"L"});  // 0.36 L = 360 mL
  EXPECT_EQ(shown(units_placing_in_range(1.78, Dimension::length, 1.00, 2.50, "cm")),
            V{"m"});  // 1.78 m = 178 cm; 1.78 mm is 0.178 cm
  EXPECT_EQ(shown(units_placing_in_range(20, Dimension::length, 0.002, 0.040, "cm")),
            V{"mm"});  // 20 mm = 2.0 cm
  EXPECT_TRUE(units_placing_in_range(5000, Dimension::length, 0.002, 0.040, "cm").empty());
  EXPECT_TRUE(units_placing_in_range(0.5, Dimension::fraction, 0.0, 1.0, "%").empty());
}

TEST(DecimalComma, OneCommaInOneNumberIsADecimalComma) {
  EXPECT_DOUBLE_EQ(parse_in_si("2,1", Dimension::length, Field{"--lvot", "cm"}), 0.021);
  EXPECT_DOUBLE_EQ(parse_in_si("2,1 cm", Dimension::length, Field{"--lvot", "cm"}), 0.021);
  EXPECT_DOUBLE_EQ(parse_in_si("21,5mm", Dimension::length, Field{"--lvot", "cm"}), 0.0215);
  EXPECT_DOUBLE_EQ(parse_in_si("-2,5", Dimension::pressure, Field{"x", "Pa"}), -2.5);
  EXPECT_DOUBLE_EQ(parse_in_si("1,25", Dimension::volume, Field{"vt", "L"}), 1.25e-3);
}

TEST(DecimalComma, AnAmbiguousOrSecondCommaIsRefusedAndSaysWhy) {
  const Field f{"--vt", "mL"};
  try {
    parse_in_si("2,100", Dimension::volume, f);
    FAIL() << "2,100 read";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "--vt");
    EXPECT_NE(e.problem().find("thousands"), std::string::npos) << e.what();
    EXPECT_NE(e.expected().find("2.100"), std::string::npos) << e.what();
    EXPECT_NE(e.expected().find("2100"), std::string::npos) << e.what();
  }
  for (const char* text : {"2,1,3", "2.5,1", "2,", "2,cm"}) {
    SCOPED_TRACE(text);
    try {
      parse_in_si(text, Dimension::volume, f);
      FAIL() << "read";
    } catch (const InputError& e) {
      EXPECT_NE(e.problem().find("comma"), std::string::npos) << e.what();
    }
  }
}

}  // namespace
}  // namespace bb
