#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "app/reproduce.h"
#include "cli/commands.h"
#include "core/error.h"
#include "store/ledger.h"
#include "version.h"

namespace alphatrail::cli {

namespace {

// Prints what reproducing the run found; throws Error(mismatch) after it when the run does
// not reproduce, so the differences are on stdout and the verdict on stderr.
void print_reproduction(std::ostream& out, const app::ReproduceOutcome& o) {
  out << fmt::format("run {} ({}), recorded by engine {}; this is engine {}\n", o.run_id,
                     o.strategy, o.recorded_by_engine, kEngineVersion);
  out << fmt::format("inputs hash: stored {}, recomputed {} ({})\n",
                     o.stored_inputs_hash.substr(0, 12), o.recomputed_inputs_hash.substr(0, 12),
                     o.inputs_hash_matches() ? "identical" : "different");
  for (const auto& d : o.differences)
    out << fmt::format("  {}: stored {}, recomputed {}\n", d.path, d.before.dump(), d.after.dump());
  if (o.matched()) {
    out << "reproduced: every coefficient and statistic is identical, bit for bit\n";
    return;
  }
  const std::size_t n = o.differences.size();
  throw Error(
      Failure::mismatch,
      fmt::format("run {} does not reproduce: {} value{} differ{}", o.run_id, n, n == 1 ? "" : "s",
                  o.recorded_by_engine != kEngineVersion
                      ? fmt::format(" (the engine changed from {} to {})", o.recorded_by_engine,
                                    kEngineVersion)
                      : ""));
}

void run_reproduce(std::int64_t run_id, const GlobalOptions& global) {
  auto ledger = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                   store::OpenMode::read_only, std::cerr);
  print_reproduction(std::cout, app::reproduce_run(*ledger, run_id));
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
