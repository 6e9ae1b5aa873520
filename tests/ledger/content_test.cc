// Tests of the canonical content form: the exact JSON text of a column (it is hashed, so it
// must never drift), bit-exact round trips, refusal of malformed text, and a content hash that
// changes with every part of the content and nothing else.
#include "ledger/content.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <cstring>
#include <limits>
#include <random>
#include <regex>
#include <set>
#include <string>
#include <vector>

#include "core/dates.h"
#include "core/error.h"

namespace {

namespace ledger = alphatrail::ledger;
namespace core = alphatrail::core;
using alphatrail::Error;
using alphatrail::ExitCode;

core::Day day(int y, int m, int d) { return core::to_day({y, m, d}); }

ledger::ColumnData column(const std::string& name, std::vector<core::Day> dates,
                          std::vector<double> values) {
  return {name, std::move(dates), std::move(values)};
}

std::uint64_t bits(double x) {
  std::uint64_t b = 0;
  std::memcpy(&b, &x, sizeof b);
  return b;
}

const double kNaN = std::numeric_limits<double>::quiet_NaN();

// --- encoding -----------------------------------------------------------------------------

TEST(ValuesJson, EncodesDatesAscendingAndNullForMissing) {
  const auto c = column("a", {day(2021, 1, 31), day(2021, 2, 28), day(2021, 3, 31)},
                        {0.1, kNaN, 1e-05});
  EXPECT_EQ(ledger::encode_values_json(c), R"({"2021-01-31":0.1,"2021-02-28":null,"2021-03-31":1e-05})");
}

TEST(ValuesJson, EncodesTheShortestRoundTripForm) {
  struct Case {
    double value;
    const char* text;
  };
  for (const Case& c : std::vector<Case>{
           {0.1, "0.1"},
           {0.015, "0.015"},
           {-0.005, "-0.005"},
           {0.1 + 0.2, "0.30000000000000004"},
           {1.0 / 3, "0.3333333333333333"},
           {110.0 / 100 - 1, "0.10000000000000009"},
           {1e-05, "1e-05"},
           {123.0, "123"},
           {-2.5e-10, "-2.5e-10"},
           {5e-324, "5e-324"},
           {std::numeric_limits<double>::max(), "1.7976931348623157e+308"},
       }) {
    const auto col = column("x", {day(2000, 1, 1)}, {c.value});
    EXPECT_EQ(ledger::encode_values_json(col), std::string(R"({"2000-01-01":)") + c.text + "}")
        << c.text;
  }
}

TEST(ValuesJson, EncodesEmptyColumnAsEmptyObjectAndPadsYears) {
  EXPECT_EQ(ledger::encode_values_json(column("e", {}, {})), "{}");
  EXPECT_EQ(ledger::encode_values_json(column("y", {day(1999, 12, 31), day(2100, 1, 1)}, {1, 2})),
            R"({"1999-12-31":1,"2100-01-01":2})");
}

// --- decoding -----------------------------------------------------------------------------

TEST(ValuesJson, RoundTripsBitForBit) {
  std::vector<double> values{0.1,   -0.0,  0.0,   1.0 / 3, 0.1 + 0.2, 5e-324, -5e-324,
                             2.2250738585072014e-308,      std::numeric_limits<double>::max(),
                             -1e-300, 1e21, 123456789.125};
  std::mt19937_64 random(20211231);
  while (values.size() < 2000) {
    const std::uint64_t b = random();
    double x = 0;
    std::memcpy(&x, &b, sizeof x);
    if (std::isfinite(x)) values.push_back(x);
  }
  values.push_back(kNaN);
  std::vector<core::Day> dates;
  for (std::size_t i = 0; i < values.size(); ++i) dates.push_back(day(2000, 1, 1) + static_cast<int>(i));
  const auto original = column("r", dates, values);

  const std::string json = ledger::encode_values_json(original);
  const auto decoded = ledger::decode_values_json("r", json);
  EXPECT_EQ(decoded.name, "r");
  EXPECT_EQ(decoded.dates, original.dates);
  ASSERT_EQ(decoded.values.size(), values.size());
  for (std::size_t i = 0; i + 1 < values.size(); ++i)
    ASSERT_EQ(bits(decoded.values[i]), bits(values[i])) << "value " << i << ": " << values[i];
  EXPECT_TRUE(std::isnan(decoded.values.back()));
  // The decoded column encodes to the same text: the stored form is a fixed point.
  EXPECT_EQ(ledger::encode_values_json(decoded), json);
}

TEST(ValuesJson, DecodesEmptyObject) {
  const auto c = ledger::decode_values_json("none", "{}");
  EXPECT_EQ(c.name, "none");
  EXPECT_TRUE(c.dates.empty());
  EXPECT_TRUE(c.values.empty());
}

// Expects decoding to fail with a ledger error naming the column.
void expect_malformed(const std::string& json) {
  try {
    const auto c = ledger::decode_values_json("col-x", json);
    ADD_FAILURE() << "accepted malformed text: " << json << " (" << c.dates.size() << " dates)";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::ledger) << json;
    EXPECT_NE(std::string(e.what()).find("column 'col-x' are malformed at byte"), std::string::npos)
        << e.what();
    EXPECT_NE(std::string(e.what()).find("alphatrail verify"), std::string::npos) << e.what();
  }
}

TEST(ValuesJson, RejectsMalformedText) {
  for (const char* json : {
           "",
           "{",
           "[]",
           "null",
           R"({"2021-01-31":0.1)",
           R"({"2021-01-31":0.1,})",
           R"({"2021-01-31":})",
           R"({"2021-01-31" 0.1})",
           R"({"2021-01-31":0.1 })",
           R"({ "2021-01-31":0.1})",
           R"({"2021-01-31":"0.1"})",
           R"({"2021-01-31":nul})",
           R"({"2021-01-31":0.1}})",
           R"({"2021-01-31":0.1},)",
           R"({"2021-02-30":0.1})",   // not a calendar date
           R"({"2021-01":0.1})",      // a month is not a stored date
           R"({"2021-1-31":0.1})",
           R"({"2021-01-31x":0.1})",
           R"({2021-01-31:0.1})",
           R"({"2021-01-31":1e999})",  // out of range
       })
    expect_malformed(json);
}

TEST(ValuesJson, RejectsTextAfterAnEmptyObject) {
  // "{}" followed by anything is no more canonical than "{...}" followed by anything.
  expect_malformed("{}x");
  expect_malformed("{},{}");
}

TEST(ValuesJson, RejectsNumbersJsonDoesNotHave) {
  // A missing value is stored as null; nan and inf are not JSON.
  expect_malformed(R"({"2021-01-31":nan})");
  expect_malformed(R"({"2021-01-31":inf})");
  expect_malformed(R"({"2021-01-31":+1})");
}

TEST(ValuesJson, RejectsDatesOutOfOrderOrRepeated) {
  // A column's dates are ascending and unique; stored text that breaks this is malformed.
  expect_malformed(R"({"2021-02-28":0.1,"2021-01-31":0.2})");
  expect_malformed(R"({"2021-01-31":0.1,"2021-01-31":0.2})");
}

// --- content hash ---------------------------------------------------------------------------

struct Content {
  ledger::ContentMeta meta{"strategy", "decimal return", std::nullopt};
  std::vector<ledger::ColumnData> columns{
      column("fund-one", {day(2021, 1, 31), day(2021, 2, 28), day(2021, 3, 31)},
             {0.01, -0.005, 0.012})};

  std::string hash() const {
    std::vector<ledger::EncodedColumn> encoded;
    for (const auto& c : columns) encoded.push_back({c.name, ledger::encode_values_json(c)});
    return ledger::content_hash(meta, encoded);
  }
};

TEST(ContentHash, MatchesTheDocumentedFormat) {
  // SHA-256 of "alphatrail content v1\nkind: strategy\nunit: decimal return\nquote: none\n"
  // "column: fund-one\n{...}\n", computed outside alphatrail; also the hash that
  // fixtures/ledgers/v1.db holds for this content. Changing it breaks every stored ledger.
  EXPECT_EQ(Content{}.hash(), "56ab984b7a4f64aaec1f3db90fde4668858aea600a9fb6cfaacebcd49ed3d20d");
}

TEST(ContentHash, IsStableForEqualContent) {
  const std::string h = Content{}.hash();
  EXPECT_TRUE(std::regex_match(h, std::regex("[0-9a-f]{64}"))) << h;
  EXPECT_EQ(Content{}.hash(), h);
  // Equal values reached another way (-0.005 as -5e-3, a decoded copy) are equal content.
  Content other;
  other.columns[0].values = {0.01, -5e-3, 12e-3};
  EXPECT_EQ(other.hash(), h);
  Content decoded;
  decoded.columns[0] =
      ledger::decode_values_json("fund-one", ledger::encode_values_json(Content{}.columns[0]));
  EXPECT_EQ(decoded.hash(), h);
}

TEST(ContentHash, ChangesWithEveryPartOfTheContent) {
  std::set<std::string> hashes{Content{}.hash()};
  int variants = 0;
  const auto add = [&](const Content& c, const char* what) {
    ++variants;
    EXPECT_TRUE(hashes.insert(c.hash()).second) << what << " did not change the hash";
  };
  Content c;
  c.columns[0].values[1] = -0.004;
  add(c, "a value");
  c = Content{};
  c.columns[0].values[2] = kNaN;
  add(c, "a value becoming missing");
  c = Content{};
  c.columns[0].values[0] = 0.010000000000000002;  // one ulp away
  add(c, "a value's last bit");
  c = Content{};
  c.columns[0].dates[0] = day(2021, 1, 29);
  add(c, "a date");
  c = Content{};
  c.meta.unit = "percent yield";
  add(c, "the unit");
  c = Content{};
  c.meta.kind = "benchmark";
  add(c, "the kind");
  c = Content{};
  c.meta.quote = "yield";
  add(c, "a quote instead of none");
  c = Content{};
  c.meta.quote = "discount";
  add(c, "another quote");
  c = Content{};
  c.columns[0].name = "fund-two";
  add(c, "the column name");
  c = Content{};
  c.columns.push_back(column("extra", {day(2021, 1, 31)}, {0.0}));
  add(c, "an extra column");
  Content swapped = c;
  std::swap(swapped.columns[0], swapped.columns[1]);
  add(swapped, "the column order");
  c = Content{};
  c.columns.clear();
  add(c, "no columns");
  c = Content{};
  c.columns[0].dates.pop_back();
  c.columns[0].values.pop_back();
  add(c, "a dropped observation");
  EXPECT_EQ(hashes.size(), static_cast<std::size_t>(variants) + 1);
}

}  // namespace
