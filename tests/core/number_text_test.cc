// Numbers as tables, readings and report pages write them (common practice: percent with its
// sign, p-values to four decimals, "n/a" where the figure is undefined, as JSON's null).
#include "core/number_text.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>

namespace {

using alphatrail::core::fixed;
using alphatrail::core::p_value_text;
using alphatrail::core::signed_percent;

constexpr double kInf = std::numeric_limits<double>::infinity();

TEST(NumberText, FixedDigits) {
  EXPECT_EQ(fixed(0.54321, 3), "0.543");
  EXPECT_EQ(fixed(-2.665, 2), "-2.67");  // -2.665 is stored as -2.66500000000000003553
  EXPECT_EQ(fixed(3, 0), "3");
  EXPECT_EQ(fixed(NAN, 3), "n/a");
  EXPECT_EQ(fixed(kInf, 2), "n/a");  // the t statistic of an exact fit
}

TEST(NumberText, SignedPercent) {
  EXPECT_EQ(signed_percent(0.0292), "+2.92%");
  EXPECT_EQ(signed_percent(-0.0223), "-2.23%");
  EXPECT_EQ(signed_percent(0.00005, 3), "+0.005%");
  EXPECT_EQ(signed_percent(0), "+0.00%");
  EXPECT_EQ(signed_percent(NAN), "n/a");
  EXPECT_EQ(signed_percent(-kInf), "n/a");
}

TEST(NumberText, PValues) {
  EXPECT_EQ(p_value_text(0.0011), "0.0011");
  EXPECT_EQ(p_value_text(0.68349), "0.6835");
  EXPECT_EQ(p_value_text(0.0001), "0.0001");
  EXPECT_EQ(p_value_text(0.00009), "<0.0001");
  EXPECT_EQ(p_value_text(0), "<0.0001");
  EXPECT_EQ(p_value_text(NAN), "n/a");
}

}  // namespace
