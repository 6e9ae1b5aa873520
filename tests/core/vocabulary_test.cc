// Every vocabulary of core: the wire names each table lists (they are stored in the ledger and
// typed on the command line, so they never change), and that each one parses back to its value.
#include "core/vocabulary.h"

#include <gtest/gtest.h>

#include "core/annualize.h"
#include "core/dates.h"
#include "core/model.h"
#include "core/rates.h"
#include "core/regression.h"
#include "core/series_file.h"
#include "support/vocabulary_checks.h"

namespace alphatrail::core {
namespace {

using alphatrail::testing::expect_round_trip;

TEST(Vocabulary, EveryTableRoundTrips) {
  expect_round_trip(kFrequencies, {"daily", "weekly", "monthly", "quarterly"});
  expect_round_trip(kErrorKinds, {"classic", "hc0", "hc1", "hc2", "hc3", "newey-west"});
  expect_round_trip(kRateBases, {"compound", "simple", "act360"});
  expect_round_trip(kRateTimings, {"start", "end"});
  expect_round_trip(kRateUnits, {"percent", "decimal"});
  expect_round_trip(kAnnualizations, {"compound", "arithmetic"});
  expect_round_trip(kSeriesKinds, {"strategy", "benchmark", "rate", "factor"});
  expect_round_trip(kValueUnits, {"decimal", "percent", "levels"});
  expect_round_trip(kRateQuotes, {"yield", "discount"});
  expect_round_trip(kTermRoles, {"intercept", "market", "factor"});
}

TEST(Vocabulary, ParsesExactNamesOnly) {
  EXPECT_EQ(kErrorKinds.parse("newey-west"), ErrorKind::newey_west);
  EXPECT_EQ(kErrorKinds.parse("newey_west"), std::nullopt);
  EXPECT_EQ(kFrequencies.parse("Monthly"), std::nullopt);
  EXPECT_EQ(kFrequencies.parse("monthly "), std::nullopt);
}

TEST(Vocabulary, NamingAValueWithoutARowIsAnInternalError) {
  const auto not_listed = static_cast<Frequency>(7);
  try {
    kFrequencies.name(not_listed);
    FAIL() << "named a value with no row";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::internal);
  }
}

TEST(Vocabulary, FrequencyRowsHoldNounsPeriodsAndOrder) {
  const Frequency all[] = {Frequency::daily, Frequency::weekly, Frequency::monthly,
                           Frequency::quarterly};
  const char* nouns[] = {"day", "week", "month", "quarter"};
  const int periods[] = {252, 52, 12, 4};  // common practice
  for (std::size_t i = 0; i < 4; ++i) {
    EXPECT_STREQ(period_noun(all[i]), nouns[i]);
    EXPECT_EQ(periods_per_year(all[i]), periods[i]);
    for (std::size_t j = 0; j < 4; ++j) EXPECT_EQ(is_finer(all[i], all[j]), i < j) << i << j;
  }
}

}  // namespace
}  // namespace alphatrail::core
