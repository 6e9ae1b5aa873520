#include "report/scale.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>

namespace alphatrail::report {
namespace {

std::vector<double> ticks_of(double lo, double hi, int target = 5, bool zero = false) {
  return nice_axis(lo, hi, target, zero).ticks;
}

bool has_tick(const Axis& a, double v) {
  return std::find(a.ticks.begin(), a.ticks.end(), v) != a.ticks.end();
}

// The mantissa of a step, m in [1, 10): must be 1, 2, 2.5 or 5.
double mantissa(double step) {
  return step / std::pow(10.0, std::floor(std::log10(step) + 1e-12));
}

TEST(NiceAxis, UnitRangeInQuarters) {
  const Axis a = nice_axis(0.0, 1.0);
  EXPECT_EQ(a.low, 0.0);
  EXPECT_EQ(a.high, 1.0);
  EXPECT_EQ(a.step, 0.25);
  EXPECT_EQ(a.ticks, (std::vector<double>{0.0, 0.25, 0.5, 0.75, 1.0}));
}

TEST(NiceAxis, TicksAreExactDecimalsWithoutAccumulatedNoise) {
  // Adding 0.1 three times gives 0.30000000000000004; i * step computed from the exact power of
  // ten gives the double nearest 0.3, the same as the literal.
  EXPECT_EQ(ticks_of(0.1, 0.7), (std::vector<double>{0.0, 0.2, 0.4, 0.6, 0.8}));
  EXPECT_EQ(ticks_of(0.1, 0.7, 8), (std::vector<double>{0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7}));
  const Axis a = nice_axis(0.1, 0.7, 8);
  EXPECT_EQ(a.step, 0.1);
  EXPECT_EQ(tick_labels(a),
            (std::vector<std::string>{"0.1", "0.2", "0.3", "0.4", "0.5", "0.6", "0.7"}));
}

TEST(NiceAxis, MixedSignsHaveZeroAsATick) {
  const Axis a = nice_axis(-0.4, 3.5);
  EXPECT_EQ(a.ticks, (std::vector<double>{-1, 0, 1, 2, 3, 4}));
  const Axis b = nice_axis(-0.03, 0.047);
  EXPECT_TRUE(has_tick(b, 0.0));
  EXPECT_LE(b.low, -0.03);
  EXPECT_GE(b.high, 0.047);
  EXPECT_EQ(b.step, 0.025);
  EXPECT_FALSE(std::signbit(b.ticks[2]));  // 0, not -0
}

TEST(NiceAxis, NegativeOnlyRangeStaysBelowZero) {
  const Axis a = nice_axis(-0.08, -0.02);
  EXPECT_EQ(a.ticks, (std::vector<double>{-0.08, -0.06, -0.04, -0.02}));
  EXPECT_EQ(tick_labels(a, "%"),
            (std::vector<std::string>{"-0.08%", "-0.06%", "-0.04%", "-0.02%"}));
}

TEST(NiceAxis, PositiveOnlyRange) {
  const Axis a = nice_axis(0.02, 0.09);
  EXPECT_EQ(a.ticks, (std::vector<double>{0.02, 0.04, 0.06, 0.08, 0.1}));
  EXPECT_EQ(a.step, 0.02);
}

TEST(NiceAxis, IncludeZeroExtendsTheRange) {
  EXPECT_EQ(nice_axis(0.02, 0.05).low, 0.02);
  const Axis a = nice_axis(0.02, 0.05, 5, true);
  EXPECT_EQ(a.low, 0.0);
  EXPECT_EQ(a.high, 0.05);
  const Axis b = nice_axis(-7.0, -3.0, 5, true);
  EXPECT_EQ(b.high, 0.0);
  EXPECT_LE(b.low, -7.0);
}

TEST(NiceAxis, TinyMagnitudes) {
  const Axis a = nice_axis(1e-5, 3e-5);
  EXPECT_EQ(a.step, 5e-6);
  EXPECT_EQ(a.ticks, (std::vector<double>{1e-5, 1.5e-5, 2e-5, 2.5e-5, 3e-5}));
  EXPECT_EQ(tick_label(a.ticks[1], a.step), "0.000015");
}

TEST(NiceAxis, LargeMagnitudes) {
  const Axis a = nice_axis(0.0, 1e6);
  EXPECT_EQ(a.ticks, (std::vector<double>{0, 250000, 500000, 750000, 1000000}));
  EXPECT_EQ(tick_label(a.ticks[1], a.step), "250000");
  const Axis b = nice_axis(1.2e6, 3.4e6);
  EXPECT_EQ(b.step, 500000.0);
  EXPECT_EQ(b.low, 1e6);
  EXPECT_EQ(b.high, 3.5e6);
}

TEST(NiceAxis, SinglePointGetsASymmetricRange) {
  const Axis a = nice_axis(0.05, 0.05);
  EXPECT_GT(a.high - a.low, 0.0);
  EXPECT_NEAR(0.5 * (a.low + a.high), 0.05, 1e-15);
  EXPECT_EQ(a.ticks.size(), 5u);
  const Axis b = nice_axis(-2.0, -2.0);
  EXPECT_NEAR(0.5 * (b.low + b.high), -2.0, 1e-15);
  EXPECT_GT(b.high, b.low);
}

TEST(NiceAxis, SingleZeroGetsMinusOneToOne) {
  const Axis a = nice_axis(0.0, 0.0);
  EXPECT_EQ(a.low, -1.0);
  EXPECT_EQ(a.high, 1.0);
  EXPECT_TRUE(has_tick(a, 0.0));
}

TEST(NiceAxis, AllEqualValuesNeverGiveZeroWidth) {
  const Axis a = nice_axis(finite_extent({3.0, 3.0, NAN, 3.0}));
  EXPECT_EQ(a.ticks, (std::vector<double>{2.6, 2.8, 3.0, 3.2, 3.4}));
}

TEST(NiceAxis, EmptyOrAllMissingDataGiveTheUnitAxis) {
  EXPECT_FALSE(finite_extent({}).has_value());
  EXPECT_FALSE(finite_extent({NAN, NAN}).has_value());
  for (const Axis& a : {nice_axis(finite_extent({})), nice_axis(finite_extent({NAN})),
                        nice_axis(NAN, NAN), nice_axis(0.0, INFINITY)}) {
    EXPECT_EQ(a.low, 0.0);
    EXPECT_EQ(a.high, 1.0);
    EXPECT_EQ(a.ticks.size(), 5u);
  }
}

TEST(NiceAxis, SwappedBoundsAreAccepted) {
  EXPECT_EQ(ticks_of(1.0, 0.0), ticks_of(0.0, 1.0));
}

// Invariants over many ranges from a fixed-seed generator (so a failure reproduces).
TEST(NiceAxis, InvariantsOverManyRanges) {
  std::uint64_t state = 12345;
  auto next = [&] {  // a linear congruential generator in [0, 1) (Knuth's MMIX constants)
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    return static_cast<double>(state >> 11) / 9007199254740992.0;
  };
  for (int k = 0; k < 2000; ++k) {
    const double scale = std::pow(10.0, std::floor(next() * 14) - 7);
    const double a = (next() * 2 - 1) * scale, b = (next() * 2 - 1) * scale;
    const double lo = std::min(a, b), hi = std::max(a, b);
    const Axis axis = nice_axis(lo, hi);
    SCOPED_TRACE(::testing::Message() << "range " << lo << " .. " << hi);
    ASSERT_GE(axis.ticks.size(), 3u);
    ASSERT_LE(axis.ticks.size(), 9u);
    EXPECT_LE(axis.low, lo);
    EXPECT_GE(axis.high, hi);
    EXPECT_EQ(axis.ticks.front(), axis.low);
    EXPECT_EQ(axis.ticks.back(), axis.high);
    const double m = mantissa(axis.step);
    EXPECT_TRUE(std::abs(m - 1) < 1e-9 || std::abs(m - 2) < 1e-9 || std::abs(m - 2.5) < 1e-9 ||
                std::abs(m - 5) < 1e-9)
        << "step " << axis.step;
    for (double t : axis.ticks) {
      const double i = t / axis.step;
      EXPECT_NEAR(i, std::round(i), 1e-9) << "tick " << t << " is not a multiple of the step";
    }
    if (lo < 0 && hi > 0) {
      EXPECT_TRUE(has_tick(axis, 0.0));
    }
  }
}

TEST(TickLabel, FewestDecimalsThatWriteTheStep) {
  EXPECT_EQ(tick_decimals(0.25), 2);
  EXPECT_EQ(tick_decimals(5.0), 0);
  EXPECT_EQ(tick_decimals(2.5), 1);
  EXPECT_EQ(tick_decimals(0.002), 3);
  EXPECT_EQ(tick_decimals(250000.0), 0);
  EXPECT_EQ(tick_label(0.25, 0.25), "0.25");
  EXPECT_EQ(tick_label(0.5, 0.25), "0.50");
  EXPECT_EQ(tick_label(10.0, 5.0), "10");
  EXPECT_EQ(tick_label(-10.0, 5.0, "%"), "-10%");
  EXPECT_EQ(tick_label(7.5, 2.5, "%"), "7.5%");
}

TEST(TickLabel, NeverWritesMinusZero) {
  EXPECT_EQ(tick_label(-0.0, 1.0), "0");
  EXPECT_EQ(tick_label(-1e-12, 0.5), "0.0");
  EXPECT_EQ(tick_label(-0.001, 0.25, "%"), "0.00%");
}

TEST(FiniteExtent, SkipsMissingValues) {
  const auto e = finite_extent({0.02, NAN, -0.01, INFINITY, 0.005});
  ASSERT_TRUE(e);
  EXPECT_EQ(e->min, -0.01);
  EXPECT_EQ(e->max, 0.02);
  const auto w = widen(e, 3.0);
  EXPECT_EQ(w->max, 3.0);
  EXPECT_EQ(widen(std::nullopt, NAN), std::nullopt);
}

TEST(LabelPositions, EvenlySpacedAndAtMostTheTarget) {
  EXPECT_EQ(label_positions(24, 6), (std::vector<std::size_t>{0, 4, 8, 12, 16, 20}));
  EXPECT_EQ(label_positions(25, 6), (std::vector<std::size_t>{0, 5, 10, 15, 20}));
  EXPECT_EQ(label_positions(3, 6), (std::vector<std::size_t>{0, 1, 2}));
  EXPECT_TRUE(label_positions(0, 6).empty());
  EXPECT_LE(label_positions(1000, 6).size(), 6u);
}

TEST(LinearScale, MapsTheEndsExactly) {
  const LinearScale x{-0.05, 0.05, 72.0, 616.0};
  EXPECT_EQ(x.map(-0.05), 72.0);
  EXPECT_EQ(x.map(0.05), 616.0);
  EXPECT_DOUBLE_EQ(x.map(0.0), 344.0);
  EXPECT_DOUBLE_EQ(x.map(0.025), 480.0);
}

TEST(LinearScale, InvertsForTheYAxis) {
  // SVG y grows downward: the axis low is at the bottom of the plot (300), high at the top.
  const LinearScale y{0.0, 4.0, 300.0, 48.0};
  EXPECT_EQ(y.map(0.0), 300.0);
  EXPECT_EQ(y.map(4.0), 48.0);
  EXPECT_DOUBLE_EQ(y.map(1.0), 237.0);
  EXPECT_GT(y.map(1.0), y.map(3.0));
}

TEST(LinearScale, ZeroWidthDomainMapsToTheMiddle) {
  const LinearScale x{2.0, 2.0, 100.0, 200.0};
  EXPECT_EQ(x.map(2.0), 150.0);
  EXPECT_EQ(x.map(7.0), 150.0);
}

}  // namespace
}  // namespace alphatrail::report
