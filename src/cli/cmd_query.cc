// `alphatrail query SQL`: runs one SQL statement that only reads and streams its rows as they
// come (table, json or csv), so a long or endless result needs no more memory than a short one.
//
// What may run is decided by an SQLite authorizer on the query's connection (reads, functions,
// recursive queries and the pragmas that only report); the connection itself is read-only with
// PRAGMA query_only, the hard guard underneath. A refused statement exits 2, names what was
// refused and leaves the ledger as it was. A failure after the first rows were printed exits 2
// too, the rows printed so far standing.
#include <fmt/format.h>
#include <sqlite3.h>

#include <CLI/CLI.hpp>
#include <array>
#include <cctype>
#include <chrono>
#include <cstdint>
#include <iostream>
#include <memory>
#include <string_view>

#include "cli/commands.h"
#include "cli/output.h"
#include "core/error.h"
#include "store/sqlite_ledger.h"

namespace alphatrail::cli {

namespace {

struct QueryOptions {
  std::string sql;
  Format format = Format::table;
  std::int64_t limit = -1;  // the most rows to print; -1 for all
};

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

// --- printing rows as they come ------------------------------------------------------------

std::string cell_bytes(sqlite3_stmt* statement, int column) {
  const void* data = sqlite3_column_blob(statement, column);  // text or blob, as stored
  const int size = sqlite3_column_bytes(statement, column);
  return data != nullptr ? std::string(static_cast<const char*>(data), size) : std::string();
}

// Returns a cell as text: an integer in full, a double in its shortest exact form, text and
// blobs as stored, NULL as `null_text`.
std::string cell_text(sqlite3_stmt* statement, int column, const char* null_text) {
  switch (sqlite3_column_type(statement, column)) {
    case SQLITE_NULL: return null_text;
    case SQLITE_INTEGER: return std::to_string(sqlite3_column_int64(statement, column));
    case SQLITE_FLOAT: return fmt::format("{}", sqlite3_column_double(statement, column));
    default: return cell_bytes(statement, column);
  }
}

std::vector<std::string> column_names(sqlite3_stmt* statement) {
  std::vector<std::string> names;
  names.reserve(static_cast<std::size_t>(sqlite3_column_count(statement)));
  for (int c = 0; c < sqlite3_column_count(statement); ++c)
    names.push_back(text_of(sqlite3_column_name(statement, c)));
  return names;
}

class RowPrinter {
 public:
  virtual ~RowPrinter() = default;
  virtual void row(sqlite3_stmt* statement) = 0;
  // Ends the output after the last row.
  virtual void finish() = 0;
};

class CsvRows : public RowPrinter {
 public:
  CsvRows(std::ostream& out, sqlite3_stmt* statement) : out_(out) {
    print_csv_row(out_, column_names(statement));
  }
  void row(sqlite3_stmt* statement) override {
    cells_.clear();
    for (int c = 0; c < sqlite3_column_count(statement); ++c)
      cells_.push_back(cell_text(statement, c, ""));
    print_csv_row(out_, cells_);
  }
  void finish() override {}

 private:
  std::ostream& out_;
  std::vector<std::string> cells_;
};

// A JSON array of one object per row, as print_json prints it, written row by row.
class JsonRows : public RowPrinter {
 public:
  JsonRows(std::ostream& out, sqlite3_stmt* statement)
      : out_(out), names_(column_names(statement)) {
    out_ << '[';
  }
  void row(sqlite3_stmt* statement) override {
    nlohmann::ordered_json object = nlohmann::ordered_json::object();
    for (int c = 0; c < sqlite3_column_count(statement); ++c) {
      auto& value = object[names_[c]];
      switch (sqlite3_column_type(statement, c)) {
        case SQLITE_NULL: value = nullptr; break;
        case SQLITE_INTEGER: value = sqlite3_column_int64(statement, c); break;
        case SQLITE_FLOAT: value = json_number(sqlite3_column_double(statement, c)); break;
        default: value = cell_bytes(statement, c);
      }
    }
    // Indented one level deeper, as inside the array (JSON text holds no raw line breaks).
    std::string text = rows_ == 0 ? "\n  " : ",\n  ";
    // Text that is not UTF-8 (a blob cast to text) prints as U+FFFD rather than failing.
    for (const char c : object.dump(2, ' ', false, nlohmann::json::error_handler_t::replace)) {
      text += c;
      if (c == '\n') text += "  ";
    }
    out_.write(text.data(), static_cast<std::streamsize>(text.size()));
    ++rows_;
  }
  void finish() override { out_ << (rows_ == 0 ? "]\n" : "\n]\n"); }

 private:
  std::ostream& out_;
  std::vector<std::string> names_;
  std::int64_t rows_ = 0;
};

class TableRows : public RowPrinter {
 public:
  TableRows(std::ostream& out, sqlite3_stmt* statement) : table_(out, column_names(statement)) {}
  void row(sqlite3_stmt* statement) override {
    std::vector<std::string> cells;
    cells.reserve(static_cast<std::size_t>(sqlite3_column_count(statement)));
    numbers_.assign(static_cast<std::size_t>(sqlite3_column_count(statement)), false);
    for (int c = 0; c < sqlite3_column_count(statement); ++c) {
      const int type = sqlite3_column_type(statement, c);
      numbers_[c] = type == SQLITE_INTEGER || type == SQLITE_FLOAT;
      cells.push_back(cell_text(statement, c, "NULL"));
    }
    table_.add(std::move(cells), numbers_);
  }
  void finish() override { table_.finish(); }

 private:
  StreamedTable table_;
  std::vector<bool> numbers_;
};

// Pushes printed rows out while the query runs: what was printed is flushed once 50 ms have
// passed since the last flush, checked after each row and, through SQLite's progress handler,
// while SQLite works towards the next. The first rows appear at once even when the rest takes
// long, and a fast result is still written in large blocks rather than a write per row.
class Flusher {
 public:
  explicit Flusher(std::ostream& out) : out_(out), last_(Clock::now()) {}
  void printed() {
    pending_ = true;
    flush_when_due();
  }
  void flush_when_due() {
    if (pending_ && Clock::now() - last_ >= kInterval) flush();
  }
  void flush() {
    out_.flush();
    pending_ = false;
    last_ = Clock::now();
  }
  static int on_progress(void* self) {
    static_cast<Flusher*>(self)->flush_when_due();
    return 0;  // go on
  }

 private:
  using Clock = std::chrono::steady_clock;
  static constexpr std::chrono::milliseconds kInterval{50};
  std::ostream& out_;
  Clock::time_point last_;
  bool pending_ = false;
};

std::unique_ptr<RowPrinter> row_printer(Format format, std::ostream& out, sqlite3_stmt* statement) {
  switch (format) {
    case Format::json: return std::make_unique<JsonRows>(out, statement);
    case Format::csv: return std::make_unique<CsvRows>(out, statement);
    case Format::table: break;
  }
  return std::make_unique<TableRows>(out, statement);
}

// Keeps a Flusher as the connection's progress handler while it lives.
class FlushWhileWorking {
 public:
  FlushWhileWorking(sqlite3* db, Flusher& flusher) : db_(db) {
    constexpr int kSteps = 1000;  // virtual machine steps between two calls
    sqlite3_progress_handler(db_, kSteps, Flusher::on_progress, &flusher);
  }
  ~FlushWhileWorking() { sqlite3_progress_handler(db_, 0, nullptr, nullptr); }
  FlushWhileWorking(const FlushWhileWorking&) = delete;
  FlushWhileWorking& operator=(const FlushWhileWorking&) = delete;

 private:
  sqlite3* db_;
};

void run_query(const QueryOptions& o, const GlobalOptions& global) {
  auto ledger = store::SqliteLedger::open(store::resolve_ledger_path(global.ledger),
                                          store::OpenMode::read_only, std::cerr);
  sqlite3* db = ledger.db().getHandle();
  std::string refused;  // what the authorizer refused, for the message
  const StatementHandle statement = prepare_read(db, o.sql, refused);
  std::ostream& out = std::cout;
  Flusher flusher(out);
  // The header waits for SQLite's first answer: a query that fails at once prints nothing.
  std::unique_ptr<RowPrinter> printer;
  {
    const FlushWhileWorking guard(db, flusher);
    for (std::int64_t rows = 0; o.limit < 0 || rows < o.limit; ++rows) {
      const int rc = sqlite3_step(statement.get());
      if (rc != SQLITE_ROW && rc != SQLITE_DONE) {
        flusher.flush();  // the rows printed so far stand
        if (!refused.empty()) throw refusal(refused);
        throw query_failure(sqlite3_errmsg(db));
      }
      if (!printer) printer = row_printer(o.format, out, statement.get());
      if (rc == SQLITE_DONE) break;
      printer->row(statement.get());
      flusher.printed();
      if (!out)  // a closed pipe or a full disk: an endless query would never stop
        throw Error(Failure::internal, "query stopped: its output could not be written");
    }
  }
  if (!printer) printer = row_printer(o.format, out, statement.get());  // --limit 0
  printer->finish();
  flusher.flush();
}

}  // namespace

void setup_query(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<QueryOptions>();
  auto* cmd = app.add_subcommand(
      "query", "Run one SQL statement that only reads, printing its rows as they come");
  cmd->add_option("sql", o->sql,
                  "One SQL statement that reads: SELECT, WITH ... SELECT, or a PRAGMA that "
                  "reports (a trailing ; and comments are fine)")
      ->required();
  add_format_option(*cmd, o->format);
  cmd->add_option("--limit", o->limit,
                  "Print at most N rows (N >= 0) and stop the query there; default: all rows")
      ->type_name("N")
      ->check(CLI::Validator(
          [](const std::string& text) {
            const bool digits =
                !text.empty() && text.find_first_not_of("0123456789") == std::string::npos;
            return digits ? std::string()
                          : fmt::format("needs a whole number of rows, 0 or more, not '{}'", text);
          },
          "N >= 0"));
  cmd->callback([o, &global] { run_query(*o, global); });
}

}  // namespace alphatrail::cli
