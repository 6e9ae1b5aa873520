// The ledger store: everything alphatrail keeps (series versions, runs, marks) behind one
// abstract interface, so that commands and use cases never see the storage engine. Values go
// in and come out typed (record/ and the types below); no SQL crosses this line but the text
// of a user's own read-only query (read_only_query), which the engine vets.
//
// One implementation exists today, SQLite (store/sqlite_ledger.h), chosen by open_ledger from
// the ledger's location. A second engine implements this class and is chosen there too.
//
// Contracts every implementation keeps: nothing stored is ever updated or deleted (a new
// version or run is added instead); writes happen inside write_transaction, all or nothing;
// reads inside read_transaction see one snapshot. Failures throw alphatrail::Error with a
// kind (core/error.h): unusable_ledger, busy, not_found, corruption, bad_input.
#pragma once

#include <cstdint>
#include <filesystem>
#include <functional>
#include <memory>
#include <nlohmann/json.hpp>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "core/series_file.h"
#include "record/content.h"
#include "record/run_record.h"
#include "record/shown_run.h"

namespace alphatrail::store {

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

// Returns the milliseconds a command waits for a busy ledger ($ALPHATRAIL_BUSY_TIMEOUT_MS,
// default 10000).
int busy_timeout_ms();

// A version to store, as prepared from an ingest file.
struct NewVersion {
  std::string name;
  record::ContentMeta meta;
  std::string input_unit;  // decimal | percent | levels: how the file stated the values
  std::vector<record::ColumnData> columns;
};

// Where a batch of versions came from.
struct SourceInfo {
  std::string file;    // as the user named it
  std::string sha256;  // of the file's bytes
  std::string note;    // --note, may be empty
};

struct StoreOutcome {
  std::string name;
  std::string kind;
  int version = 0;
  bool new_series = false;
  bool unchanged = false;  // identical content to the latest version: nothing written
  std::string content_hash;
};

// One version's description (without observations).
struct VersionInfo {
  std::string name;
  std::string kind;
  int version = 0;
  std::int64_t version_id = 0;
  std::string content_hash;
  std::string unit;
  std::string input_unit;
  std::optional<std::string> quote;
  std::optional<std::string> frequency;
  std::string first_date;
  std::string last_date;
  std::int64_t observations = 0;
  std::int64_t missing = 0;
  std::string source_file;
  std::string source_sha256;
  std::string ingested_at;
  std::string ingested_by;
  std::string note;
  std::vector<std::string> columns;
};

// A version with its observations.
struct LoadedVersion {
  VersionInfo info;
  std::vector<record::ColumnData> columns;
};

struct VersionRequest {
  std::string name;
  std::optional<int> version;  // nullopt: the latest
};

struct RunFilter {
  std::string strategy;        // empty: any
  std::string study;           // empty: any
  std::int64_t first_run = 0;  // run ids from .. to (inclusive); 0: unbounded
  std::int64_t last_run = 0;
  bool staleness = true;  // false: leave RunSummary::stale false, which saves a join per run
};

// One line of `alphatrail runs`.
struct RunSummary {
  std::int64_t run_id = 0;
  std::string created_at;
  std::string strategy;
  std::string benchmark;
  std::string study;
  std::string inputs_hash;
  std::string frequency;
  int observations = 0;
  double alpha = 0;
  double alpha_annualized = 0;
  double alpha_t = 0;
  double alpha_p = 0;
  double beta = 0;
  double r_squared = 0;
  std::string errors;
  int lags = 0;
  bool stale = false;  // an input has a newer version than the run used
  std::optional<std::int64_t> revises_run_id;
};

// An input of a run with a newer version than the one the run used.
struct NewerInput {
  std::string series;
  int version = 0;         // the version the run used
  int latest_version = 0;  // the newest version there is
};

// One cell of a query result, as the engine typed it.
struct QueryValue {
  enum class Type { null, integer, real, text, blob };
  Type type = Type::null;
  std::int64_t integer = 0;
  double real = 0;
  std::string bytes;  // text or blob, as stored
};

// Receives a read-only query's result as it comes: the column names once, then each row.
// Both may throw (e.g. when the output cannot be written); the query stops there.
class QueryRowSink {
 public:
  virtual ~QueryRowSink() = default;
  // Called once, after the engine's first answer (or at once for a limit of 0), so a query
  // that fails at once has given the sink nothing.
  virtual void columns(const std::vector<std::string>& names) = 0;
  virtual void row(const std::vector<QueryValue>& values) = 0;
  // Called now and then while the engine works towards the next row (to flush output).
  virtual void waiting() {}
};

// A version as stored, for verification: its description, hash and every column's stored
// JSON with its packed copy.
struct StoredColumn {
  std::string name;
  std::string values_json;
  std::optional<std::string> packed_days;  // nullopt: no packed copy (before schema version 5)
  std::string packed_numbers;
};

struct StoredVersion {
  std::string name;
  int version = 0;
  record::ContentMeta meta;  // kind, unit, quote as stored
  std::string content_hash;
  std::string frequency;  // empty when none was stored
  std::string first_date;
  std::string last_date;
  std::int64_t observations = 0;
  std::int64_t missing = 0;
  std::vector<StoredColumn> columns;  // in stored position order
};

class Ledger {
 public:
  virtual ~Ledger() = default;

  // Where the ledger is, as the user would name it (a file path).
  virtual const std::filesystem::path& path() const = 0;
  // Returns the schema version of the ledger (the number of migrations applied).
  virtual int schema_version() = 0;

  // --- transactions
  // Runs work inside one write transaction; any exception rolls everything back. Inside
  // another transaction it joins it (as a savepoint): a command that does several writing
  // steps wraps them in one outer write_transaction and commits once, all or nothing.
  virtual void write_transaction(const std::function<void()>& work) = 0;
  // Runs work inside one read transaction: every read sees the same snapshot. Inside another
  // transaction it runs in that one's snapshot.
  virtual void read_transaction(const std::function<void()>& work) = 0;
  // Returns true while a transaction is open.
  virtual bool in_transaction() = 0;

  // --- marks (table ledger_marks: one row per mark, never changed)
  // Empties the ledger in place and recreates the schema, inside the caller's write
  // transaction: the ledger stays the same ledger, so another process that has it open sees
  // the new content. Used by `demo --replace` on its own ledgers.
  virtual void erase_and_recreate() = 0;
  virtual void add_mark(const std::string& mark, const std::string& detail,
                        const std::string& marked_at) = 0;
  // Returns true when the ledger carries the mark (false for ledgers older than the marks).
  virtual bool has_mark(const std::string& mark) = 0;

  // --- series and versions
  // Stores each version whose content differs from its series' latest version. Must run
  // inside write_transaction. Throws Error(bad_input) when a name exists as another kind.
  virtual std::vector<StoreOutcome> store_versions(std::vector<NewVersion> versions,
                                                   const SourceInfo& source) = 0;
  // Returns the names of every series of a kind, in name order.
  virtual std::vector<std::string> series_names(core::SeriesKind kind) = 0;
  // Returns the latest version of every series, set and curve, ordered by kind then name.
  virtual std::vector<VersionInfo> list_latest_versions() = 0;
  // Returns every version of a series, oldest first; throws Error(not_found) when unknown.
  virtual std::vector<VersionInfo> version_history(const std::string& name) = 0;
  // Returns one version row per request, without the observations; throws Error(not_found).
  virtual std::vector<VersionInfo> find_versions(const std::vector<VersionRequest>& requests) = 0;
  // Loads the observations of versions find_versions returned; throws Error(corruption) for
  // a column that cannot be read back.
  virtual std::vector<LoadedVersion> load_observations(std::vector<VersionInfo> versions) = 0;
  // find_versions and load_observations in one, in request order.
  std::vector<LoadedVersion> load_versions(const std::vector<VersionRequest>& requests);
  // Loads a version (the latest when version is empty); throws Error(not_found) when absent.
  LoadedVersion load_version(const std::string& name, std::optional<int> version = std::nullopt);

  // --- runs
  // Records runs in order, each chained to the one before, all with one time of recording;
  // must run inside write_transaction. Drafts the rows on all cores, then appends them one
  // by one, calling on_stored(number stored so far) after each. Returns their run ids.
  virtual std::vector<std::int64_t> store_runs(
      const std::vector<const record::NewRun*>& runs,
      const std::function<void(std::size_t)>& on_stored = {}) = 0;
  // Reads a run row with its inputs and coefficients; nullopt when absent.
  virtual std::optional<record::RunRow> read_run_row(std::int64_t run_id) = 0;
  // Returns the row of a run that must exist; throws Error(not_found) naming the run, the
  // ledger and the command that lists the runs.
  record::RunRow existing_run_row(std::int64_t run_id);
  // Returns the inputs of a stored run with their versions' names, numbers and hashes.
  virtual std::vector<record::RunInput> read_run_inputs(std::int64_t run_id) = 0;
  // Returns the inputs of a stored run as shown: versions, where they came from and each
  // series' newest version; strategy, benchmark, rate, then factors.
  virtual std::vector<record::ShownInput> read_shown_inputs(std::int64_t run_id) = 0;
  // Returns a run as typed values, its stored texts read checked; throws Error(not_found) when
  // absent and StoredTextError (corruption) naming the field that cannot be read.
  record::ShownRun load_run_record(std::int64_t run_id);
  // Returns the JSON run object of a run (the contract of `show --format json`: the stored
  // texts' keys in stored order); throws like load_run_record.
  virtual nlohmann::ordered_json load_run(std::int64_t run_id) = 0;
  // Returns how many runs a study has (0 for an empty study name).
  virtual int count_study_runs(const std::string& study) = 0;
  // Returns how many runs a strategy has.
  virtual int count_strategy_runs(const std::string& strategy) = 0;
  // Returns the runs matching the filter, oldest first.
  virtual std::vector<RunSummary> list_runs(const RunFilter& filter) = 0;
  // Returns the stale runs (an input has a newer version than the run used: the run_summary
  // view's definition) that no later run revises yet, oldest first.
  virtual std::vector<std::int64_t> unrevised_stale_runs() = 0;
  // Returns the inputs of a run that have newer versions, in the run's input order.
  virtual std::vector<NewerInput> newer_input_versions(std::int64_t run_id) = 0;

  // --- reading as stored (verify, query)
  // Calls each with every version in the order stored, its columns as stored.
  virtual void for_each_stored_version(const std::function<void(const StoredVersion&)>& each) = 0;
  // Returns every run id, ascending.
  virtual std::vector<std::int64_t> run_ids() = 0;
  // Returns the findings of the engine's own integrity check, one per line (none: intact).
  virtual std::vector<std::string> integrity_problems() = 0;
  // Runs one SQL statement that only reads, giving its result to sink as it comes; at most
  // `limit` rows (-1: all), the statement stopped there. Throws Error(invalid_argument) for a
  // statement that would write, more than one statement, none, or one the engine rejects or
  // fails (rows given so far stand).
  virtual void read_only_query(const std::string& sql, std::int64_t limit, QueryRowSink& sink) = 0;
};

// Returns the schema version this binary writes (the number of embedded migrations).
int current_schema_version();

// Opens the ledger at `location` (in the create and existing modes creating or upgrading it
// when needed; notices go to `notices`). A read_only open never writes.
std::unique_ptr<Ledger> open_ledger(const std::filesystem::path& location, OpenMode mode,
                                    std::ostream& notices);

// Returns the current UTC time as ISO 8601 with milliseconds, e.g. 2026-12-02T01:02:03.004Z.
std::string utc_now();

// Returns the name of the user running the command ($USER, else the account), with bytes that
// are not storable text (core/text.h) escaped as \xNN.
std::string current_user();

}  // namespace alphatrail::store
