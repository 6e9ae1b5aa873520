#include <SQLiteCpp/Statement.h>
#include <fmt/format.h>
#include <pwd.h>
#include <sqlite3.h>
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <condition_variable>
#include <cstdlib>
#include <deque>
#include <exception>
#include <mutex>
#include <thread>
#include <unordered_map>

#include "core/error.h"
#include "core/parallel.h"
#include "core/text.h"
#include "store/sqlite_ledger.h"

namespace alphatrail::store {

namespace {

struct Prepared {
  std::vector<record::EncodedColumn> columns;
  std::vector<record::PackedColumn> packed;  // the same columns, packed for loading
  std::string hash;
  std::vector<core::Day> all_dates;  // union over columns, ascending
  std::int64_t missing = 0;
};

Prepared prepare(const NewVersion& v) {
  Prepared p;
  p.columns.reserve(v.columns.size());
  p.packed.reserve(v.columns.size());
  for (const auto& c : v.columns) {
    p.columns.push_back({c.name, record::encode_values_json(c)});
    p.packed.push_back(record::encode_packed(c));
    p.missing +=
        std::count_if(c.values.begin(), c.values.end(), [](double x) { return std::isnan(x); });
    p.all_dates.insert(p.all_dates.end(), c.dates.begin(), c.dates.end());
  }
  if (v.columns.size() > 1) {
    std::sort(p.all_dates.begin(), p.all_dates.end());
    p.all_dates.erase(std::unique(p.all_dates.begin(), p.all_dates.end()), p.all_dates.end());
  }
  p.hash = record::content_hash(v.meta, p.columns);
  return p;
}

// Encodes and hashes versions on worker threads while the caller stores the ones already
// done, in order: the pure work overlaps SQLite's writing.
class PreparedPipeline {
 public:
  explicit PreparedPipeline(const std::vector<NewVersion>& versions)
      : versions_(versions), slots_(versions.size()), ready_(versions.size(), false) {
    const std::size_t workers =
        std::min<std::size_t>(std::max(1u, std::thread::hardware_concurrency()), versions.size());
    for (std::size_t w = 0; w < workers; ++w) threads_.emplace_back([this] { work(); });
  }
  ~PreparedPipeline() {
    stop_ = true;
    for (auto& t : threads_) t.join();
  }
  PreparedPipeline(const PreparedPipeline&) = delete;
  PreparedPipeline& operator=(const PreparedPipeline&) = delete;

  // Waits for version i and returns its encoding; rethrows a worker's failure.
  const Prepared& get(std::size_t i) {
    std::unique_lock lock(mutex_);
    done_.wait(lock, [&] { return ready_[i] || failure_; });
    if (failure_) std::rethrow_exception(failure_);
    return slots_[i];
  }

  // Frees version i's encoding once it is stored: the encodings of a wide file take about
  // three times the file's size, and holding them all to the end sets the ingest's peak.
  void release(std::size_t i) {
    Prepared stored;
    {
      std::lock_guard lock(mutex_);
      std::swap(stored, slots_[i]);
    }
  }  // freed here, outside the lock

 private:
  void work() {
    while (!stop_) {
      const std::size_t i = next_.fetch_add(1);
      if (i >= versions_.size()) return;
      try {
        Prepared p = prepare(versions_[i]);
        std::lock_guard lock(mutex_);
        slots_[i] = std::move(p);
        ready_[i] = true;
      } catch (...) {
        std::lock_guard lock(mutex_);
        failure_ = std::current_exception();
      }
      done_.notify_all();
    }
  }

  const std::vector<NewVersion>& versions_;
  std::vector<Prepared> slots_;
  std::vector<bool> ready_;
  std::exception_ptr failure_;
  std::atomic<std::size_t> next_{0};
  std::atomic<bool> stop_{false};
  std::mutex mutex_;
  std::condition_variable done_;
  std::vector<std::thread> threads_;
};

std::optional<std::string> optional_text(const SQLite::Column& c) {
  if (c.isNull()) return std::nullopt;
  return c.getString();
}

constexpr const char* kVersionColumns =
    "s.name, s.kind, v.version, v.version_id, v.content_hash, v.unit, v.input_unit, v.quote, "
    "v.frequency, v.first_date, v.last_date, v.observations, v.missing, v.source_file, "
    "v.source_sha256, v.ingested_at, v.ingested_by, coalesce(v.note, ''), "
    "(SELECT group_concat(column_name, char(31)) FROM "
    "(SELECT column_name FROM version_columns c WHERE c.version_id = v.version_id ORDER BY "
    "position))";

VersionInfo read_version_info(SQLite::Statement& q) {
  VersionInfo info;
  info.name = q.getColumn(0).getString();
  info.kind = q.getColumn(1).getString();
  info.version = q.getColumn(2).getInt();
  info.version_id = q.getColumn(3).getInt64();
  info.content_hash = q.getColumn(4).getString();
  info.unit = q.getColumn(5).getString();
  info.input_unit = q.getColumn(6).getString();
  info.quote = optional_text(q.getColumn(7));
  info.frequency = optional_text(q.getColumn(8));
  info.first_date = q.getColumn(9).getString();
  info.last_date = q.getColumn(10).getString();
  info.observations = q.getColumn(11).getInt64();
  info.missing = q.getColumn(12).getInt64();
  info.source_file = q.getColumn(13).getString();
  info.source_sha256 = q.getColumn(14).getString();
  info.ingested_at = q.getColumn(15).getString();
  info.ingested_by = q.getColumn(16).getString();
  info.note = q.getColumn(17).getString();
  const std::string names = q.getColumn(18).getString();
  std::size_t start = 0;
  while (start <= names.size() && !names.empty()) {
    const std::size_t end = names.find('\x1f', start);
    info.columns.push_back(names.substr(start, end - start));
    if (end == std::string::npos) break;
    start = end + 1;
  }
  return info;
}

}  // namespace

std::string utc_now() {
  const auto now = std::chrono::system_clock::now();
  const auto ms =
      std::chrono::duration_cast<std::chrono::milliseconds>(now.time_since_epoch()).count();
  const auto day = static_cast<core::Day>(ms / 86400000);
  const std::int64_t in_day = ms % 86400000;
  return fmt::format("{}T{:02}:{:02}:{:02}.{:03}Z", core::format_date(day), in_day / 3600000,
                     in_day / 60000 % 60, in_day / 1000 % 60, in_day % 1000);
}

std::string current_user() {
  // The environment is no user's typing to refuse: a name that is not storable text is stored
  // with its bad bytes escaped, so every JSON output can still write it.
  const auto storable = [](const char* name) {
    return core::text_problem(name) ? core::printable_text(name) : std::string(name);
  };
  if (const char* user = std::getenv("USER"); user != nullptr && *user != '\0')
    return storable(user);
  if (const passwd* pw = getpwuid(getuid()); pw != nullptr) return storable(pw->pw_name);
  return "unknown";
}

std::vector<StoreOutcome> SqliteLedger::store_versions(std::vector<NewVersion> versions,
                                                       const SourceInfo& source) {
  SQLite::Database& db = *db_;
  PreparedPipeline prepared(versions);
  const std::string now = utc_now();
  const std::string user = current_user();

  SQLite::Statement find_series(db, "SELECT series_id, kind FROM series WHERE name = ?");
  SQLite::Statement latest(db,
                           "SELECT version, content_hash FROM series_versions WHERE series_id = ? "
                           "ORDER BY version DESC LIMIT 1");
  SQLite::Statement add_series(db, "INSERT INTO series (name, kind, created_at) VALUES (?, ?, ?)");
  SQLite::Statement add_version(
      db,
      "INSERT INTO series_versions (series_id, version, content_hash, unit, input_unit, quote, "
      "frequency, first_date, last_date, observations, missing, source_file, source_sha256, "
      "ingested_at, ingested_by, note) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)");
  SQLite::Statement add_column(db,
                               "INSERT INTO version_columns (version_id, position, column_name, "
                               "values_json) VALUES (?, ?, ?, ?)");
  SQLite::Statement add_packed(
      db, "INSERT INTO packed_columns (column_id, days, numbers) VALUES (?, ?, ?)");

  std::vector<StoreOutcome> outcomes;
  outcomes.reserve(versions.size());
  for (std::size_t i = 0; i < versions.size(); ++i) {
    const NewVersion& v = versions[i];
    const Prepared& p = prepared.get(i);
    StoreOutcome outcome{v.name, v.meta.kind, 1, false, false, p.hash};

    std::int64_t series_id = 0;
    find_series.reset();
    find_series.bind(1, v.name);
    if (find_series.executeStep()) {
      series_id = find_series.getColumn(0).getInt64();
      const std::string kind = find_series.getColumn(1).getString();
      if (kind != v.meta.kind)
        throw Error(Failure::bad_input,
                    fmt::format("{}: series '{}' already exists as a {} series, not {}; rename "
                                "the column or use --name",
                                source.file, v.name, kind, v.meta.kind));
      latest.reset();
      latest.bind(1, series_id);
      if (latest.executeStep()) {
        outcome.version = latest.getColumn(0).getInt() + 1;
        if (latest.getColumn(1).getString() == p.hash) {
          outcome.version -= 1;
          outcome.unchanged = true;
          outcomes.push_back(outcome);
          prepared.release(i);
          continue;
        }
      }
    } else {
      add_series.reset();
      add_series.bind(1, v.name);
      add_series.bind(2, v.meta.kind);
      add_series.bind(3, now);
      add_series.exec();
      series_id = db.getLastInsertRowid();
      outcome.new_series = true;
    }

    const auto frequency = core::detect_frequency(p.all_dates);
    add_version.reset();
    add_version.bind(1, series_id);
    add_version.bind(2, outcome.version);
    add_version.bind(3, p.hash);
    add_version.bind(4, v.meta.unit);
    add_version.bind(5, v.input_unit);
    if (v.meta.quote)
      add_version.bind(6, *v.meta.quote);
    else
      add_version.bind(6);
    if (frequency)
      add_version.bind(7, core::frequency_name(*frequency));
    else
      add_version.bind(7);
    add_version.bind(8, core::format_date(p.all_dates.front()));
    add_version.bind(9, core::format_date(p.all_dates.back()));
    add_version.bind(10, static_cast<std::int64_t>(p.all_dates.size()));
    add_version.bind(11, p.missing);
    add_version.bind(12, source.file);
    add_version.bind(13, source.sha256);
    add_version.bind(14, now);
    add_version.bind(15, user);
    if (source.note.empty())
      add_version.bind(16);
    else
      add_version.bind(16, source.note);
    add_version.exec();
    const std::int64_t version_id = db.getLastInsertRowid();

    for (std::size_t c = 0; c < p.columns.size(); ++c) {
      add_column.reset();
      add_column.bind(1, version_id);
      add_column.bind(2, static_cast<int>(c + 1));
      add_column.bind(3, p.columns[c].name);
      add_column.bindNoCopy(4, p.columns[c].values_json);
      add_column.exec();
      const record::PackedColumn& packed = p.packed[c];
      add_packed.reset();
      add_packed.bind(1, db.getLastInsertRowid());
      add_packed.bindNoCopy(2, packed.days.data(), static_cast<int>(packed.days.size()));
      add_packed.bindNoCopy(3, packed.numbers.data(), static_cast<int>(packed.numbers.size()));
      add_packed.exec();
    }
    outcomes.push_back(outcome);
    prepared.release(i);
  }
  return outcomes;
}

std::vector<VersionInfo> SqliteLedger::list_latest_versions() {
  SQLite::Statement q(
      *db_,
      fmt::format("SELECT {} FROM series s JOIN series_versions v ON v.series_id = s.series_id "
                  "WHERE v.version = (SELECT max(version) FROM series_versions w WHERE "
                  "w.series_id = s.series_id) ORDER BY CASE s.kind WHEN 'strategy' THEN 1 WHEN "
                  "'benchmark' THEN 2 WHEN 'rate' THEN 3 ELSE 4 END, s.name",
                  kVersionColumns));
  std::vector<VersionInfo> out;
  while (q.executeStep()) out.push_back(read_version_info(q));
  return out;
}

std::vector<VersionInfo> SqliteLedger::version_history(const std::string& name) {
  SQLite::Statement q(*db_,
                      fmt::format("SELECT {} FROM series s JOIN series_versions v ON v.series_id "
                                  "= s.series_id WHERE s.name = ? ORDER BY v.version",
                                  kVersionColumns));
  q.bind(1, name);
  std::vector<VersionInfo> out;
  while (q.executeStep()) out.push_back(read_version_info(q));
  if (out.empty())
    throw Error(Failure::not_found,
                fmt::format("no series named '{}' in {}; `alphatrail series` lists them", name,
                            path().string()));
  return out;
}

namespace {

// Reads packed copies straight into a column's vectors with SQLite's incremental blob I/O,
// instead of having SQLite first assemble each blob in a buffer of its own (a third copy of
// every observation). Owns two blob handles, moved from row to row; one reader per load.
class PackedReader {
 public:
  explicit PackedReader(SQLite::Database& db) : db_(db.getHandle()) {}
  ~PackedReader() {
    sqlite3_blob_close(days_);
    sqlite3_blob_close(numbers_);
  }
  PackedReader(const PackedReader&) = delete;
  PackedReader& operator=(const PackedReader&) = delete;

  // Returns the column stored as packed_columns row column_id; throws Error(ledger) when the
  // copy is corrupted or cannot be read.
  record::ColumnData read(const std::string& name, std::int64_t column_id, std::int64_t days_bytes,
                          std::int64_t numbers_bytes) {
    record::ColumnData column = record::packed_column_shape(
        name, static_cast<std::size_t>(days_bytes), static_cast<std::size_t>(numbers_bytes));
    read_blob(days_, "days", column_id, column.dates.data(), days_bytes, name);
    read_blob(numbers_, "numbers", column_id, column.values.data(), numbers_bytes, name);
    record::finish_packed(column);
    return column;
  }

 private:
  void read_blob(sqlite3_blob*& handle, const char* field, std::int64_t row, void* out,
                 std::int64_t bytes, const std::string& name) {
    int rc = handle == nullptr
                 ? sqlite3_blob_open(db_, "main", "packed_columns", field, row, 0, &handle)
                 : sqlite3_blob_reopen(handle, row);
    if (rc == SQLITE_OK && bytes > 0)
      rc = sqlite3_blob_read(handle, out, static_cast<int>(bytes), 0);
    if (rc != SQLITE_OK)
      throw Error(Failure::unusable_ledger,
                  fmt::format("cannot read the packed copy of column '{}': {}; run `alphatrail "
                              "verify`",
                              name, sqlite3_errstr(rc)));
  }

  sqlite3* db_;
  sqlite3_blob* days_ = nullptr;
  sqlite3_blob* numbers_ = nullptr;
};

// Returns the version row a request names; throws Error(not_found) when there is none.
VersionInfo find_version(SqliteLedger& ledger, const VersionRequest& request) {
  const auto& [name, version] = request;
  auto q = ledger.statement(
      fmt::format("SELECT {} FROM series s JOIN series_versions v ON v.series_id = "
                  "s.series_id WHERE s.name = ? AND (? IS NULL OR v.version = ?) ORDER BY "
                  "v.version DESC LIMIT 1",
                  kVersionColumns));
  q->bind(1, name);
  if (version) {
    q->bind(2, *version);
    q->bind(3, *version);
  }
  if (!q->executeStep()) {
    if (version) ledger.version_history(name);  // names an unknown series first
    throw Error(Failure::not_found,
                version
                    ? fmt::format("series '{}' has no version {}; `alphatrail series {}` "
                                  "lists its versions",
                                  name, *version, name)
                    : fmt::format("no series named '{}'; `alphatrail series` lists them", name));
  }
  return read_version_info(*q);
}

}  // namespace

std::vector<VersionInfo> SqliteLedger::find_versions(const std::vector<VersionRequest>& requests) {
  // Many latest versions come from one pass over the ledger's latest versions rather than one
  // query each; a pinned version, or a name that is not there, takes the query of its own.
  std::unordered_map<std::string, VersionInfo> latest;
  if (requests.size() >= 16) {
    auto q = statement(
        fmt::format("SELECT {} FROM series s JOIN series_versions v ON v.series_id = s.series_id "
                    "WHERE v.version = (SELECT max(w.version) FROM series_versions w WHERE "
                    "w.series_id = s.series_id)",
                    kVersionColumns));
    while (q->executeStep()) {
      VersionInfo info = read_version_info(*q);
      latest.emplace(info.name, std::move(info));
    }
  }
  std::vector<VersionInfo> infos;
  infos.reserve(requests.size());
  for (const auto& request : requests) {
    const auto it = request.version ? latest.end() : latest.find(request.name);
    infos.push_back(it != latest.end() ? it->second : find_version(*this, request));
  }
  return infos;
}

std::vector<LoadedVersion> SqliteLedger::load_observations(std::vector<VersionInfo> versions) {
  // Reading is SQLite's and serial. A column with a packed copy is unpacked by the reader as
  // it reads (a copy of the bytes, cheaper than handing them over); a column stored before
  // the packed copies existed is decoded from its JSON text by the other workers while the
  // caller reads on, and the caller then decodes the rest with them.
  std::vector<LoadedVersion> loaded(versions.size());
  struct Pending {
    std::size_t version;
    std::string name;
    std::string text;  // JSON to decode, when the column has no packed copy
    record::ColumnData column;
    bool decoded = false;
  };
  std::deque<Pending> pending;  // push_back keeps references to earlier items valid
  std::size_t next = 0;         // the first item no worker has taken yet
  bool reading = true;
  std::mutex mutex;
  std::condition_variable arrived;

  const auto decode_until_done = [&] {
    while (true) {
      std::unique_lock lock(mutex);
      arrived.wait(lock, [&] { return next < pending.size() || !reading; });
      if (next >= pending.size()) return;
      Pending& item = pending[next++];
      lock.unlock();
      if (item.decoded) continue;
      item.column = record::decode_values_json(item.name, item.text);
      std::string().swap(item.text);  // keep the peak low
    }
  };
  const auto stop_reading = [&] {
    {
      std::lock_guard lock(mutex);
      reading = false;
    }
    arrived.notify_all();
  };
  PackedReader packed(*db_);
  const auto read_all = [&] {
    for (std::size_t r = 0; r < versions.size(); ++r) {
      loaded[r].info = std::move(versions[r]);
      // The columns come from an index that holds their names (migration 0006); the row itself,
      // with its JSON, is only read when there is no packed copy. The packed blobs' lengths
      // come from their record header, their bytes from `packed`.
      auto cols = statement(
          "SELECT c.column_name, p.column_id, length(p.days), length(p.numbers), CASE WHEN "
          "p.column_id IS NULL THEN c.values_json END FROM version_columns c INDEXED BY "
          "version_columns_in_order LEFT JOIN packed_columns p ON p.column_id = c.column_id "
          "WHERE c.version_id = ? ORDER BY c.position");
      cols->bind(1, loaded[r].info.version_id);
      while (cols->executeStep()) {
        Pending item{r, cols->getColumn(0).getString(), {}, {}};
        if (const SQLite::Column id = cols->getColumn(1); !id.isNull()) {
          item.column = packed.read(item.name, id.getInt64(), cols->getColumn(2).getInt64(),
                                    cols->getColumn(3).getInt64());
          item.decoded = true;
        } else {
          const SQLite::Column json = cols->getColumn(4);
          item.text.assign(static_cast<const char*>(json.getText()),
                           static_cast<std::size_t>(json.getBytes()));
        }
        const bool to_decode = !item.decoded;
        {
          std::lock_guard lock(mutex);
          pending.push_back(std::move(item));
        }
        if (to_decode) arrived.notify_one();
      }
    }
  };
  core::run_parallel(core::worker_count(versions.size(), 8), [&](std::size_t task) {
    if (task > 0) return decode_until_done();
    try {
      read_all();
    } catch (...) {
      stop_reading();  // the decoders finish what was read, then the error surfaces
      throw;
    }
    stop_reading();
    decode_until_done();
  });
  for (auto& item : pending) loaded[item.version].columns.push_back(std::move(item.column));
  return loaded;
}

std::vector<std::string> SqliteLedger::series_names(core::SeriesKind kind) {
  SQLite::Statement q(*db_, "SELECT name FROM series WHERE kind = ? ORDER BY name");
  q.bind(1, core::series_kind_name(kind));
  std::vector<std::string> names;
  while (q.executeStep()) names.push_back(q.getColumn(0).getString());
  return names;
}

}  // namespace alphatrail::store
