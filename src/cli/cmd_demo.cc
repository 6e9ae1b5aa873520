#include <CLI/CLI.hpp>
#include <fmt/format.h>

#include <iostream>

#include "cli/commands.h"
#include "cli/demo_scenario.h"
#include "cli/ingest.h"
#include "core/error.h"
#include "ledger/ledger.h"

namespace alphatrail::cli {

namespace {

struct DemoOptions {
  std::uint64_t seed = 20261202;
  bool replace = false;
  std::string data_folder;  // default: LEDGER-data beside the ledger
};

void remove_ledger(const std::filesystem::path& path) {
  for (const char* suffix : {"", "-wal", "-shm"})
    std::filesystem::remove(path.string() + suffix);
}

void run_demo(const DemoOptions& options, const GlobalOptions& global) {
  const auto path = ledger::resolve_ledger_path(global.ledger);
  if (std::filesystem::exists(path)) {
    if (!options.replace)
      throw Error(ExitCode::usage,
                  fmt::format("{} exists; the demo builds a fresh ledger: pass --replace to "
                              "overwrite it, or name another with --ledger",
                              path.string()));
    remove_ledger(path);
  }
  const std::filesystem::path folder =
      options.data_folder.empty() ? std::filesystem::path(path.string() + "-data")
                                  : std::filesystem::path(options.data_folder);

  std::cout << fmt::format(
      "Demo: Brindle Hollow Capital (a fictional firm) tests its strategies against the Alder "
      "Vale Composite index and Alder Vale bills (invented data, seed {}).\n\n",
      options.seed);
  for (const auto& file : write_demo_files(folder, options.seed)) {
    IngestRequest request;
    request.kind = file.kind;
    request.file = file.path.string();
    request.name = file.name;
    request.percent = file.percent;
    request.levels = file.levels;
    request.note = file.note;
    std::cout << fmt::format("$ alphatrail ingest {} {}{}{}{}\n", request.kind, request.file,
                             request.name.empty() ? "" : " --name " + request.name,
                             request.percent ? " --percent" : "", request.levels ? " --levels" : "");
    ingest_file(path, request, std::cout, std::cerr);
  }
  std::cout << fmt::format("\nDemo ledger: {}\n", path.string());
}

}  // namespace

void setup_demo(CLI::App& app, const GlobalOptions& global) {
  auto options = std::make_shared<DemoOptions>();
  auto* cmd = app.add_subcommand(
      "demo", "Build a demo ledger from invented data (a fictional firm) and run the main job");
  cmd->add_option("--seed", options->seed, "Seed of the invented data")->default_val(20261202);
  cmd->add_flag("--replace", options->replace, "Overwrite an existing ledger at the path");
  cmd->add_option("--data-folder", options->data_folder,
                  "Where to write the demo CSV files (default: LEDGER-data)");
  cmd->callback([options, &global] { run_demo(*options, global); });
}

}  // namespace alphatrail::cli
