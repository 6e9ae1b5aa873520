#include <SQLiteCpp/Statement.h>
#include <fmt/format.h>
#include <sqlite3.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "cli/commands.h"
#include "cli/output.h"
#include "core/error.h"
#include "ledger/ledger.h"

namespace alphatrail::cli {

namespace {

struct QueryOptions {
  std::string sql;
  Format format = Format::table;
};

// Asks SQLite whether a statement would write (it is refused on this connection anyway; this
// gives the clearer message).
bool is_read_only(SQLite::Database& db, const std::string& sql) {
  sqlite3_stmt* statement = nullptr;
  if (sqlite3_prepare_v2(db.getHandle(), sql.c_str(), -1, &statement, nullptr) != SQLITE_OK)
    return true;  // the caller's own prepare reports the error
  const bool read_only = sqlite3_stmt_readonly(statement) != 0;
  sqlite3_finalize(statement);
  return read_only;
}

void run_query(const QueryOptions& o, const GlobalOptions& global) {
  auto ledger = ledger::Ledger::open(ledger::resolve_ledger_path(global.ledger),
                                     ledger::OpenMode::read_only, std::cerr);
  Table table;
  auto rows = nlohmann::ordered_json::array();
  try {
    SQLite::Statement q(ledger.db(), o.sql);
    if (!is_read_only(ledger.db(), o.sql))
      throw Error(ExitCode::usage,
                  "query runs on a read-only connection: the statement would write, so it was "
                  "refused and nothing changed (the ledger is append-only; use ingest and "
                  "evaluate)");
    for (int c = 0; c < q.getColumnCount(); ++c) table.header.push_back(q.getColumnName(c));
    table.right_aligned.assign(table.header.size(), false);
    while (q.executeStep()) {
      std::vector<std::string> row;
      nlohmann::ordered_json object = nlohmann::ordered_json::object();
      for (int c = 0; c < q.getColumnCount(); ++c) {
        const SQLite::Column col = q.getColumn(c);
        switch (col.getType()) {
          case SQLITE_NULL:
            row.emplace_back(o.format == Format::table ? "NULL" : "");
            object[table.header[c]] = nullptr;
            break;
          case SQLITE_INTEGER:
            row.push_back(std::to_string(col.getInt64()));
            object[table.header[c]] = col.getInt64();
            table.right_aligned[c] = true;
            break;
          case SQLITE_FLOAT:
            row.push_back(fmt::format("{}", col.getDouble()));
            object[table.header[c]] = json_number(col.getDouble());
            table.right_aligned[c] = true;
            break;
          default: row.push_back(col.getString()); object[table.header[c]] = col.getString();
        }
      }
      table.rows.push_back(std::move(row));
      rows.push_back(std::move(object));
    }
  } catch (const SQLite::Exception& e) {
    throw Error(ExitCode::usage, fmt::format("query failed: {}; nothing was changed (see "
                                             "schema/ledger.sql for the tables and views)",
                                             e.what()));
  }
  switch (o.format) {
    case Format::json: print_json(std::cout, rows); break;
    case Format::csv: print_csv(std::cout, table); break;
    case Format::table: print_table(std::cout, table); break;
  }
}

}  // namespace

void setup_query(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<QueryOptions>();
  auto* cmd = app.add_subcommand("query", "Run an SQL query on a read-only connection");
  cmd->add_option("sql", o->sql, "SQL SELECT statement")->required();
  add_format_option(*cmd, o->format);
  cmd->callback([o, &global] { run_query(*o, global); });
}

}  // namespace alphatrail::cli
