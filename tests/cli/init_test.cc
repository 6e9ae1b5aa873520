// Command-level tests of `alphatrail init` and of how every command treats the file named as
// the ledger: a new ledger carries its marks, a newer, foreign or non-SQLite file is refused
// and left byte for byte as it was, and an older ledger (fixtures/ledgers/v1.db) is upgraded
// with its data intact by init and the writing commands. The commands that only read never
// write: they refuse an empty file, an empty SQLite database and an older ledger (naming
// init), and leave each byte for byte as it was, with no journal files beside it.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <gtest/gtest.h>

#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "store/ledger.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::store::current_schema_version;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_at;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::source_path;

int pragma(const fs::path& path, const std::string& name) {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  return db.execAndGet("PRAGMA " + name).getInt();
}

std::string journal_mode(const fs::path& path) {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  return db.execAndGet("PRAGMA journal_mode").getString();
}

// The file's bytes, with its write-ahead log if one was left behind.
std::string bytes_of(const fs::path& path) {
  std::string all = read_file(path);
  const fs::path wal = path.string() + "-wal";
  if (fs::exists(wal)) all += "\n-wal:\n" + read_file(wal);
  return all;
}

std::string version_text() {
  return std::to_string(current_schema_version());
}

// The commands that open the ledger read-only, with the arguments each needs.
const std::vector<std::vector<std::string>>& reading_commands() {
  static const std::vector<std::vector<std::string>> commands{
      {"query", "SELECT 1"},  {"verify"},        {"series"},
      {"series", "fund-one"}, {"runs"},          {"show", "1"},
      {"compare", "1", "2"},  {"reproduce", "1"}};
  return commands;
}

// Returns the write-ahead log, shared-memory index and rollback journal beside the file, with
// their bytes.
std::string journal_files(const fs::path& ledger) {
  std::string all;
  for (const char* suffix : {"-wal", "-shm", "-journal"}) {
    const fs::path file = ledger.string() + suffix;
    if (fs::exists(file)) all += std::string(suffix) + ": " + read_file(file) + "\n";
  }
  return all;
}

// Counts the objects in an SQLite file's schema, through a read-only connection.
int schema_objects(const fs::path& path) {
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  return db.execAndGet("SELECT count(*) FROM sqlite_master").getInt();
}

// A file that no reading command may treat as a ledger: each exits 4 with every one of
// `messages` and leaves the file exactly as it was, making or changing no journal file beside
// it.
void expect_reading_commands_refuse(const ScratchDir& dir, const fs::path& ledger,
                                    const std::vector<std::string>& messages) {
  const std::string before = read_file(ledger);
  const std::string journals_before = journal_files(ledger);
  std::vector<std::vector<std::string>> commands = reading_commands();
  commands.push_back({"report", "1", "-o", (dir / "report.html").string()});
  for (const auto& args : commands) {
    const CommandResult r = run_at(ledger, args);
    EXPECT_EQ(r.exit_code, 4) << args[0] << ": " << r.out << r.err;
    EXPECT_EQ(r.err.rfind("alphatrail: error: ", 0), 0u) << r.err;
    for (const auto& message : messages)
      EXPECT_TRUE(contains(r.err, message)) << args[0] << ": " << r.err;
    EXPECT_EQ(r.out, "") << args[0];
    EXPECT_EQ(fs::file_size(ledger), before.size()) << args[0] << " changed the file's size";
    EXPECT_TRUE(read_file(ledger) == before) << args[0] << " changed the file";
    EXPECT_TRUE(journal_files(ledger) == journals_before)
        << args[0] << " made or changed a journal file beside the ledger";
  }
  EXPECT_FALSE(fs::exists(dir / "report.html"));
}

// A file that every command must refuse: each exits 4 naming the problem and leaves the file
// exactly as it was.
void expect_every_command_refuses(const ScratchDir& dir, const fs::path& ledger,
                                  const std::string& message) {
  const std::string csv = dir.write("fund.csv", "date,fund\n2021-01-31,0.01\n").string();
  const std::string before = bytes_of(ledger);
  for (const auto& args : std::vector<std::vector<std::string>>{
           {"init"}, {"series"}, {"series", "fund"}, {"ingest", "strategy", csv}}) {
    std::vector<std::string> all{"--ledger", ledger.string()};
    all.insert(all.end(), args.begin(), args.end());
    const CommandResult r = run_alphatrail(all);
    EXPECT_EQ(r.exit_code, 4) << args[0] << ": " << r.err;
    EXPECT_EQ(r.err.rfind("alphatrail: error: ", 0), 0u) << r.err;
    EXPECT_TRUE(contains(r.err, message)) << args[0] << ": " << r.err;
    EXPECT_EQ(r.out, "") << args[0];
    EXPECT_EQ(bytes_of(ledger), before) << args[0] << " changed the file";
  }
}

// Makes an SQLite file whose schema holds nothing (a table created and dropped again).
void make_blank_sqlite(const fs::path& path) {
  SQLite::Database db(path.string(), SQLite::OPEN_READWRITE | SQLite::OPEN_CREATE);
  db.exec("CREATE TABLE scratch (x)");
  db.exec("DROP TABLE scratch");
}

TEST(InitCommand, CreatesALedgerWithItsMarks) {
  ScratchDir dir;
  const fs::path ledger = dir / "new.db";
  const CommandResult r = run_alphatrail({"--ledger", ledger.string(), "init"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out,
            "created ledger " + ledger.string() + " (schema version " + version_text() + ")\n");
  EXPECT_EQ(r.err, "");
  EXPECT_EQ(pragma(ledger, "application_id"), 0x4154524C);  // "ATRL"
  EXPECT_EQ(pragma(ledger, "user_version"), current_schema_version());
  EXPECT_GE(current_schema_version(), 1);
  EXPECT_EQ(journal_mode(ledger), "wal");
  SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
  for (const char* name : {"series", "series_versions", "version_columns", "observations"})
    EXPECT_EQ(
        db.execAndGet(std::string("SELECT count(*) FROM sqlite_master WHERE name = '") + name + "'")
            .getInt(),
        1)
        << name;
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM series").getInt(), 0);
}

TEST(InitCommand, SecondInitSaysUpToDateAndChangesNothing) {
  ScratchDir dir;
  const fs::path ledger = dir / "ledger.db";
  ASSERT_EQ(run_alphatrail({"--ledger", ledger.string(), "init"}).exit_code, 0);
  const std::string before = bytes_of(ledger);
  const CommandResult r = run_alphatrail({"init", "--ledger", ledger.string()});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out, "ledger " + ledger.string() + " is up to date (schema version " +
                       version_text() + ")\n");
  EXPECT_EQ(bytes_of(ledger), before);
}

TEST(InitCommand, LedgerFromTheEnvironment) {
  ScratchDir dir;
  const fs::path ledger = dir / "env.db";
  const CommandResult r = run_alphatrail({"init"}, {"ALPHATRAIL_LEDGER=" + ledger.string()});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.out, "created ledger " + ledger.string())) << r.out;
  EXPECT_EQ(pragma(ledger, "application_id"), 0x4154524C);
}

TEST(InitCommand, LedgerInAMissingFolderIsALedgerError) {
  ScratchDir dir;
  const fs::path ledger = dir / "no" / "such" / "folder.db";
  const CommandResult r = run_alphatrail({"--ledger", ledger.string(), "init"});
  EXPECT_EQ(r.exit_code, 4) << r.err;
  EXPECT_TRUE(contains(r.err, ledger.string())) << r.err;
  EXPECT_FALSE(fs::exists(dir / "no"));
}

TEST(InitCommand, EmptyFileBecomesANewLedger) {
  // SQLite treats a zero-byte file as an empty database: init makes it a ledger, and says it
  // created one (there was no ledger to upgrade).
  ScratchDir dir;
  const fs::path ledger = dir.write("empty.db", "");
  const CommandResult r = run_alphatrail({"--ledger", ledger.string(), "init"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out,
            "created ledger " + ledger.string() + " (schema version " + version_text() + ")\n");
  EXPECT_EQ(pragma(ledger, "user_version"), current_schema_version());
  EXPECT_EQ(pragma(ledger, "application_id"), 0x4154524C);
}

TEST(LedgerFile, ReadingCommandsRefuseAnEmptyFile) {
  ScratchDir dir;
  const fs::path ledger = dir.write("empty.db", "");
  expect_reading_commands_refuse(dir, ledger,
                                 {ledger.string() + " is an empty file, not an alphatrail ledger",
                                  "`alphatrail init --ledger " + ledger.string() + "`"});
  EXPECT_EQ(fs::file_size(ledger), 0u);
}

TEST(LedgerFile, ReadingCommandsRefuseAnEmptySqliteDatabase) {
  ScratchDir dir;
  const fs::path ledger = dir / "blank.db";
  make_blank_sqlite(ledger);
  ASSERT_GT(fs::file_size(ledger), 0u);
  ASSERT_EQ(schema_objects(ledger), 0);
  expect_reading_commands_refuse(
      dir, ledger,
      {ledger.string() + " is an empty SQLite database, not an alphatrail ledger",
       "`alphatrail init --ledger " + ledger.string() + "`"});
  EXPECT_EQ(schema_objects(ledger), 0);
  EXPECT_EQ(pragma(ledger, "user_version"), 0);
  EXPECT_EQ(pragma(ledger, "application_id"), 0);
}

TEST(LedgerFile, EvaluateAndRerunRefuseAnEmptySqliteDatabase) {
  // Only init and ingest make an empty database a ledger: evaluate and rerun would otherwise
  // write the whole schema into it and then fail for want of series.
  ScratchDir dir;
  const fs::path ledger = dir / "blank.db";
  make_blank_sqlite(ledger);
  ASSERT_GT(fs::file_size(ledger), 0u);
  ASSERT_EQ(schema_objects(ledger), 0);
  const std::string before = read_file(ledger);
  for (const auto& args : std::vector<std::vector<std::string>>{
           {"evaluate", "x", "--benchmark", "b", "--rate", "r"}, {"rerun", "--all-stale"}}) {
    std::vector<std::string> all{"--ledger", ledger.string()};
    all.insert(all.end(), args.begin(), args.end());
    const CommandResult r = run_alphatrail(all);
    EXPECT_EQ(r.exit_code, 4) << args.front() << ": " << r.err;
    EXPECT_TRUE(contains(r.err, "is an empty SQLite database, not an alphatrail ledger")) << r.err;
    EXPECT_EQ(read_file(ledger), before) << args.front() << " wrote to the file";
    EXPECT_EQ(schema_objects(ledger), 0);
  }
}

TEST(LedgerFile, ReadingCommandsRefuseAnotherApplicationsDatabase) {
  ScratchDir dir;
  const fs::path ledger = dir / "app.db";
  {
    SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE | SQLite::OPEN_CREATE);
    db.exec("PRAGMA application_id = 1234");
    db.exec("PRAGMA journal_mode = WAL");  // so that a read would need journal files
  }
  expect_reading_commands_refuse(dir, ledger, {"not an alphatrail ledger (application_id 0x4d2)"});
}

TEST(LedgerFile, FolderIsRefused) {
  ScratchDir dir;
  const fs::path ledger = dir / "folder.db";
  fs::create_directory(ledger);
  expect_every_command_refuses(dir, ledger, ledger.string());
  EXPECT_TRUE(fs::is_empty(ledger));
}

TEST(LedgerFile, NewerLedgerIsRefusedAndLeftUntouched) {
  ScratchDir dir;
  const fs::path ledger = dir / "future.db";
  ASSERT_EQ(run_alphatrail({"--ledger", ledger.string(), "init"}).exit_code, 0);
  {
    SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE);
    db.exec("PRAGMA user_version = 999");
  }
  expect_every_command_refuses(dir, ledger,
                               "has schema version 999, newer than this alphatrail (it knows up "
                               "to " +
                                   version_text() + "); use a newer alphatrail binary");
  EXPECT_EQ(pragma(ledger, "user_version"), 999);
}

TEST(LedgerFile, ForeignSqliteDatabaseIsRefused) {
  ScratchDir dir;
  const fs::path ledger = dir / "other.db";
  {
    SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE | SQLite::OPEN_CREATE);
    db.exec("CREATE TABLE notes (id INTEGER PRIMARY KEY, body TEXT)");
    db.exec("INSERT INTO notes (body) VALUES ('keep me')");
  }
  expect_every_command_refuses(dir, ledger, "is an SQLite database but not an alphatrail ledger");
  SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM sqlite_master").getInt(), 1);
  EXPECT_EQ(db.execAndGet("PRAGMA application_id").getInt(), 0);
}

TEST(LedgerFile, DatabaseOfAnotherApplicationIsRefused) {
  ScratchDir dir;
  const fs::path ledger = dir / "app.db";
  {
    SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE | SQLite::OPEN_CREATE);
    db.exec("PRAGMA application_id = 1234");  // no tables, but claimed by someone else
  }
  expect_every_command_refuses(dir, ledger, "not an alphatrail ledger (application_id 0x4d2)");
}

TEST(LedgerFile, TextFileIsRefused) {
  ScratchDir dir;
  for (const char* content : {"date,fund\n2021-01-31,0.01\n2021-02-28,0.02\n", "hi\n"}) {
    const fs::path ledger = dir.write("notes.txt", content);
    expect_every_command_refuses(dir, ledger, ledger.string() + " is not an SQLite database");
    EXPECT_EQ(read_file(ledger), content);
  }
}

// fixtures/ledgers/v1.db: schema version 1, strategy 'fund-one' with 3 monthly returns.
class V1Fixture : public ::testing::Test {
 protected:
  void SetUp() override {
    fs::copy_file(source_path("fixtures/ledgers/v1.db"), ledger_);
    fixture_version_ = pragma(ledger_, "user_version");
    ASSERT_EQ(fixture_version_, 1);
    ASSERT_LE(fixture_version_, current_schema_version());
  }

  // Checks the ledger is current and fund-one's three returns are as the fixture holds them.
  void expect_upgraded_with_data() const {
    EXPECT_EQ(pragma(ledger_, "user_version"), current_schema_version());
    EXPECT_EQ(pragma(ledger_, "application_id"), 0x4154524C);
    SQLite::Database db(ledger_.string(), SQLite::OPEN_READONLY);
    EXPECT_EQ(db.execAndGet("PRAGMA integrity_check").getString(), "ok");
    SQLite::Statement q(db,
                        "SELECT date, value FROM observations WHERE series = 'fund-one' AND "
                        "version = 1 ORDER BY date");
    std::vector<std::pair<std::string, double>> rows;
    while (q.executeStep())
      rows.emplace_back(q.getColumn(0).getString(), q.getColumn(1).getDouble());
    ASSERT_EQ(rows.size(), 3u);
    EXPECT_EQ(rows[0].first, "2021-01-31");
    EXPECT_DOUBLE_EQ(rows[0].second, 0.01);
    EXPECT_EQ(rows[1].first, "2021-02-28");
    EXPECT_DOUBLE_EQ(rows[1].second, -0.005);
    EXPECT_EQ(rows[2].first, "2021-03-31");
    EXPECT_DOUBLE_EQ(rows[2].second, 0.012);
    EXPECT_EQ(db.execAndGet("SELECT content_hash FROM series_versions").getString(),
              "56ab984b7a4f64aaec1f3db90fde4668858aea600a9fb6cfaacebcd49ed3d20d");
    EXPECT_EQ(db.execAndGet("SELECT note FROM series_versions").getString(),
              "fixture at schema version 1");
  }

  std::string upgrade_notice() const {
    return "upgraded ledger " + ledger_.string() + " from schema version " +
           std::to_string(fixture_version_) + " to " + version_text() + "\n";
  }

  ScratchDir dir_;
  fs::path ledger_ = dir_ / "v1.db";
  int fixture_version_ = 0;
};

// Commands that only read never upgrade: they refuse the older ledger, name the command that
// upgrades it and leave it byte for byte as it was; after init they read it.
TEST_F(V1Fixture, ReadingCommandsRefuseItUntilInitUpgradesIt) {
  ASSERT_LT(fixture_version_, current_schema_version());
  expect_reading_commands_refuse(
      dir_, ledger_,
      {ledger_.string() + " has schema version 1, older than this alphatrail (schema version " +
           version_text() + ")",
       "upgrade it with `alphatrail init --ledger " + ledger_.string() + "`"});
  EXPECT_EQ(pragma(ledger_, "user_version"), 1);

  ASSERT_EQ(run_at(ledger_, {"init"}).exit_code, 0);
  expect_upgraded_with_data();
  const CommandResult series = run_at(ledger_, {"series", "--format", "json"});
  ASSERT_EQ(series.exit_code, 0) << series.err;
  EXPECT_EQ(series.err, "");
  const auto list = nlohmann::json::parse(series.out);
  ASSERT_EQ(list.size(), 1u);
  EXPECT_EQ(list[0]["name"], "fund-one");
  EXPECT_EQ(list[0]["observations"], 3);
  EXPECT_EQ(list[0]["frequency"], "monthly");
  const CommandResult query =
      run_at(ledger_, {"query", "SELECT count(*) AS n FROM observations WHERE series = 'fund-one'",
                       "--format", "csv"});
  ASSERT_EQ(query.exit_code, 0) << query.err;
  EXPECT_EQ(query.out, "n\n3\n");
  const CommandResult verify = run_at(ledger_, {"verify"});
  EXPECT_EQ(verify.exit_code, 0) << verify.out << verify.err;
  const CommandResult runs = run_at(ledger_, {"runs", "--format", "json"});
  ASSERT_EQ(runs.exit_code, 0) << runs.err;
  EXPECT_EQ(nlohmann::json::parse(runs.out), nlohmann::json::array());
}

TEST_F(V1Fixture, InitReportsTheUpgradeOnStdout) {
  const CommandResult r = run_alphatrail({"--ledger", ledger_.string(), "init"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  if (fixture_version_ < current_schema_version())
    EXPECT_EQ(r.out, upgrade_notice());
  else
    EXPECT_EQ(r.out, "ledger " + ledger_.string() + " is up to date (schema version " +
                         version_text() + ")\n");
  expect_upgraded_with_data();
}

TEST_F(V1Fixture, IngestAddsBesideTheOldData) {
  const std::string csv = dir_.write("fund-one.csv",
                                     "date,fund-one\n2021-01-31,0.01\n2021-02-28,-0.005\n"
                                     "2021-03-31,0.012\n2021-04-30,0.003\n")
                              .string();
  const CommandResult r = run_alphatrail({"--ledger", ledger_.string(), "ingest", "strategy", csv});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  if (fixture_version_ < current_schema_version()) {
    EXPECT_TRUE(contains(r.err, upgrade_notice())) << r.err;
  }
  EXPECT_TRUE(contains(r.out, "strategy fund-one: version 2 (")) << r.out;
  expect_upgraded_with_data();
}

TEST_F(V1Fixture, SameContentAsTheFixtureIsUnchanged) {
  // The content hash of a version ingested by an earlier binary must not drift.
  const std::string csv = dir_.write("fund-one.csv",
                                     "date,fund-one\n2021-01-31,0.01\n2021-02-28,-0.005\n"
                                     "2021-03-31,0.012\n")
                              .string();
  const CommandResult r = run_alphatrail({"--ledger", ledger_.string(), "ingest", "strategy", csv});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.out, "strategy fund-one: unchanged (version 1, 56ab984b7a4f)")) << r.out;
  expect_upgraded_with_data();
}

}  // namespace
