// Tests of the series store: new series, unchanged content and next versions inside a write
// transaction, all-or-nothing batches, bit-exact loading, version history and not-found errors.
#include <SQLiteCpp/Database.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <cstring>
#include <filesystem>
#include <limits>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "core/error.h"
#include "store/sqlite_ledger.h"
#include "support/test_support.h"

namespace {

namespace store = alphatrail::store;
namespace record = alphatrail::record;
namespace core = alphatrail::core;
using alphatrail::Error;
using alphatrail::Failure;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::source_path;

const double kNaN = std::numeric_limits<double>::quiet_NaN();

core::Day day(int y, int m, int d) {
  return core::to_day({y, m, d});
}

std::vector<core::Day> month_ends(int months) {
  std::vector<core::Day> out;
  for (int i = 0; i < months; ++i) {
    const int m = i % 12 + 1;
    const int y = 2021 + i / 12;
    out.push_back(day(y, m, core::days_in_month(y, m)));
  }
  return out;
}

std::uint64_t bits(double x) {
  std::uint64_t b = 0;
  std::memcpy(&b, &x, sizeof b);
  return b;
}

store::NewVersion returns(const std::string& name, std::vector<double> values,
                          const std::string& kind = "strategy") {
  store::NewVersion v;
  v.name = name;
  v.meta = {kind, "decimal return", std::nullopt};
  v.input_unit = "decimal";
  v.columns.push_back({name, month_ends(static_cast<int>(values.size())), std::move(values)});
  return v;
}

class SeriesStore : public ::testing::Test {
 protected:
  SeriesStore()
      : ledger_(store::SqliteLedger::open(dir_ / "ledger.db", store::OpenMode::create, notices_)) {}

  std::vector<store::StoreOutcome> store(std::vector<store::NewVersion> versions,
                                         const std::string& note = "") {
    std::vector<store::StoreOutcome> out;
    ledger_.write_transaction([&] {
      out = ledger_.store_versions(std::move(versions), {"input.csv", std::string(64, 'a'), note});
    });
    return out;
  }

  int rows(const std::string& table) {
    return ledger_.db().execAndGet("SELECT count(*) FROM " + table).getInt();
  }

  ScratchDir dir_;
  std::ostringstream notices_;
  store::SqliteLedger ledger_;
};

TEST_F(SeriesStore, NewSeriesThenUnchangedThenNextVersion) {
  auto out = store({returns("fund", {0.01, -0.005, 0.012})});
  ASSERT_EQ(out.size(), 1u);
  EXPECT_EQ(out[0].name, "fund");
  EXPECT_EQ(out[0].kind, "strategy");
  EXPECT_EQ(out[0].version, 1);
  EXPECT_TRUE(out[0].new_series);
  EXPECT_FALSE(out[0].unchanged);
  // The outcome's hash is the hash of the canonical content.
  const auto v = returns("fund", {0.01, -0.005, 0.012});
  EXPECT_EQ(out[0].content_hash,
            record::content_hash(v.meta, {{"fund", record::encode_values_json(v.columns[0])}}));
  const std::string first_hash = out[0].content_hash;

  out = store({returns("fund", {0.01, -0.005, 0.012})});
  ASSERT_EQ(out.size(), 1u);
  EXPECT_EQ(out[0].version, 1);
  EXPECT_TRUE(out[0].unchanged);
  EXPECT_FALSE(out[0].new_series);
  EXPECT_EQ(out[0].content_hash, first_hash);
  EXPECT_EQ(rows("series"), 1);
  EXPECT_EQ(rows("series_versions"), 1);
  EXPECT_EQ(rows("version_columns"), 1);

  out = store({returns("fund", {0.01, -0.005, 0.013})});
  EXPECT_EQ(out[0].version, 2);
  EXPECT_FALSE(out[0].unchanged);
  EXPECT_FALSE(out[0].new_series);
  EXPECT_NE(out[0].content_hash, first_hash);
  EXPECT_EQ(rows("series"), 1);
  EXPECT_EQ(rows("series_versions"), 2);

  // Back to the first content: that is a change from the latest, so version 3.
  out = store({returns("fund", {0.01, -0.005, 0.012})});
  EXPECT_EQ(out[0].version, 3);
  EXPECT_EQ(out[0].content_hash, first_hash);
  EXPECT_EQ(rows("series_versions"), 3);
}

TEST_F(SeriesStore, BatchMixesNewUnchangedAndChanged) {
  store({returns("a", {0.01, 0.02}), returns("b", {0.03, 0.04})});
  const auto out =
      store({returns("a", {0.01, 0.02}), returns("b", {0.03, 0.05}), returns("c", {0.06})});
  ASSERT_EQ(out.size(), 3u);
  EXPECT_TRUE(out[0].unchanged);
  EXPECT_EQ(out[0].version, 1);
  EXPECT_EQ(out[1].version, 2);
  EXPECT_FALSE(out[1].unchanged);
  EXPECT_TRUE(out[2].new_series);
  EXPECT_EQ(out[2].version, 1);
  EXPECT_EQ(rows("series_versions"), 4);
}

TEST_F(SeriesStore, NameOfAnotherKindRollsBackTheBatch) {
  store({returns("fund", {0.01})});
  try {
    store({returns("new-one", {0.02}, "benchmark"), returns("fund", {0.01}, "benchmark")});
    ADD_FAILURE() << "stored a benchmark under a strategy's name";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::bad_input);
    EXPECT_EQ(std::string(e.what()),
              "input.csv: series 'fund' already exists as a strategy series, not benchmark; "
              "rename the column or use --name");
  }
  EXPECT_EQ(rows("series"), 1);
  EXPECT_EQ(rows("series_versions"), 1);
  EXPECT_EQ(rows("version_columns"), 1);
}

TEST_F(SeriesStore, LoadVersionRoundTripsValuesBitForBit) {
  const std::vector<double> values{0.1,    1.0 / 3, kNaN,      -0.0,    5e-324,
                                   1e-300, -0.99,   0.1 + 0.2, 123.456, 110.0 / 100 - 1};
  store({returns("exact", values)}, "a note");
  const auto loaded = ledger_.load_version("exact");
  ASSERT_EQ(loaded.columns.size(), 1u);
  const auto& c = loaded.columns[0];
  EXPECT_EQ(c.name, "exact");
  EXPECT_EQ(c.dates, month_ends(static_cast<int>(values.size())));
  ASSERT_EQ(c.values.size(), values.size());
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (std::isnan(values[i]))
      EXPECT_TRUE(std::isnan(c.values[i])) << i;
    else
      EXPECT_EQ(bits(c.values[i]), bits(values[i])) << i << ": " << values[i];
  }
  const auto& info = loaded.info;
  EXPECT_EQ(info.name, "exact");
  EXPECT_EQ(info.kind, "strategy");
  EXPECT_EQ(info.version, 1);
  EXPECT_EQ(info.unit, "decimal return");
  EXPECT_EQ(info.input_unit, "decimal");
  EXPECT_FALSE(info.quote.has_value());
  EXPECT_EQ(info.frequency, std::optional<std::string>("monthly"));
  EXPECT_EQ(info.first_date, "2021-01-31");
  EXPECT_EQ(info.last_date, "2021-10-31");
  EXPECT_EQ(info.observations, 10);
  EXPECT_EQ(info.missing, 1);
  EXPECT_EQ(info.source_file, "input.csv");
  EXPECT_EQ(info.source_sha256, std::string(64, 'a'));
  EXPECT_EQ(info.note, "a note");
  EXPECT_EQ(info.columns, std::vector<std::string>{"exact"});
  EXPECT_FALSE(info.ingested_by.empty());
  EXPECT_TRUE(
      std::regex_match(info.ingested_at, std::regex(R"(\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z)")))
      << info.ingested_at;
}

TEST_F(SeriesStore, LoadVersionPicksTheAskedVersion) {
  store({returns("fund", {0.01, 0.02})});
  store({returns("fund", {0.01, 0.03})});
  EXPECT_EQ(ledger_.load_version("fund").info.version, 2);
  EXPECT_EQ(ledger_.load_version("fund").columns[0].values[1], 0.03);
  const auto first = ledger_.load_version("fund", 1);
  EXPECT_EQ(first.info.version, 1);
  EXPECT_EQ(first.columns[0].values[1], 0.02);
}

TEST_F(SeriesStore, SetWithSeveralColumnsKeepsTheirOrderAndDateUnion) {
  store::NewVersion set;
  set.name = "ff";
  set.meta = {"factor", "decimal return", std::nullopt};
  set.input_unit = "percent";
  const auto d = month_ends(4);
  set.columns.push_back({"smb", {d[1], d[2], d[3]}, {0.002, kNaN, 0.001}});
  set.columns.push_back({"mkt_rf", {d[0], d[1], d[2]}, {0.01, 0.02, 0.03}});
  const auto out = store({set});
  EXPECT_TRUE(out[0].new_series);
  const auto loaded = ledger_.load_version("ff");
  ASSERT_EQ(loaded.columns.size(), 2u);
  EXPECT_EQ(loaded.columns[0].name, "smb");
  EXPECT_EQ(loaded.columns[1].name, "mkt_rf");
  EXPECT_EQ(loaded.columns[0].dates, (std::vector<core::Day>{d[1], d[2], d[3]}));
  EXPECT_EQ(loaded.info.columns, (std::vector<std::string>{"smb", "mkt_rf"}));
  EXPECT_EQ(loaded.info.observations, 4);  // dates of any column
  EXPECT_EQ(loaded.info.first_date, "2021-01-31");
  EXPECT_EQ(loaded.info.last_date, "2021-04-30");
  EXPECT_EQ(loaded.info.missing, 1);
  EXPECT_EQ(loaded.info.input_unit, "percent");
  EXPECT_EQ(rows("version_columns"), 2);
}

TEST_F(SeriesStore, RateCurveKeepsItsQuote) {
  store::NewVersion curve;
  curve.name = "ust";
  curve.meta = {"rate", "percent yield", std::string("discount")};
  curve.input_unit = "percent";
  curve.columns.push_back({"3M", month_ends(2), {4.5, 4.25}});
  store({curve});
  const auto loaded = ledger_.load_version("ust");
  EXPECT_EQ(loaded.info.quote, std::optional<std::string>("discount"));
  EXPECT_EQ(loaded.info.unit, "percent yield");
  // The same numbers quoted as yields are other content.
  curve.meta.quote = "yield";
  EXPECT_EQ(store({curve})[0].version, 2);
}

TEST_F(SeriesStore, VersionHistoryIsOldestFirst) {
  store({returns("fund", {0.01})}, "first");
  store({returns("fund", {0.01, 0.02})}, "second");
  store({returns("other", {0.05})});
  store({returns("fund", {0.01, 0.02, 0.03})}, "third");
  const auto history = ledger_.version_history("fund");
  ASSERT_EQ(history.size(), 3u);
  for (int i = 0; i < 3; ++i) {
    EXPECT_EQ(history[i].name, "fund");
    EXPECT_EQ(history[i].version, i + 1);
    EXPECT_EQ(history[i].observations, i + 1);
  }
  EXPECT_EQ(history[0].note, "first");
  EXPECT_EQ(history[2].note, "third");
  EXPECT_EQ(history[2].last_date, "2021-03-31");
  EXPECT_FALSE(history[0].frequency.has_value());  // one date: no frequency
  EXPECT_LT(history[0].version_id, history[1].version_id);
  EXPECT_LE(history[0].ingested_at, history[2].ingested_at);
}

TEST_F(SeriesStore, ListHoldsTheLatestOfEachByKindThenName) {
  store({returns("zeta", {0.01}, "benchmark"), returns("beta", {0.01}), returns("alpha", {0.02})});
  store({returns("beta", {0.03})});
  store::NewVersion factors = returns("aaa-factors", {0.01}, "factor");
  store({factors});
  const auto list = ledger_.list_latest_versions();
  ASSERT_EQ(list.size(), 4u);
  EXPECT_EQ(list[0].name, "alpha");
  EXPECT_EQ(list[1].name, "beta");
  EXPECT_EQ(list[1].version, 2);
  EXPECT_EQ(list[2].name, "zeta");
  EXPECT_EQ(list[3].name, "aaa-factors");
}

TEST_F(SeriesStore, UnknownNamesAndVersionsAreNotFound) {
  store({returns("fund", {0.01})});
  const auto expect_not_found = [](auto&& call, const std::string& message) {
    try {
      call();
      ADD_FAILURE() << "found: " << message;
    } catch (const Error& e) {
      EXPECT_EQ(e.kind(), Failure::not_found);
      EXPECT_NE(std::string(e.what()).find(message), std::string::npos) << e.what();
    }
  };
  expect_not_found([&] { ledger_.version_history("nope"); }, "no series named 'nope'");
  expect_not_found([&] { ledger_.load_version("nope"); }, "no series named 'nope'");
  expect_not_found([&] { ledger_.load_version("nope", 1); }, "no series named 'nope'");
  expect_not_found([&] { ledger_.load_version("fund", 2); }, "series 'fund' has no version 2");
  expect_not_found([&] { ledger_.load_version("fund", 0); }, "series 'fund' has no version 0");
  // Names are exact: no case folding, no prefixes.
  expect_not_found([&] { ledger_.load_version("FUND"); }, "no series named 'FUND'");
  expect_not_found([&] { ledger_.load_version("fun"); }, "no series named 'fun'");
}

TEST_F(SeriesStore, ManySeriesInOneBatch) {
  // Enough series that encoding runs on several threads; each keeps its own content.
  std::vector<store::NewVersion> batch;
  // (fmt::format, not "s" + std::to_string(i): GCC 12 warns falsely on the latter, -Wrestrict.)
  for (int i = 0; i < 200; ++i) batch.push_back(returns(fmt::format("s{}", i), {i * 1e-4, 0.01}));
  const auto out = store(batch);
  ASSERT_EQ(out.size(), 200u);
  for (int i = 0; i < 200; ++i) {
    EXPECT_EQ(out[i].name, fmt::format("s{}", i));
    EXPECT_TRUE(out[i].new_series);
  }
  EXPECT_EQ(rows("series"), 200);
  EXPECT_EQ(ledger_.load_version("s123").columns[0].values[0], 123 * 1e-4);
  EXPECT_EQ(
      ledger_.db().execAndGet("SELECT count(DISTINCT content_hash) FROM series_versions").getInt(),
      200);
}

TEST(UtcNow, IsIsoWithMilliseconds) {
  const std::string now = store::utc_now();
  EXPECT_TRUE(
      std::regex_match(now, std::regex(R"(20\d\d-[01]\d-[0-3]\dT[0-2]\d:[0-5]\d:[0-5]\d\.\d{3}Z)")))
      << now;
}

}  // namespace

namespace {

// Many versions at once: decoding overlaps reading on worker threads; the result must be that
// of load_version on each, in request order, and an unknown name anywhere must fail cleanly.
TEST_F(SeriesStore, LoadsManyVersionsAsLoadVersionDoes) {
  std::vector<store::NewVersion> batch;
  for (int i = 0; i < 120; ++i)
    batch.push_back(returns(fmt::format("s{}", i), {i * 1e-4, 0.01, kNaN, -0.02 + i * 1e-5}));
  store(batch);
  store({returns("s7", {0.5, 0.6})});  // s7 gets a version 2
  std::vector<store::VersionRequest> wanted;
  for (int i = 119; i >= 0; --i) wanted.push_back({fmt::format("s{}", i), std::nullopt});
  wanted.push_back({"s7", 1});
  const auto many = ledger_.load_versions(wanted);
  ASSERT_EQ(many.size(), wanted.size());
  for (std::size_t r = 0; r < wanted.size(); ++r) {
    const auto one = ledger_.load_version(wanted[r].name, wanted[r].version);
    EXPECT_EQ(many[r].info.name, wanted[r].name);
    EXPECT_EQ(many[r].info.version, one.info.version);
    ASSERT_EQ(many[r].columns.size(), 1u);
    EXPECT_EQ(many[r].columns[0].dates, one.columns[0].dates);
    ASSERT_EQ(many[r].columns[0].values.size(), one.columns[0].values.size());
    for (std::size_t t = 0; t < one.columns[0].values.size(); ++t)
      EXPECT_EQ(bits(many[r].columns[0].values[t]), bits(one.columns[0].values[t]));
  }
  EXPECT_EQ(many[0].info.name, "s119");
  EXPECT_EQ(many[112].info.version, 2);  // s7, latest
  EXPECT_EQ(many[112].columns[0].values[0], 0.5);
  EXPECT_EQ(many[120].info.version, 1);  // s7 pinned to version 1
  EXPECT_EQ(many[120].columns[0].values[0], 7e-4);

  wanted.insert(wanted.begin() + 60, {"missing", std::nullopt});
  try {
    ledger_.load_versions(wanted);
    ADD_FAILURE() << "an unknown series was loaded";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::not_found);
    EXPECT_NE(std::string(e.what()).find("no series named 'missing'"), std::string::npos);
  }
}

}  // namespace

namespace {

// --- the packed copy ------------------------------------------------------------------------

// Expects two loads to hold the same columns, every value bit for bit (NaN bits included).
void expect_same_columns(const store::LoadedVersion& a, const store::LoadedVersion& b) {
  ASSERT_EQ(a.columns.size(), b.columns.size());
  for (std::size_t c = 0; c < a.columns.size(); ++c) {
    SCOPED_TRACE(a.columns[c].name);
    EXPECT_EQ(a.columns[c].name, b.columns[c].name);
    EXPECT_EQ(a.columns[c].dates, b.columns[c].dates);
    ASSERT_EQ(a.columns[c].values.size(), b.columns[c].values.size());
    for (std::size_t t = 0; t < a.columns[c].values.size(); ++t)
      EXPECT_EQ(bits(a.columns[c].values[t]), bits(b.columns[c].values[t])) << t;
  }
}

// Values whose decimal and binary forms are easy to get wrong.
const std::vector<double> kAwkward{0.1,
                                   -0.0,
                                   5e-324,
                                   -5e-324,
                                   2.2250738585072009e-308,
                                   kNaN,
                                   1e21,
                                   0.1 + 0.2,
                                   std::numeric_limits<double>::max(),
                                   -1e-300,
                                   1.0 / 3};

store::NewVersion awkward_set() {
  store::NewVersion set;
  set.name = "awkward";
  set.meta = {"factor", "decimal return", std::nullopt};
  set.input_unit = "decimal";
  const auto d = month_ends(static_cast<int>(kAwkward.size()));
  set.columns.push_back({"first", d, kAwkward});
  set.columns.push_back({"second", {d[0], d[3], d[5]}, {kNaN, -0.0, 0.25}});
  return set;
}

// Runs SQL on the test's own connection with the guarding triggers of packed_columns dropped.
void without_packed_triggers(store::SqliteLedger& l, const std::string& sql) {
  l.db().exec("DROP TRIGGER packed_columns_no_update");
  l.db().exec("DROP TRIGGER packed_columns_no_delete");
  ASSERT_GE(l.db().exec(sql), 1) << sql;
}

TEST_F(SeriesStore, IngestWritesAPackedCopyOfEveryColumn) {
  const auto set = awkward_set();
  store({set});
  store({returns("fund", {0.01, kNaN})});
  EXPECT_EQ(rows("packed_columns"), 3);
  SQLite::Statement q(ledger_.db(),
                      "SELECT c.column_name, p.days, p.numbers FROM version_columns c JOIN "
                      "packed_columns p ON p.column_id = c.column_id ORDER BY c.column_id");
  std::vector<record::ColumnData> expected = set.columns;
  expected.push_back(returns("fund", {0.01, kNaN}).columns[0]);
  for (const auto& c : expected) {
    ASSERT_TRUE(q.executeStep());
    EXPECT_EQ(q.getColumn(0).getString(), c.name);
    const auto packed = record::encode_packed(c);
    ASSERT_EQ(q.getColumn(1).getBytes(), static_cast<int>(4 * c.dates.size()));
    ASSERT_EQ(q.getColumn(2).getBytes(), static_cast<int>(8 * c.dates.size()));
    EXPECT_TRUE(q.getColumn(1).isBlob());
    EXPECT_EQ(std::memcmp(q.getColumn(1).getBlob(), packed.days.data(), packed.days.size()), 0);
    EXPECT_EQ(std::memcmp(q.getColumn(2).getBlob(), packed.numbers.data(), packed.numbers.size()),
              0);
  }
  EXPECT_FALSE(q.executeStep());
  // Unchanged content writes no packed row either.
  store({returns("fund", {0.01, kNaN})});
  EXPECT_EQ(rows("packed_columns"), 3);
}

TEST_F(SeriesStore, LoadReadsThePackedCopyWhenThereIsOne) {
  // Loading must not parse the JSON when a packed copy exists: an edited packed value shows.
  store({returns("fund", {0.01, 0.02, 0.03})});
  without_packed_triggers(ledger_,
                          "UPDATE packed_columns SET numbers = x'"
                          "7b14ae47e17a843f"
                          "7b14ae47e17a943f"
                          "0000000000000840'");  // 0.01, 0.02, 3
  const auto loaded = ledger_.load_version("fund");
  ASSERT_EQ(loaded.columns.size(), 1u);
  EXPECT_EQ(loaded.columns[0].values, (std::vector<double>{0.01, 0.02, 3.0}));
}

TEST_F(SeriesStore, LoadsTheSameWithAndWithoutThePackedCopy) {
  std::vector<store::NewVersion> batch{awkward_set()};
  for (int i = 0; i < 40; ++i)
    batch.push_back(returns(fmt::format("s{}", i), {i * 1e-4, kNaN, -0.0, 5e-324 * i}));
  store(batch);
  std::vector<store::VersionRequest> wanted{{"awkward", std::nullopt}};
  for (int i = 0; i < 40; ++i) wanted.push_back({fmt::format("s{}", i), std::nullopt});
  const auto packed = ledger_.load_versions(wanted);

  // The packed copies read back what was stored, bit for bit.
  ASSERT_EQ(packed[0].columns.size(), 2u);
  EXPECT_EQ(packed[0].columns[0].dates, month_ends(static_cast<int>(kAwkward.size())));
  for (std::size_t t = 0; t < kAwkward.size(); ++t)
    EXPECT_EQ(bits(packed[0].columns[0].values[t]),
              bits(std::isnan(kAwkward[t]) ? kNaN : kAwkward[t]))
        << t;
  EXPECT_EQ(bits(packed[0].columns[1].values[1]), 0x8000000000000000u);

  // As a ledger from before schema version 5 has them: half of the columns without a packed
  // copy, then none. Loading falls back to the JSON and gives the same data.
  without_packed_triggers(ledger_, "DELETE FROM packed_columns WHERE column_id % 2 = 0");
  const auto mixed = ledger_.load_versions(wanted);
  ASSERT_EQ(rows("packed_columns"), 21);
  ledger_.db().exec("DELETE FROM packed_columns");
  ASSERT_EQ(rows("packed_columns"), 0);
  const auto from_json = ledger_.load_versions(wanted);
  ASSERT_EQ(mixed.size(), packed.size());
  ASSERT_EQ(from_json.size(), packed.size());
  for (std::size_t r = 0; r < packed.size(); ++r) {
    SCOPED_TRACE(wanted[r].name);
    EXPECT_EQ(from_json[r].info.name, wanted[r].name);
    expect_same_columns(packed[r], from_json[r]);
    expect_same_columns(mixed[r], from_json[r]);
  }
}

TEST_F(SeriesStore, CorruptedPackedCopyIsALedgerErrorNamingTheColumn) {
  store({returns("fund", {0.01, 0.02, 0.03})});
  const auto expect_corrupted = [&](const std::string& problem) {
    try {
      const auto loaded = ledger_.load_version("fund");
      ADD_FAILURE() << "loaded a corrupted packed copy: " << loaded.columns[0].values.size()
                    << " values";
    } catch (const Error& e) {
      EXPECT_EQ(e.kind(), Failure::unusable_ledger);
      EXPECT_NE(
          std::string(e.what()).find("the packed copy of column 'fund' is corrupted: " + problem),
          std::string::npos)
          << e.what();
    }
  };
  // The table's CHECK keeps the sizes consistent; only a file edited around it breaks them.
  ledger_.db().exec("PRAGMA ignore_check_constraints = ON");
  without_packed_triggers(ledger_, "UPDATE packed_columns SET days = substr(days, 1, 8)");
  expect_corrupted("8 bytes of days and 24 bytes of numbers");
  ledger_.db().exec("UPDATE packed_columns SET days = x'e2480000e2480000e2480000'");
  expect_corrupted("its dates are not ascending at observation 2");
}

TEST_F(SeriesStore, PackedCopiesAreImmutableAndSizeChecked) {
  store({returns("fund", {0.01, 0.02})});
  const auto error = [&](const std::string& sql) {
    try {
      ledger_.db().exec(sql);
    } catch (const SQLite::Exception& e) {
      return std::string(e.what());
    }
    return std::string("(no error)");
  };
  EXPECT_EQ(error("UPDATE packed_columns SET numbers = numbers"),
            "observations are immutable: ingest a new version instead");
  EXPECT_EQ(error("DELETE FROM packed_columns"),
            "observations are never deleted: the ledger keeps every revision");
  const std::int64_t column_id =
      ledger_.db().execAndGet("SELECT column_id FROM version_columns").getInt64();
  ledger_.db().exec("DROP TRIGGER packed_columns_no_delete");
  ledger_.db().exec("DELETE FROM packed_columns");
  EXPECT_NE(
      error(fmt::format("INSERT INTO packed_columns VALUES ({}, x'00000000', x'00')", column_id))
          .find("CHECK constraint failed"),
      std::string::npos);
  EXPECT_NE(error("INSERT INTO packed_columns VALUES (999, x'00000000', x'0000000000000000')")
                .find("FOREIGN KEY constraint failed"),
            std::string::npos);
  EXPECT_EQ(rows("packed_columns"), 0);
}

// Ledgers from before schema version 5 are upgraded with no packed copies: their columns load
// from their JSON, and what is ingested afterwards gets packed copies.
TEST(PackedUpgrade, VersionOneLedgerLoadsItsColumnsFromTheirJson) {
  ScratchDir dir;
  const auto path = dir / "v1.db";
  std::filesystem::copy_file(source_path("fixtures/ledgers/v1.db"), path);
  std::ostringstream notices;
  auto l = store::SqliteLedger::open(path, store::OpenMode::existing, notices);
  ASSERT_EQ(l.schema_version(), store::current_schema_version());
  EXPECT_EQ(l.db().execAndGet("SELECT count(*) FROM packed_columns").getInt(), 0);
  const auto old = l.load_version("fund-one");
  ASSERT_EQ(old.columns.size(), 1u);
  EXPECT_EQ(old.columns[0].dates,
            (std::vector<core::Day>{day(2021, 1, 31), day(2021, 2, 28), day(2021, 3, 31)}));
  EXPECT_EQ(old.columns[0].values, (std::vector<double>{0.01, -0.005, 0.012}));

  l.write_transaction([&] {
    l.store_versions({returns("fund-one", {0.01, -0.005, 0.012, 0.002})},
                     {"more.csv", std::string(64, 'b'), ""});
  });
  EXPECT_EQ(l.db().execAndGet("SELECT count(*) FROM packed_columns").getInt(), 1);
  const auto both = l.load_versions({{"fund-one", 1}, {"fund-one", 2}});
  EXPECT_EQ(both[0].columns[0].values, (std::vector<double>{0.01, -0.005, 0.012}));
  EXPECT_EQ(both[1].columns[0].values, (std::vector<double>{0.01, -0.005, 0.012, 0.002}));
}

TEST(PackedUpgrade, VersionFourLedgerKeepsItsColumnsReadable) {
  // A version 4 ledger made from a current one: the packed table (and what migrations 6 and 7
  // added) taken away as if they had never existed. Opening upgrades it with an empty packed table.
  ScratchDir dir;
  const auto path = dir / "v4.db";
  std::ostringstream notices;
  store::LoadedVersion before;
  {
    auto l = store::SqliteLedger::open(path, store::OpenMode::create, notices);
    l.write_transaction([&] {
      l.store_versions({awkward_set()}, {"set.csv", std::string(64, 'c'), ""});
    });
    before = l.load_version("awkward");
    l.db().exec("DROP TABLE packed_columns");
    l.db().exec("DROP INDEX version_columns_in_order");
    l.db().exec("DROP TABLE ledger_marks");
    l.db().exec("PRAGMA user_version = 4");
  }
  auto l = store::SqliteLedger::open(path, store::OpenMode::existing, notices);
  EXPECT_NE(notices.str().find(
                fmt::format("from schema version 4 to {}", store::current_schema_version())),
            std::string::npos)
      << notices.str();
  EXPECT_EQ(l.db().execAndGet("SELECT count(*) FROM packed_columns").getInt(), 0);
  const auto after = l.load_version("awkward");
  expect_same_columns(before, after);
  EXPECT_EQ(bits(after.columns[1].values[1]), 0x8000000000000000u);
  EXPECT_TRUE(std::isnan(after.columns[0].values[5]));
}

}  // namespace
