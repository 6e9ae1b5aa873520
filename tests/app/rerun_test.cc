// The verdict of a re-run: which flips of significance and sign count, at which level, and
// how p-values and alphas that are not numbers are treated.
#include "app/rerun.h"

#include <gtest/gtest.h>

#include <cmath>

namespace alphatrail::app {
namespace {

TEST(RerunVerdict, NothingFlipsWhenSignificanceAndSignHold) {
  const Verdict v = verdict(0.01, 0.03, 0.002, 0.001, 0.05);
  EXPECT_FALSE(v.significance_lost);
  EXPECT_FALSE(v.became_significant);
  EXPECT_FALSE(v.sign_changed);
  EXPECT_FALSE(v.flipped());
  // Insignificant both times, negative both times: unchanged as well.
  EXPECT_FALSE(verdict(0.40, 0.20, -0.001, -0.003, 0.05).flipped());
}

TEST(RerunVerdict, SignificanceLostAndGained) {
  const Verdict lost = verdict(0.01, 0.08, 0.002, 0.001, 0.05);
  EXPECT_TRUE(lost.significance_lost);
  EXPECT_FALSE(lost.became_significant);
  EXPECT_FALSE(lost.sign_changed);
  EXPECT_TRUE(lost.flipped());

  const Verdict gained = verdict(0.08, 0.01, 0.001, 0.002, 0.05);
  EXPECT_FALSE(gained.significance_lost);
  EXPECT_TRUE(gained.became_significant);
  EXPECT_TRUE(gained.flipped());
}

TEST(RerunVerdict, SignificanceIsJudgedAtTheRunsLevel) {
  // p 0.03 -> 0.07 loses significance at 5% but not at 10%.
  EXPECT_TRUE(verdict(0.03, 0.07, 0.001, 0.001, 0.05).significance_lost);
  EXPECT_FALSE(verdict(0.03, 0.07, 0.001, 0.001, 0.10).flipped());
  // A p-value equal to the level is not below it: not significant.
  EXPECT_TRUE(verdict(0.04, 0.05, 0.001, 0.001, 0.05).significance_lost);
}

TEST(RerunVerdict, SignChangeIsAFlipOnItsOwn) {
  const Verdict v = verdict(0.30, 0.40, 0.001, -0.001, 0.05);
  EXPECT_TRUE(v.sign_changed);
  EXPECT_FALSE(v.significance_lost);
  EXPECT_FALSE(v.became_significant);
  EXPECT_TRUE(v.flipped());
  // Zero is not positive: 0.001 -> 0 changes sign, -0.001 -> 0 does not.
  EXPECT_TRUE(verdict(0.30, 0.40, 0.001, 0.0, 0.05).sign_changed);
  EXPECT_FALSE(verdict(0.30, 0.40, -0.001, 0.0, 0.05).sign_changed);
}

TEST(RerunVerdict, BothFlipsAtOnce) {
  const Verdict v = verdict(0.001, 0.60, 0.004, -0.0005, 0.05);
  EXPECT_TRUE(v.significance_lost);
  EXPECT_TRUE(v.sign_changed);
  EXPECT_FALSE(v.became_significant);
}

TEST(RerunVerdict, NotANumberIsNotSignificantAndNotPositive) {
  // A re-run whose p-value cannot be computed loses significance, never gains it.
  EXPECT_TRUE(verdict(0.01, NAN, 0.001, 0.001, 0.05).significance_lost);
  EXPECT_FALSE(verdict(NAN, NAN, 0.001, 0.001, 0.05).flipped());
  EXPECT_TRUE(verdict(0.50, 0.50, 0.001, NAN, 0.05).sign_changed);
}

TEST(RerunVerdict, OutcomeUsesAlphaPerPeriodAndTheRunsLevel) {
  RerunOutcome outcome;
  outcome.before.alpha_p = 0.02;
  outcome.before.alpha = 0.001;
  outcome.after.alpha_p = 0.06;
  outcome.after.alpha = 0.001;
  outcome.level = 0.05;
  EXPECT_TRUE(verdict(outcome).significance_lost);
  outcome.level = 0.10;  // a run at 90% confidence
  EXPECT_FALSE(verdict(outcome).flipped());
}

}  // namespace
}  // namespace alphatrail::app
