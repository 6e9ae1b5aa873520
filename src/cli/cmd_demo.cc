#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>
#include <sstream>

#include "cli/commands.h"
#include "cli/demo_scenario.h"
#include "cli/ingest.h"
#include "cli/print_runs.h"
#include "cli/report.h"
#include "core/error.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

struct DemoOptions {
  std::uint64_t seed = 20261202;
  bool replace = false;
  std::string data_folder;  // default: LEDGER-data beside the ledger
};

constexpr const char* kDemoMark = "demo";

// The demo's ledger: --ledger, else ./demo.db. Never $ALPHATRAIL_LEDGER: that names the
// user's own ledger, which the demo must not touch.
std::filesystem::path demo_ledger_path(const GlobalOptions& global) {
  return global.ledger.empty() ? std::filesystem::path("demo.db")
                               : std::filesystem::path(global.ledger);
}

// True when nothing is at the path, or an empty file (it holds nothing to lose).
bool nothing_at(const std::filesystem::path& path) {
  std::error_code ec;
  const auto status = std::filesystem::symlink_status(path, ec);
  if (!std::filesystem::exists(status)) return true;
  return std::filesystem::is_regular_file(status) && std::filesystem::file_size(path, ec) == 0;
}

Error not_a_demo_ledger(const std::filesystem::path& path, const std::string& why) {
  return Error(
      Failure::invalid_argument,
      fmt::format("{} is not a ledger the demo made ({}): the demo replaces only its "
                  "own ledgers and left it as it was; name a new file with --ledger (or remove "
                  "this one yourself if you no longer need it)",
                  path.string(), why));
}

// Refuses, before anything is written, to replace a file that is not a demo ledger.
void check_replaceable(const std::filesystem::path& path) {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(std::filesystem::symlink_status(path, ec)))
    throw not_a_demo_ledger(path, "it is not a regular file");
  try {
    std::ostringstream ignored;
    auto existing_opened = store::open_ledger(path, store::OpenMode::read_only, ignored);
    store::Ledger& existing = *existing_opened;
    if (!existing.has_mark(kDemoMark)) throw not_a_demo_ledger(path, "it has no demo mark");
  } catch (const Error& e) {
    if (e.kind() != Failure::unusable_ledger) throw;
    throw not_a_demo_ledger(path, "it is not an alphatrail ledger of this version");
  }
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
  const auto path = demo_ledger_path(global);
  const bool replacing = !nothing_at(path);
  if (replacing) {
    if (!options.replace)
      throw Error(Failure::invalid_argument,
                  fmt::format("{} exists; the demo builds a fresh ledger: pass --replace to "
                              "replace it (only a ledger the demo made), or name another with "
                              "--ledger",
                              path.string()));
    check_replaceable(path);
  }
  const std::filesystem::path folder = options.data_folder.empty()
                                           ? std::filesystem::path(path.string() + "-data")
                                           : std::filesystem::path(options.data_folder);

  std::cout << fmt::format(
      "Demo: Brindle Hollow Capital (a fictional firm) tests its strategies against the Alder "
      "Vale Composite index and Alder Vale bills (invented data, seed {}).\n\n",
      options.seed);
  const auto files = write_demo_files(folder, options.seed);
  const IngestRequest revision = ingest_request(write_restated_benchmark(folder));

  auto ledger_opened = store::open_ledger(
      path, replacing ? store::OpenMode::existing : store::OpenMode::create, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  // One write transaction for the whole demo: a ledger being replaced is emptied in place
  // while the write lock is held (a process that has the file open sees the new demo, never a
  // deleted file), and a failure anywhere leaves the file as it was.
  ledger.write_transaction([&] {
    if (replacing) {
      if (!ledger.has_mark(kDemoMark))  // checked again under the lock
        throw not_a_demo_ledger(path, "it has no demo mark");
      ledger.erase_and_recreate();
    }
    ledger.add_mark(kDemoMark, fmt::format("seed {}", options.seed), store::utc_now());

    for (const auto& file : files) {
      const IngestRequest request = ingest_request(file);
      std::cout << fmt::format("$ alphatrail ingest {} {}{}{}{}\n", request.kind, request.file,
                               request.name.empty() ? "" : " --name " + request.name,
                               request.percent ? " --percent" : "",
                               request.levels ? " --levels" : "");
      store_file(ledger, check_file(request, std::cerr), std::cout);
    }

    // The main job: every strategy against the index, bills and style factors.
    app::EvaluateRequest request;
    request.benchmark = kDemoBenchmark;
    request.rate = kDemoRate;
    request.factors = {{kDemoFactors, {}}};  // every column of the set
    request.strategies = {"trend-*"};
    request.study = kDemoStudy;
    request.note = "demo: trend look-back variants";
    // Three-year rolling alpha and beta, kept for the later commands.
    request.rolling = {app::RollingChoice::Mode::automatic, 0};
    std::cout << fmt::format(
        "\n$ alphatrail evaluate 'trend-*' --benchmark {} --rate {} --factor {} "
        "--study {} --rolling auto\n",
        kDemoBenchmark, kDemoRate, kDemoFactors, kDemoStudy);
    auto runs = app::evaluate_and_record(ledger, request);
    request.strategies = {"carry-g10", "defensive-tilt", "crash-hedge"};
    request.study.clear();
    request.note = "demo: other books";
    std::cout << fmt::format(
        "$ alphatrail evaluate carry-g10 defensive-tilt crash-hedge "
        "--benchmark {} --rate {} --factor {} --rolling auto\n\n",
        kDemoBenchmark, kDemoRate, kDemoFactors);
    const auto more = app::evaluate_and_record(ledger, request);
    runs.insert(runs.end(), more.begin(), more.end());
    print_runs(std::cout, ledger, runs, Format::table);

    std::cout << fmt::format("\n$ alphatrail show {}\n\n", runs.front());
    print_run_text(std::cout, ledger.load_run_record(runs.front()));
    // The vendor restates a month of the index: re-run what it touched and show what changed.
    std::cout << fmt::format("$ alphatrail ingest benchmark {} --name {} --levels --note \"{}\"\n",
                             revision.file, revision.name, revision.note);
    store_file(ledger, check_file(revision, std::cerr), std::cout);
    std::cout << fmt::format("\n$ alphatrail rerun --all-stale\n\n");
    print_reruns(std::cout, app::rerun_runs(ledger, runs), Format::table);
  });

  // The page a colleague would open: the latest run of the first strategy (a revision).
  const auto main_runs = ledger.list_runs({"trend-12m", "", 0, 0});
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
      "demo",
      "Build a demo ledger from invented data (a fictional firm) and run the main job; the "
      "ledger is --ledger or ./demo.db, never $ALPHATRAIL_LEDGER");
  cmd->add_option("--seed", options->seed, "Seed of the invented data")->default_val(20261202);
  cmd->add_flag("--replace", options->replace,
                "Replace a demo ledger already at the path (never any other file)");
  cmd->add_option("--data-folder", options->data_folder,
                  "Where to write the demo CSV files (default: LEDGER-data)");
  cmd->callback([options, &global] { run_demo(*options, global); });
}

}  // namespace alphatrail::cli
