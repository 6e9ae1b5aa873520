// The boundary of the SQLite store: a Ledger that forwards every call to a SqliteLedger and
// turns any SQLite::Exception into alphatrail::Error, so that nothing above the store sees
// the engine's exceptions. A busy ledger becomes Failure::busy naming the timeout; any other
// engine failure Failure::unusable_ledger. Errors of alphatrail's own pass through untouched.
#include <SQLiteCpp/Exception.h>
#include <fmt/format.h>
#include <sqlite3.h>

#include <utility>

#include "core/error.h"
#include "store/sqlite_ledger.h"

namespace alphatrail::store {

namespace {

Error translated(const SQLite::Exception& e) {
  if (e.getErrorCode() == SQLITE_BUSY)
    return Error(Failure::busy,
                 fmt::format("the ledger stayed busy for {} ms (another command is writing); "
                             "nothing was written; try again or raise "
                             "ALPHATRAIL_BUSY_TIMEOUT_MS",
                             busy_timeout_ms()));
  return Error(Failure::unusable_ledger,
               fmt::format("ledger error: {}; nothing was written", e.what()));
}

// Runs call, throwing an SQLite exception it throws as alphatrail::Error.
template <typename Call>
auto guarded(Call&& call) -> decltype(call()) {
  try {
    return call();
  } catch (const SQLite::Exception& e) {
    throw translated(e);
  }
}

class GuardedLedger final : public Ledger {
 public:
  explicit GuardedLedger(SqliteLedger ledger) : ledger_(std::move(ledger)) {}

  const std::filesystem::path& path() const override { return ledger_.path(); }
  int schema_version() override {
    return guarded([&] { return ledger_.schema_version(); });
  }
  void write_transaction(const std::function<void()>& work) override {
    guarded([&] { ledger_.write_transaction(work); });
  }
  void read_transaction(const std::function<void()>& work) override {
    guarded([&] { ledger_.read_transaction(work); });
  }
  bool in_transaction() override {
    return guarded([&] { return ledger_.in_transaction(); });
  }
  void erase_and_recreate() override {
    guarded([&] { ledger_.erase_and_recreate(); });
  }
  void add_mark(const std::string& mark, const std::string& detail,
                const std::string& marked_at) override {
    guarded([&] { ledger_.add_mark(mark, detail, marked_at); });
  }
  bool has_mark(const std::string& mark) override {
    return guarded([&] { return ledger_.has_mark(mark); });
  }
  std::vector<StoreOutcome> store_versions(std::vector<NewVersion> versions,
                                           const SourceInfo& source) override {
    return guarded([&] { return ledger_.store_versions(std::move(versions), source); });
  }
  std::vector<std::string> series_names(core::SeriesKind kind) override {
    return guarded([&] { return ledger_.series_names(kind); });
  }
  std::vector<VersionInfo> list_latest_versions() override {
    return guarded([&] { return ledger_.list_latest_versions(); });
  }
  std::vector<VersionInfo> version_history(const std::string& name) override {
    return guarded([&] { return ledger_.version_history(name); });
  }
  std::vector<VersionInfo> find_versions(const std::vector<VersionRequest>& requests) override {
    return guarded([&] { return ledger_.find_versions(requests); });
  }
  std::vector<LoadedVersion> load_observations(std::vector<VersionInfo> versions) override {
    return guarded([&] { return ledger_.load_observations(std::move(versions)); });
  }
  std::vector<std::int64_t> store_runs(const std::vector<const record::NewRun*>& runs,
                                       const std::function<void(std::size_t)>& on_stored) override {
    return guarded([&] { return ledger_.store_runs(runs, on_stored); });
  }
  std::optional<record::RunRow> read_run_row(std::int64_t run_id) override {
    return guarded([&] { return ledger_.read_run_row(run_id); });
  }
  std::vector<record::RunInput> read_run_inputs(std::int64_t run_id) override {
    return guarded([&] { return ledger_.read_run_inputs(run_id); });
  }
  std::vector<record::ShownInput> read_shown_inputs(std::int64_t run_id) override {
    return guarded([&] { return ledger_.read_shown_inputs(run_id); });
  }
  nlohmann::ordered_json load_run(std::int64_t run_id) override {
    return guarded([&] { return ledger_.load_run(run_id); });
  }
  int count_study_runs(const std::string& study) override {
    return guarded([&] { return ledger_.count_study_runs(study); });
  }
  int count_strategy_runs(const std::string& strategy) override {
    return guarded([&] { return ledger_.count_strategy_runs(strategy); });
  }
  std::vector<RunSummary> list_runs(const RunFilter& filter) override {
    return guarded([&] { return ledger_.list_runs(filter); });
  }
  std::vector<std::int64_t> unrevised_stale_runs() override {
    return guarded([&] { return ledger_.unrevised_stale_runs(); });
  }
  std::vector<NewerInput> newer_input_versions(std::int64_t run_id) override {
    return guarded([&] { return ledger_.newer_input_versions(run_id); });
  }
  void for_each_stored_version(const std::function<void(const StoredVersion&)>& each) override {
    guarded([&] { ledger_.for_each_stored_version(each); });
  }
  std::vector<std::int64_t> run_ids() override {
    return guarded([&] { return ledger_.run_ids(); });
  }
  std::vector<std::string> integrity_problems() override {
    return guarded([&] { return ledger_.integrity_problems(); });
  }
  void read_only_query(const std::string& sql, std::int64_t limit, QueryRowSink& sink) override {
    guarded([&] { ledger_.read_only_query(sql, limit, sink); });
  }

 private:
  SqliteLedger ledger_;
};

}  // namespace

std::unique_ptr<Ledger> open_guarded_sqlite_ledger(const std::filesystem::path& path, OpenMode mode,
                                                   std::ostream& notices) {
  return std::make_unique<GuardedLedger>(
      guarded([&] { return SqliteLedger::open(path, mode, notices); }));
}

}  // namespace alphatrail::store
