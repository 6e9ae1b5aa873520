// The SQLite ledger store: an alphatrail ledger in one SQLite file, the implementation of
// store::Ledger (store/ledger.h) that holds all of alphatrail's SQL and its migrations.
//
// A SqliteLedger owns one SQLite connection. Opening checks the file's application_id and refuses a
// ledger newer than this binary. Opening to write upgrades an older ledger in one transaction
// (saying so on the notice stream); opening read-only writes nothing and refuses an older
// ledger instead. Opening fails with alphatrail::Error (Failure::unusable_ledger or busy); the
// methods may throw SQLite::Exception, which open_guarded_sqlite_ledger turns into Error.
#pragma once

#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>

#include <filesystem>
#include <functional>
#include <memory>
#include <ostream>
#include <string>
#include <unordered_map>

#include "store/ledger.h"

namespace alphatrail::store {

// PRAGMA application_id of every alphatrail ledger: the bytes "ATRL".
inline constexpr int kApplicationId = 0x4154524C;

// PRAGMA page_size of a ledger this binary creates; older ledgers keep the size they have.
inline constexpr int kNewLedgerPageSize = 16384;

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

class SqliteLedger final : public Ledger {
 public:
  // Opens the ledger file (in the create and existing modes creating or upgrading it when
  // needed); notices go to `notices`. A read_only open never writes: it refuses an older ledger.
  static SqliteLedger open(const std::filesystem::path& path, OpenMode mode, std::ostream& notices);

  SQLite::Database& db() { return *db_; }
  const std::filesystem::path& path() const override { return path_; }
  int schema_version() override;

  // BEGIN IMMEDIATE ... COMMIT; nested calls are savepoints.
  void write_transaction(const std::function<void()>& work) override;
  // One read transaction; SQLite takes its locks once instead of once per statement.
  void read_transaction(const std::function<void()>& work) override;
  bool in_transaction() override;

  void erase_and_recreate() override;
  void add_mark(const std::string& mark, const std::string& detail,
                const std::string& marked_at) override;
  bool has_mark(const std::string& mark) override;

  // Every column as its canonical JSON and a packed copy (record/content.h).
  std::vector<StoreOutcome> store_versions(std::vector<NewVersion> versions,
                                           const SourceInfo& source) override;
  std::vector<std::string> series_names(core::SeriesKind kind) override;
  std::vector<VersionInfo> list_latest_versions() override;
  std::vector<VersionInfo> version_history(const std::string& name) override;
  std::vector<VersionInfo> find_versions(const std::vector<VersionRequest>& requests) override;
  // Each column from its packed copy, or, when it has none (stored before schema version 5),
  // from its JSON decoded on all cores.
  std::vector<LoadedVersion> load_observations(std::vector<VersionInfo> versions) override;

  std::vector<std::int64_t> store_runs(const std::vector<const record::NewRun*>& runs,
                                       const std::function<void(std::size_t)>& on_stored) override;
  std::optional<record::RunRow> read_run_row(std::int64_t run_id) override;
  std::vector<record::RunInput> read_run_inputs(std::int64_t run_id) override;
  std::vector<record::ShownInput> read_shown_inputs(std::int64_t run_id) override;
  nlohmann::ordered_json load_run(std::int64_t run_id) override;
  int count_study_runs(const std::string& study) override;
  int count_strategy_runs(const std::string& strategy) override;
  std::vector<RunSummary> list_runs(const RunFilter& filter) override;
  std::vector<std::int64_t> unrevised_stale_runs() override;
  std::vector<NewerInput> newer_input_versions(std::int64_t run_id) override;

  void for_each_stored_version(const std::function<void(const StoredVersion&)>& each) override;
  std::vector<std::int64_t> run_ids() override;
  // PRAGMA integrity_check, its rows split into lines.
  std::vector<std::string> integrity_problems() override;
  // Under an authorizer that allows reading only (sqlite_query.cc), on top of the read-only
  // connection's PRAGMA query_only when opened read_only.
  void read_only_query(const std::string& sql, std::int64_t limit, QueryRowSink& sink) override;

  // Drops the cached statements (before the schema they were prepared against changes).
  void forget_statements() { statements_.clear(); }

  // Returns the statement for `sql`, prepared once per connection: statements run once per
  // run or per series (thousands per command) spend more time being parsed than executed.
  // Do not borrow the same statement twice at once.
  CachedStatement statement(const std::string& sql);

 private:
  SqliteLedger(std::filesystem::path path, std::unique_ptr<SQLite::Database> db);
  std::filesystem::path path_;
  std::unique_ptr<SQLite::Database> db_;
  // Declared after db_, so destroyed before the connection closes.
  std::unordered_map<std::string, std::unique_ptr<SQLite::Statement>> statements_;
};

// Opens the ledger as SqliteLedger::open does, behind the Ledger interface with every
// SQLite::Exception a call throws turned into alphatrail::Error (sqlite_guard.cc): busy into
// Failure::busy, anything else into Failure::unusable_ledger. What open_ledger returns.
std::unique_ptr<Ledger> open_guarded_sqlite_ledger(const std::filesystem::path& path, OpenMode mode,
                                                   std::ostream& notices);

// Applies the migrations after the database's user_version, each with its version bump in
// one BEGIN IMMEDIATE transaction. Returns the number applied.
int migrate(SQLite::Database& db);

// Returns a normalised description of every table, column, index, view and trigger, for
// comparing two schemas (comments and white space do not count).
std::string schema_fingerprint(SQLite::Database& db);

}  // namespace alphatrail::store
