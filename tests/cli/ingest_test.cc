// Command-level tests of `alphatrail ingest`: every validation path (exit code, the exact
// FILE:LINE:COLUMN prefix, the fix, and a ledger left exactly as it was), versioning, unit
// handling read back through the observations view, and all-or-nothing storage.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <fcntl.h>
#include <fmt/format.h>
#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cmath>
#include <csignal>
#include <filesystem>
#include <optional>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "store/ledger.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_program;
using alphatrail::testing::ScratchDir;

// Three month-end returns; the seed every rejected ingest must leave alone.
constexpr const char* kSeedCsv =
    "date,seed\n"
    "2021-01-31,0.01\n"
    "2021-02-28,-0.005\n"
    "2021-03-31,0.012\n";

// Returns the schema and every row of every table, in rowid order, as text: two dumps are
// equal exactly when the ledger's content is.
std::string dump_ledger(const fs::path& path) {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  std::ostringstream out;
  out << "user_version " << db.execAndGet("PRAGMA user_version").getInt() << '\n';
  out << "application_id " << db.execAndGet("PRAGMA application_id").getInt() << '\n';
  // The schema as a short digest (its text would drown a failure message), then every row.
  for (const char* sql :
       {"SELECT count(*), total(length(sql)), group_concat(name) FROM sqlite_master",
        "SELECT * FROM series ORDER BY rowid", "SELECT * FROM series_versions ORDER BY rowid",
        "SELECT * FROM version_columns ORDER BY rowid"}) {
    SQLite::Statement q(db, sql);
    while (q.executeStep()) {
      for (int i = 0; i < q.getColumnCount(); ++i) {
        const SQLite::Column c = q.getColumn(i);
        out << (i > 0 ? "|" : "") << (c.isNull() ? std::string("NULL") : c.getString());
      }
      out << '\n';
    }
  }
  return out.str();
}

std::string integrity(const fs::path& path) {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  return db.execAndGet("PRAGMA integrity_check").getString();
}

long long count(const fs::path& path, const std::string& sql) {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  return db.execAndGet(sql).getInt64();
}

std::string text(const fs::path& path, const std::string& sql) {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  const SQLite::Column c = db.execAndGet(sql);
  return c.isNull() ? "NULL" : c.getString();
}

struct Observation {
  std::string date;
  std::optional<double> value;  // nullopt: NULL in the view
};

// Reads one version of a series (one column) back through the observations view.
std::vector<Observation> observations(const fs::path& path, const std::string& series, int version,
                                      const std::string& column = "") {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  SQLite::Statement q(db,
                      "SELECT date, value FROM observations WHERE series = ? AND version = ? "
                      "AND (? = '' OR column_name = ?) ORDER BY date");
  q.bind(1, series);
  q.bind(2, version);
  q.bind(3, column);
  q.bind(4, column);
  std::vector<Observation> out;
  while (q.executeStep()) {
    Observation o{q.getColumn(0).getString(), std::nullopt};
    if (!q.getColumn(1).isNull()) o.value = q.getColumn(1).getDouble();
    out.push_back(o);
  }
  return out;
}

// A header "date,s01,...,sNN" and `rows` month-end rows of small returns.
std::string wide_csv(int columns, int rows, const std::string& prefix = "s") {
  std::string csv = "date";
  // fmt::format, not "," + ... + std::to_string(c): GCC 12 warns falsely on that (-Wrestrict).
  for (int c = 1; c <= columns; ++c) csv += fmt::format(",{}{:02}", prefix, c);
  csv += '\n';
  const char* dates[] = {"2021-01-31", "2021-02-28", "2021-03-31", "2021-04-30", "2021-05-31"};
  for (int r = 0; r < rows; ++r) {
    csv += dates[r];
    for (int c = 1; c <= columns; ++c) csv += fmt::format(",{}e-4", c);
    csv += '\n';
  }
  return csv;
}

class IngestTest : public ::testing::Test {
 protected:
  // Runs `alphatrail --ledger LEDGER ingest ARGS...`.
  CommandResult ingest(const std::vector<std::string>& args) const {
    return ingest_into(ledger_, args);
  }
  CommandResult ingest_into(const fs::path& ledger, const std::vector<std::string>& args) const {
    std::vector<std::string> all{"--ledger", ledger.string(), "ingest"};
    all.insert(all.end(), args.begin(), args.end());
    return run_alphatrail(all);
  }
  std::string write(const std::string& name, const std::string& content) const {
    return dir_.write(name, content).string();
  }
  // Creates the ledger holding the strategy 'seed'.
  void seed() const {
    const CommandResult r = ingest({"strategy", write("seed.csv", kSeedCsv)});
    ASSERT_EQ(r.exit_code, 0) << r.err;
  }

  // Checks that an ingest fails with exit 3, stderr starting with the error prefix (usually
  // "FILE:LINE:COLUMN: problem") and naming the fix, and writes nothing: a seeded ledger keeps
  // its exact content and a missing ledger is not created.
  void expect_rejected(const std::vector<std::string>& args, const std::string& prefix,
                       const std::string& fix_word) const {
    seed();
    const std::string before = dump_ledger(ledger_);
    const CommandResult r = ingest(args);
    EXPECT_EQ(r.exit_code, 3) << r.err;
    EXPECT_EQ(r.err.rfind("alphatrail: error: " + prefix, 0), 0u) << r.err;
    EXPECT_TRUE(contains(r.err, fix_word)) << r.err;
    EXPECT_EQ(r.out, "");
    EXPECT_EQ(dump_ledger(ledger_), before);
    EXPECT_EQ(integrity(ledger_), "ok");

    const fs::path absent = dir_ / "absent.db";
    const CommandResult again = ingest_into(absent, args);
    EXPECT_EQ(again.exit_code, 3) << again.err;
    EXPECT_FALSE(fs::exists(absent)) << "a failing ingest created the ledger";
  }

  ScratchDir dir_;
  fs::path ledger_ = dir_ / "ledger.db";
};

// "FILE:LINE:COLUMN: " for a cell, "FILE:LINE: " for a row, "FILE: " for the whole file.
std::string at(const std::string& file, long line = 0, long column = 0) {
  std::string s = file;
  if (line > 0) s += fmt::format(":{}", line);  // (not ":" + std::to_string: GCC 12 -Wrestrict)
  if (column > 0) s += fmt::format(":{}", column);
  return s + ": ";
}

// --- validation paths --------------------------------------------------------------------

TEST_F(IngestTest, MissingFileIsRejected) {
  const std::string file = (dir_ / "nowhere.csv").string();
  expect_rejected({"strategy", file}, at(file) + "no such file", "check the path");
}

TEST_F(IngestTest, UnreadableFileIsRejected) {
  const std::string file = write("locked.csv", kSeedCsv);
  fs::permissions(file, fs::perms::none);
  if (access(file.c_str(), R_OK) == 0) {
    fs::permissions(file, fs::perms::owner_all);
    GTEST_SKIP() << "running as a user who reads files regardless of permissions (root)";
  }
  expect_rejected({"strategy", file}, at(file) + "cannot be read", "permissions");
  fs::permissions(file, fs::perms::owner_all);
}

TEST_F(IngestTest, FolderIsRejected) {
  fs::create_directory(dir_ / "folder.csv");
  const std::string file = (dir_ / "folder.csv").string();
  expect_rejected({"strategy", file}, at(file) + "is a folder, not a file", "CSV file");
}

TEST_F(IngestTest, EmptyFileIsRejected) {
  const std::string file = write("empty.csv", "");
  expect_rejected({"strategy", file}, at(file) + "the file is empty", "header row");
}

TEST_F(IngestTest, HeaderWithoutRowsIsRejected) {
  const std::string file = write("header.csv", "date,a\n");
  expect_rejected({"strategy", file}, at(file) + "the file has a header but no data rows",
                  "one row per date");
}

TEST_F(IngestTest, MissingHeaderIsRejected) {
  const std::string file = write("noheader.csv", "2021-01-31,0.01\n2021-02-28,0.02\n");
  expect_rejected({"strategy", file},
                  at(file, 1, 1) + "the first row starts with the date 2021-01-31", "header row");
}

TEST_F(IngestTest, RaggedRowIsRejected) {
  const std::string file =
      write("ragged.csv", "date,a\n2021-01-31,0.01\n2021-02-28,0.02,0.03\n2021-03-31,0.01\n");
  expect_rejected({"strategy", file}, at(file, 3) + "the row has 3 fields but the header has 2",
                  "one field per header column");
}

TEST_F(IngestTest, BlankLineBetweenRowsIsRejected) {
  const std::string file = write("blank.csv", "date,a\n2021-01-31,0.01\n\n2021-03-31,0.01\n");
  expect_rejected({"strategy", file}, at(file, 3) + "the line is blank", "remove the blank line");
}

TEST_F(IngestTest, UnparseableDateIsRejected) {
  const std::string file = write("baddate.csv", "date,a\n2021-01-31,0.01\n31/02/2021,0.02\n");
  expect_rejected({"strategy", file}, at(file, 3, 1) + "'31/02/2021' is not a date", "YYYY-MM-DD");
}

TEST_F(IngestTest, EmptyDateIsRejected) {
  const std::string file = write("nodate.csv", "date,a\n2021-01-31,0.01\n,0.02\n");
  expect_rejected({"strategy", file}, at(file, 3, 1) + "the date is empty", "fill in the date");
}

TEST_F(IngestTest, ImpossibleCalendarDateIsRejected) {
  const std::string file = write("feb30.csv", "date,a\n2021-01-31,0.01\n2021-02-30,0.02\n");
  expect_rejected({"strategy", file}, at(file, 3, 1) + "2021-02-30 is not a calendar date",
                  "check the day and the month");
}

TEST_F(IngestTest, DuplicateDateIsRejected) {
  const std::string file =
      write("dup.csv", "date,a\n2021-01-31,0.01\n2021-02-28,0.02\n2021-01-31,0.03\n");
  expect_rejected({"strategy", file},
                  at(file, 4, 1) + "date 2021-01-31 appears again; first on line 2",
                  "one row per date");
}

TEST_F(IngestTest, MixedDateFormsAreRejected) {
  const std::string file = write("mixed.csv", "date,a\n2021-01,0.01\n2021-02-28,0.02\n");
  expect_rejected({"strategy", file}, at(file, 3, 1) + "2021-02-28 is a full date but line 2",
                  "one form");
}

TEST_F(IngestTest, UnparseableNumberIsRejected) {
  const std::string file =
      write("word.csv", "date,a,b\n2021-01-31,0.01,0.02\n2021-02-28,0.02,abc\n");
  expect_rejected({"strategy", file}, at(file, 3, 3) + "'abc' is not a number", "plain numbers");
}

TEST_F(IngestTest, PercentSignIsRejected) {
  const std::string file = write("sign.csv", "date,a\n2021-01-31,1.5%\n2021-02-28,2%\n");
  expect_rejected({"strategy", file}, at(file, 2, 2) + "'1.5%' is not a number", "--percent");
}

TEST_F(IngestTest, NanIsRejected) {
  const std::string file = write("nan.csv", "date,a\n2021-01-31,0.01\n2021-02-28,NaN\n");
  expect_rejected({"strategy", file}, at(file, 3, 2) + "'NaN' is not a finite number", "NA");
}

TEST_F(IngestTest, InfinityIsRejected) {
  const std::string file = write("inf.csv", "date,a\n2021-01-31,-inf\n2021-02-28,0.01\n");
  expect_rejected({"strategy", file}, at(file, 2, 2) + "'-inf' is not a finite number", "NA");
}

TEST_F(IngestTest, OverflowingNumberIsRejected) {
  const std::string file = write("huge.csv", "date,a\n2021-01-31,0.01\n2021-02-28,1e999\n");
  expect_rejected({"strategy", file}, at(file, 3, 2) + "'1e999' is not a finite number", "NA");
}

TEST_F(IngestTest, ReturnOfMinusOneHundredPercentIsRejected) {
  const std::string file = write("wipeout.csv", "date,a\n2021-01-31,0.01\n2021-02-28,-1\n");
  expect_rejected({"strategy", file}, at(file, 3, 2) + "return -1 is -100% or less", "--percent");
}

TEST_F(IngestTest, PercentReturnBelowMinusOneHundredIsRejected) {
  const std::string file = write("wipeout-pct.csv", "date,a\n2021-01-31,1.5\n2021-02-28,-100.5\n");
  expect_rejected({"strategy", file, "--percent"},
                  at(file, 3, 2) + "return -100.5% is -100% or less", "check the value");
}

TEST_F(IngestTest, LevelOfZeroIsRejected) {
  const std::string file = write("zero.csv", "date,px\n2021-01-31,100\n2021-02-28,0\n");
  expect_rejected({"strategy", file, "--levels"}, at(file, 3, 2) + "level 0 is zero or below",
                  "must be positive");
}

TEST_F(IngestTest, NegativeLevelIsRejected) {
  const std::string file = write("negative.csv", "date,px\n2021-01-31,100\n2021-02-28,-3\n");
  expect_rejected({"strategy", file, "--levels"}, at(file, 3, 2) + "level -3 is zero or below",
                  "--levels");
}

TEST_F(IngestTest, LevelsGivingAReturnThatCannotBeStoredAreRejected) {
  // Every level is positive and finite, but 100 -> 1e-300 is a return of -1 (-100%) and
  // 1e-300 -> 1e300 overflows: stored, they made invalid JSON and a version that never verifies.
  const std::string file =
      write("l.csv", "month,lvl\n2020-01,100\n2020-02,1e-300\n2020-03,1e300\n2020-04,100\n");
  expect_rejected(
      {"strategy", file, "--levels"},
      at(file, 3, 2) + "level 1e-300 after 100 on line 2 gives a return of -100% or less",
      "above -100%");
  // Into a ledger that did not exist: nothing stored, so no file either.
  const fs::path fresh = dir_ / "fresh.db";
  const CommandResult r = ingest_into(fresh, {"strategy", file, "--levels"});
  EXPECT_EQ(r.exit_code, 3) << r.err;
  EXPECT_TRUE(contains(r.err, "l.csv:3:2: ")) << r.err;
  EXPECT_FALSE(fs::exists(fresh));
  // The overflow alone is reported on the level that caused it.
  const std::string overflow = write("o.csv", "month,lvl\n2020-01,1e-300\n2020-02,1e300\n");
  expect_rejected({"strategy", overflow, "--levels"},
                  at(overflow, 3, 2) +
                      "level 1e+300 after 1e-300 on line 2 gives a return too "
                      "large to represent",
                  "check the levels");
}

TEST_F(IngestTest, ReturnAboveOneThousandPercentNeedsTheOption) {
  const std::string file =
      write("huge.csv", "date,a\n2021-01-31,0.01\n2021-02-28,1e300\n2021-03-31,-0.02\n");
  expect_rejected({"strategy", file},
                  at(file, 3, 2) + "return 1e+300 (+1e+302%) is above +1,000% in one period",
                  "--allow-large-returns");
  const std::string factors =
      write("ff.csv", "date,smb,hml\n2021-01-31,0.01,0.02\n2021-02-28,0.01,25\n2021-03-31,0,0\n");
  expect_rejected({"factor", factors, "--name", "ff"},
                  at(factors, 3, 3) + "return 25 (+2500%) is above +1,000% in one period",
                  "--allow-large-returns");
  const std::string levels = write("px.csv", "date,px\n2021-01-31,100\n2021-02-28,5000\n");
  expect_rejected({"benchmark", levels, "--levels"},
                  at(levels, 3, 2) + "level 5000 after 100 on line 2 gives a return of +4900%",
                  "--allow-large-returns");

  // Confirmed, the value is stored as it is.
  const CommandResult r = ingest({"strategy", file, "--allow-large-returns"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  ASSERT_EQ(observations(ledger_, "a", 1).size(), 3u);
  EXPECT_EQ(*observations(ledger_, "a", 1)[1].value, 1e300);
  // Rates are no returns: their plausible range decides, with or without the option.
  const std::string rate = write("rate.csv", "date,1M\n2021-01-31,4\n2021-02-28,1e300\n");
  expect_rejected({"rate", rate, "--name", "bills"},
                  at(rate, 3, 2) + "rate 1e300 is outside the plausible range", "--decimal");
  const CommandResult option = ingest({"rate", rate, "--name", "bills", "--allow-large-returns"});
  EXPECT_EQ(option.exit_code, 2) << option.err;
  EXPECT_TRUE(contains(option.err, "--allow-large-returns")) << option.err;
}

TEST_F(IngestTest, PercentLookingValuesWithoutPercentAreRejected) {
  // Median |value| (1.5 + 2) / 2 = 1.75 > 1 with mixed signs: percent returns, not decimals.
  const std::string file = write("pct.csv",
                                 "date,d,a\n2021-01-31,0.01,1.5\n2021-02-28,0.02,-0.5\n"
                                 "2021-03-31,0.03,3.25\n2021-04-30,0.01,2.0\n");
  expect_rejected({"strategy", file}, at(file, 1, 3) + "column 'a' looks like percent",
                  "pass --percent");
}

TEST_F(IngestTest, LevelLookingValuesWithoutLevelsAreRejected) {
  const std::string file = write("px.csv", "date,a\n2021-01-31,100\n2021-02-28,101.5\n");
  expect_rejected({"strategy", file}, at(file, 1, 2) + "column 'a' looks like levels", "--levels");
}

TEST_F(IngestTest, ImplausibleRateIsRejected) {
  const std::string file = write("rate.csv", "date,3M\n2021-01-31,0.05\n2021-02-28,75\n");
  expect_rejected({"rate", file, "--name", "tbill"},
                  at(file, 3, 2) + "rate 75 is outside the plausible range -5 to 50 (percent)",
                  "--decimal");
}

TEST_F(IngestTest, ImplausibleDecimalRateIsRejected) {
  // 5 as a decimal yield is 500%: the file states percent.
  const std::string file = write("rate.csv", "date,3M\n2021-01-31,0.05\n2021-02-28,5\n");
  expect_rejected({"rate", file, "--name", "tbill", "--decimal"},
                  at(file, 3, 2) + "rate 5 is outside the plausible range -0.05 to 0.5 (decimal)",
                  "leave out --decimal");
}

TEST_F(IngestTest, RateColumnThatIsNotATenorIsRejected) {
  const std::string file = write("rate.csv", "date,bill\n2021-01-31,0.05\n");
  expect_rejected({"rate", file, "--name", "tbill"},
                  at(file, 1, 2) + "rate column 'bill' is not a tenor", "--tenor");
}

TEST_F(IngestTest, ColumnsNamingAMissingColumnAreRejected) {
  const std::string file = write("cols.csv", "date,a,b\n2021-01-31,0.01,0.02\n");
  expect_rejected({"strategy", file, "--columns", "a,zzz"},
                  at(file, 1) + "no column named 'zzz'; the header has: date, a, b", "--columns");
}

TEST_F(IngestTest, MissingDateColumnIsRejected) {
  const std::string file = write("cols.csv", "when,a\n2021-01-31,0.01\n");
  expect_rejected({"strategy", file, "--date-column", "date"},
                  at(file, 1) + "no column named 'date'; the header has: when, a", "--date-column");
}

TEST_F(IngestTest, FileWithoutValueColumnsIsRejected) {
  const std::string file = write("dates.csv", "date\n2021-01-31\n2021-02-28\n");
  expect_rejected({"strategy", file}, at(file, 1) + "the header names only the date column",
                  "add a column");
}

TEST_F(IngestTest, ColumnWithoutValuesIsRejected) {
  const std::string file = write("hollow.csv", "date,a,b\n2021-01-31,0.01,\n2021-02-28,0.02,NA\n");
  expect_rejected({"strategy", file}, at(file, 1, 3) + "column 'b' has no values", "--columns");
}

TEST_F(IngestTest, DuplicateColumnNameIsRejected) {
  const std::string file = write("twice.csv", "date,a,a\n2021-01-31,0.01,0.02\n");
  expect_rejected({"strategy", file}, at(file, 1, 3) + "column name 'a' appears twice",
                  "unique name");
}

TEST_F(IngestTest, UnclosedQuoteIsRejected) {
  const std::string file = write("quote.csv", "date,a\n2021-01-31,\"0.01\n2021-02-28,0.02\n");
  expect_rejected({"strategy", file}, at(file, 2, 2) + "a quoted field is never closed",
                  "closing quote");
}

TEST_F(IngestTest, NameForSeveralColumnsIsRejected) {
  const std::string file = write("two.csv", "date,a,b\n2021-01-31,0.01,0.02\n");
  expect_rejected({"strategy", file, "--name", "x"}, at(file) + "a new name fits a single series",
                  "--columns");
}

TEST_F(IngestTest, FactorAndRateFilesNeedAName) {
  seed();
  const std::string before = dump_ledger(ledger_);
  const std::string factors = write("ff.csv", "date,mkt_rf,smb\n2021-01-31,0.01,0.002\n");
  const std::string rates = write("r.csv", "date,3M\n2021-01-31,0.05\n");
  for (const auto& args :
       std::vector<std::vector<std::string>>{{"factor", factors}, {"rate", rates}}) {
    const CommandResult r = ingest(args);
    EXPECT_EQ(r.exit_code, 2) << args[0] << ": " << r.err;
    EXPECT_TRUE(contains(r.err, "--name")) << r.err;
    EXPECT_EQ(dump_ledger(ledger_), before);
  }
}

TEST_F(IngestTest, ConflictingUnitOptionsAreUsageErrors) {
  seed();
  const std::string before = dump_ledger(ledger_);
  const std::string file = write("a.csv", "date,a\n2021-01-31,0.01\n");
  for (const auto& args :
       std::vector<std::vector<std::string>>{{"strategy", file, "--percent", "--levels"},
                                             {"strategy", file, "--decimal"},
                                             {"strategy", file, "--quote", "discount"},
                                             {"strategy", file, "--tenor", "3M"},
                                             {"rate", file, "--name", "r", "--levels"},
                                             {"bond", file}}) {
    const CommandResult r = ingest(args);
    EXPECT_EQ(r.exit_code, 2) << args[0] << " " << args.back() << ": " << r.err;
    EXPECT_EQ(dump_ledger(ledger_), before);
  }
}

TEST_F(IngestTest, DeviceWithoutASizeIsAnInputErrorNotACrash) {
  // /dev/null exists and is no folder, but has no file size: reading it must end in an input
  // error (exit 3), never in an internal error (exit 1).
  expect_rejected({"strategy", "/dev/null"}, "/dev/null: ", "");
}

TEST_F(IngestTest, HeaderNameWithALineBreakIsRejected) {
  // A quoted header cell may hold a line break, but a series or column name may not: it could
  // not be typed on the command line, would break the table output, and makes the content
  // hash ambiguous ("column: NAME\nJSON\n" lines could be forged by such a name).
  const std::string file = write("nl.csv", "date,\"x\ny\"\n2021-01-31,0.01\n");
  expect_rejected({"factor", file, "--name", "ff"}, at(file, 1, 2), "name");
}

// --- stored text: UTF-8 without control characters ---------------------------------------

// A file header in Latin-1 (e9 is é there) was stored, after which every JSON output of the
// ledger failed: nothing stored may be text a JSON writer cannot write.
TEST_F(IngestTest, HeaderNameThatIsNotUtf8IsRejected) {
  const std::string file = write("latin1.csv", "date,caf\xe9-strat\n2021-01-31,0.01\n");
  expect_rejected({"strategy", file},
                  at(file, 1, 2) + "column name 'caf\\xe9-strat': byte 4 is not valid UTF-8 (0xe9)",
                  "save the file as UTF-8");
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series"), 1);  // the seed only
  // Each class of ill-formed UTF-8, a C1 control and white space that trimming leaves, in the
  // column names of a factor set (they become the terms of every run).
  const struct {
    const char* name;
    const char* problem;
  } cases[] = {
      {"hml\xc0\xaf",
       "column name 'hml\\xc0\\xaf': byte 4 is not valid UTF-8 (0xc0 0xaf, an "
       "overlong encoding)"},
      {"\xed\xa0\x80x",
       "column name '\\xed\\xa0\\x80x': byte 1 is not valid UTF-8 (0xed 0xa0 "
       "0x80, a surrogate (U+D800))"},
      {"x\xf4\x90\x80\x80",
       "column name 'x\\xf4\\x90\\x80\\x80': byte 2 is not valid UTF-8 "
       "(0xf4 0x90 0x80 0x80, above U+10FFFF)"},
      {"a\xc2\x85"
       "b",
       "column name 'a\\u0085b': byte 2 is a control character (U+0085)"},
      {"hml\xc2\xa0",
       "column name 'hml\xc2\xa0': the name ends with white space (U+00A0 at "
       "byte 4)"},
  };
  for (const auto& c : cases) {
    const std::string f =
        write("ff.csv", std::string("date,smb,") + c.name + "\n2021-01-31,0.01,0.02\n");
    expect_rejected({"factor", f, "--name", "ff"}, at(f, 1, 3) + c.problem, "rename the column");
  }
}

class IngestTextTest : public IngestTest {
 protected:
  // Checks that an ingest fails as a usage error (exit 2) with exactly `message`, before the
  // ledger is opened: a seeded ledger keeps its content and a missing one is not created.
  void expect_usage_error(const std::vector<std::string>& args, const std::string& message) {
    seed();
    const std::string before = dump_ledger(ledger_);
    const CommandResult r = ingest(args);
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_EQ(r.err, "alphatrail: error: " + message + "\n");
    EXPECT_EQ(r.out, "");
    EXPECT_EQ(dump_ledger(ledger_), before);
    const fs::path absent = dir_ / "absent.db";
    EXPECT_EQ(ingest_into(absent, args).exit_code, 2);
    EXPECT_FALSE(fs::exists(absent)) << "a refused ingest created the ledger";
  }
};

TEST_F(IngestTextTest, OptionTextThatIsNotUtf8OrHoldsControlsIsAUsageError) {
  const std::string file = write("a.csv", "date,a\n2021-01-31,0.01\n");
  const std::string rates = write("r.csv", "date,x\n2021-01-31,4\n");
  const std::string utf8 = " (write the text in UTF-8)";
  const std::string one_line =
      " (leave out control characters, tabs and line breaks: the text must fit on one line)";
  expect_usage_error({"strategy", file, "--note", "revis\xe9"},
                     "--note: byte 6 is not valid UTF-8 (0xe9)" + utf8);
  expect_usage_error({"strategy", file, "--note", "two\nlines"},
                     "--note: byte 4 is a control character (U+000A, a line break)" + one_line);
  expect_usage_error({"strategy", file, "--name", "caf\xe9"},
                     "--name: byte 4 is not valid UTF-8 (0xe9)" + utf8);
  expect_usage_error({"factor", file, "--name", "f\x1b[31m"},
                     "--name: byte 2 is a control character (U+001B)" + one_line);
  expect_usage_error({"rate", rates, "--name", "bills", "--tenor", "1M\t"},
                     "--tenor: byte 3 is a control character (U+0009, a tab)" + one_line);
  const std::string latin1_path = write("caf\xe9.csv", "date,a\n2021-01-31,0.01\n");
  expect_usage_error({"strategy", latin1_path},
                     "file '" + (dir_ / "caf\\xe9.csv").string() + "': byte " +
                         std::to_string((dir_ / "caf").string().size() + 1) +
                         " of the path is not valid UTF-8 (0xe9) (the ledger records the path: "
                         "rename the file, or link to it under a name in UTF-8)");
}

TEST_F(IngestTextTest, BlankNamesAndNamesWithWhiteSpaceAroundThemAreUsageErrors) {
  const std::string file = write("a.csv", "date,a\n2021-01-31,0.01\n");
  const std::string blank = "the name is blank (give a name with at least one visible character)";
  expect_usage_error({"strategy", file, "--name", "   "}, "--name: " + blank);
  expect_usage_error({"factor", file, "--name", " "}, "--name: " + blank);
  expect_usage_error({"rate", file, "--name", "\xc2\xa0"}, "--name: " + blank);
  expect_usage_error({"strategy", file, "--name", " momentum"},
                     "--name: the name begins with white space (U+0020 at byte 1) (remove the "
                     "white space around the name)");
  expect_usage_error({"factor", file, "--name", "ff "},
                     "--name: the name ends with white space (U+0020 at byte 3) (remove the "
                     "white space around the name)");
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series WHERE trim(name) = ''"), 0);
}

TEST_F(IngestTextTest, Utf8NamesAndNotesAreStoredAsTheyAre) {
  const std::string file = write("cafe.csv",
                                 "date,caf\xc3\xa9-strat,\xe6\x97\xa5\xe6\x9c\xac\n"
                                 "2021-01-31,0.01,0.02\n2021-02-28,0.02,0.03\n");
  const CommandResult r =
      ingest({"strategy", file, "--note", "r\xc3\xa9vis\xc3\xa9 \xe2\x80\x94 from the desk"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(text(ledger_, "SELECT group_concat(name, ',') FROM series"),
            "caf\xc3\xa9-strat,\xe6\x97\xa5\xe6\x9c\xac");
  EXPECT_EQ(text(ledger_, "SELECT DISTINCT note FROM series_versions"),
            "r\xc3\xa9vis\xc3\xa9 \xe2\x80\x94 from the desk");
  const CommandResult json =
      run_alphatrail({"--ledger", ledger_.string(), "series", "--format", "json"});
  EXPECT_EQ(json.exit_code, 0) << json.err;
  EXPECT_TRUE(contains(json.out, "caf\xc3\xa9-strat")) << json.out;
}

// $USER is stored as who ingested; a name a JSON writer cannot write is stored escaped.
TEST_F(IngestTextTest, UserNameThatIsNotUtf8IsStoredEscaped) {
  const std::string file = write("a.csv", "date,a\n2021-01-31,0.01\n");
  // env(1) replaces USER; run_alphatrail's env would add a second one after the first.
  const CommandResult r = run_program({"/usr/bin/env", "USER=caf\xe9", ALPHATRAIL_BINARY,
                                       "--ledger", ledger_.string(), "ingest", "strategy", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(text(ledger_, "SELECT ingested_by FROM series_versions"), "caf\\xe9");
  const CommandResult json =
      run_alphatrail({"--ledger", ledger_.string(), "series", "a", "--format", "json"});
  EXPECT_EQ(json.exit_code, 0) << json.err;
}

// --- accepted files ----------------------------------------------------------------------

TEST_F(IngestTest, DatesOutOfOrderAreSortedWithANote) {
  const std::string file =
      write("unsorted.csv", "date,a\n2021-03-31,0.03\n2021-01-31,0.01\n2021-02-28,0.02\n");
  const CommandResult r = ingest({"strategy", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.err,
                       "alphatrail: note: dates were out of order and have been sorted "
                       "(line 3 has 2021-01-31 after 2021-03-31)\n"))
      << r.err;
  const auto obs = observations(ledger_, "a", 1);
  ASSERT_EQ(obs.size(), 3u);
  EXPECT_EQ(obs[0].date, "2021-01-31");
  EXPECT_DOUBLE_EQ(*obs[0].value, 0.01);
  EXPECT_EQ(obs[1].date, "2021-02-28");
  EXPECT_DOUBLE_EQ(*obs[1].value, 0.02);
  EXPECT_EQ(obs[2].date, "2021-03-31");
  EXPECT_DOUBLE_EQ(*obs[2].value, 0.03);
  EXPECT_EQ(text(ledger_, "SELECT values_json FROM version_columns"),
            R"({"2021-01-31":0.01,"2021-02-28":0.02,"2021-03-31":0.03})");
}

TEST_F(IngestTest, SortedFileHasNoNote) {
  const std::string file = write("sorted.csv", kSeedCsv);
  const CommandResult r = ingest({"strategy", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_FALSE(contains(r.err, "note:")) << r.err;
}

TEST_F(IngestTest, NewVersionOnlyWhenContentChanges) {
  const std::string v1 = write("fund.csv", "date,fund\n2021-01-31,0.01\n2021-02-28,-0.005\n");
  CommandResult r = ingest({"strategy", v1});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const std::string hash1 = text(ledger_, "SELECT content_hash FROM series_versions");
  EXPECT_EQ(r.out, "strategy fund: version 1, new series (" + hash1.substr(0, 12) + ")\n" + v1 +
                       ": 1 new version, 0 unchanged\n");

  // The same file again: nothing is written.
  const std::string after_first = dump_ledger(ledger_);
  r = ingest({"strategy", v1});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out, "strategy fund: unchanged (version 1, " + hash1.substr(0, 12) + ")\n" + v1 +
                       ": 0 new versions, 1 unchanged\n");
  EXPECT_EQ(dump_ledger(ledger_), after_first);

  // Other bytes, same content (CRLF, a trailing zero, spaces): still unchanged, because the
  // hash covers the canonical content, not the file.
  const std::string same =
      write("fund-copy.csv", "date,fund\r\n2021-01-31, 0.010\r\n2021-02-28,-0.0050 \r\n");
  r = ingest({"strategy", same});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.out, "strategy fund: unchanged (version 1")) << r.out;
  EXPECT_EQ(dump_ledger(ledger_), after_first);

  // A changed value: version 2, version 1 kept as it was.
  const std::string v2 = write("fund-v2.csv", "date,fund\n2021-01-31,0.01\n2021-02-28,-0.004\n");
  r = ingest({"strategy", v2});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.out, "strategy fund: version 2 (")) << r.out;
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series"), 1);
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series_versions"), 2);
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM version_columns"), 2);
  EXPECT_EQ(count(ledger_, "SELECT max(version) FROM series_versions"), 2);
  EXPECT_NE(text(ledger_, "SELECT content_hash FROM series_versions WHERE version = 2"), hash1);
  EXPECT_DOUBLE_EQ(*observations(ledger_, "fund", 1)[1].value, -0.005);
  EXPECT_DOUBLE_EQ(*observations(ledger_, "fund", 2)[1].value, -0.004);

  // A changed date with the same values is new content too.
  const std::string v3 = write("fund-v3.csv", "date,fund\n2021-01-29,0.01\n2021-02-28,-0.004\n");
  r = ingest({"strategy", v3});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(count(ledger_, "SELECT max(version) FROM series_versions"), 3);
  EXPECT_EQ(observations(ledger_, "fund", 3)[0].date, "2021-01-29");
}

TEST_F(IngestTest, SameValuesAsLevelsOrPercentAreOtherContent) {
  // Same numbers in the file; --percent stores them divided by 100: new version.
  const std::string file = write("p.csv", "date,p\n2021-01-31,0.5\n2021-02-28,0.25\n");
  ASSERT_EQ(ingest({"strategy", file}).exit_code, 0);
  const CommandResult r = ingest({"strategy", file, "--percent"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series_versions"), 2);
  EXPECT_DOUBLE_EQ(*observations(ledger_, "p", 2)[0].value, 0.5 / 100);
  EXPECT_EQ(text(ledger_, "SELECT input_unit FROM series_versions WHERE version = 2"), "percent");
}

TEST_F(IngestTest, MixedNewAndUnchangedSeriesInOneFile) {
  ASSERT_EQ(ingest({"strategy", write("a.csv", "date,a\n2021-01-31,0.01\n")}).exit_code, 0);
  const std::string file = write("ab.csv", "date,a,b\n2021-01-31,0.01,0.02\n");
  const CommandResult r = ingest({"strategy", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.out, "strategy a: unchanged (version 1, ")) << r.out;
  EXPECT_TRUE(contains(r.out, "strategy b: version 1, new series (")) << r.out;
  EXPECT_TRUE(contains(r.out, file + ": 1 new version, 1 unchanged\n")) << r.out;
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series_versions"), 2);
}

TEST_F(IngestTest, WideFileGivesOneSeriesPerColumn) {
  const std::string file = write("wide.csv", wide_csv(50, 4));
  const CommandResult r = ingest({"benchmark", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out, file + ": 50 new versions, 0 unchanged\n");  // too many to list each
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series WHERE kind = 'benchmark'"), 50);
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series_versions WHERE version = 1"), 50);
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM version_columns"), 50);
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM observations"), 50 * 4);
  EXPECT_EQ(count(ledger_, "SELECT count(DISTINCT content_hash) FROM series_versions"), 50);
  // Column s37 holds 37e-4 on every row, under its own name.
  const auto s37 = observations(ledger_, "s37", 1);
  ASSERT_EQ(s37.size(), 4u);
  for (const auto& o : s37) EXPECT_DOUBLE_EQ(*o.value, 37e-4);
  EXPECT_EQ(s37.back().date, "2021-04-30");
  EXPECT_EQ(text(ledger_,
                 "SELECT column_name FROM version_columns c JOIN series_versions v "
                 "USING (version_id) JOIN series s USING (series_id) WHERE s.name = 's50'"),
            "s50");

  // All 50 again: one summary line, nothing written.
  const std::string before = dump_ledger(ledger_);
  const CommandResult again = ingest({"benchmark", file});
  ASSERT_EQ(again.exit_code, 0) << again.err;
  EXPECT_EQ(again.out, file + ": 0 new versions, 50 unchanged\n");
  EXPECT_EQ(dump_ledger(ledger_), before);
}

TEST_F(IngestTest, LevelsBecomeSimpleReturns) {
  // r_t = P_t / P_{t-1} - 1: 110/100 - 1 (0.1 up to rounding: 0.10000000000000009),
  // 99/110 - 1 (-0.1 up to rounding); the first level gives no return, so the series starts
  // at the second date. A level next to a missing one gives no return either:
  // 120 follows NA (missing), 132/120 - 1 = 0.1 up to rounding.
  const std::string file = write("px.csv",
                                 "date,px\n"
                                 "2021-01-31,100\n"
                                 "2021-02-28,110\n"
                                 "2021-03-31,99\n"
                                 "2021-04-30,NA\n"
                                 "2021-05-31,120\n"
                                 "2021-06-30,132\n");
  const CommandResult r = ingest({"strategy", file, "--levels"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto obs = observations(ledger_, "px", 1);
  ASSERT_EQ(obs.size(), 5u);
  EXPECT_EQ(obs[0].date, "2021-02-28");
  EXPECT_DOUBLE_EQ(*obs[0].value, 110.0 / 100.0 - 1);
  EXPECT_EQ(obs[1].date, "2021-03-31");
  EXPECT_DOUBLE_EQ(*obs[1].value, 99.0 / 110.0 - 1);
  EXPECT_FALSE(obs[2].value.has_value());  // 2021-04-30: no level
  EXPECT_FALSE(obs[3].value.has_value());  // 2021-05-31: no level the month before
  EXPECT_EQ(obs[4].date, "2021-06-30");
  EXPECT_DOUBLE_EQ(*obs[4].value, 132.0 / 120.0 - 1);
  EXPECT_EQ(text(ledger_,
                 "SELECT input_unit || '|' || unit || '|' || first_date || '|' || "
                 "observations || '|' || missing FROM series_versions"),
            "levels|decimal return|2021-02-28|5|2");
}

TEST_F(IngestTest, PercentReturnsAreDividedByOneHundred) {
  // Percent is divided by 100, not multiplied by 0.01: 1.04 / 100 is the double nearest 0.0104,
  // while 1.04 * 0.01 is 0.010400000000000001, so the stored text tells the two apart.
  const std::string file =
      write("pct.csv", "date,p\n2021-01-31,1.04\n2021-02-28,-2.25\n2021-03-31,0.75\n");
  const CommandResult r = ingest({"strategy", file, "--percent"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto obs = observations(ledger_, "p", 1);
  ASSERT_EQ(obs.size(), 3u);
  EXPECT_DOUBLE_EQ(*obs[0].value, 1.04 / 100);
  EXPECT_DOUBLE_EQ(*obs[1].value, -2.25 / 100);
  EXPECT_DOUBLE_EQ(*obs[2].value, 0.75 / 100);
  EXPECT_EQ(text(ledger_, "SELECT values_json FROM version_columns"),
            R"({"2021-01-31":0.0104,"2021-02-28":-0.0225,"2021-03-31":0.0075})");
  EXPECT_EQ(text(ledger_, "SELECT input_unit || '|' || unit FROM series_versions"),
            "percent|decimal return");
}

TEST_F(IngestTest, RatesKeepTheirUnitAndQuote) {
  const std::string file =
      write("curve.csv", "date,1m,3M\n2021-01-31,0.05,0.07\n2021-02-28,0.04,0.06\n");
  CommandResult r = ingest({"rate", file, "--name", "ust", "--quote", "discount"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series"), 1);
  EXPECT_EQ(text(ledger_, "SELECT kind FROM series"), "rate");
  EXPECT_EQ(text(ledger_, "SELECT unit || '|' || input_unit || '|' || quote FROM series_versions"),
            "percent yield|percent|discount");
  EXPECT_EQ(text(ledger_,
                 "SELECT group_concat(column_name, ',') FROM "
                 "(SELECT column_name FROM version_columns ORDER BY position)"),
            "1M,3M");                                                       // tenors upper-cased
  EXPECT_DOUBLE_EQ(*observations(ledger_, "ust", 1, "3M")[1].value, 0.06);  // not converted

  // Same numbers quoted as yields are other content: version 2.
  r = ingest({"rate", file, "--name", "ust"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(text(ledger_, "SELECT quote FROM series_versions WHERE version = 2"), "yield");

  // A single-column file gets its tenor from --tenor.
  const std::string one = write("bill.csv", "date,yield\n2021-01-31,0.05\n");
  r = ingest({"rate", one, "--name", "bill", "--tenor", "13w", "--decimal"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(text(ledger_,
                 "SELECT unit FROM series_versions v JOIN series s USING (series_id) "
                 "WHERE s.name = 'bill'"),
            "decimal yield");
  EXPECT_EQ(observations(ledger_, "bill", 1, "13W").size(), 1u);
}

TEST_F(IngestTest, FactorFileIsOneSet) {
  const std::string file =
      write("ff.csv",
            "date,mkt_rf,smb,hml\n2021-01-31,0.01,0.002,-0.003\n2021-02-28,0.02,NA,0.001\n"
            "2021-03-31,0.015,0.003,0.002\n");
  const CommandResult r = ingest({"factor", file, "--name", "ff3"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out, "factor ff3: version 1, new series (" +
                       text(ledger_, "SELECT substr(content_hash, 1, 12) FROM series_versions") +
                       ")\n" + file + ": 1 new version, 0 unchanged\n");
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series"), 1);
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM version_columns"), 3);
  EXPECT_EQ(text(ledger_, "SELECT observations || '|' || missing FROM series_versions"), "3|1");
  EXPECT_DOUBLE_EQ(*observations(ledger_, "ff3", 1, "hml")[0].value, -0.003);
  EXPECT_FALSE(observations(ledger_, "ff3", 1, "smb")[1].value.has_value());
}

TEST_F(IngestTest, ColumnsDateColumnAndNameSelectAndRename) {
  const std::string file =
      write("sel.csv", "a,when,b,c\n0.01,2021-01-31,0.02,0.03\n0.04,2021-02-28,0.05,0.06\n");
  CommandResult r = ingest({"strategy", file, "--date-column", "when", "--columns", "c,a"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(text(ledger_,
                 "SELECT group_concat(name, ',') FROM (SELECT name FROM series ORDER BY "
                 "series_id)"),
            "a,c");  // file order, b left out
  EXPECT_DOUBLE_EQ(*observations(ledger_, "c", 1)[1].value, 0.06);

  r = ingest({"strategy", file, "--date-column", "when", "--columns", "b", "--name", "renamed"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series WHERE name = 'b'"), 0);
  EXPECT_DOUBLE_EQ(*observations(ledger_, "renamed", 1)[0].value, 0.02);
}

TEST_F(IngestTest, ByteOrderMarkAndCrlfAreAccepted) {
  const std::string file = write("excel.csv",
                                 "\xEF\xBB\xBF"
                                 "date,fund\r\n2021-01-31,0.01\r\n2021-02-28,0.02\r\n");
  const CommandResult r = ingest({"strategy", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(text(ledger_, "SELECT name FROM series"), "fund");
  EXPECT_EQ(text(ledger_, "SELECT values_json FROM version_columns"),
            R"({"2021-01-31":0.01,"2021-02-28":0.02})");
}

TEST_F(IngestTest, CrlfFileReportsPhysicalLines) {
  const std::string file = write("crlf.csv",
                                 "\xEF\xBB\xBF"
                                 "date,fund\r\n2021-01-31,0.01\r\n2021-02-28,x\r\n");
  expect_rejected({"strategy", file}, at(file, 3, 2) + "'x' is not a number", "plain numbers");
}

TEST_F(IngestTest, NaAndEmptyCellsAreStoredAsNull) {
  const std::string file = write("gaps.csv",
                                 "date,a,b\n"
                                 "2021-01-31,0.01,0.02\n"
                                 "2021-02-28,NA,\n"
                                 "2021-03-31,0.03,0.04\n");
  const CommandResult r = ingest({"strategy", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  for (const char* name : {"a", "b"}) {
    const auto obs = observations(ledger_, name, 1);
    ASSERT_EQ(obs.size(), 3u) << name;
    EXPECT_TRUE(obs[0].value.has_value());
    EXPECT_EQ(obs[1].date, "2021-02-28");
    EXPECT_FALSE(obs[1].value.has_value()) << name;
    EXPECT_TRUE(obs[2].value.has_value());
  }
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM observations WHERE value IS NULL"), 2);
  EXPECT_EQ(count(ledger_, "SELECT sum(missing) FROM series_versions"), 2);
  EXPECT_EQ(text(ledger_, "SELECT values_json FROM version_columns WHERE column_name = 'a'"),
            R"({"2021-01-31":0.01,"2021-02-28":null,"2021-03-31":0.03})");
}

TEST_F(IngestTest, LeadingAndTrailingMissingValuesAreTrimmed) {
  const std::string file = write("late.csv",
                                 "date,a,b\n"
                                 "2021-01-31,0.01,\n"
                                 "2021-02-28,0.02,0.05\n"
                                 "2021-03-31,0.03,NA\n");
  ASSERT_EQ(ingest({"strategy", file}).exit_code, 0);
  EXPECT_EQ(text(ledger_, "SELECT values_json FROM version_columns WHERE column_name = 'b'"),
            R"({"2021-02-28":0.05})");
  EXPECT_EQ(text(ledger_,
                 "SELECT first_date || '|' || last_date || '|' || observations FROM "
                 "series_versions v JOIN series s USING (series_id) WHERE s.name = 'b'"),
            "2021-02-28|2021-02-28|1");
}

TEST_F(IngestTest, NoteAndSourceAreStored) {
  const std::string file = write("noted.csv", kSeedCsv);
  const CommandResult r = ingest({"strategy", file, "--note", "from the prospectus, p. 12"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(text(ledger_, "SELECT note FROM series_versions"), "from the prospectus, p. 12");
  EXPECT_EQ(text(ledger_, "SELECT source_file FROM series_versions"), file);
  const CommandResult sum = run_program({"/usr/bin/sha256sum", file});
  ASSERT_EQ(sum.exit_code, 0) << sum.err;
  EXPECT_EQ(text(ledger_, "SELECT source_sha256 FROM series_versions"), sum.out.substr(0, 64));
  EXPECT_EQ(text(ledger_, "SELECT frequency FROM series_versions"), "monthly");
  EXPECT_FALSE(text(ledger_, "SELECT ingested_by FROM series_versions").empty());

  // Without --note the column is NULL.
  ASSERT_EQ(ingest({"strategy", write("other.csv", "date,other\n2021-01-31,0.01\n")}).exit_code, 0);
  EXPECT_EQ(text(ledger_,
                 "SELECT note FROM series_versions v JOIN series s USING (series_id) "
                 "WHERE s.name = 'other'"),
            "NULL");
}

TEST_F(IngestTest, NamedPipeIsRead) {
  // `alphatrail ingest strategy <(curl ...)` hands over a named pipe: it has no size, but its
  // bytes are the file.
  const fs::path fifo = dir_ / "pipe.csv";
  ASSERT_EQ(mkfifo(fifo.c_str(), 0600), 0);
  signal(SIGPIPE, SIG_IGN);
  std::thread writer([&] {
    const int fd = open(fifo.c_str(), O_WRONLY);  // waits for the reader
    if (fd < 0) return;
    const std::string csv = kSeedCsv;
    (void)!::write(fd, csv.data(), csv.size());
    close(fd);
  });
  const CommandResult r = ingest({"strategy", fifo.string()});
  // Should the command never have opened the pipe, let the writer go.
  const int unblock = open(fifo.c_str(), O_RDONLY | O_NONBLOCK);
  writer.join();
  if (unblock >= 0) close(unblock);
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(observations(ledger_, "seed", 1).size(), 3u);
}

TEST_F(IngestTest, LedgerOptionBeforeOrAfterTheCommandAndFromTheEnvironment) {
  const std::string file = write("fund.csv", kSeedCsv);
  const fs::path before = dir_ / "before.db";
  const fs::path after = dir_ / "after.db";
  const fs::path last = dir_ / "last.db";
  const fs::path env = dir_ / "env.db";
  const fs::path overridden = dir_ / "overridden.db";

  EXPECT_EQ(run_alphatrail({"--ledger", before.string(), "ingest", "strategy", file}).exit_code, 0);
  EXPECT_EQ(run_alphatrail({"ingest", "--ledger", after.string(), "strategy", file}).exit_code, 0);
  EXPECT_EQ(run_alphatrail({"ingest", "strategy", file, "--ledger", last.string()}).exit_code, 0);
  EXPECT_EQ(
      run_alphatrail({"ingest", "strategy", file}, {"ALPHATRAIL_LEDGER=" + env.string()}).exit_code,
      0);
  EXPECT_EQ(run_alphatrail({"--ledger", overridden.string(), "ingest", "strategy", file},
                           {"ALPHATRAIL_LEDGER=" + (dir_ / "unused.db").string()})
                .exit_code,
            0);
  for (const auto& path : {before, after, last, env, overridden}) {
    ASSERT_TRUE(fs::exists(path)) << path;
    EXPECT_EQ(count(path, "SELECT count(*) FROM observations WHERE series = 'seed'"), 3) << path;
  }
  EXPECT_FALSE(fs::exists(dir_ / "unused.db"));
}

TEST_F(IngestTest, MissingLedgerIsCreatedAndSaysSo) {
  const std::string file = write("fund.csv", kSeedCsv);
  ASSERT_FALSE(fs::exists(ledger_));
  const CommandResult r = ingest({"strategy", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.err, "created ledger " + ledger_.string() + " (schema version " +
                       std::to_string(alphatrail::store::current_schema_version()) + ")\n");
  EXPECT_TRUE(fs::exists(ledger_));
  // The second ingest finds it: no notice.
  const CommandResult again = ingest({"strategy", file});
  ASSERT_EQ(again.exit_code, 0) << again.err;
  EXPECT_EQ(again.err, "");
}

// --- all or nothing ----------------------------------------------------------------------

TEST_F(IngestTest, BadValueInTheLastCellOfAWideFileStoresNothing) {
  // 50 good columns but the very last cell: no series at all may be stored.
  std::string csv = wide_csv(50, 4);
  csv.replace(csv.rfind(",50e-4\n"), 7, ",oops\n");
  const std::string file = write("wide-bad.csv", csv);
  expect_rejected({"strategy", file}, at(file, 5, 51) + "'oops' is not a number", "NA");
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series"), 1);  // the seed only
}

TEST_F(IngestTest, NameOfAnotherKindRollsBackTheWholeFile) {
  seed();
  const std::string before = dump_ledger(ledger_);
  // 49 new benchmarks and, last, a column named like the existing strategy 'seed': the 49
  // already inserted in the transaction must be rolled back.
  std::string csv = wide_csv(49, 3, "b");
  std::string with_seed;
  std::istringstream lines(csv);
  std::string line;
  for (int i = 0; std::getline(lines, line); ++i)
    with_seed += line + (i == 0 ? ",seed\n" : ",0.001\n");
  const std::string file = write("clash.csv", with_seed);
  const CommandResult r = ingest({"benchmark", file});
  EXPECT_EQ(r.exit_code, 3) << r.err;
  EXPECT_EQ(r.err, "alphatrail: error: " + file +
                       ": series 'seed' already exists as a strategy series, not benchmark; "
                       "rename the column or use --name\n");
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(dump_ledger(ledger_), before);
  EXPECT_EQ(count(ledger_, "SELECT count(*) FROM series WHERE kind = 'benchmark'"), 0);
  EXPECT_EQ(integrity(ledger_), "ok");
}

TEST_F(IngestTest, BusyLedgerIsRefusedWithNothingWritten) {
  seed();
  const std::string before = dump_ledger(ledger_);
  SQLite::Database writer(ledger_.string(), SQLite::OPEN_READWRITE);
  writer.exec("BEGIN IMMEDIATE");  // another command is writing
  const std::string file = write("other.csv", "date,other\n2021-01-31,0.01\n");
  const CommandResult r = run_alphatrail({"--ledger", ledger_.string(), "ingest", "strategy", file},
                                         {"ALPHATRAIL_BUSY_TIMEOUT_MS=50"});
  writer.exec("ROLLBACK");
  EXPECT_EQ(r.exit_code, 4) << r.err;
  EXPECT_TRUE(contains(r.err, "busy for 50 ms")) << r.err;
  EXPECT_TRUE(contains(r.err, "ALPHATRAIL_BUSY_TIMEOUT_MS")) << r.err;
  EXPECT_EQ(dump_ledger(ledger_), before);
}

}  // namespace
