// Tests of the canonical content form: the exact JSON text of a column (it is hashed, so it
// must never drift), bit-exact round trips, refusal of malformed text, and a content hash that
// changes with every part of the content and nothing else.
#include "record/content.h"

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

namespace record = alphatrail::record;
namespace core = alphatrail::core;
using alphatrail::Error;
using alphatrail::Failure;

core::Day day(int y, int m, int d) {
  return core::to_day({y, m, d});
}

record::ColumnData column(const std::string& name, std::vector<core::Day> dates,
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
  const auto c =
      column("a", {day(2021, 1, 31), day(2021, 2, 28), day(2021, 3, 31)}, {0.1, kNaN, 1e-05});
  EXPECT_EQ(record::encode_values_json(c),
            R"({"2021-01-31":0.1,"2021-02-28":null,"2021-03-31":1e-05})");
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
    EXPECT_EQ(record::encode_values_json(col), std::string(R"({"2000-01-01":)") + c.text + "}")
        << c.text;
  }
}

TEST(ValuesJson, EncodesEmptyColumnAsEmptyObjectAndPadsYears) {
  EXPECT_EQ(record::encode_values_json(column("e", {}, {})), "{}");
  EXPECT_EQ(record::encode_values_json(column("y", {day(1999, 12, 31), day(2100, 1, 1)}, {1, 2})),
            R"({"1999-12-31":1,"2100-01-01":2})");
}

// --- decoding -----------------------------------------------------------------------------

TEST(ValuesJson, RoundTripsBitForBit) {
  std::vector<double> values{0.1,
                             -0.0,
                             0.0,
                             1.0 / 3,
                             0.1 + 0.2,
                             5e-324,
                             -5e-324,
                             2.2250738585072014e-308,
                             std::numeric_limits<double>::max(),
                             -1e-300,
                             1e21,
                             123456789.125};
  std::mt19937_64 random(20211231);
  while (values.size() < 2000) {
    const std::uint64_t b = random();
    double x = 0;
    std::memcpy(&x, &b, sizeof x);
    if (std::isfinite(x)) values.push_back(x);
  }
  values.push_back(kNaN);
  std::vector<core::Day> dates;
  for (std::size_t i = 0; i < values.size(); ++i)
    dates.push_back(day(2000, 1, 1) + static_cast<int>(i));
  const auto original = column("r", dates, values);

  const std::string json = record::encode_values_json(original);
  const auto decoded = record::decode_values_json("r", json);
  EXPECT_EQ(decoded.name, "r");
  EXPECT_EQ(decoded.dates, original.dates);
  ASSERT_EQ(decoded.values.size(), values.size());
  for (std::size_t i = 0; i + 1 < values.size(); ++i)
    ASSERT_EQ(bits(decoded.values[i]), bits(values[i])) << "value " << i << ": " << values[i];
  EXPECT_TRUE(std::isnan(decoded.values.back()));
  // The decoded column encodes to the same text: the stored form is a fixed point.
  EXPECT_EQ(record::encode_values_json(decoded), json);
}

TEST(ValuesJson, DecodesEmptyObject) {
  const auto c = record::decode_values_json("none", "{}");
  EXPECT_EQ(c.name, "none");
  EXPECT_TRUE(c.dates.empty());
  EXPECT_TRUE(c.values.empty());
}

// Expects decoding to fail with a ledger error naming the column.
void expect_malformed(const std::string& json) {
  try {
    const auto c = record::decode_values_json("col-x", json);
    ADD_FAILURE() << "accepted malformed text: " << json << " (" << c.dates.size() << " dates)";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::unusable_ledger) << json;
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
           R"({"2021-02-30":0.1})",  // not a calendar date
           R"({"2021-01":0.1})",     // a month is not a stored date
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

// Expects `encode` to refuse the column with an internal error that says nothing was written.
template <typename Encode>
void expect_refused(const record::ColumnData& c, const Encode& encode) {
  try {
    encode(c);
    ADD_FAILURE() << "encoded a column holding " << c.values.back();
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::internal) << e.what();
    const std::string message = e.what();
    EXPECT_NE(message.find("column '" + c.name + "'"), std::string::npos) << message;
    EXPECT_NE(message.find("2021-02-28"), std::string::npos) << message;
    EXPECT_NE(message.find("a bug"), std::string::npos) << message;
    EXPECT_NE(message.find("nothing was written"), std::string::npos) << message;
  }
}

TEST(ValuesJson, RefusesInfinitiesAsAnInternalError) {
  // JSON has no infinity: text holding one could never be decoded again, so verify would fail
  // for ever on an immutable version. Ingest refuses such values first; reaching the writer
  // with one is a bug.
  const double inf = std::numeric_limits<double>::infinity();
  for (const double bad : {inf, -inf}) {
    const auto c = column("r", {day(2021, 1, 31), day(2021, 2, 28)}, {0.01, bad});
    expect_refused(c, [](const record::ColumnData& x) { return record::encode_values_json(x); });
    expect_refused(c, [](const record::ColumnData& x) { return record::encode_packed(x); });
  }
  // NaN is the missing value: written as null, never as a number.
  const auto missing = column("r", {day(2021, 1, 31), day(2021, 2, 28)}, {0.01, -kNaN});
  EXPECT_EQ(record::encode_values_json(missing), R"({"2021-01-31":0.01,"2021-02-28":null})");
}

// --- packed form ----------------------------------------------------------------------------

std::string hex(const std::string& bytes) {
  std::string out;
  for (const char c : bytes) {
    constexpr const char* kDigits = "0123456789abcdef";
    const auto u = static_cast<unsigned char>(c);
    out += kDigits[u >> 4];
    out += kDigits[u & 15];
  }
  return out;
}

TEST(PackedColumn, WritesLittleEndianDayNumbersAndDoubles) {
  // 2021-01-31 is day 18658 = 0x48e2 (51 years of 365 days, 13 leap days, 30 days);
  // 0.1 is 0x3fb999999999999a and -0.0 is the sign bit alone (IEEE 754 binary64).
  const auto c = column("a", {day(2021, 1, 31), day(1969, 12, 31)}, {0.1, -0.0});
  const auto packed = record::encode_packed(c);
  EXPECT_EQ(hex(packed.days), "e2480000ffffffff");
  EXPECT_EQ(hex(packed.numbers), "9a9999999999b93f0000000000000080");
}

TEST(PackedColumn, WritesEveryMissingValueAsTheNaNJsonDecodesTo) {
  // Missing values may reach the store as any NaN; the packed copy holds one NaN so that it
  // is a function of the JSON text. 0x7ff8000000000000 is the quiet NaN.
  double negative_payload = 0;
  const std::uint64_t b = 0xfff0000000000123u;
  std::memcpy(&negative_payload, &b, sizeof b);
  ASSERT_TRUE(std::isnan(negative_payload));
  const auto c = column("m", {day(2021, 1, 31), day(2021, 2, 28)}, {negative_payload, -kNaN});
  EXPECT_EQ(hex(record::encode_packed(c).numbers), "000000000000f87f000000000000f87f");
  const auto from_json = record::decode_values_json("m", record::encode_values_json(c));
  EXPECT_EQ(bits(from_json.values[0]), 0x7ff8000000000000u);
}

TEST(PackedColumn, RoundTripsAsTheJsonDoesBitForBit) {
  // Negative zero, the smallest subnormals, the boundary between subnormal and normal, the
  // largest finite doubles, values without a short decimal form, random bit patterns, and
  // the first and last dates the JSON form can write.
  std::vector<double> values{-0.0,
                             0.0,
                             5e-324,
                             -5e-324,
                             2.2250738585072009e-308,  // the largest subnormal
                             2.2250738585072014e-308,  // the smallest normal
                             std::numeric_limits<double>::max(),
                             std::numeric_limits<double>::lowest(),
                             0.1 + 0.2,
                             1.0 / 3,
                             kNaN,
                             -1e-300};
  std::mt19937_64 random(20260101);
  while (values.size() < 3000) {
    const std::uint64_t b = random();
    double x = 0;
    std::memcpy(&x, &b, sizeof x);
    values.push_back(std::isfinite(x) ? x : kNaN);
  }
  std::vector<core::Day> dates{day(0, 1, 1)};
  for (std::size_t i = 1; i + 1 < values.size(); ++i)
    dates.push_back(day(1900, 1, 1) + static_cast<int>(i) * 11);
  dates.push_back(day(9999, 12, 31));
  const auto original = column("r", dates, values);

  const auto packed = record::encode_packed(original);
  ASSERT_EQ(packed.days.size(), 4 * values.size());
  ASSERT_EQ(packed.numbers.size(), 8 * values.size());
  const auto unpacked = record::decode_packed("r", packed.days, packed.numbers);
  const auto from_json = record::decode_values_json("r", record::encode_values_json(original));
  EXPECT_EQ(unpacked.name, "r");
  EXPECT_EQ(unpacked.dates, original.dates);
  EXPECT_EQ(unpacked.dates, from_json.dates);
  ASSERT_EQ(unpacked.values.size(), values.size());
  ASSERT_EQ(from_json.values.size(), values.size());
  int missing = 0;
  for (std::size_t i = 0; i < values.size(); ++i) {
    ASSERT_EQ(bits(unpacked.values[i]), bits(from_json.values[i])) << "value " << i;
    if (std::isnan(values[i]))
      ++missing;
    else
      ASSERT_EQ(bits(unpacked.values[i]), bits(values[i])) << "value " << i << ": " << values[i];
  }
  EXPECT_GT(missing, 1);  // the random patterns held NaNs and infinities too
  EXPECT_EQ(bits(unpacked.values[0]), 0x8000000000000000u);  // negative zero kept
  EXPECT_EQ(core::format_date(unpacked.dates.front()), "0000-01-01");
  EXPECT_EQ(core::format_date(unpacked.dates.back()), "9999-12-31");
  // Packing the JSON's decoding gives the same bytes: the packed copy is a function of the JSON.
  const auto repacked = record::encode_packed(from_json);
  EXPECT_EQ(repacked.days, packed.days);
  EXPECT_EQ(repacked.numbers, packed.numbers);
}

TEST(PackedColumn, StoredDaysAreTheYearsJsonCanWrite) {
  EXPECT_EQ(record::kFirstStoredDay, day(0, 1, 1));
  EXPECT_EQ(record::kLastStoredDay, day(9999, 12, 31));
  EXPECT_EQ(core::format_date(record::kFirstStoredDay), "0000-01-01");
  EXPECT_EQ(core::format_date(record::kLastStoredDay), "9999-12-31");
}

TEST(PackedColumn, WritesAnyDayNumberInTwosComplement) {
  const std::vector<core::Day> dates{
      std::numeric_limits<core::Day>::min(), -719528, -1, 0, 1, 2932896,
      std::numeric_limits<core::Day>::max()};
  const auto packed =
      record::encode_packed(column("d", dates, std::vector<double>(dates.size(), 1.5)));
  EXPECT_EQ(hex(packed.days),
            "00000080"    // INT32_MIN
            "5805f5ff"    // -719528, 0000-01-01
            "ffffffff"    // -1
            "00000000"    // 0, 1970-01-01
            "01000000"    // 1
            "a0c02c00"    // 2932896, 9999-12-31
            "ffffff7f");  // INT32_MAX
}

TEST(PackedColumn, RoundTripsAnEmptyColumn) {
  const auto packed = record::encode_packed(column("e", {}, {}));
  EXPECT_TRUE(packed.days.empty());
  EXPECT_TRUE(packed.numbers.empty());
  const auto c = record::decode_packed("e", "", "");
  EXPECT_EQ(c.name, "e");
  EXPECT_TRUE(c.dates.empty());
  EXPECT_TRUE(c.values.empty());
}

// Expects unpacking to fail with a ledger error naming the column and the problem.
void expect_corrupted(const std::string& days, const std::string& numbers,
                      const std::string& problem) {
  try {
    const auto c = record::decode_packed("col-y", days, numbers);
    ADD_FAILURE() << "accepted " << days.size() << " bytes of days and " << numbers.size()
                  << " of numbers (" << c.dates.size() << " dates)";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::unusable_ledger);
    const std::string what = e.what();
    EXPECT_NE(what.find("the packed copy of column 'col-y' is corrupted: " + problem),
              std::string::npos)
        << what;
    EXPECT_NE(what.find("alphatrail verify"), std::string::npos) << what;
  }
}

TEST(PackedColumn, RejectsSizesThatDisagree) {
  const auto packed = record::encode_packed(
      column("col-y", {day(2021, 1, 31), day(2021, 2, 28), day(2021, 3, 31)}, {0.1, kNaN, 0.2}));
  ASSERT_EQ(packed.days.size(), 12u);
  expect_corrupted(packed.days.substr(0, 11), packed.numbers,
                   "11 bytes of days and 24 bytes of numbers");
  expect_corrupted(packed.days.substr(0, 8), packed.numbers,
                   "8 bytes of days and 24 bytes of numbers");
  expect_corrupted(packed.days, packed.numbers.substr(0, 23),
                   "12 bytes of days and 23 bytes of numbers");
  expect_corrupted(packed.days, packed.numbers + packed.numbers.substr(0, 8),
                   "12 bytes of days and 32 bytes of numbers");
  expect_corrupted("", packed.numbers, "0 bytes of days and 24 bytes of numbers");
}

TEST(PackedColumn, RejectsDatesOutOfOrderOrRepeated) {
  const auto descending = record::encode_packed(
      column("col-y", {day(2021, 1, 31), day(2021, 3, 31), day(2021, 2, 28)}, {0.1, 0.2, 0.3}));
  expect_corrupted(descending.days, descending.numbers,
                   "its dates are not ascending at observation 3");
  const auto repeated =
      record::encode_packed(column("col-y", {day(2021, 1, 31), day(2021, 1, 31)}, {0.1, 0.2}));
  expect_corrupted(repeated.days, repeated.numbers, "its dates are not ascending at observation 2");
}

TEST(PackedColumn, RejectsDaysBeyondTheStoredYears) {
  // Date arithmetic on such days would overflow; the JSON cannot hold them either.
  const auto early = record::encode_packed(
      column("col-y", {record::kFirstStoredDay - 1, day(2021, 1, 31)}, {0.1, 0.2}));
  expect_corrupted(early.days, early.numbers,
                   "observation 1 has day number -719529, outside 0000-01-01 .. 9999-12-31");
  const auto late = record::encode_packed(
      column("col-y", {day(2021, 1, 31), day(2021, 2, 28), std::numeric_limits<core::Day>::max()},
             {0.1, 0.2, 0.3}));
  expect_corrupted(late.days, late.numbers,
                   "observation 3 has day number 2147483647, outside 0000-01-01 .. 9999-12-31");
  // The edges themselves are stored days.
  const auto edges = record::encode_packed(
      column("col-y", {record::kFirstStoredDay, record::kLastStoredDay}, {0.1, 0.2}));
  EXPECT_EQ(record::decode_packed("col-y", edges.days, edges.numbers).dates,
            (std::vector<core::Day>{record::kFirstStoredDay, record::kLastStoredDay}));
}

// --- content hash ---------------------------------------------------------------------------

struct Content {
  record::ContentMeta meta{"strategy", "decimal return", std::nullopt};
  std::vector<record::ColumnData> columns{column(
      "fund-one", {day(2021, 1, 31), day(2021, 2, 28), day(2021, 3, 31)}, {0.01, -0.005, 0.012})};

  std::string hash() const {
    std::vector<record::EncodedColumn> encoded;
    for (const auto& c : columns) encoded.push_back({c.name, record::encode_values_json(c)});
    return record::content_hash(meta, encoded);
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
      record::decode_values_json("fund-one", record::encode_values_json(Content{}.columns[0]));
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

namespace {

// The stored unit vocabulary: the text series_versions.unit holds (schema/ledger.sql) and
// the rate unit and quote an evaluation reads back from it; edited text is corruption.
TEST(StoredUnit, SpellingsAndTheRateUnitsTheyStandFor) {
  using alphatrail::record::StoredUnit;
  EXPECT_STREQ(record::stored_unit_name(StoredUnit::decimal_return), "decimal return");
  EXPECT_STREQ(record::stored_unit_name(StoredUnit::percent_yield), "percent yield");
  EXPECT_STREQ(record::stored_unit_name(StoredUnit::decimal_yield), "decimal yield");
  EXPECT_EQ(record::stored_unit_for(core::SeriesKind::rate, core::ValueUnit::percent),
            StoredUnit::percent_yield);
  EXPECT_EQ(record::stored_unit_for(core::SeriesKind::rate, core::ValueUnit::decimal),
            StoredUnit::decimal_yield);
  EXPECT_EQ(record::stored_unit_for(core::SeriesKind::strategy, core::ValueUnit::percent),
            StoredUnit::decimal_return);
  EXPECT_EQ(record::stored_rate_unit("bills", "percent yield"), core::RateUnit::percent);
  EXPECT_EQ(record::stored_rate_unit("bills", "decimal yield"), core::RateUnit::decimal);
  EXPECT_EQ(record::stored_rate_quote("bills", std::nullopt), core::RateQuote::yield);
  EXPECT_EQ(record::stored_rate_quote("bills", std::string("discount")), core::RateQuote::discount);
}

TEST(StoredUnit, EditedTextIsCorruptionNamingTheSeries) {
  for (const char* unit : {"decimal return", "percent", "Percent yield", ""}) {
    try {
      record::stored_rate_unit("bills", unit);
      ADD_FAILURE() << unit;
    } catch (const Error& e) {
      EXPECT_EQ(e.kind(), Failure::corruption);
      EXPECT_NE(std::string(e.what()).find("rate curve bills"), std::string::npos) << e.what();
    }
  }
  try {
    record::stored_rate_quote("bills", std::string("bogus"));
    ADD_FAILURE();
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::corruption);
    EXPECT_NE(std::string(e.what()).find("\"bogus\""), std::string::npos) << e.what();
  }
}

}  // namespace
