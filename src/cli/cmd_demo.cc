#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "cli/commands.h"
#include "cli/demo_scenario.h"
#include "cli/evaluate.h"
#include "cli/ingest.h"
#include "cli/report.h"
#include "core/error.h"
#include "ledger/ledger.h"
#include "ledger/run_store.h"

namespace alphatrail::cli {

namespace {

struct DemoOptions {
  std::uint64_t seed = 20261202;
  bool replace = false;
  std::string data_folder;  // default: LEDGER-data beside the ledger
};

void remove_ledger(const std::filesystem::path& path) {
  for (const char* suffix : {"", "-wal", "-shm"}) std::filesystem::remove(path.string() + suffix);
}

IngestRequest ingest_request(const DemoFile& file) {
  IngestRequest request;
  request.kind = file.kind;
  request.file = file.path.string();
  request.name = file.name;
  request.percent = file.percent;
  request.levels = file.levels;
  request.note = file.note;
  return request;
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
  const std::filesystem::path folder = options.data_folder.empty()
                                           ? std::filesystem::path(path.string() + "-data")
                                           : std::filesystem::path(options.data_folder);

  std::cout << fmt::format(
      "Demo: Brindle Hollow Capital (a fictional firm) tests its strategies against the Alder "
      "Vale Composite index and Alder Vale bills (invented data, seed {}).\n\n",
      options.seed);
  for (const auto& file : write_demo_files(folder, options.seed)) {
    const IngestRequest request = ingest_request(file);
    std::cout << fmt::format("$ alphatrail ingest {} {}{}{}{}\n", request.kind, request.file,
                             request.name.empty() ? "" : " --name " + request.name,
                             request.percent ? " --percent" : "",
                             request.levels ? " --levels" : "");
    ingest_file(path, request, std::cout, std::cerr);
  }

  // The main job: every strategy against the index, bills and style factors.
  EvaluateRequest request;
  request.benchmark = kDemoBenchmark;
  request.rate = kDemoRate;
  request.factors = {kDemoFactors};
  request.strategies = {"trend-*"};
  request.study = kDemoStudy;
  request.note = "demo: trend look-back variants";
  request.rolling = "auto";  // three-year rolling alpha and beta, kept for the later commands
  auto ledger = ledger::Ledger::open(path, ledger::OpenMode::existing, std::cerr);
  std::cout << fmt::format(
      "\n$ alphatrail evaluate 'trend-*' --benchmark {} --rate {} --factor {} "
      "--study {} --rolling auto\n",
      kDemoBenchmark, kDemoRate, kDemoFactors, kDemoStudy);
  auto runs = evaluate_and_record(ledger, request, false);
  request.strategies = {"carry-g10", "defensive-tilt", "crash-hedge"};
  request.study.clear();
  request.note = "demo: other books";
  std::cout << fmt::format(
      "$ alphatrail evaluate carry-g10 defensive-tilt crash-hedge "
      "--benchmark {} --rate {} --factor {} --rolling auto\n\n",
      kDemoBenchmark, kDemoRate, kDemoFactors);
  const auto more = evaluate_and_record(ledger, request, false);
  runs.insert(runs.end(), more.begin(), more.end());
  print_runs(std::cout, ledger, runs, Format::table);

  std::cout << fmt::format("\n$ alphatrail show {}\n\n", runs.front());
  print_run_text(std::cout, ledger::load_run(ledger, runs.front()));
  // The vendor restates a month of the index: re-run what it touched and show what changed.
  const IngestRequest revision = ingest_request(write_restated_benchmark(folder));
  std::cout << fmt::format("$ alphatrail ingest benchmark {} --name {} --levels --note \"{}\"\n",
                           revision.file, revision.name, revision.note);
  ingest_file(path, revision, std::cout, std::cerr);
  std::cout << fmt::format("\n$ alphatrail rerun --all-stale\n\n");
  rerun_runs(ledger, runs, Format::table, std::cout, false);

  // The page a colleague would open: the latest run of the first strategy (a revision).
  const auto main_runs = ledger::list_runs(ledger, {"trend-12m", "", 0, 0});
  const std::int64_t main_run = main_runs.back().run_id;
  const auto page = std::filesystem::absolute(folder / fmt::format("report-run-{}.html", main_run));
  std::cout << fmt::format("\n$ alphatrail report {} -o {}\n", main_run, page.string());
  write_run_report(ledger, main_run, page);
  std::cout << fmt::format("report written to {}\n\n", page.string());
  std::cout << fmt::format(
      "Demo ledger: {} (try `alphatrail runs --ledger {}` or "
      "`alphatrail series --ledger {}`)\n",
      path.string(), path.string(), path.string());
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
