#include "store/ledger.h"

#include <fmt/format.h>

#include <cstdlib>

#include "core/error.h"
#include "store/sqlite_ledger.h"

namespace alphatrail::store {

std::filesystem::path resolve_ledger_path(const std::string& option_value) {
  if (!option_value.empty()) return option_value;
  if (const char* env = std::getenv("ALPHATRAIL_LEDGER"); env != nullptr && *env != '\0')
    return env;
  return "alphatrail.db";
}

std::unique_ptr<Ledger> open_ledger(const std::filesystem::path& location, OpenMode mode,
                                    std::ostream& notices) {
  // Every location is a SQLite file today; a second engine is chosen here by its location.
  return open_guarded_sqlite_ledger(location, mode, notices);
}

std::vector<LoadedVersion> Ledger::load_versions(const std::vector<VersionRequest>& requests) {
  return load_observations(find_versions(requests));
}

LoadedVersion Ledger::load_version(const std::string& name, std::optional<int> version) {
  return std::move(load_versions({{name, version}}).front());
}

record::RunRow Ledger::existing_run_row(std::int64_t run_id) {
  auto row = read_run_row(run_id);
  if (!row)
    throw Error(Failure::not_found, fmt::format("no run {} in {}; `alphatrail runs` lists them",
                                                run_id, path().string()));
  return std::move(*row);
}

record::ShownRun Ledger::load_run_record(std::int64_t run_id) {
  record::ShownRun run;
  run.row = existing_run_row(run_id);
  run.inputs = read_shown_inputs(run_id);
  run.parameters = record::read_parameters(run_id, run.row.engine_version, run.row.parameters_json);
  run.result = record::read_run_result(run_id, run.row.result_json);
  return run;
}

}  // namespace alphatrail::store
