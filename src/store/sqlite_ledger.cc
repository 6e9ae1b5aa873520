#include "store/sqlite_ledger.h"

#include <SQLiteCpp/Statement.h>
#include <SQLiteCpp/Transaction.h>
#include <fmt/format.h>
#include <sqlite3.h>

#include <cstdint>
#include <cstdlib>
#include <fstream>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <utility>
#include <vector>

#include "core/error.h"
#include "store/migrations.h"

namespace alphatrail::store {

namespace {

Error ledger_error(const std::string& message) {
  return Error(Failure::unusable_ledger, message);
}

bool looks_like_sqlite(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  char header[16] = {};
  in.read(header, sizeof header);
  if (in.gcount() == 0) return true;  // an empty file is a new database to SQLite
  return in.gcount() == 16 && std::string(header, 15) == "SQLite format 3";
}

int pragma_int(SQLite::Database& db, const char* name) {
  return db.execAndGet(fmt::format("PRAGMA {}", name)).getInt();
}

bool has_user_objects(SQLite::Database& db) {
  return db.execAndGet("SELECT count(*) FROM sqlite_master WHERE name NOT LIKE 'sqlite_%'")
             .getInt() > 0;
}

std::unique_ptr<SQLite::Database> connect(const std::filesystem::path& path, int flags) {
  auto db = std::make_unique<SQLite::Database>(path.string(), flags, busy_timeout_ms());
  // Only a connection that writes has foreign keys to enforce; a read-only one sets nothing.
  if ((flags & SQLite::OPEN_READONLY) == 0) db->exec("PRAGMA foreign_keys = ON");
  return db;
}

// What a file says about itself: its marks and whether its schema holds anything.
struct Identity {
  std::uint32_t application_id = 0;
  int user_version = 0;
  bool has_objects = false;
};

Identity identity_of(SQLite::Database& db) {
  return {static_cast<std::uint32_t>(pragma_int(db, "application_id")),
          pragma_int(db, "user_version"), has_user_objects(db)};
}

std::uint32_t big_endian_32(const unsigned char* bytes) {
  return (std::uint32_t{bytes[0]} << 24) | (std::uint32_t{bytes[1]} << 16) |
         (std::uint32_t{bytes[2]} << 8) | std::uint32_t{bytes[3]};
}

// Reads the identity from the file's first page without SQLite (the layout is SQLite's file
// format, sqlite.org/fileformat.html: user_version at offset 60, application_id at 68, and
// page 1's b-tree header at 100, the root page of sqlite_master). Only trustworthy while no
// write-ahead log or rollback journal with content lies beside the file: every committed
// change is then in the file itself. Returns nothing when that is not so or the page is short.
std::optional<Identity> identity_from_first_page(const std::filesystem::path& path) {
  std::error_code ec;
  for (const char* suffix : {"-wal", "-journal"}) {
    const std::filesystem::path beside = path.string() + suffix;
    if (std::filesystem::exists(beside, ec) && std::filesystem::file_size(beside, ec) != 0)
      return std::nullopt;
  }
  std::ifstream in(path, std::ios::binary);
  unsigned char page[108] = {};
  in.read(reinterpret_cast<char*>(page), sizeof page);
  if (in.gcount() != sizeof page) return std::nullopt;
  constexpr unsigned char kLeafTablePage = 13;
  const bool empty_schema = page[100] == kLeafTablePage && page[103] == 0 && page[104] == 0;
  return Identity{big_endian_32(page + 68), static_cast<int>(big_endian_32(page + 60)),
                  !empty_schema};
}

// Checks the file is ours, not newer than this binary and, for a read-only open, current;
// returns its schema version (0 for an empty database the other modes make a ledger of).
int check_identity(const Identity& id, const std::filesystem::path& path, OpenMode mode) {
  const std::string name = path.string();
  if (id.application_id == 0 && id.user_version == 0 && !id.has_objects) {
    // Only a command that creates ledgers (init, ingest) makes an empty database one; evaluate
    // or rerun on it would turn it into a ledger and then fail for want of series.
    if (mode == OpenMode::create) return 0;
    throw ledger_error(
        fmt::format("{} is an empty SQLite database, not an alphatrail ledger; make it one with "
                    "`alphatrail init --ledger {}`, or name another with --ledger",
                    name, name));
  }
  if (id.application_id != static_cast<std::uint32_t>(kApplicationId))
    throw ledger_error(fmt::format(
        "{} is an SQLite database but not an alphatrail ledger (application_id {:#x}); name "
        "another file with --ledger",
        name, id.application_id));
  if (id.user_version > current_schema_version())
    throw ledger_error(fmt::format(
        "{} has schema version {}, newer than this alphatrail (it knows up to {}); use a newer "
        "alphatrail binary",
        name, id.user_version, current_schema_version()));
  if (mode == OpenMode::read_only && id.user_version < current_schema_version())
    throw ledger_error(fmt::format(
        "{} has schema version {}, older than this alphatrail (schema version {}); commands "
        "that only read never change a ledger: upgrade it with `alphatrail init --ledger {}`",
        name, id.user_version, current_schema_version(), name));
  return id.user_version;
}

Error busy_error(const std::filesystem::path& path) {
  return Error(
      Failure::busy,
      fmt::format("ledger {} stayed busy for {} ms (another command is writing); try again, or "
                  "raise ALPHATRAIL_BUSY_TIMEOUT_MS",
                  path.string(), busy_timeout_ms()));
}

// Opens an existing ledger without writing anything: SQLITE_OPEN_READONLY from the start (no
// journal mode, page size, migration or other setting is written) and PRAGMA query_only on
// top. A file that is not a current ledger is refused before SQLite opens it when its first
// page can tell: a read-only connection to a WAL file creates the -wal and -shm files beside
// it and cannot remove them again, and a refusal leaves no trace.
std::unique_ptr<SQLite::Database> open_read_only(const std::filesystem::path& path) {
  std::error_code ec;
  if (std::filesystem::is_regular_file(path, ec) && std::filesystem::file_size(path, ec) == 0)
    throw ledger_error(fmt::format(
        "{} is an empty file, not an alphatrail ledger; make it one with `alphatrail init "
        "--ledger {}`, or name another with --ledger",
        path.string(), path.string()));
  if (const auto id = identity_from_first_page(path))
    check_identity(*id, path, OpenMode::read_only);
  auto db = connect(path, SQLite::OPEN_READONLY);
  check_identity(identity_of(*db), path, OpenMode::read_only);  // what SQLite itself sees
  db->exec("PRAGMA query_only = ON");
  return db;
}

}  // namespace

int busy_timeout_ms() {
  if (const char* env = std::getenv("ALPHATRAIL_BUSY_TIMEOUT_MS"); env != nullptr) {
    char* end = nullptr;
    const long value = std::strtol(env, &end, 10);
    if (end != env && *end == '\0' && value >= 0) return static_cast<int>(value);
  }
  return 10000;
}

int current_schema_version() {
  return static_cast<int>(embedded_migrations().size());
}

namespace {

// Applies the migrations after user_version inside the caller's transaction; returns how many.
int apply_migrations(SQLite::Database& db) {
  const int from = pragma_int(db, "user_version");
  const auto& migrations = embedded_migrations();
  for (std::size_t i = static_cast<std::size_t>(from); i < migrations.size(); ++i) {
    db.exec(migrations[i].sql);
    db.exec(fmt::format("PRAGMA user_version = {}", i + 1));
  }
  if (from < static_cast<int>(migrations.size()))
    db.exec(fmt::format("PRAGMA application_id = {}", kApplicationId));
  return static_cast<int>(migrations.size()) - from;
}

}  // namespace

int migrate(SQLite::Database& db) {
  db.exec("BEGIN IMMEDIATE");
  try {
    const int applied = apply_migrations(db);
    db.exec("COMMIT");
    return applied;
  } catch (...) {
    db.exec("ROLLBACK");
    throw;
  }
}

SqliteLedger::SqliteLedger(std::filesystem::path path, std::unique_ptr<SQLite::Database> db)
    : path_(std::move(path)), db_(std::move(db)) {}

SqliteLedger SqliteLedger::open(const std::filesystem::path& path, OpenMode mode,
                                std::ostream& notices) {
  std::error_code ec;
  const bool on_disk = std::filesystem::exists(path, ec);
  // SQLite takes a zero-byte file for an empty database: it becomes a new ledger. A read-only
  // open refuses it as what it is (open_read_only); the existing mode takes it for missing.
  const bool exists = on_disk && !(std::filesystem::is_regular_file(path, ec) &&
                                   std::filesystem::file_size(path, ec) == 0);
  const bool missing = mode == OpenMode::read_only ? !on_disk : !exists;
  if (missing && mode != OpenMode::create)
    throw ledger_error(fmt::format(
        "no ledger at {}; create one with `alphatrail init --ledger {}` or name another with "
        "--ledger",
        path.string(), path.string()));
  if (exists && !looks_like_sqlite(path))
    throw ledger_error(fmt::format(
        "{} is not an SQLite database; name an alphatrail ledger with --ledger", path.string()));
  try {
    if (mode == OpenMode::read_only) return SqliteLedger(path, open_read_only(path));
    auto db = connect(path, SQLite::OPEN_READWRITE | SQLite::OPEN_CREATE);
    const int version = check_identity(identity_of(*db), path, mode);
    // A new ledger gets 16 KiB pages (SQLite's default is 4 KiB): a stored column of 5,000
    // observations spans 4 pages instead of 15, so ingesting and loading many long series
    // make a quarter of the page reads and writes. Only possible before the first table.
    if (!exists) db->exec(fmt::format("PRAGMA page_size = {}", kNewLedgerPageSize));
    if (db->execAndGet("PRAGMA journal_mode").getString() != "wal")
      db->exec("PRAGMA journal_mode = WAL");  // readers and a writer work side by side
    if (version < current_schema_version()) {
      const int applied = migrate(*db);
      if (!exists)
        notices << fmt::format("created ledger {} (schema version {})\n", path.string(),
                               current_schema_version());
      else if (applied > 0)
        notices << fmt::format("upgraded ledger {} from schema version {} to {}\n", path.string(),
                               version, current_schema_version());
    }
    db->exec("PRAGMA synchronous = NORMAL");
    return SqliteLedger(path, std::move(db));
  } catch (const SQLite::Exception& e) {
    if (e.getErrorCode() == SQLITE_BUSY) throw busy_error(path);
    throw ledger_error(fmt::format("cannot open ledger {}: {}", path.string(), e.what()));
  }
}

int SqliteLedger::schema_version() {
  return pragma_int(*db_, "user_version");
}

CachedStatement SqliteLedger::statement(const std::string& sql) {
  auto& slot = statements_[sql];
  if (!slot) slot = std::make_unique<SQLite::Statement>(*db_, sql);
  return CachedStatement(*slot);
}

bool SqliteLedger::in_transaction() {
  return sqlite3_get_autocommit(db_->getHandle()) == 0;
}

void SqliteLedger::write_transaction(const std::function<void()>& work) {
  if (in_transaction()) {
    // Nested: the outer transaction holds the write lock; a savepoint keeps this part's
    // all-or-nothing for a caller that catches the error and goes on.
    db_->exec("SAVEPOINT nested_write");
    try {
      work();
      db_->exec("RELEASE nested_write");
    } catch (...) {
      try {
        db_->exec("ROLLBACK TO nested_write");
        db_->exec("RELEASE nested_write");
      } catch (...) {  // the transaction may already be gone; the original error matters
      }
      throw;
    }
    return;
  }
  db_->exec("BEGIN IMMEDIATE");
  try {
    work();
    db_->exec("COMMIT");
  } catch (...) {
    try {
      db_->exec("ROLLBACK");
    } catch (...) {  // the transaction may already be gone; the original error matters
    }
    throw;
  }
}

void SqliteLedger::read_transaction(const std::function<void()>& work) {
  if (in_transaction()) return work();  // the outer transaction is the snapshot
  db_->exec("BEGIN");
  try {
    work();
  } catch (...) {
    try {
      db_->exec("ROLLBACK");
    } catch (...) {  // the transaction may already be gone; the original error matters
    }
    throw;
  }
  db_->exec("COMMIT");
}

void SqliteLedger::erase_and_recreate() {
  if (!in_transaction())
    throw std::logic_error("erase_and_recreate must run inside a write transaction");
  SQLite::Database& db = *db_;
  forget_statements();  // they refer to the tables about to go
  // Triggers go with their tables, indexes too; dropping the tables newest first keeps every
  // foreign key pointing at a table that still exists, and DROP TABLE fires no trigger.
  std::vector<std::pair<std::string, std::string>> objects;
  {
    SQLite::Statement q(db,
                        "SELECT type, name FROM sqlite_master WHERE type IN ('view', 'table') "
                        "AND name NOT LIKE 'sqlite_%' ORDER BY type = 'table', rowid DESC");
    while (q.executeStep())
      objects.emplace_back(q.getColumn(0).getString(), q.getColumn(1).getString());
  }
  db.exec("PRAGMA defer_foreign_keys = ON");
  for (const auto& [type, name] : objects)
    db.exec(fmt::format("DROP {} \"{}\"", type == "view" ? "VIEW" : "TABLE", name));
  db.exec("PRAGMA user_version = 0");
  apply_migrations(db);
}

void SqliteLedger::add_mark(const std::string& mark, const std::string& detail,
                            const std::string& marked_at) {
  SQLite::Statement q(*db_, "INSERT INTO ledger_marks (mark, detail, marked_at) VALUES (?, ?, ?)");
  q.bind(1, mark);
  q.bind(2, detail);
  q.bind(3, marked_at);
  q.exec();
}

bool SqliteLedger::has_mark(const std::string& mark) {
  SQLite::Database& db = *db_;
  if (!db.tableExists("ledger_marks")) return false;  // older than schema version 7
  SQLite::Statement q(db, "SELECT 1 FROM ledger_marks WHERE mark = ?");
  q.bind(1, mark);
  return q.executeStep();
}

namespace {

// Strips "--" comments and folds white space so that formatting does not count.
std::string normalise_sql(const std::string& sql) {
  std::string out;
  bool in_comment = false;
  bool in_string = false;
  bool pending_space = false;
  for (std::size_t i = 0; i < sql.size(); ++i) {
    const char c = sql[i];
    if (in_comment) {
      if (c == '\n') in_comment = false;
      continue;
    }
    if (!in_string && c == '-' && i + 1 < sql.size() && sql[i + 1] == '-') {
      in_comment = true;
      pending_space = true;
      continue;
    }
    if (c == '\'') in_string = !in_string;
    if (!in_string && (c == ' ' || c == '\n' || c == '\t' || c == '\r')) {
      pending_space = true;
      continue;
    }
    if (pending_space && !out.empty() && c != ')' && c != ',' && out.back() != '(') out += ' ';
    pending_space = false;
    out += c;
  }
  return out;
}

}  // namespace

std::string schema_fingerprint(SQLite::Database& db) {
  std::ostringstream out;
  SQLite::Statement objects(db,
                            "SELECT type, name, tbl_name, coalesce(sql, '') FROM sqlite_master "
                            "WHERE name NOT LIKE 'sqlite_%' ORDER BY type, name");
  while (objects.executeStep()) {
    out << objects.getColumn(0).getString() << ' ' << objects.getColumn(1).getString() << " on "
        << objects.getColumn(2).getString() << ": "
        << normalise_sql(objects.getColumn(3).getString()) << '\n';
  }
  return out.str();
}

}  // namespace alphatrail::store
