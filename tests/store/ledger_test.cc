// Tests of the ledger file: migrations from zero equal schema/ledger.sql, opening modes and
// their refusals, transactions that are all or nothing, and the triggers that keep every
// table append-only.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <optional>
#include <regex>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "core/error.h"
#include "store/migrations.h"
#include "store/sqlite_ledger.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
namespace store = alphatrail::store;
using alphatrail::Error;
using alphatrail::Failure;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::source_path;

SQLite::Database memory_db() {
  return SQLite::Database(":memory:", SQLite::OPEN_READWRITE | SQLite::OPEN_CREATE);
}

std::string reference_schema_sql() {
  return read_file(source_path("schema/ledger.sql"));
}

// Runs SQL and returns SQLite's error message, or "(no error)".
std::string sql_error(SQLite::Database& db, const std::string& sql) {
  try {
    db.exec(sql);
  } catch (const SQLite::Exception& e) {
    return e.what();
  }
  return "(no error)";
}

std::string dump_rows(SQLite::Database& db) {
  std::ostringstream out;
  for (const char* table : {"series", "series_versions", "version_columns"}) {
    SQLite::Statement q(db, std::string("SELECT * FROM ") + table + " ORDER BY rowid");
    while (q.executeStep()) {
      out << table;
      for (int i = 0; i < q.getColumnCount(); ++i)
        out << '|' << (q.getColumn(i).isNull() ? std::string("NULL") : q.getColumn(i).getString());
      out << '\n';
    }
  }
  return out.str();
}

// --- migrations --------------------------------------------------------------------------

TEST(Migrations, FromZeroEqualTheReferenceSchema) {
  auto migrated = memory_db();
  EXPECT_EQ(store::migrate(migrated), store::current_schema_version());
  auto reference = memory_db();
  reference.exec(reference_schema_sql());

  const std::string fingerprint = store::schema_fingerprint(migrated);
  EXPECT_EQ(fingerprint, store::schema_fingerprint(reference));
  // The fingerprint covers every kind of object, so the comparison means something.
  for (const char* part :
       {"table series on series:", "table series_versions on series_versions:",
        "table version_columns on version_columns:", "view observations on observations:",
        "trigger series_versions_in_sequence on series_versions:",
        "trigger version_columns_no_delete on version_columns:"})
    EXPECT_TRUE(contains(fingerprint, part)) << part << "\n" << fingerprint;
  EXPECT_FALSE(contains(fingerprint, "--")) << "comments must not count";
}

TEST(Migrations, ReferenceSchemaStatesTheCurrentVersion) {
  // schema/ledger.sql's header names the user_version it matches.
  const std::string sql = reference_schema_sql();
  std::smatch m;
  ASSERT_TRUE(std::regex_search(sql, m, std::regex(R"(PRAGMA user_version = (\d+))"))) << sql;
  EXPECT_EQ(std::stoi(m[1].str()), store::current_schema_version());
  EXPECT_TRUE(contains(sql, "PRAGMA application_id = 0x4154524C"));
}

TEST(Migrations, FingerprintIgnoresLayoutButNotContent) {
  auto reference = memory_db();
  reference.exec(reference_schema_sql());

  // Extra blank lines and comments between statements do not count.
  std::string spaced = reference_schema_sql();
  const std::string spacer = ";\n\n-- spacer --\n\n";
  for (std::size_t at = 0; (at = spaced.find(";\n", at)) != std::string::npos; at += spacer.size())
    spaced.replace(at, 2, spacer);
  // ... nor do comments and line breaks inside a statement.
  const std::string create = "CREATE TABLE series (";
  spaced.replace(spaced.find(create), create.size(), "CREATE TABLE series (  -- inside\n\t\t");
  auto relaid = memory_db();
  relaid.exec(spaced);
  EXPECT_EQ(store::schema_fingerprint(relaid), store::schema_fingerprint(reference));

  // A missing trigger does.
  auto missing = memory_db();
  missing.exec(reference_schema_sql());
  missing.exec("DROP TRIGGER version_columns_no_delete");
  EXPECT_NE(store::schema_fingerprint(missing), store::schema_fingerprint(reference));

  // So does a changed message inside a trigger (string literals keep their spaces).
  std::string reworded = reference_schema_sql();
  const std::string text = "'series are immutable";
  reworded.replace(reworded.find(text), text.size(), "'series  are immutable");
  auto changed = memory_db();
  changed.exec(reworded);
  EXPECT_NE(store::schema_fingerprint(changed), store::schema_fingerprint(reference));
}

TEST(Migrations, FilesAreNumberedInOrder) {
  const auto& migrations = store::embedded_migrations();
  ASSERT_EQ(static_cast<int>(migrations.size()), store::current_schema_version());
  for (std::size_t i = 0; i < migrations.size(); ++i) {
    std::smatch m;
    ASSERT_TRUE(
        std::regex_match(migrations[i].file, m, std::regex(R"((\d{4})_[a-z]+(_[a-z]+)+\.sql)")))
        << migrations[i].file;
    EXPECT_EQ(std::stoi(m[1].str()), static_cast<int>(i) + 1) << migrations[i].file;
    EXPECT_EQ(migrations[i].sql, read_file(source_path("migrations/" + migrations[i].file)));
  }
}

TEST(Migrations, FromEveryVersionReachTheSameSchema) {
  auto reference = memory_db();
  reference.exec(reference_schema_sql());
  const auto& migrations = store::embedded_migrations();
  for (std::size_t start = 0; start <= migrations.size(); ++start) {
    auto db = memory_db();
    for (std::size_t i = 0; i < start; ++i) db.exec(migrations[i].sql);
    db.exec("PRAGMA user_version = " + std::to_string(start));
    EXPECT_EQ(store::migrate(db), static_cast<int>(migrations.size() - start)) << start;
    EXPECT_EQ(store::schema_fingerprint(db), store::schema_fingerprint(reference)) << start;
    EXPECT_EQ(db.execAndGet("PRAGMA user_version").getInt(), store::current_schema_version());
  }
}

TEST(Migrations, UpgradedOldLedgerEqualsANewOne) {
  // fixtures/ledgers/v1.db was made by the binary of schema version 1. Upgraded, it must have
  // exactly the schema of a ledger migrated from zero; this fails when a landed migration is
  // edited instead of a new one being added.
  ScratchDir dir;
  const fs::path path = dir / "v1.db";
  fs::copy_file(source_path("fixtures/ledgers/v1.db"), path);
  std::ostringstream notices;
  auto upgraded = store::SqliteLedger::open(path, store::OpenMode::existing, notices);
  auto fresh = memory_db();
  store::migrate(fresh);
  EXPECT_EQ(store::schema_fingerprint(upgraded.db()), store::schema_fingerprint(fresh));
}

TEST(Migrations, SetMarksAndRunOnce) {
  auto db = memory_db();
  store::migrate(db);
  EXPECT_EQ(db.execAndGet("PRAGMA user_version").getInt(), store::current_schema_version());
  EXPECT_EQ(db.execAndGet("PRAGMA application_id").getInt(), store::kApplicationId);
  EXPECT_EQ(store::kApplicationId, 0x4154524C);
  const std::string once = store::schema_fingerprint(db);
  EXPECT_EQ(store::migrate(db), 0);
  EXPECT_EQ(store::schema_fingerprint(db), once);
}

TEST(Migrations, FailingMigrationLeavesNothing) {
  // An object in the way makes the first migration fail: the version stays 0 and nothing of
  // the migration remains.
  auto db = memory_db();
  db.exec("CREATE TABLE version_columns (x)");
  EXPECT_THROW(store::migrate(db), SQLite::Exception);
  EXPECT_EQ(db.execAndGet("PRAGMA user_version").getInt(), 0);
  EXPECT_EQ(db.execAndGet("PRAGMA application_id").getInt(), 0);
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM sqlite_master").getInt(), 1);
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM sqlite_master WHERE name = 'series'").getInt(), 0);
}

// --- opening ------------------------------------------------------------------------------

TEST(LedgerOpen, CreateMakesACurrentWalLedgerAndSaysSo) {
  ScratchDir dir;
  const fs::path path = dir / "new.db";
  std::ostringstream notices;
  auto l = store::SqliteLedger::open(path, store::OpenMode::create, notices);
  EXPECT_EQ(notices.str(), "created ledger " + path.string() + " (schema version " +
                               std::to_string(store::current_schema_version()) + ")\n");
  EXPECT_EQ(l.schema_version(), store::current_schema_version());
  EXPECT_EQ(l.path(), path);
  EXPECT_EQ(l.db().execAndGet("PRAGMA journal_mode").getString(), "wal");
  EXPECT_EQ(l.db().execAndGet("PRAGMA application_id").getInt(), store::kApplicationId);
  EXPECT_EQ(l.db().execAndGet("PRAGMA foreign_keys").getInt(), 1);
  EXPECT_EQ(l.db().execAndGet("PRAGMA page_size").getInt(), store::kNewLedgerPageSize);

  std::ostringstream again;
  auto reopened = store::SqliteLedger::open(path, store::OpenMode::existing, again);
  EXPECT_EQ(again.str(), "");
}

TEST(LedgerOpen, ExistingLedgerIsSwitchedToWal) {
  // A copy made with another journal mode is put back into WAL by the next writing open.
  ScratchDir dir;
  const fs::path path = dir / "ledger.db";
  std::ostringstream notices;
  { store::SqliteLedger::open(path, store::OpenMode::create, notices); }
  {
    SQLite::Database db(path.string(), SQLite::OPEN_READWRITE);
    db.exec("PRAGMA journal_mode = DELETE");
  }
  { store::SqliteLedger::open(path, store::OpenMode::existing, notices); }
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  EXPECT_EQ(db.execAndGet("PRAGMA journal_mode").getString(), "wal");
}

// A ledger made before new ledgers got larger pages keeps its 4 KiB pages (SQLite cannot
// change them in WAL mode) and works as before.
TEST(LedgerOpen, OlderLedgerKeepsItsPageSize) {
  ScratchDir dir;
  const fs::path path = dir / "ledger.db";
  fs::copy_file(source_path("fixtures/ledgers/v1.db"), path);
  std::ostringstream notices;
  auto l = store::SqliteLedger::open(path, store::OpenMode::existing, notices);
  EXPECT_EQ(l.db().execAndGet("PRAGMA page_size").getInt(), 4096);
  EXPECT_EQ(l.db().execAndGet("PRAGMA integrity_check").getString(), "ok");
}

TEST(LedgerOpen, ExistingAndReadOnlyNeedAFile) {
  ScratchDir dir;
  const fs::path path = dir / "absent.db";
  for (auto mode : {store::OpenMode::existing, store::OpenMode::read_only}) {
    std::ostringstream notices;
    try {
      store::SqliteLedger::open(path, mode, notices);
      ADD_FAILURE() << "opened a missing ledger";
    } catch (const Error& e) {
      EXPECT_EQ(e.kind(), Failure::unusable_ledger);
      EXPECT_TRUE(contains(e.what(), "no ledger at " + path.string())) << e.what();
    }
    EXPECT_FALSE(fs::exists(path));
  }
}

TEST(LedgerOpen, ReadOnlyRefusesWrites) {
  ScratchDir dir;
  const fs::path path = dir / "ro.db";
  std::ostringstream notices;
  { store::SqliteLedger::open(path, store::OpenMode::create, notices); }
  auto l = store::SqliteLedger::open(path, store::OpenMode::read_only, notices);
  EXPECT_NE(sql_error(l.db(),
                      "INSERT INTO series (name, kind, created_at) VALUES ('x', "
                      "'strategy', '2021-01-01T00:00:00.000Z')"),
            "(no error)");
  EXPECT_EQ(l.db().execAndGet("SELECT count(*) FROM series").getInt(), 0);
}

// Opening read-only writes nothing: an older ledger, an empty file and an empty SQLite database
// are refused (each naming init) and left byte for byte as they were.
TEST(LedgerOpen, ReadOnlyRefusesWhatItWouldHaveToChange) {
  ScratchDir dir;
  const fs::path older = dir / "v1.db";
  fs::copy_file(source_path("fixtures/ledgers/v1.db"), older);
  const fs::path empty = dir / "empty.db";
  { std::ofstream touch(empty); }
  const fs::path blank = dir / "blank.db";
  {
    SQLite::Database db(blank.string(), SQLite::OPEN_READWRITE | SQLite::OPEN_CREATE);
    db.exec("PRAGMA user_version = 0");  // writes the first page and nothing else
  }
  struct Case {
    fs::path path;
    std::string problem;
  };
  for (const Case& c :
       std::vector<Case>{{older, "has schema version 1, older than this alphatrail"},
                         {empty, "is an empty file, not an alphatrail ledger"},
                         {blank, "is an empty SQLite database, not an alphatrail ledger"}}) {
    SCOPED_TRACE(c.path.string());
    const std::string before = read_file(c.path);
    std::ostringstream notices;
    try {
      store::SqliteLedger::open(c.path, store::OpenMode::read_only, notices);
      ADD_FAILURE() << "opened read-only";
    } catch (const Error& e) {
      EXPECT_EQ(e.kind(), Failure::unusable_ledger);
      EXPECT_TRUE(contains(e.what(), c.problem)) << e.what();
      EXPECT_TRUE(contains(e.what(), "`alphatrail init --ledger " + c.path.string() + "`"))
          << e.what();
    }
    EXPECT_EQ(notices.str(), "");
    EXPECT_TRUE(read_file(c.path) == before) << "the file changed";
    EXPECT_FALSE(fs::exists(c.path.string() + "-wal"));
    EXPECT_FALSE(fs::exists(c.path.string() + "-shm"));
  }
}

TEST(LedgerOpen, NewerLedgerIsRefused) {
  ScratchDir dir;
  const fs::path path = dir / "future.db";
  std::ostringstream notices;
  {
    auto l = store::SqliteLedger::open(path, store::OpenMode::create, notices);
    l.db().exec("PRAGMA user_version = 999");
  }
  for (auto mode :
       {store::OpenMode::create, store::OpenMode::existing, store::OpenMode::read_only}) {
    try {
      store::SqliteLedger::open(path, mode, notices);
      ADD_FAILURE() << "opened a ledger newer than the binary";
    } catch (const Error& e) {
      EXPECT_EQ(e.kind(), Failure::unusable_ledger);
      EXPECT_TRUE(contains(e.what(), "schema version 999")) << e.what();
    }
  }
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  EXPECT_EQ(db.execAndGet("PRAGMA user_version").getInt(), 999);
}

TEST(LedgerOpen, OlderLedgerIsUpgradedAndSaysSo) {
  ScratchDir dir;
  const fs::path path = dir / "v1.db";
  fs::copy_file(source_path("fixtures/ledgers/v1.db"), path);
  std::ostringstream notices;
  auto l = store::SqliteLedger::open(path, store::OpenMode::existing, notices);
  EXPECT_EQ(l.schema_version(), store::current_schema_version());
  if (store::current_schema_version() > 1)
    EXPECT_TRUE(
        contains(notices.str(), "upgraded ledger " + path.string() + " from schema version 1 to "))
        << notices.str();
  else
    EXPECT_EQ(notices.str(), "");
  EXPECT_EQ(
      l.db().execAndGet("SELECT count(*) FROM observations WHERE series = 'fund-one'").getInt(), 3);
}

TEST(LedgerPath, OptionThenEnvironmentThenDefault) {
  const char* saved = std::getenv("ALPHATRAIL_LEDGER");
  const std::string saved_value = saved ? saved : "";
  unsetenv("ALPHATRAIL_LEDGER");
  EXPECT_EQ(store::resolve_ledger_path(""), fs::path("alphatrail.db"));
  EXPECT_EQ(store::resolve_ledger_path("x.db"), fs::path("x.db"));
  setenv("ALPHATRAIL_LEDGER", "/tmp/env.db", 1);
  EXPECT_EQ(store::resolve_ledger_path(""), fs::path("/tmp/env.db"));
  EXPECT_EQ(store::resolve_ledger_path("x.db"), fs::path("x.db"));
  setenv("ALPHATRAIL_LEDGER", "", 1);
  EXPECT_EQ(store::resolve_ledger_path(""), fs::path("alphatrail.db"));
  if (saved)
    setenv("ALPHATRAIL_LEDGER", saved_value.c_str(), 1);
  else
    unsetenv("ALPHATRAIL_LEDGER");
}

TEST(LedgerPath, BusyTimeoutFromTheEnvironment) {
  const char* saved = std::getenv("ALPHATRAIL_BUSY_TIMEOUT_MS");
  const std::string saved_value = saved ? saved : "";
  unsetenv("ALPHATRAIL_BUSY_TIMEOUT_MS");
  EXPECT_EQ(store::busy_timeout_ms(), 10000);
  setenv("ALPHATRAIL_BUSY_TIMEOUT_MS", "250", 1);
  EXPECT_EQ(store::busy_timeout_ms(), 250);
  setenv("ALPHATRAIL_BUSY_TIMEOUT_MS", "0", 1);
  EXPECT_EQ(store::busy_timeout_ms(), 0);
  for (const char* bad : {"", "abc", "-5", "12ms"}) {
    setenv("ALPHATRAIL_BUSY_TIMEOUT_MS", bad, 1);
    EXPECT_EQ(store::busy_timeout_ms(), 10000) << bad;
  }
  if (saved)
    setenv("ALPHATRAIL_BUSY_TIMEOUT_MS", saved_value.c_str(), 1);
  else
    unsetenv("ALPHATRAIL_BUSY_TIMEOUT_MS");
}

// --- transactions and immutability --------------------------------------------------------

class LedgerRows : public ::testing::Test {
 protected:
  void SetUp() override {
    fs::copy_file(source_path("fixtures/ledgers/v1.db"), path_);
    std::ostringstream notices;
    ledger_.emplace(store::SqliteLedger::open(path_, store::OpenMode::existing, notices));
  }
  SQLite::Database& db() { return ledger_->db(); }

  // Inserts a version row of series 1 (fund-one) with the given number.
  std::string insert_version(int series_id, int version) {
    return sql_error(
        db(),
        "INSERT INTO series_versions (series_id, version, content_hash, unit, input_unit, "
        "first_date, last_date, observations, missing, source_file, source_sha256, "
        "ingested_at, ingested_by) VALUES (" +
            std::to_string(series_id) + ", " + std::to_string(version) +
            ", printf('%064d', 0), 'decimal return', 'decimal', '2021-01-31', "
            "'2021-01-31', 1, 0, 'f.csv', printf('%064d', 0), "
            "'2021-01-01T00:00:00.000Z', 'me')");
  }

  ScratchDir dir_;
  fs::path path_ = dir_ / "ledger.db";
  std::optional<store::SqliteLedger> ledger_;
};

TEST_F(LedgerRows, UpdatesAndDeletesAbortWithTheTriggerMessage) {
  const std::string before = dump_rows(db());
  struct Case {
    const char* sql;
    const char* message;
  };
  for (const Case& c : std::vector<Case>{
           {"UPDATE series SET name = 'renamed'",
            "series are immutable: ingest a new version instead"},
           {"DELETE FROM series", "series are never deleted: the ledger keeps every revision"},
           {"UPDATE series_versions SET note = 'edited'",
            "series versions are immutable: ingest a new version instead"},
           {"DELETE FROM series_versions",
            "series versions are never deleted: the ledger keeps every revision"},
           {"UPDATE version_columns SET values_json = '{}'",
            "observations are immutable: ingest a new version instead"},
           {"DELETE FROM version_columns",
            "observations are never deleted: the ledger keeps every revision"},
           {"UPDATE series SET name = name",  // even a no-op
            "series are immutable: ingest a new version instead"},
       }) {
    EXPECT_EQ(sql_error(db(), c.sql), c.message) << c.sql;
  }
  EXPECT_EQ(dump_rows(db()), before);
  EXPECT_EQ(db().execAndGet("PRAGMA integrity_check").getString(), "ok");
}

TEST_F(LedgerRows, VersionNumbersHaveNoGaps) {
  const std::string gap = "series versions are numbered 1, 2, 3 ... without gaps";
  EXPECT_EQ(insert_version(1, 3), gap);  // fund-one has version 1
  EXPECT_EQ(insert_version(1, 1), gap);  // again
  EXPECT_EQ(db().execAndGet("SELECT count(*) FROM series_versions").getInt(), 1);
  EXPECT_EQ(insert_version(1, 2), "(no error)");

  db().exec(
      "INSERT INTO series (name, kind, created_at) VALUES ('fresh', 'benchmark', "
      "'2021-01-01T00:00:00.000Z')");
  const int fresh = static_cast<int>(db().getLastInsertRowid());
  EXPECT_EQ(insert_version(fresh, 2), gap);  // a new series starts at 1
  EXPECT_EQ(insert_version(fresh, 1), "(no error)");
  EXPECT_EQ(db().execAndGet("SELECT group_concat(series_id || ':' || version, ' ') FROM "
                            "(SELECT * FROM series_versions ORDER BY version_id)")
                .getString(),
            "1:1 1:2 " + std::to_string(fresh) + ":1");
}

TEST_F(LedgerRows, ChecksRejectMalformedRows) {
  EXPECT_TRUE(contains(sql_error(db(),
                                 "INSERT INTO series (name, kind, created_at) VALUES "
                                 "('b', 'bond', '2021-01-01T00:00:00.000Z')"),
                       "CHECK constraint failed"));
  EXPECT_TRUE(contains(sql_error(db(),
                                 "INSERT INTO series (name, kind, created_at) VALUES "
                                 "('fund-one', 'strategy', '2021-01-01T00:00:00.000Z')"),
                       "UNIQUE constraint failed"));
  EXPECT_TRUE(contains(sql_error(db(),
                                 "INSERT INTO version_columns (version_id, position, "
                                 "column_name, values_json) VALUES (99, 1, 'x', '{}')"),
                       "FOREIGN KEY constraint failed"));
}

TEST_F(LedgerRows, WriteTransactionIsAllOrNothing) {
  const std::string before = dump_rows(db());
  EXPECT_THROW(ledger_->write_transaction([&] {
    db().exec(
        "INSERT INTO series (name, kind, created_at) VALUES ('half', 'strategy', "
        "'2021-01-01T00:00:00.000Z')");
    throw std::runtime_error("stop half way");
  }),
               std::runtime_error);
  EXPECT_EQ(dump_rows(db()), before);

  // A failing statement (a trigger) rolls back the statements before it too.
  EXPECT_THROW(ledger_->write_transaction([&] {
    db().exec(
        "INSERT INTO series (name, kind, created_at) VALUES ('half', 'strategy', "
        "'2021-01-01T00:00:00.000Z')");
    db().exec("DELETE FROM series");
  }),
               SQLite::Exception);
  EXPECT_EQ(dump_rows(db()), before);

  ledger_->write_transaction([&] {
    db().exec(
        "INSERT INTO series (name, kind, created_at) VALUES ('whole', 'strategy', "
        "'2021-01-01T00:00:00.000Z')");
  });
  EXPECT_EQ(db().execAndGet("SELECT count(*) FROM series WHERE name = 'whole'").getInt(), 1);
  // The connection is usable after a rollback: no transaction is left open.
  EXPECT_EQ(sql_error(db(), "BEGIN IMMEDIATE"), "(no error)");
  db().exec("ROLLBACK");
}

// A read transaction is one snapshot: what another connection commits meanwhile is seen only
// after it ends. An error inside it ends it too, leaving the connection free.
TEST_F(LedgerRows, ReadTransactionSeesOneSnapshot) {
  const auto series_count = [&] { return db().execAndGet("SELECT count(*) FROM series").getInt(); };
  const int before = series_count();
  SQLite::Database other(path_.string(), SQLite::OPEN_READWRITE);
  ledger_->read_transaction([&] {
    EXPECT_EQ(series_count(), before);
    other.exec(
        "INSERT INTO series (name, kind, created_at) VALUES ('meanwhile', 'strategy', "
        "'2021-01-01T00:00:00.000Z')");
    EXPECT_EQ(series_count(), before);
  });
  EXPECT_EQ(series_count(), before + 1);

  EXPECT_THROW(ledger_->read_transaction([&] { throw std::runtime_error("stop half way"); }),
               std::runtime_error);
  EXPECT_EQ(sql_error(db(), "BEGIN IMMEDIATE"), "(no error)");
  db().exec("ROLLBACK");
}

TEST(FailedIngest, LeavesAnIntactLedger) {
  ScratchDir dir;
  const fs::path path = dir / "ledger.db";
  const std::string good = dir.write("good.csv", "date,fund\n2021-01-31,0.01\n2021-02-28,0.02\n");
  ASSERT_EQ(run_alphatrail({"--ledger", path.string(), "ingest", "strategy", good}).exit_code, 0);
  // A file failing in parsing, and one failing in the store (the name is a strategy).
  const std::string bad = dir.write("bad.csv", "date,x\n2021-01-31,0.01\n2021-02-30,0.02\n");
  const std::string clash =
      dir.write("clash.csv", "date,other,fund\n2021-01-31,0.01,0.02\n2021-02-28,0.02,0.03\n");
  const CommandResult parse_failure =
      run_alphatrail({"--ledger", path.string(), "ingest", "strategy", bad});
  const CommandResult store_failure =
      run_alphatrail({"--ledger", path.string(), "ingest", "benchmark", clash});
  EXPECT_EQ(parse_failure.exit_code, 3) << parse_failure.err;
  EXPECT_EQ(store_failure.exit_code, 3) << store_failure.err;
  SQLite::Database db(path.string(), SQLite::OPEN_READONLY);
  EXPECT_EQ(db.execAndGet("PRAGMA integrity_check").getString(), "ok");
  SQLite::Statement fk(db, "PRAGMA foreign_key_check");
  EXPECT_FALSE(fk.executeStep());
  EXPECT_EQ(db.execAndGet("SELECT group_concat(name) FROM series").getString(), "fund");
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM version_columns").getInt(), 1);
}

}  // namespace
