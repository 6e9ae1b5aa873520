// The SQLite store's read-only query (`alphatrail query SQL`): one statement that only reads,
// its rows handed to a QueryRowSink as SQLite produces them.
//
// What may run is decided by an SQLite authorizer on the connection (reads, functions,
// recursive queries and the pragmas that only report); a ledger opened read_only has PRAGMA
// query_only too, the hard guard underneath. A refused statement throws
// Error(invalid_argument) naming what was refused, before anything ran; a failure after rows
// were given throws the same kind, the rows given standing.
#include <fmt/format.h>
#include <sqlite3.h>

#include <array>
#include <cctype>
#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "core/error.h"
#include "store/sqlite_ledger.h"

namespace alphatrail::store {

namespace {

Error refusal(const std::string& what) {
  return Error(Failure::invalid_argument,
               fmt::format("query only reads, on a read-only connection: {} was refused; "
                           "nothing changed (the ledger is append-only: use ingest and evaluate "
                           "to add to it)",
                           what));
}

Error query_failure(const char* sqlite_message) {
  return Error(Failure::invalid_argument, fmt::format("query failed: {}; nothing was changed (see "
                                                      "schema/ledger.sql for the tables and views)",
                                                      sqlite_message));
}

// --- what may run -------------------------------------------------------------------------

template <std::size_t N>
bool is_one_of(const char* name, const std::array<const char*, N>& names) {
  if (name == nullptr) return false;
  for (const char* candidate : names)
    if (sqlite3_stricmp(name, candidate) == 0) return true;
  return false;
}

// Pragmas that read the schema of a named table or index, or check it: allowed with their
// argument. Every other pragma is allowed only in its query form, without an argument.
constexpr std::array<const char*, 10> kSchemaPragmas{
    "table_info",  "table_xinfo",      "table_list",        "index_list",      "index_info",
    "index_xinfo", "foreign_key_list", "foreign_key_check", "integrity_check", "quick_check"};

// Pragmas that act even in their query form: a checkpoint writes the ledger file, optimize runs
// ANALYZE, incremental_vacuum frees pages.
constexpr std::array<const char*, 3> kActingPragmas{"optimize", "wal_checkpoint",
                                                    "incremental_vacuum"};

constexpr std::array<const char*, 4> kSchemaTables{"sqlite_master", "sqlite_schema",
                                                   "sqlite_temp_master", "sqlite_temp_schema"};

std::string text_of(const char* text) {
  return text != nullptr ? text : "";
}

// Describes an action the authorizer refuses, e.g. "DELETE on table runs".
std::string describe(int action, const char* a, const char* b) {
  const std::string first = text_of(a);
  switch (action) {
    case SQLITE_INSERT: return "INSERT into table " + first;
    case SQLITE_UPDATE: return "UPDATE of table " + first;
    case SQLITE_DELETE: return "DELETE on table " + first;
    case SQLITE_CREATE_TABLE: return "CREATE TABLE " + first;
    case SQLITE_CREATE_TEMP_TABLE: return "CREATE TEMP TABLE " + first;
    case SQLITE_CREATE_INDEX:
    case SQLITE_CREATE_TEMP_INDEX: return "CREATE INDEX " + first;
    case SQLITE_CREATE_VIEW:
    case SQLITE_CREATE_TEMP_VIEW: return "CREATE VIEW " + first;
    case SQLITE_CREATE_TRIGGER:
    case SQLITE_CREATE_TEMP_TRIGGER: return "CREATE TRIGGER " + first;
    case SQLITE_CREATE_VTABLE: return "CREATE VIRTUAL TABLE " + first;
    case SQLITE_DROP_TABLE:
    case SQLITE_DROP_TEMP_TABLE: return "DROP TABLE " + first;
    case SQLITE_DROP_INDEX:
    case SQLITE_DROP_TEMP_INDEX: return "DROP INDEX " + first;
    case SQLITE_DROP_VIEW:
    case SQLITE_DROP_TEMP_VIEW: return "DROP VIEW " + first;
    case SQLITE_DROP_TRIGGER:
    case SQLITE_DROP_TEMP_TRIGGER: return "DROP TRIGGER " + first;
    case SQLITE_DROP_VTABLE: return "DROP VIRTUAL TABLE " + first;
    case SQLITE_ALTER_TABLE: return "ALTER TABLE " + text_of(b);
    case SQLITE_ANALYZE: return "ANALYZE";
    case SQLITE_REINDEX: return "REINDEX";
    case SQLITE_ATTACH: return fmt::format("ATTACH of '{}'", first);
    case SQLITE_DETACH: return "DETACH of " + first;
    case SQLITE_TRANSACTION: return first + " (a transaction)";
    case SQLITE_SAVEPOINT:  // a: BEGIN, RELEASE or ROLLBACK
      return fmt::format("{} {}", first == "BEGIN" ? "SAVEPOINT" : first, text_of(b));
    case SQLITE_PRAGMA:
      return b != nullptr ? fmt::format("PRAGMA {} = {}", first, b) : "PRAGMA " + first;
    default: return fmt::format("SQLite action {}", action);
  }
}

// The authorizer of the query's connection: allows reading and nothing else, and keeps the
// first refused action (in `data`, a std::string) for the message.
int authorize(void* data, int action, const char* a, const char* b, const char* /*database*/,
              const char* /*trigger or view*/) {
  bool allowed = false;
  switch (action) {
    case SQLITE_SELECT:
    case SQLITE_READ:
    case SQLITE_FUNCTION:
    case SQLITE_RECURSIVE: allowed = true; break;
    case SQLITE_PRAGMA:
      allowed = b == nullptr ? !is_one_of(a, kActingPragmas) : is_one_of(a, kSchemaPragmas);
      break;
    case SQLITE_INSERT:
    case SQLITE_UPDATE:
    case SQLITE_DELETE:
      // Of the schema table only. SQLite asks for an UPDATE of it when a connection first uses
      // a table-valued function (json_each, which the observations view reads, or
      // pragma_table_info) while declaring its columns; and asks for an INSERT before the
      // CREATE TABLE that causes it, which names the refusal better. Such a write still cannot
      // run: it makes a statement that writes, refused after preparing (or its CREATE is
      // refused here), on a connection that cannot write.
      allowed = is_one_of(a, kSchemaTables);
      break;
    default: break;
  }
  if (allowed) return SQLITE_OK;
  auto& refused = *static_cast<std::string*>(data);
  if (refused.empty()) refused = describe(action, a, b);
  return SQLITE_DENY;
}

// Returns the position of the first character from `pos` that is not white space, a comment
// ("--" to the line end, "/* ... */", an unclosed one running to the end) or a semicolon.
std::size_t skip_blanks(std::string_view sql, std::size_t pos) {
  while (pos < sql.size()) {
    const char c = sql[pos];
    if (c == ';' || std::isspace(static_cast<unsigned char>(c)) != 0) {
      ++pos;
    } else if (sql.substr(pos, 2) == "--") {
      pos = sql.find('\n', pos);
      if (pos == std::string_view::npos) return sql.size();
    } else if (sql.substr(pos, 2) == "/*") {
      pos = sql.find("*/", pos + 2);
      if (pos == std::string_view::npos) return sql.size();
      pos += 2;
    } else {
      break;
    }
  }
  return pos;
}

// Returns the statement's first word in capitals, e.g. "VACUUM".
std::string first_word(std::string_view sql) {
  std::string word;
  for (std::size_t i = skip_blanks(sql, 0);
       i < sql.size() && (std::isalpha(static_cast<unsigned char>(sql[i])) != 0 || sql[i] == '_');
       ++i)
    word += static_cast<char>(std::toupper(static_cast<unsigned char>(sql[i])));
  return word;
}

using StatementHandle = std::unique_ptr<sqlite3_stmt, decltype(&sqlite3_finalize)>;

// Prepares the one statement of `sql` under the reading authorizer (`refused` receives what it
// refuses and must outlive the statement), or throws an Error saying why not.
StatementHandle prepare_read(sqlite3* db, const std::string& sql, std::string& refused) {
  sqlite3_set_authorizer(db, authorize, &refused);
  sqlite3_stmt* raw = nullptr;
  const char* tail = nullptr;
  const int rc = sqlite3_prepare_v2(db, sql.c_str(), static_cast<int>(sql.size()), &raw, &tail);
  StatementHandle statement(raw, sqlite3_finalize);
  if (!refused.empty()) throw refusal(refused);
  if (rc != SQLITE_OK) throw query_failure(sqlite3_errmsg(db));
  if (!statement)
    throw Error(Failure::invalid_argument,
                "query needs an SQL statement, and the text holds none (it is empty or only "
                "comments); give one, e.g. alphatrail query \"SELECT * FROM run_summary\"");
  const std::size_t rest = skip_blanks(sql, static_cast<std::size_t>(tail - sql.c_str()));
  if (rest < sql.size()) {
    constexpr std::size_t kShown = 40;
    const std::string more = sql.substr(rest, kShown) + (sql.size() - rest > kShown ? "..." : "");
    throw Error(Failure::invalid_argument,
                fmt::format("query runs one SQL statement, and more follows the first (`{}`); "
                            "nothing was run: give each statement a query of its own",
                            more));
  }
  // The authorizer never sees VACUUM (VACUUM INTO writes a new file even from a read-only
  // connection): SQLite's own flag catches it. The query form of a pragma such as journal_mode
  // counts as writing there although it only reports; the authorizer has vetted pragmas.
  const std::string word = first_word(sql);
  if (sqlite3_stmt_readonly(statement.get()) == 0 && word != "PRAGMA")
    throw refusal(word.empty() ? "the statement" : word + " statement");
  return statement;
}

std::string cell_bytes(sqlite3_stmt* statement, int column) {
  const void* data = sqlite3_column_blob(statement, column);  // text or blob, as stored
  const int size = sqlite3_column_bytes(statement, column);
  return data != nullptr ? std::string(static_cast<const char*>(data), size) : std::string();
}

void read_row(sqlite3_stmt* statement, std::vector<QueryValue>& values) {
  values.resize(static_cast<std::size_t>(sqlite3_column_count(statement)));
  for (int c = 0; c < sqlite3_column_count(statement); ++c) {
    QueryValue& value = values[static_cast<std::size_t>(c)];
    value.bytes.clear();
    switch (sqlite3_column_type(statement, c)) {
      case SQLITE_NULL: value.type = QueryValue::Type::null; break;
      case SQLITE_INTEGER:
        value.type = QueryValue::Type::integer;
        value.integer = sqlite3_column_int64(statement, c);
        break;
      case SQLITE_FLOAT:
        value.type = QueryValue::Type::real;
        value.real = sqlite3_column_double(statement, c);
        break;
      case SQLITE_TEXT:
        value.type = QueryValue::Type::text;
        value.bytes = cell_bytes(statement, c);
        break;
      default: value.type = QueryValue::Type::blob; value.bytes = cell_bytes(statement, c);
    }
  }
}

std::vector<std::string> column_names(sqlite3_stmt* statement) {
  std::vector<std::string> names;
  names.reserve(static_cast<std::size_t>(sqlite3_column_count(statement)));
  for (int c = 0; c < sqlite3_column_count(statement); ++c)
    names.push_back(text_of(sqlite3_column_name(statement, c)));
  return names;
}

int on_progress(void* sink) {
  static_cast<QueryRowSink*>(sink)->waiting();
  return 0;  // go on
}

// Keeps the sink's waiting() as the connection's progress handler, and the reading authorizer,
// while it lives.
class QueryHooks {
 public:
  explicit QueryHooks(sqlite3* db) : db_(db) {}
  void progress(QueryRowSink& sink) {
    constexpr int kSteps = 1000;  // virtual machine steps between two calls
    sqlite3_progress_handler(db_, kSteps, on_progress, &sink);
  }
  ~QueryHooks() {
    sqlite3_progress_handler(db_, 0, nullptr, nullptr);
    sqlite3_set_authorizer(db_, nullptr, nullptr);
  }
  QueryHooks(const QueryHooks&) = delete;
  QueryHooks& operator=(const QueryHooks&) = delete;

 private:
  sqlite3* db_;
};

}  // namespace

void SqliteLedger::read_only_query(const std::string& sql, std::int64_t limit, QueryRowSink& sink) {
  sqlite3* db = db_->getHandle();
  std::string refused;   // what the authorizer refused, for the message
  QueryHooks hooks(db);  // declared before the statement: outlives it
  const StatementHandle statement = prepare_read(db, sql, refused);
  hooks.progress(sink);
  // The names wait for SQLite's first answer: a query that fails at once gives nothing.
  bool named = false;
  std::vector<QueryValue> values;
  for (std::int64_t rows = 0; limit < 0 || rows < limit; ++rows) {
    const int rc = sqlite3_step(statement.get());
    if (rc != SQLITE_ROW && rc != SQLITE_DONE) {
      if (!refused.empty()) throw refusal(refused);
      throw query_failure(sqlite3_errmsg(db));
    }
    if (!named) {
      sink.columns(column_names(statement.get()));
      named = true;
    }
    if (rc == SQLITE_DONE) break;
    read_row(statement.get(), values);
    sink.row(values);
  }
  if (!named) sink.columns(column_names(statement.get()));  // a limit of 0
}

}  // namespace alphatrail::store
