// The SQLite store's reads of material as stored, for verification (store/verify.cc): each
// version with its columns' JSON and packed bytes, the run ids, and SQLite's own integrity
// check. Nothing is decoded or checked here; a read failure throws SQLite::Exception.
#include <SQLiteCpp/Statement.h>

#include <string>
#include <vector>

#include "store/sqlite_ledger.h"

namespace alphatrail::store {

namespace {

std::string bytes_of(const SQLite::Column& c) {
  if (c.getBytes() == 0) return {};
  return std::string(static_cast<const char*>(c.getBlob()), static_cast<std::size_t>(c.getBytes()));
}

}  // namespace

void SqliteLedger::for_each_stored_version(const std::function<void(const StoredVersion&)>& each) {
  SQLite::Statement versions(*db_,
                             "SELECT v.version_id, s.name, s.kind, v.version, v.unit, v.quote, "
                             "v.content_hash, coalesce(v.frequency, ''), v.first_date, "
                             "v.last_date, v.observations, v.missing FROM series_versions v JOIN "
                             "series s ON s.series_id = v.series_id ORDER BY v.version_id");
  SQLite::Statement columns(*db_,
                            "SELECT c.column_name, c.values_json, p.days, p.numbers FROM "
                            "version_columns c LEFT JOIN packed_columns p ON p.column_id = "
                            "c.column_id WHERE c.version_id = ? ORDER BY c.position");
  while (versions.executeStep()) {
    StoredVersion v;
    v.name = versions.getColumn(1).getString();
    v.version = versions.getColumn(3).getInt();
    v.meta = {versions.getColumn(2).getString(), versions.getColumn(4).getString(), std::nullopt};
    if (!versions.getColumn(5).isNull()) v.meta.quote = versions.getColumn(5).getString();
    v.content_hash = versions.getColumn(6).getString();
    v.frequency = versions.getColumn(7).getString();
    v.first_date = versions.getColumn(8).getString();
    v.last_date = versions.getColumn(9).getString();
    v.observations = versions.getColumn(10).getInt64();
    v.missing = versions.getColumn(11).getInt64();
    columns.reset();
    columns.bind(1, versions.getColumn(0).getInt64());
    while (columns.executeStep()) {
      StoredColumn c{
          columns.getColumn(0).getString(), columns.getColumn(1).getString(), std::nullopt, {}};
      if (const SQLite::Column days = columns.getColumn(2); !days.isNull()) {
        c.packed_days = bytes_of(days);
        c.packed_numbers = bytes_of(columns.getColumn(3));
      }
      v.columns.push_back(std::move(c));
    }
    each(v);
  }
}

std::vector<std::int64_t> SqliteLedger::run_ids() {
  std::vector<std::int64_t> ids;
  SQLite::Statement q(*db_, "SELECT run_id FROM runs ORDER BY run_id");
  while (q.executeStep()) ids.push_back(q.getColumn(0).getInt64());
  return ids;
}

std::vector<std::string> SqliteLedger::integrity_problems() {
  std::vector<std::string> problems;
  SQLite::Statement integrity(*db_, "PRAGMA integrity_check");
  while (integrity.executeStep()) {
    const std::string text = integrity.getColumn(0).getString();
    if (text == "ok") continue;
    std::size_t start = 0;  // one finding per line: SQLite puts several in one row
    while (start < text.size()) {
      const auto end = text.find('\n', start);
      const std::string line = text.substr(start, end == std::string::npos ? end : end - start);
      if (!line.empty()) problems.push_back(line);
      if (end == std::string::npos) break;
      start = end + 1;
    }
  }
  return problems;
}

}  // namespace alphatrail::store
