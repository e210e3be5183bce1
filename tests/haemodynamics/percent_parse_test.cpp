// PPV and SVV typed as percentages: a bare number is percent, and a bare number
// between 0 and 1 is refused because it may have been meant as a fraction
// (common practice, no source).
#include <gtest/gtest.h>

#include <string>

#include "breathbeat/errors.hpp"
#include "breathbeat/haemodynamics.hpp"

namespace bb {
namespace {

InputError refusal(const std::string& text) {
  try {
    parse_percent_points(text, "svv");
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << "'" << text << "' was accepted";
  return InputError("", "", "", "");
}

TEST(PercentPoints, BareNumbersAndPercentSignsArePercent) {
  // "12" and "12%" are both 12 % (common practice, no source).
  EXPECT_NEAR(in_percent(parse_percent_points("12", "svv")), 12.0, 1e-12);
  EXPECT_NEAR(in_percent(parse_percent_points("12%", "svv")), 12.0, 1e-12);
  EXPECT_NEAR(in_percent(parse_percent_points(" 1 ", "svv")), 1.0, 1e-12);  // 1 is 1 %
  EXPECT_NEAR(in_percent(parse_percent_points("0", "svv")), 0.0, 1e-12);    // 0 means the same
}

TEST(PercentPoints, WrittenWithPercentBelowOneIsTakenAsTyped) {
  // "0.5%" says what it means: 0.5 % (common practice, no source).
  EXPECT_NEAR(in_percent(parse_percent_points("0.5%", "svv")), 0.5, 1e-12);
  EXPECT_NEAR(in_percent(parse_percent_points("0.15 %", "ppv")), 0.15, 1e-12);
}

TEST(PercentPoints, BareNumberBelowOneIsRefusedWithBothReadings) {
  // 0.15 could be the fraction 0.15 = 15 % or 0.15 %: refused (common practice, no source).
  const InputError e = refusal("0.15");
  EXPECT_EQ(e.field(), "svv");
  EXPECT_EQ(e.value(), "0.15");
  EXPECT_NE(e.problem().find("read as percent"), std::string::npos) << e.problem();
  EXPECT_NE(e.expected().find("15%"), std::string::npos) << e.expected();
  EXPECT_NE(e.expected().find("0.15%"), std::string::npos) << e.expected();
  // 0.125 as a fraction is 12.5 % (arithmetic).
  EXPECT_EQ(refusal("0.125").expected().rfind("12.5%", 0), 0u);
  // 0.1 as a fraction is 10 %, not "1" (arithmetic).
  EXPECT_EQ(refusal("0.1").expected().rfind("10%", 0), 0u) << refusal("0.1").expected();
  EXPECT_EQ(refusal("0.99").expected().rfind("99%", 0), 0u);
}

TEST(PercentPoints, PreloadValueMeasuredAsPpvKeepsTheRule) {
  // A PPV before/after of a preload test reads through the same rule.
  EXPECT_THROW(parse_preload_value("0.15", PreloadMeasure::ppv, "before"), InputError);
  const PreloadValue v = parse_preload_value("15", PreloadMeasure::ppv, "before");
  ASSERT_TRUE(std::holds_alternative<Ratio>(v));
  EXPECT_NEAR(in_percent(std::get<Ratio>(v)), 15.0, 1e-12);
}

}  // namespace
}  // namespace bb
