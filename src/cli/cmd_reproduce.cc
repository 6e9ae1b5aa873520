#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "app/evaluate.h"
#include "cli/commands.h"
#include "cli/json_diff.h"
#include "core/error.h"
#include "record/stored_result.h"
#include "version.h"

namespace alphatrail::cli {

namespace {

void run_reproduce(std::int64_t run_id, const GlobalOptions& global) {
  auto ledger_opened = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                          store::OpenMode::read_only, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  const record::RunRow row = ledger.existing_run_row(run_id);
  auto pending = app::evaluate_request(ledger, app::request_from_run(ledger, run_id, true));
  const auto& p = pending.front();
  const std::string recomputed_hash =
      record::inputs_hash(kEngineVersion, p.run.parameters_json, p.run.inputs);

  // The reading counts runs in the ledger, so compare the figures, not the words.
  auto stored = record::read_result(run_id, row.result_json);
  auto fresh = record::result_json(p.result, {});
  for (auto* j : {&stored, &fresh}) j->erase("reading");
  const auto differences = json_differences(stored, fresh);

  std::cout << fmt::format("run {} ({}), recorded by engine {}; this is engine {}\n", run_id,
                           row.strategy, row.engine_version, kEngineVersion);
  std::cout << fmt::format("inputs hash: stored {}, recomputed {} ({})\n",
                           row.inputs_hash.substr(0, 12), recomputed_hash.substr(0, 12),
                           recomputed_hash == row.inputs_hash ? "identical" : "different");
  for (const auto& d : differences)
    std::cout << fmt::format("  {}: stored {}, recomputed {}\n", d.path, d.before.dump(),
                             d.after.dump());
  if (differences.empty() && recomputed_hash == row.inputs_hash) {
    std::cout << "reproduced: every coefficient and statistic is identical, bit for bit\n";
    return;
  }
  throw Error(Failure::mismatch,
              fmt::format("run {} does not reproduce: {} value{} differ{}", run_id,
                          differences.size(), differences.size() == 1 ? "" : "s",
                          row.engine_version != kEngineVersion
                              ? fmt::format(" (the engine changed from {} to {})",
                                            row.engine_version, kEngineVersion)
                              : ""));
}

}  // namespace

void setup_reproduce(CLI::App& app, const GlobalOptions& global) {
  auto run_id = std::make_shared<std::int64_t>(0);
  auto* cmd = app.add_subcommand(
      "reproduce", "Recompute a run from its stored input versions and parameters and compare");
  cmd->add_option("run", *run_id, "Run id")->required();
  cmd->callback([run_id, &global] { run_reproduce(*run_id, global); });
}

}  // namespace alphatrail::cli
