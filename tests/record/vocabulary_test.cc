// Every vocabulary of record: the stored spellings each table lists (they are in every ledger,
// so they never change), and that each one parses back to its value.
#include <gtest/gtest.h>

#include "record/content.h"
#include "record/run_parameters.h"
#include "support/vocabulary_checks.h"

namespace alphatrail::record {
namespace {

using alphatrail::testing::expect_round_trip;

TEST(RecordVocabulary, EveryTableRoundTrips) {
  expect_round_trip(kStoredUnits, {"decimal return", "percent yield", "decimal yield"});
  expect_round_trip(kFrequencyRules, {"lowest among the inputs", "given"});
  // Stored-text messages list the tenor rules in this order ("not one of given, closest ...").
  expect_round_trip(kTenorRules, {"given", "closest to the period length"});
}

}  // namespace
}  // namespace alphatrail::record
