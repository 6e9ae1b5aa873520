// The ledger file: opening, creating and migrating an alphatrail SQLite ledger.
//
// A Ledger owns one SQLite connection. Opening checks the file's application_id and refuses a
// ledger newer than this binary. Opening to write upgrades an older ledger in one transaction
// (saying so on the notice stream); opening read-only writes nothing and refuses an older
// ledger instead. Failures throw alphatrail::Error with Failure::unusable_ledger.
#pragma once

#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>

#include <filesystem>
#include <functional>
#include <memory>
#include <ostream>
#include <string>
#include <unordered_map>

namespace alphatrail::store {

// PRAGMA application_id of every alphatrail ledger: the bytes "ATRL".
inline constexpr int kApplicationId = 0x4154524C;

// PRAGMA page_size of a ledger this binary creates; older ledgers keep the size they have.
inline constexpr int kNewLedgerPageSize = 16384;

enum class OpenMode {
  create,    // create the file if missing (and say so), migrate
  existing,  // the file must be a ledger (an empty SQLite database is refused), migrate
  // The file must be a ledger at the current schema version: opened with SQLITE_OPEN_READONLY
  // and PRAGMA query_only, nothing written (no journal mode, no migration). An older ledger, an
  // empty file or database and any other file are refused; `alphatrail init` upgrades an older
  // ledger.
  read_only,
};

// Returns the ledger path: the --ledger option when given, else $ALPHATRAIL_LEDGER, else
// ./alphatrail.db.
std::filesystem::path resolve_ledger_path(const std::string& option_value);

// A prepared statement borrowed from a Ledger's cache; handing it back resets it and clears
// its bindings, so a finished read never holds a snapshot open. Use it as a SQLite::Statement.
class CachedStatement {
 public:
  explicit CachedStatement(SQLite::Statement& statement) : statement_(&statement) {}
  ~CachedStatement() {
    statement_->tryReset();
    statement_->clearBindings();
  }
  CachedStatement(const CachedStatement&) = delete;
  CachedStatement& operator=(const CachedStatement&) = delete;
  SQLite::Statement* operator->() { return statement_; }
  SQLite::Statement& operator*() { return *statement_; }

 private:
  SQLite::Statement* statement_;
};

class Ledger {
 public:
  // Opens the ledger (in the create and existing modes creating or upgrading it when needed);
  // notices go to `notices`. A read_only open never writes: it refuses an older ledger.
  static Ledger open(const std::filesystem::path& path, OpenMode mode, std::ostream& notices);

  SQLite::Database& db() { return *db_; }
  const std::filesystem::path& path() const { return path_; }
  // Returns PRAGMA user_version, the number of migrations applied.
  int schema_version();

  // Runs work inside BEGIN IMMEDIATE ... COMMIT; any exception rolls everything back. Inside
  // another transaction it joins it (as a savepoint): a command that does several writing
  // steps wraps them in one outer write_transaction and commits once, all or nothing.
  void write_transaction(const std::function<void()>& work);

  // Runs work inside one read transaction: every statement sees the same snapshot, and SQLite
  // takes its locks once instead of once per statement (thousands when loading many series).
  // Inside another transaction it runs in that one's snapshot.
  void read_transaction(const std::function<void()>& work);

  // Returns true while a transaction is open on this connection.
  bool in_transaction();

  // Drops the cached statements (before the schema they were prepared against changes).
  void forget_statements() { statements_.clear(); }

  // Returns the statement for `sql`, prepared once per connection: statements run once per
  // run or per series (thousands per command) spend more time being parsed than executed.
  // Do not borrow the same statement twice at once.
  CachedStatement statement(const std::string& sql);

 private:
  Ledger(std::filesystem::path path, std::unique_ptr<SQLite::Database> db);
  std::filesystem::path path_;
  std::unique_ptr<SQLite::Database> db_;
  // Declared after db_, so destroyed before the connection closes.
  std::unordered_map<std::string, std::unique_ptr<SQLite::Statement>> statements_;
};

// Empties the ledger in place and applies every migration from zero, inside the caller's write
// transaction: the file stays the same file, so another process that has it open sees the new
// content instead of writing into a deleted file. Used by `demo --replace` on its own ledgers.
void erase_and_recreate(Ledger& ledger);

// Adds a mark to the ledger (table ledger_marks, one row per mark; a mark is never changed).
void add_mark(Ledger& ledger, const std::string& mark, const std::string& detail,
              const std::string& marked_at);

// Returns true when the ledger carries the mark (false for ledgers older than the marks).
bool has_mark(Ledger& ledger, const std::string& mark);

// Returns the schema version this binary writes (the number of embedded migrations).
int current_schema_version();

// Applies the migrations after the database's user_version, each with its version bump in
// one BEGIN IMMEDIATE transaction. Returns the number applied.
int migrate(SQLite::Database& db);

// Returns a normalised description of every table, column, index, view and trigger, for
// comparing two schemas (comments and white space do not count).
std::string schema_fingerprint(SQLite::Database& db);

// Returns the milliseconds a command waits for a busy ledger ($ALPHATRAIL_BUSY_TIMEOUT_MS,
// default 10000).
int busy_timeout_ms();

}  // namespace alphatrail::store
