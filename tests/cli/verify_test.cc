// Command-level tests of `alphatrail verify` and `alphatrail query` through the real binary.
//
// verify: a fresh demo ledger checks out (exit 0); copies altered by raw SQL (triggers dropped
// and restored around the edit, so the schema stays as it was) must exit 7 with a MISMATCH
// line naming the altered object; a file with garbage bytes must exit 4 or 7 without
// crashing. Every altered copy is first checked with SQLite's own integrity check: the
// logical edits leave a sound SQLite file, which is why the ledger needs its own hashes.
//
// query: the views answer as expected in JSON, CSV and table form; statements that would write
// exit 2 and leave the file byte for byte as it was.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <SQLiteCpp/Transaction.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "core/dates.h"
#include "core/sha256.h"
#include "record/content.h"
#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::copy_ledger;
using alphatrail::testing::lines_of;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_at;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::SixRunLedgerTest;
using nlohmann::json;

constexpr const char* kStrategies[] = {"trend-12m", "trend-3m",       "trend-6m",
                                       "carry-g10", "defensive-tilt", "crash-hedge"};

void checkpoint(const fs::path& ledger) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE);
  db.exec("PRAGMA wal_checkpoint(TRUNCATE)");
}

// SQLite's own check through a separate connection: "ok", or its first complaint.
std::string integrity(const fs::path& ledger) {
  try {
    SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
    SQLite::Statement q(db, "PRAGMA integrity_check");
    std::string all;
    while (q.executeStep()) all += (all.empty() ? "" : "; ") + q.getColumn(0).getString();
    return all;
  } catch (const std::exception& e) {
    return std::string("error: ") + e.what();
  }
}

std::string sha256_of_file(const fs::path& path) {
  return alphatrail::core::sha256_hex(read_file(path));
}

// The MISMATCH lines of a verify report.
std::vector<std::string> mismatches(const CommandResult& r) {
  std::vector<std::string> out;
  for (const auto& line : lines_of(r.out))
    if (line.rfind("MISMATCH ", 0) == 0) out.push_back(line);
  return out;
}

// True when a MISMATCH line names the object (e.g. "run 3") and says the problem.
bool names(const std::vector<std::string>& lines, const std::string& object,
           const std::string& problem) {
  for (const auto& line : lines)
    if (line.rfind("MISMATCH " + object + ": ", 0) == 0 && contains(line, problem)) return true;
  return false;
}

std::string joined(const std::vector<std::string>& lines) {
  std::string out;
  for (const auto& l : lines) out += l + "\n";
  return out;
}

// Runs statements on the ledger the way a tamperer would: the guarding triggers dropped, the
// rows edited, the triggers put back exactly as they were, all in one transaction. Each
// statement must change at least one row, so that the edit really happened. With
// ignore_checks the edit may also break the tables' CHECK constraints.
void tamper(const fs::path& ledger, const std::vector<std::string>& triggers,
            const std::vector<std::string>& statements, bool ignore_checks = false) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE);
  db.exec("PRAGMA foreign_keys = OFF");
  if (ignore_checks) db.exec("PRAGMA ignore_check_constraints = ON");
  std::vector<std::string> trigger_sql;
  for (const auto& t : triggers) {
    SQLite::Statement q(db, "SELECT sql FROM sqlite_master WHERE type = 'trigger' AND name = ?");
    q.bind(1, t);
    ASSERT_TRUE(q.executeStep()) << "no trigger " << t;
    trigger_sql.push_back(q.getColumn(0).getString());
  }
  SQLite::Transaction tx(db);
  for (const auto& t : triggers) db.exec("DROP TRIGGER " + t);
  for (const auto& s : statements) {
    const int changed = db.exec(s);
    ASSERT_GE(changed, 1) << "changed nothing: " << s;
  }
  for (const auto& sql : trigger_sql) db.exec(sql);
  tx.commit();
  db.exec("PRAGMA wal_checkpoint(TRUNCATE)");
}

std::string text_of(SQLite::Database& db, const std::string& sql) {
  return db.execAndGet(sql).getString();
}

// The six-run ledger, built once; every test works on its own copy.
class VerifyLedgerTest : public SixRunLedgerTest {
 protected:
  void TearDown() override {
    // The sanity check every test ends with: the untouched copy is sound.
    EXPECT_EQ(integrity(base()), "ok");
  }

  // Verify must report the alteration: exit 7 and a MISMATCH line for the object. The
  // altered copy is still a sound SQLite file.
  std::vector<std::string> expect_mismatch(const std::string& object, const std::string& problem) {
    EXPECT_EQ(integrity(ledger_path()), "ok") << "the edit should leave a sound SQLite file";
    const CommandResult r = run_at(ledger(), {"verify"});
    EXPECT_EQ(r.exit_code, 7) << r.out << r.err;
    const auto lines = mismatches(r);
    EXPECT_TRUE(names(lines, object, problem))
        << "no MISMATCH " << object << " (" << problem << ") in\n"
        << r.out;
    EXPECT_TRUE(contains(r.err, "mismatch")) << r.err;
    EXPECT_FALSE(contains(r.out, "everything checks out")) << r.out;
    return lines;
  }
};

// The demo as it comes (its re-runs included) and the six-run ledger both check out; the
// report counts what is there and prints the last run's record hash as the chain head.
TEST_F(VerifyLedgerTest, FreshDemoLedgerChecksOut) {
  for (const fs::path& ledger_file : {demo(), ledger_path()}) {
    SCOPED_TRACE(ledger_file.string());
    EXPECT_EQ(integrity(ledger_file), "ok");
    const CommandResult r = run_at(ledger_file.string(), {"verify"});
    EXPECT_EQ(r.exit_code, 0) << r.out << r.err;
    EXPECT_TRUE(mismatches(r).empty()) << r.out;
    EXPECT_TRUE(contains(r.out, "everything checks out")) << r.out;
    SQLite::Database db(ledger_file.string(), SQLite::OPEN_READONLY);
    const std::int64_t versions = db.execAndGet("SELECT count(*) FROM series_versions").getInt64();
    const std::int64_t runs = db.execAndGet("SELECT count(*) FROM runs").getInt64();
    EXPECT_GE(runs, 6);
    EXPECT_TRUE(
        contains(r.out, fmt::format("checked {} series versions and {} runs", versions, runs)))
        << r.out;
    const std::string head =
        text_of(db, "SELECT record_hash FROM runs ORDER BY run_id DESC LIMIT 1");
    EXPECT_TRUE(contains(r.out, "chain head " + head)) << r.out;
  }
  EXPECT_EQ(run_at(ledger(), {"verify"}).out.find("checked 9 series versions and 6 runs"), 0u);
}

TEST_F(VerifyLedgerTest, EditedObservationIsAContentHashMismatch) {
  std::string json_text;
  {
    SQLite::Database db(ledger(), SQLite::OPEN_READONLY);
    json_text = text_of(db,
                        "SELECT c.values_json FROM version_columns c JOIN series_versions v USING "
                        "(version_id) JOIN series s USING (series_id) WHERE s.name = 'trend-6m'");
  }
  // Change the tenth number by one basis point.
  std::size_t colon = 0;
  for (int i = 0; i < 10; ++i) colon = json_text.find("\":", colon + 1);
  ASSERT_NE(colon, std::string::npos);
  const std::size_t start = colon + 2;
  const std::size_t end = json_text.find_first_of(",}", start);
  const double value = std::strtod(json_text.substr(start, end - start).c_str(), nullptr);
  const std::string edited =
      json_text.substr(0, start) + fmt::format("{}", value + 0.0001) + json_text.substr(end);
  ASSERT_NE(edited, json_text);
  tamper(
      ledger_path(), {"version_columns_no_update"},
      {"UPDATE version_columns SET values_json = '" + edited +
       "' WHERE version_id = (SELECT "
       "version_id FROM series_versions JOIN series USING (series_id) WHERE name = 'trend-6m')"});
  const auto lines = expect_mismatch("series trend-6m version 1", "content hash");
  // The packed copy still holds the original observations, and says so.
  EXPECT_TRUE(names(lines, "series trend-6m version 1",
                    fmt::format("the packed copy of column 'trend-6m' does not match its "
                                "values_json: the value of {} is {} in values_json but {} in "
                                "the packed copy",
                                json_text.substr(colon - 10, 10), value + 0.0001, value)))
      << joined(lines);
  EXPECT_EQ(lines.size(), 2u) << joined(lines);
}

// --- the packed copies of the observations, which loading reads instead of the JSON ---------

// The packed copy of trend-6m's one column as hex digits, and the decoded JSON beside it.
struct PackedTrend6m {
  std::string days_hex;
  std::string numbers_hex;
  alphatrail::record::ColumnData column;
};

PackedTrend6m read_packed_trend_6m(const std::string& ledger) {
  SQLite::Database db(ledger, SQLite::OPEN_READONLY);
  SQLite::Statement q(db,
                      "SELECT hex(p.days), hex(p.numbers), c.values_json FROM packed_columns p "
                      "JOIN version_columns c USING (column_id) JOIN series_versions v USING "
                      "(version_id) JOIN series s USING (series_id) WHERE s.name = 'trend-6m'");
  if (!q.executeStep()) return {};
  return {q.getColumn(0).getString(), q.getColumn(1).getString(),
          alphatrail::record::decode_values_json("trend-6m", q.getColumn(2).getString())};
}

// The little-endian bytes of a double as the upper-case hex digits SQLite's hex() gives.
std::string hex_of(double x) {
  std::uint64_t b = 0;
  std::memcpy(&b, &x, sizeof b);
  std::string out;
  for (int i = 0; i < 8; ++i) out += fmt::format("{:02X}", (b >> (8 * i)) & 0xff);
  return out;
}

const std::string kTrend6mColumn =
    "(SELECT column_id FROM version_columns JOIN series_versions USING (version_id) JOIN series "
    "USING (series_id) WHERE name = 'trend-6m')";

TEST_F(VerifyLedgerTest, EditedPackedValueIsAMismatchOfThatColumn) {
  const PackedTrend6m before = read_packed_trend_6m(ledger());
  const std::size_t n = before.column.values.size();
  ASSERT_GT(n, 10u);
  ASSERT_EQ(before.numbers_hex.size(), 16 * n);
  ASSERT_EQ(before.numbers_hex.substr(16 * 9, 16), hex_of(before.column.values[9]));
  const double value = before.column.values[9];
  ASSERT_TRUE(std::isfinite(value));
  std::string edited = before.numbers_hex;
  edited.replace(16 * 9, 16, hex_of(value + 0.0001));
  tamper(ledger_path(), {"packed_columns_no_update"},
         {"UPDATE packed_columns SET numbers = x'" + edited +
          "' WHERE column_id = " + kTrend6mColumn});
  // The premise: loading reads the packed copy, so the edit changes what the run computes.
  const CommandResult reproduce = run_at(ledger(), {"reproduce", "3"});
  EXPECT_EQ(reproduce.exit_code, 7) << reproduce.out << reproduce.err;

  const auto lines = expect_mismatch(
      "series trend-6m version 1",
      fmt::format("the packed copy of column 'trend-6m' does not match its values_json: the "
                  "value of {} is {} in values_json but {} in the packed copy",
                  alphatrail::core::format_date(before.column.dates[9]), value, value + 0.0001));
  // The content hash covers the JSON only, which is intact: this is the one finding.
  EXPECT_EQ(lines.size(), 1u) << joined(lines);
}

TEST_F(VerifyLedgerTest, EditedPackedDateOrMissingValueIsAMismatch) {
  const PackedTrend6m before = read_packed_trend_6m(ledger());
  ASSERT_GT(before.column.dates.size(), 5u);
  // The fifth date one day later.
  std::string days = before.days_hex;
  const std::uint32_t moved = static_cast<std::uint32_t>(before.column.dates[4] + 1);
  std::string moved_hex;
  for (int i = 0; i < 4; ++i) moved_hex += fmt::format("{:02X}", (moved >> (8 * i)) & 0xff);
  days.replace(8 * 4, 8, moved_hex);
  tamper(ledger_path(), {"packed_columns_no_update"},
         {"UPDATE packed_columns SET days = x'" + days + "' WHERE column_id = " + kTrend6mColumn});
  auto lines = expect_mismatch(
      "series trend-6m version 1",
      fmt::format("observation 5 is dated {} in values_json but {} in the packed copy",
                  alphatrail::core::format_date(before.column.dates[4]),
                  alphatrail::core::format_date(before.column.dates[4] + 1)));
  EXPECT_EQ(lines.size(), 1u) << joined(lines);

  // Writes value i of the packed copy as the given bytes (hex), on a fresh copy of the ledger.
  const auto replace_value = [&](std::size_t i, const std::string& bytes_hex) {
    copy_ledger(base(), ledger_path());
    std::string numbers = before.numbers_hex;
    numbers.replace(16 * i, 16, bytes_hex);
    tamper(ledger_path(), {"packed_columns_no_update"},
           {"UPDATE packed_columns SET numbers = x'" + numbers +
            "' WHERE column_id = " + kTrend6mColumn});
  };

  // A value made missing (NaN) in the packed copy only.
  ASSERT_TRUE(std::isfinite(before.column.values[2]));
  replace_value(2, hex_of(std::numeric_limits<double>::quiet_NaN()));
  lines = expect_mismatch(
      "series trend-6m version 1",
      fmt::format("the value of {} is {} in values_json but null in the "
                  "packed copy",
                  alphatrail::core::format_date(before.column.dates[2]), before.column.values[2]));
  EXPECT_EQ(lines.size(), 1u) << joined(lines);

  // Any NaN but the one the packed form writes for null is a different value.
  replace_value(3, "010000000000F87F");
  lines = expect_mismatch(
      "series trend-6m version 1",
      fmt::format("the value of {} is {} in values_json but NaN "
                  "0x7ff8000000000001 in the packed copy",
                  alphatrail::core::format_date(before.column.dates[3]), before.column.values[3]));
  EXPECT_EQ(lines.size(), 1u) << joined(lines);
}

TEST_F(VerifyLedgerTest, PackedCopyOfTheWrongLengthIsAMismatchAndRefusedByLoading) {
  const std::size_t n = read_packed_trend_6m(ledger()).column.dates.size();
  ASSERT_GT(n, 1u);
  // One observation fewer in the days than in the numbers: only possible around the CHECK.
  tamper(ledger_path(), {"packed_columns_no_update"},
         {"UPDATE packed_columns SET days = substr(days, 1, length(days) - 4) WHERE column_id = " +
          kTrend6mColumn},
         true);
  const auto lines = expect_mismatch(
      "series trend-6m version 1",
      fmt::format("the packed copy of column 'trend-6m' does not match its values_json: holds {} "
                  "bytes of days and {} bytes of numbers, not the {} and {} of its {} "
                  "observations",
                  4 * (n - 1), 8 * n, 4 * n, 8 * n, n));
  EXPECT_EQ(lines.size(), 1u) << joined(lines);

  // Loading refuses it as a damaged ledger rather than reading past its end.
  const CommandResult reproduce = run_at(ledger(), {"reproduce", "3"});
  EXPECT_EQ(reproduce.exit_code, 4) << reproduce.out << reproduce.err;
  EXPECT_TRUE(contains(reproduce.err,
                       fmt::format("the packed copy of column 'trend-6m' is corrupted: {} bytes "
                                   "of days and {} bytes of numbers",
                                   4 * (n - 1), 8 * n)))
      << reproduce.err;
}

// A ledger whose columns have no packed copies (stored before schema version 5) loads from the
// JSON: every run still reproduces bit for bit and verify finds nothing.
TEST_F(VerifyLedgerTest, ColumnsWithoutPackedCopiesLoadFromTheirJson) {
  {
    SQLite::Database db(ledger(), SQLite::OPEN_READONLY);
    ASSERT_EQ(db.execAndGet("SELECT count(*) FROM packed_columns").getInt(),
              db.execAndGet("SELECT count(*) FROM version_columns").getInt());
  }
  tamper(ledger_path(), {"packed_columns_no_delete"}, {"DELETE FROM packed_columns"});
  for (int run = 1; run <= 6; ++run) {
    const CommandResult r = run_at(ledger(), {"reproduce", std::to_string(run)});
    EXPECT_EQ(r.exit_code, 0) << "run " << run << ": " << r.out << r.err;
  }
  const CommandResult r = run_at(ledger(), {"verify"});
  EXPECT_EQ(r.exit_code, 0) << r.out << r.err;
  EXPECT_TRUE(contains(r.out, "everything checks out")) << r.out;
}

// A tamperer who also recomputes the version's content hash is caught by the runs that used
// the version: their inputs hashes cover the content hash.
TEST_F(VerifyLedgerTest, EditedObservationWithRecomputedContentHashBreaksTheRunsInputsHash) {
  std::string json_text;
  std::string column;
  std::int64_t run_id = 0;
  {
    SQLite::Database db(ledger(), SQLite::OPEN_READONLY);
    json_text = text_of(db,
                        "SELECT values_json FROM version_columns c JOIN series_versions v USING "
                        "(version_id) JOIN series s USING (series_id) WHERE s.name = 'carry-g10'");
    column = text_of(db,
                     "SELECT column_name FROM version_columns c JOIN series_versions v USING "
                     "(version_id) JOIN series s USING (series_id) WHERE s.name = 'carry-g10'");
    run_id = db.execAndGet("SELECT run_id FROM runs WHERE strategy = 'carry-g10'").getInt64();
  }
  const std::size_t colon = json_text.find("\":", json_text.size() / 2);
  const std::size_t end = json_text.find_first_of(",}", colon + 2);
  const std::string edited = json_text.substr(0, colon + 2) + "0.5" + json_text.substr(end);
  const std::string hash = alphatrail::record::content_hash(
      {"strategy", "decimal return", std::nullopt}, {{column, edited}});
  tamper(ledger_path(), {"version_columns_no_update", "series_versions_no_update"},
         {"UPDATE version_columns SET values_json = '" + edited + "' WHERE values_json = '" +
              json_text + "'",
          "UPDATE series_versions SET content_hash = '" + hash +
              "' WHERE version_id = (SELECT "
              "version_id FROM series_versions JOIN series USING (series_id) WHERE name = "
              "'carry-g10')"});
  const auto lines = expect_mismatch(fmt::format("run {}", run_id), "inputs hash");
  EXPECT_FALSE(names(lines, "series carry-g10 version 1", "content hash"))
      << "the recomputed content hash should match: " << joined(lines);
}

TEST_F(VerifyLedgerTest, EditedCoefficientBreaksThatRunsRecordHash) {
  tamper(
      ledger_path(), {"run_coefficients_no_update"},
      {"UPDATE run_coefficients SET estimate = estimate * 1.01 WHERE run_id = 2 AND position = 2"});
  const auto lines = expect_mismatch("run 2", "record does not match its record hash");
  EXPECT_EQ(lines.size(), 1u) << joined(lines);
}

TEST_F(VerifyLedgerTest, EditedParameterBreaksInputsAndRecordHash) {
  {
    SQLite::Database db(ledger(), SQLite::OPEN_READONLY);
    ASSERT_TRUE(contains(text_of(db, "SELECT parameters_json FROM runs WHERE run_id = 4"),
                         "\"confidence\":0.95"));
  }
  tamper(ledger_path(), {"runs_no_update"},
         {"UPDATE runs SET parameters_json = replace(parameters_json, '\"confidence\":0.95', "
          "'\"confidence\":0.9') WHERE run_id = 4"});
  const auto lines = expect_mismatch("run 4", "inputs hash");
  EXPECT_TRUE(names(lines, "run 4", "record does not match")) << joined(lines);
  for (const auto& l : lines) EXPECT_EQ(l.rfind("MISMATCH run 4: ", 0), 0u) << l;
}

TEST_F(VerifyLedgerTest, EditedHeadlineFigureBreaksThatRunsRecordHash) {
  tamper(ledger_path(), {"runs_no_update"},
         {"UPDATE runs SET alpha = alpha + 0.000001 WHERE run_id = 5"});
  const auto lines = expect_mismatch("run 5", "record does not match its record hash");
  EXPECT_EQ(lines.size(), 1u) << joined(lines);
}

TEST_F(VerifyLedgerTest, DeletedRunInTheMiddleIsAGapAndABrokenChain) {
  tamper(ledger_path(), {"runs_no_delete", "run_inputs_no_delete", "run_coefficients_no_delete"},
         {"DELETE FROM run_inputs WHERE run_id = 3",
          "DELETE FROM run_coefficients WHERE run_id = 3", "DELETE FROM runs WHERE run_id = 3"});
  const auto lines = expect_mismatch("run 4", "not numbered without gaps: expected run 3");
  EXPECT_TRUE(names(lines, "run 4", "hash chain is broken")) << joined(lines);
}

// The last run has no successor to betray its removal; the chain head printed changes, which is
// what a reader who noted the head compares.
TEST_F(VerifyLedgerTest, DeletedLastRunChangesTheChainHead) {
  const CommandResult before = run_at(ledger(), {"verify"});
  ASSERT_EQ(before.exit_code, 0) << before.out;
  tamper(ledger_path(), {"runs_no_delete", "run_inputs_no_delete", "run_coefficients_no_delete"},
         {"DELETE FROM run_inputs WHERE run_id = 6",
          "DELETE FROM run_coefficients WHERE run_id = 6", "DELETE FROM runs WHERE run_id = 6"});
  const CommandResult after = run_at(ledger(), {"verify"});
  const auto head = [](const std::string& out) {
    const auto at = out.find("chain head ");
    return at == std::string::npos ? std::string() : out.substr(at + 11, 64);
  };
  ASSERT_EQ(head(before.out).size(), 64u) << before.out;
  EXPECT_NE(head(before.out), head(after.out)) << after.out;
  EXPECT_TRUE(contains(after.out, "and 5 runs")) << after.out;
}

TEST_F(VerifyLedgerTest, ReorderedRunsBreakTheirRecordHashes) {
  std::vector<std::string> statements;
  for (const char* table : {"runs", "run_inputs", "run_coefficients"})
    for (const auto& [from, to] : std::vector<std::pair<int, int>>{{2, 1000}, {5, 2}, {1000, 5}})
      statements.push_back(
          fmt::format("UPDATE {} SET run_id = {} WHERE run_id = {}", table, to, from));
  tamper(ledger_path(), {"runs_no_update", "run_inputs_no_update", "run_coefficients_no_update"},
         statements);
  {
    SQLite::Database db(ledger(), SQLite::OPEN_READONLY);
    ASSERT_EQ(text_of(db, "SELECT strategy FROM runs WHERE run_id = 2"), "defensive-tilt");
  }
  const auto lines = expect_mismatch("run 2", "record does not match");
  EXPECT_TRUE(names(lines, "run 5", "record does not match")) << joined(lines);
  EXPECT_TRUE(names(lines, "run 2", "hash chain is broken")) << joined(lines);
}

TEST_F(VerifyLedgerTest, EditedContentHashIsAMismatchOfTheVersionAndOfTheRunsUsingIt) {
  const std::string other = alphatrail::core::sha256_hex("not the observations");
  tamper(ledger_path(), {"series_versions_no_update"},
         {"UPDATE series_versions SET content_hash = '" + other +
          "' WHERE version_id = (SELECT "
          "version_id FROM series_versions JOIN series USING (series_id) WHERE name = "
          "'alder-vale-composite')"});
  const auto lines = expect_mismatch("series alder-vale-composite version 1", "content hash");
  // Every run used the benchmark: each inputs hash no longer matches.
  for (int id = 1; id <= 6; ++id)
    EXPECT_TRUE(names(lines, fmt::format("run {}", id), "inputs hash")) << joined(lines);
}

// Pointing a run at another version of its input breaks its record and its inputs hash.
TEST_F(VerifyLedgerTest, EditedRunInputIsDetected) {
  tamper(ledger_path(), {"run_inputs_no_update"},
         {"UPDATE run_inputs SET version_id = (SELECT version_id FROM series_versions JOIN series "
          "USING (series_id) WHERE name = 'trend-3m') WHERE run_id = 1 AND role = 'strategy'"});
  const auto lines = expect_mismatch("run 1", "record does not match");
  EXPECT_TRUE(names(lines, "run 1", "inputs hash")) << joined(lines);
}

// A version's description is derived from its observations (frequency, first and last date,
// count, missing values) and evaluations depend on it: the frequency decides how the
// benchmark is aligned. Editing it makes every run of the benchmark irreproducible, so verify
// must notice.
TEST_F(VerifyLedgerTest, EditedVersionDescriptionIsDetected) {
  for (const std::string edit : {"frequency = 'quarterly'", "observations = observations - 1",
                                 "first_date = '1990-01-31'", "missing = missing + 3"}) {
    SCOPED_TRACE(edit);
    copy_ledger(base(), ledger_path());
    tamper(ledger_path(), {"series_versions_no_update"},
           {"UPDATE series_versions SET " + edit +
            " WHERE version_id = (SELECT version_id FROM "
            "series_versions JOIN series USING (series_id) WHERE name = 'alder-vale-composite')"});
    if (edit.rfind("frequency", 0) == 0) {  // the premise: the edit changes what a run computes
      const CommandResult reproduce = run_at(ledger(), {"reproduce", "1"});
      EXPECT_NE(reproduce.exit_code, 0) << reproduce.out;
    }
    const CommandResult r = run_at(ledger(), {"verify"});
    EXPECT_EQ(r.exit_code, 7) << "verify passes a ledger whose version description was edited:\n"
                              << r.out;
    EXPECT_TRUE(names(mismatches(r), "series alder-vale-composite version 1", "")) << r.out;
  }
}

// Garbage over one whole page, each page of the file in turn (the middle ones among them):
// verify must fail with 4 (SQLite refuses the file) or 7 (a mismatch) and never crash or
// pass.
std::string xorshift_garbage(std::size_t size) {
  std::string garbage(size, '\0');
  std::uint32_t x = 2463534242u;
  for (auto& c : garbage) {  // the same garbage every time
    x ^= x << 13;
    x ^= x >> 17;
    x ^= x << 5;
    c = static_cast<char>(x & 0xff);
  }
  return garbage;
}

void write_garbage_page(const fs::path& file, std::int64_t page, std::int64_t page_size) {
  const std::string garbage = xorshift_garbage(static_cast<std::size_t>(page_size));
  std::fstream f(file, std::ios::in | std::ios::out | std::ios::binary);
  f.seekp((page - 1) * page_size);
  f.write(garbage.data(), static_cast<std::streamsize>(garbage.size()));
}

std::int64_t page_size_of(const fs::path& ledger) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
  return db.execAndGet("PRAGMA page_size").getInt64();
}

// A copy of a ledger with 4 KiB pages, as every ledger made before new ledgers got 16 KiB
// pages: VACUUM rewrites it page by page (possible outside WAL mode only), content unchanged.
fs::path copy_with_4k_pages(const fs::path& from, const fs::path& to) {
  copy_ledger(from, to);
  SQLite::Database db(to.string(), SQLite::OPEN_READWRITE);
  db.exec("PRAGMA journal_mode = DELETE");
  db.exec("PRAGMA page_size = 4096");
  db.exec("VACUUM");
  db.exec("PRAGMA journal_mode = WAL");
  return to;
}

// Garbage over any one page: verify fails cleanly, refusing the file (exit 4) or reporting
// mismatches (exit 7). With 4 KiB pages both occur: pages SQLite needs to read, and pages only
// the hashes notice; with a new ledger's 16 KiB pages this small ledger has few of the latter.
TEST_F(VerifyLedgerTest, GarbageBytesInTheFileFailWithoutACrash) {
  const fs::path older = copy_with_4k_pages(base(), scratch_ / "older.db");
  ASSERT_EQ(page_size_of(older), 4096);
  for (const fs::path& source : {older, base()}) {
    const std::int64_t page_size = page_size_of(source);
    const std::int64_t pages = static_cast<std::int64_t>(fs::file_size(source)) / page_size;
    ASSERT_GE(pages, 8);
    int refused = 0;
    int mismatched = 0;
    for (std::int64_t page = 1; page <= pages; ++page) {
      SCOPED_TRACE(fmt::format("garbage over page {} of {} ({} bytes)", page, pages, page_size));
      copy_ledger(source, ledger_path());
      write_garbage_page(ledger_path(), page, page_size);
      EXPECT_NE(integrity(ledger_path()), "ok");
      const CommandResult r = run_at(ledger(), {"verify"});
      EXPECT_TRUE(r.exit_code == 4 || r.exit_code == 7) << r.exit_code << "\n" << r.out << r.err;
      EXPECT_FALSE(contains(r.out, "everything checks out")) << r.out;
      EXPECT_EQ(r.err.rfind("alphatrail: error: ", 0), 0u) << r.err;
      (r.exit_code == 4 ? refused : mismatched) += 1;
    }
    EXPECT_GT(refused, 0);
    if (source == older) {
      EXPECT_GT(mismatched, 0);
    }
  }
}

// Every line of a failing report is one finding ("MISMATCH object: problem") or the summary,
// so that scripts can read it line by line.
// Shows control and non-ASCII bytes as \xNN.
std::string escaped(const std::string& text) {
  std::string out;
  for (const char c : text) {
    const auto u = static_cast<unsigned char>(c);
    out += u == '\n'               ? std::string("\n")
           : u >= 0x20 && u < 0x7f ? std::string(1, c)
                                   : fmt::format("\\x{:02x}", u);
  }
  return out;
}

void expect_one_line_per_finding(const CommandResult& r) {
  for (const auto& line : lines_of(r.out)) {
    const bool printable = std::all_of(line.begin(), line.end(), [](char c) {
      return static_cast<unsigned char>(c) >= 0x20 && static_cast<unsigned char>(c) < 0x7f;
    });
    EXPECT_TRUE(printable && (line.rfind("MISMATCH ", 0) == 0 || line.rfind("checked ", 0) == 0))
        << "not a report line: '" << escaped(line) << "' in\n"
        << escaped(r.out);
  }
}

// SQLite's integrity check answers with a header line and the finding below it; the report
// must still hold one finding per line. Garbage over one of the last pages (run rows): the
// file stays readable, so verify reports rather than stops.
TEST_F(VerifyLedgerTest, DamagedFileReportHasOneLinePerFinding) {
  // 4 KiB pages, where garbage over a page can leave a file verify reads to the end.
  const fs::path older = copy_with_4k_pages(base(), scratch_ / "older.db");
  const std::int64_t page_size = page_size_of(older);
  const std::int64_t pages = static_cast<std::int64_t>(fs::file_size(older)) / page_size;
  int reports = 0;
  for (std::int64_t page = pages; page > pages / 2 && reports < 3; --page) {
    copy_ledger(older, ledger_path());
    write_garbage_page(ledger_path(), page, page_size);
    const CommandResult r = run_at(ledger(), {"verify"});
    if (r.exit_code != 7) continue;
    ++reports;
    SCOPED_TRACE(fmt::format("garbage over page {} of {}", page, pages));
    EXPECT_TRUE(names(mismatches(r), "ledger file", "integrity check")) << r.out;
    expect_one_line_per_finding(r);
  }
  EXPECT_GT(reports, 0) << "no damaged page gave a mismatch report";
}

// A stored text printed in the report cannot break a line or forge a finding.
TEST_F(VerifyLedgerTest, StoredTextCannotForgeReportLines) {
  // 64 characters, as the CHECK constraint wants, with a line break and a forged finding.
  std::string forged = "0123\nMISMATCH run 1: forged\x01";
  forged += std::string(64 - forged.size(), 'f');
  tamper(ledger_path(), {"runs_no_update"},
         {"UPDATE runs SET inputs_hash = '" + forged + "' WHERE run_id = 2"});
  const CommandResult r = run_at(ledger(), {"verify"});
  ASSERT_EQ(r.exit_code, 7) << r.out << r.err;
  EXPECT_TRUE(names(mismatches(r), "run 2", "inputs hash")) << r.out;
  expect_one_line_per_finding(r);
}

TEST_F(VerifyLedgerTest, DamagedHeaderOrTruncatedFileFailsWithoutACrash) {
  {
    std::fstream f(ledger_path(), std::ios::in | std::ios::out | std::ios::binary);
    f.write("garbage garbage garbage", 23);
  }
  const CommandResult header = run_at(ledger(), {"verify"});
  EXPECT_EQ(header.exit_code, 4) << header.out << header.err;
  EXPECT_TRUE(contains(header.err, "not an SQLite database")) << header.err;

  copy_ledger(base(), ledger_path());
  fs::resize_file(ledger_path(), fs::file_size(base()) / 2);
  const CommandResult truncated = run_at(ledger(), {"verify"});
  EXPECT_TRUE(truncated.exit_code == 4 || truncated.exit_code == 7)
      << truncated.exit_code << "\n"
      << truncated.out << truncated.err;
  EXPECT_FALSE(contains(truncated.out, "everything checks out")) << truncated.out;
}

// ---------------------------------------------------------------------------------------------
// query

class QueryLedgerTest : public VerifyLedgerTest {
 protected:
  json query_json(const std::string& sql) {
    const CommandResult r = run_at(ledger(), {"query", sql, "--format", "json"});
    EXPECT_EQ(r.exit_code, 0) << sql << ": " << r.err;
    return r.exit_code == 0 ? json::parse(r.out) : json::array();
  }

  // Runs a statement that must be refused, and checks the file did not change at all.
  void expect_refused(const std::string& sql) {
    SCOPED_TRACE(sql);
    checkpoint(ledger_path());  // through a separate connection: everything is in the main file
    const std::string before = sha256_of_file(ledger_path());
    const CommandResult r = run_at(ledger(), {"query", sql});
    EXPECT_EQ(r.exit_code, 2) << r.out << r.err;
    EXPECT_TRUE(contains(r.err, "read-only")) << r.err;
    EXPECT_TRUE(contains(r.err, "nothing changed")) << r.err;
    EXPECT_TRUE(r.out.empty()) << r.out;
    EXPECT_EQ(sha256_of_file(ledger_path()), before);
    const fs::path wal = ledger() + "-wal";
    EXPECT_TRUE(!fs::exists(wal) || fs::file_size(wal) == 0) << "frames left in the WAL";
    // And the content really is intact.
    EXPECT_EQ(query_json("SELECT count(*) AS n FROM runs")[0]["n"], 6);
    EXPECT_EQ(query_json("SELECT count(*) AS n FROM series")[0]["n"], 9);
    EXPECT_EQ(sha256_of_file(ledger_path()), before) << "a read changed the file";
  }
};

TEST_F(QueryLedgerTest, RunSummaryListsTheRunsAsRunsDoes) {
  const json rows = query_json(
      "SELECT run_id, strategy, study, stale, revises_run_id, alpha, beta, observations FROM "
      "run_summary ORDER BY run_id");
  ASSERT_EQ(rows.size(), 6u) << rows.dump();
  const CommandResult runs = run_at(ledger(), {"runs", "--format", "json"});
  ASSERT_EQ(runs.exit_code, 0);
  const json listed = json::parse(runs.out);
  for (std::size_t i = 0; i < rows.size(); ++i) {
    SCOPED_TRACE(rows[i].dump());
    EXPECT_EQ(rows[i]["run_id"], static_cast<int>(i) + 1);
    EXPECT_EQ(rows[i]["strategy"], kStrategies[i]);
    if (i < 3) {
      EXPECT_EQ(rows[i]["study"], "trend-lookbacks");
    } else {
      EXPECT_TRUE(rows[i]["study"].is_null());
    }
    EXPECT_EQ(rows[i]["stale"], 0);
    EXPECT_TRUE(rows[i]["revises_run_id"].is_null());
    EXPECT_EQ(rows[i]["alpha"].get<double>(), listed[i]["alpha"].get<double>());
    EXPECT_EQ(rows[i]["beta"].get<double>(), listed[i]["beta"].get<double>());
    EXPECT_EQ(rows[i]["observations"], 300);
  }
}

TEST_F(QueryLedgerTest, LatestVersionsAndRunInputVersions) {
  const json latest = query_json("SELECT name, kind, version FROM latest_versions ORDER BY name");
  ASSERT_EQ(latest.size(), 9u) << latest.dump();
  EXPECT_EQ(latest[0], json({{"name", "alder-vale-bills"}, {"kind", "rate"}, {"version", 1}}));
  EXPECT_EQ(latest[1],
            json({{"name", "alder-vale-composite"}, {"kind", "benchmark"}, {"version", 1}}));
  EXPECT_EQ(latest[2], json({{"name", "brindle-styles"}, {"kind", "factor"}, {"version", 1}}));
  for (std::size_t i = 3; i < latest.size(); ++i) {
    EXPECT_EQ(latest[i]["kind"], "strategy");
    EXPECT_EQ(latest[i]["version"], 1);
  }

  const json inputs = query_json(
      "SELECT role, position, series, version, latest_version, columns FROM run_input_versions "
      "WHERE run_id = 1 ORDER BY role, position");
  ASSERT_EQ(inputs.size(), 4u) << inputs.dump();
  const json expected = json::parse(R"([
    {"role": "benchmark", "position": 1, "series": "alder-vale-composite", "version": 1, "latest_version": 1, "columns": "alder-vale-composite"},
    {"role": "factor", "position": 1, "series": "brindle-styles", "version": 1, "latest_version": 1, "columns": "size-spread,value-spread"},
    {"role": "rate", "position": 1, "series": "alder-vale-bills", "version": 1, "latest_version": 1, "columns": "1M"},
    {"role": "strategy", "position": 1, "series": "trend-12m", "version": 1, "latest_version": 1, "columns": "trend-12m"}])");
  EXPECT_EQ(inputs, expected) << inputs.dump(1);
}

TEST_F(QueryLedgerTest, ObservationsInJsonCsvAndTable) {
  // The first three index returns, computed here from the demo's CSV levels.
  const auto levels = lines_of(read_file(benchmark_csv()));
  ASSERT_GE(levels.size(), 5u);
  std::vector<std::pair<std::string, double>> expected;
  for (int i = 2; i <= 4; ++i) {
    const auto now = levels[i].find(',');
    const auto before = levels[i - 1].find(',');
    expected.push_back({levels[i].substr(0, now),
                        std::strtod(levels[i].substr(now + 1).c_str(), nullptr) /
                                std::strtod(levels[i - 1].substr(before + 1).c_str(), nullptr) -
                            1});
  }
  const std::string sql =
      "SELECT date, value FROM observations WHERE series = 'alder-vale-composite' AND version = 1 "
      "ORDER BY date LIMIT 3";
  const json rows = query_json(sql);
  ASSERT_EQ(rows.size(), 3u) << rows.dump();
  for (std::size_t i = 0; i < 3; ++i) {
    EXPECT_EQ(rows[i]["date"], expected[i].first);
    EXPECT_EQ(rows[i]["value"].get<double>(), expected[i].second);
  }

  const CommandResult csv = run_at(ledger(), {"query", sql, "--format", "csv"});
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  const auto csv_lines = lines_of(csv.out);
  ASSERT_EQ(csv_lines.size(), 4u) << csv.out;
  EXPECT_EQ(csv_lines[0], "date,value");
  for (std::size_t i = 0; i < 3; ++i) {
    const auto comma = csv_lines[i + 1].find(',');
    EXPECT_EQ(csv_lines[i + 1].substr(0, comma), expected[i].first);
    EXPECT_EQ(std::strtod(csv_lines[i + 1].substr(comma + 1).c_str(), nullptr), expected[i].second)
        << csv_lines[i + 1];
  }

  const CommandResult table = run_at(ledger(), {"query", sql, "--format", "table"});
  ASSERT_EQ(table.exit_code, 0) << table.err;
  const auto table_lines = lines_of(table.out);
  ASSERT_EQ(table_lines.size(), 5u) << table.out;
  EXPECT_EQ(table_lines[0].rfind("date", 0), 0u) << table.out;
  EXPECT_TRUE(contains(table_lines[0], "value")) << table.out;
  EXPECT_EQ(table_lines[1].find_first_not_of("- "), std::string::npos) << table.out;
  for (std::size_t i = 0; i < 3; ++i) {
    std::istringstream in(table_lines[i + 2]);
    std::string date;
    double value = 0;
    in >> date >> value;
    EXPECT_EQ(date, expected[i].first);
    EXPECT_NEAR(value, expected[i].second, 1e-12);
  }
  // The default format is the table.
  EXPECT_EQ(run_at(ledger(), {"query", sql}).out, table.out);
}

TEST_F(QueryLedgerTest, NullsAndErrors) {
  const json nulls = query_json("SELECT NULL AS x, 1 AS y");
  EXPECT_EQ(nulls, json::parse(R"([{"x": null, "y": 1}])"));
  const CommandResult csv =
      run_at(ledger(), {"query", "SELECT NULL AS x, 'a,b' AS y", "--format", "csv"});
  EXPECT_EQ(csv.out, "x,y\n,\"a,b\"\n");
  const CommandResult table = run_at(ledger(), {"query", "SELECT NULL AS x"});
  EXPECT_TRUE(contains(table.out, "NULL")) << table.out;
  const CommandResult bad = run_at(ledger(), {"query", "SELECT * FROM no_such_table"});
  EXPECT_EQ(bad.exit_code, 2) << bad.err;
  EXPECT_TRUE(contains(bad.err, "query failed")) << bad.err;
  EXPECT_TRUE(contains(bad.err, "no_such_table")) << bad.err;
}

TEST_F(QueryLedgerTest, DeleteIsRefusedAndTheFileIsUnchanged) {
  expect_refused("DELETE FROM runs");
}

TEST_F(QueryLedgerTest, CreateTableIsRefusedAndTheFileIsUnchanged) {
  expect_refused("CREATE TABLE x(a)");
}

TEST_F(QueryLedgerTest, UpdateIsRefusedAndTheFileIsUnchanged) {
  expect_refused("UPDATE series SET name = 'x'");
}

TEST_F(QueryLedgerTest, OtherWritesAreRefusedAndTheFileIsUnchanged) {
  expect_refused("INSERT INTO series (name, kind, created_at) VALUES ('x', 'strategy', 'now')");
  expect_refused("DROP VIEW run_summary");
  expect_refused("PRAGMA user_version = 99");
  expect_refused("  delete from run_coefficients -- lower case, leading space, a comment");
}

// A text of two statements is refused before either runs: a write after a read is never
// executed.
TEST_F(QueryLedgerTest, SecondStatementIsNeverRun) {
  checkpoint(ledger_path());
  const std::string before = sha256_of_file(ledger_path());
  const CommandResult r =
      run_at(ledger(), {"query", "SELECT 1 AS one; DROP TABLE runs", "--format", "json"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_TRUE(contains(r.err, "query runs one SQL statement")) << r.err;
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(sha256_of_file(ledger_path()), before);
  EXPECT_EQ(query_json("SELECT count(*) AS n FROM runs")[0]["n"], 6);
}

}  // namespace
