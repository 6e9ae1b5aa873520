#include <fmt/format.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <cmath>
#include <iostream>

#include "app/rerun.h"
#include "cli/commands.h"
#include "cli/output.h"
#include "cli/print_runs.h"
#include "cli/render.h"
#include "core/error.h"
#include "core/number_text.h"

namespace alphatrail::cli {

namespace {

struct RerunOptions {
  std::vector<std::int64_t> runs;
  bool all_stale = false;
  bool dry_run = false;
  Format format = Format::table;
};

std::string revisions_of(store::Ledger& ledger, std::int64_t run_id) {
  std::vector<std::string> parts;
  for (const auto& n : ledger.newer_input_versions(run_id))
    parts.push_back(fmt::format("{} v{} -> v{}", n.series, n.version, n.latest_version));
  return parts.empty() ? "no newer input versions" : fmt::format("{}", fmt::join(parts, ", "));
}

// The verdict as rerun words it, in every format.
std::string conclusion_text(const app::Verdict& v) {
  std::vector<std::string> flips;
  if (v.significance_lost) flips.push_back("significance lost");
  if (v.became_significant) flips.push_back("became significant");
  if (v.sign_changed) flips.push_back("alpha changed sign");
  return flips.empty() ? "conclusion unchanged"
                       : fmt::format("FLIPPED: {}", fmt::join(flips, ", "));
}

using core::fixed;

}  // namespace

void print_reruns(std::ostream& out, const std::vector<app::RerunOutcome>& outcomes,
                  Format format) {
  View view;
  Table& table = view.table;
  table.header = {"run",     "new run", "strategy", "alpha a year", "alpha t",
                  "alpha p", "beta",    "R2",       "conclusion"};
  view.json = nlohmann::ordered_json::array();
  for (const auto& outcome : outcomes) {
    const record::RunRow& before = outcome.before;
    const record::RunRow& after = outcome.after;
    const std::string conclusion = conclusion_text(app::verdict(outcome));
    const auto pair = [](const std::string& a, const std::string& b) {
      return fmt::format("{} -> {}", a, b);
    };
    table.rows.push_back({std::to_string(before.run_id), std::to_string(after.run_id),
                          after.strategy,
                          pair(fmt::format("{:+.2f}%", 100 * before.alpha_annualized),
                               fmt::format("{:+.2f}%", 100 * after.alpha_annualized)),
                          pair(fixed(before.alpha_t, 2), fixed(after.alpha_t, 2)),
                          pair(fixed(before.alpha_p, 4), fixed(after.alpha_p, 4)),
                          pair(fixed(before.beta, 3), fixed(after.beta, 3)),
                          pair(fixed(before.r_squared, 3), fixed(after.r_squared, 3)), conclusion});
    view.json.push_back({{"run_id", before.run_id},
                         {"new_run_id", after.run_id},
                         {"strategy", after.strategy},
                         {"before",
                          {{"alpha_annualized", json_number(before.alpha_annualized)},
                           {"alpha_t", json_number(before.alpha_t)},
                           {"alpha_p", json_number(before.alpha_p)},
                           {"beta", json_number(before.beta)},
                           {"r_squared", json_number(before.r_squared)}}},
                         {"after",
                          {{"alpha_annualized", json_number(after.alpha_annualized)},
                           {"alpha_t", json_number(after.alpha_t)},
                           {"alpha_p", json_number(after.alpha_p)},
                           {"beta", json_number(after.beta)},
                           {"r_squared", json_number(after.r_squared)}}},
                         {"conclusion", conclusion}});
  }
  view.footnote =
      "alpha a year as each run annualizes it; significance at each run's own confidence "
      "level.\n";
  render(out, view, format);
}

namespace {

void run_rerun(const RerunOptions& o, const GlobalOptions& global) {
  if (o.runs.empty() && !o.all_stale)
    throw Error(Failure::invalid_argument, "name the runs to re-run, or pass --all-stale");
  const auto path = store::resolve_ledger_path(global.ledger);
  const auto runs_to_redo = [&](store::Ledger& ledger) {
    return app::runs_to_rerun(ledger, o.runs, o.all_stale);
  };
  const auto none_stale = [] {
    std::cout << "no stale runs: every run used the latest versions of its inputs\n";
  };

  if (o.dry_run) {
    auto ledger_opened = store::open_ledger(path, store::OpenMode::read_only, std::cerr);
    store::Ledger& ledger = *ledger_opened;
    ledger.read_transaction([&] {
      const auto ids = runs_to_redo(ledger);
      if (ids.empty()) return none_stale();
      for (auto id : ids)
        std::cout << fmt::format("would re-run run {} ({}): {}\n", id,
                                 ledger.read_run_row(id)->strategy, revisions_of(ledger, id));
    });
    return;
  }
  // The stale set is read, evaluated and recorded in one write transaction: every re-run uses
  // the versions of one snapshot, and a second rerun waits and then finds these runs revised.
  auto ledger_opened = store::open_ledger(path, store::OpenMode::existing, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  std::vector<app::RerunOutcome> outcomes;
  ledger.write_transaction([&] {
    const auto ids = runs_to_redo(ledger);
    if (!ids.empty()) outcomes = app::rerun_runs(ledger, ids, progress_bar(isatty(2) != 0));
  });
  if (outcomes.empty()) return none_stale();
  print_reruns(std::cout, outcomes, o.format);
}

}  // namespace

void setup_rerun(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<RerunOptions>();
  auto* cmd = app.add_subcommand(
      "rerun", "Re-evaluate stale runs against the latest input versions, same parameters");
  cmd->add_option("runs", o->runs, "Runs to re-run");
  cmd->add_flag("--all-stale", o->all_stale, "Every stale run not yet re-run");
  cmd->add_flag("--dry-run", o->dry_run, "List what would be re-run and why; record nothing");
  add_format_option(*cmd, o->format);
  cmd->callback([o, &global] { run_rerun(*o, global); });
}

}  // namespace alphatrail::cli
