// The shared text helpers: numbers printed with the digits that decide a comparison.
#include <gtest/gtest.h>

#include "breathbeat/text/strings.hpp"

namespace bb {
namespace {

TEST(FormatDeciding, AddsDigitsOnlyWhenTheValueWouldPrintAsItsCutOff) {
  // Hand-worked: 8.03 prints "8.0" at one decimal, the same as the cut-off 8.0.
  EXPECT_EQ(format_deciding(8.03, 8.0, 1), "8.03");
  EXPECT_EQ(format_deciding(8.003, 8.0, 1), "8.003");
  EXPECT_EQ(format_deciding(0.304, 0.30, 2), "0.304");  // O2 extraction against 0.30
  // Already different at the precision shown: no extra digits.
  EXPECT_EQ(format_deciding(8.4, 8.0, 1), "8.4");
  EXPECT_EQ(format_deciding(31.0, 30.0, 1), "31.0");
  // Equal to the cut-off: printed as it is.
  EXPECT_EQ(format_deciding(8.0, 8.0, 1), "8.0");
  // At most three more digits.
  EXPECT_EQ(format_deciding(8.0000001, 8.0, 1), "8.0000");
}

}  // namespace
}  // namespace bb
