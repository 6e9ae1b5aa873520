#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <cmath>
#include <iostream>

#include "cli/commands.h"
#include "cli/output.h"
#include "cli/print_runs.h"
#include "cli/render.h"
#include "core/evaluation.h"
#include "core/number_text.h"
#include "core/rolling.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

struct RunsOptions {
  std::string strategy;
  std::string study;
  Format format = Format::table;
};

using core::fixed;

// The runs listing in every format; CSV keeps each inputs hash in full, the table its start.
View runs_view(const std::vector<store::RunSummary>& runs, bool full_hashes) {
  View view;
  view.json = nlohmann::ordered_json::array();
  for (const auto& r : runs)
    view.json.push_back(
        {{"run_id", r.run_id},
         {"created_at", r.created_at},
         {"strategy", r.strategy},
         {"benchmark", r.benchmark},
         {"study", r.study.empty() ? nlohmann::ordered_json() : nlohmann::ordered_json(r.study)},
         {"inputs_hash", r.inputs_hash},
         {"frequency", r.frequency},
         {"observations", r.observations},
         {"alpha", json_number(r.alpha)},
         {"alpha_annualized", json_number(r.alpha_annualized)},
         {"alpha_t", json_number(r.alpha_t)},
         {"alpha_p", json_number(r.alpha_p)},
         {"beta", json_number(r.beta)},
         {"r_squared", json_number(r.r_squared)},
         {"errors", r.errors},
         {"lags", r.lags},
         {"stale", r.stale},
         {"revises_run_id", r.revises_run_id ? nlohmann::ordered_json(*r.revises_run_id)
                                             : nlohmann::ordered_json()}});
  Table& table = view.table;
  table.header = {"run",          "recorded (UTC)", "strategy",   "study", "periods",
                  "alpha a year", "alpha t",        "p",          "beta",  "R2",
                  "errors",       "stale",          "inputs hash"};
  table.right_aligned = {true, false, false, false, true,  true,
                         true, true,  true,  true,  false, false};
  for (const auto& r : runs)
    table.rows.push_back(
        {std::to_string(r.run_id), r.created_at.substr(0, 19), r.strategy, r.study,
         std::to_string(r.observations),
         std::isnan(r.alpha_annualized) ? "n/a" : fmt::format("{:+.2f}%", 100 * r.alpha_annualized),
         fixed(r.alpha_t, 2), fixed(r.alpha_p, 4), fixed(r.beta, 3), fixed(r.r_squared, 3),
         r.errors == "newey-west" ? fmt::format("newey-west ({})", r.lags) : r.errors,
         r.stale ? "stale" : "", full_hashes ? r.inputs_hash : r.inputs_hash.substr(0, 12)});
  view.when_empty = "no runs yet; record some with `alphatrail evaluate`\n";
  view.footnote =
      "alpha a year: annualized as each run's parameters say; stale: an input has a newer "
      "version than the run used.\n";
  return view;
}

void run_runs(const RunsOptions& o, const GlobalOptions& global) {
  auto ledger = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                   store::OpenMode::read_only, std::cerr);
  const auto runs = ledger->list_runs({o.strategy, o.study});
  render(std::cout, runs_view(runs, o.format == Format::csv), o.format);
}

}  // namespace

void setup_runs(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<RunsOptions>();
  auto* cmd = app.add_subcommand("runs", "List recorded runs with their headline figures");
  cmd->add_option("--strategy", o->strategy, "Only runs of this strategy");
  cmd->add_option("--study", o->study, "Only runs of this study");
  add_format_option(*cmd, o->format);
  cmd->callback([o, &global] { run_runs(*o, global); });
}

namespace {

struct ShowOptions {
  std::int64_t run_id = 0;
  Format format = Format::table;
};

// The text of a figure in CSV: shortest round trip, empty for one that could not be computed.
std::string csv_figure(double v) {
  return std::isnan(v) ? "" : fmt::format("{}", v);
}

// Prints one CSV row per rolling window end, with the columns of the run_windows view.
void print_windows_csv(std::ostream& out, const record::ShownRun& run,
                       const record::StoredRolling& rolling) {
  Table table;
  table.header = {"run_id", "window_end", "window_first", "observations", "lags"};
  for (const auto& figure : core::kWindowFigures) table.header.emplace_back(figure.name);
  const std::string run_id = std::to_string(run.row.run_id);
  for (const auto& w : rolling.windows) {
    std::vector<std::string> row{run_id, w.end, w.first, std::to_string(w.observations),
                                 std::to_string(w.lags)};
    for (const auto& figure : core::kWindowFigures) row.push_back(csv_figure(w.*figure.member));
    table.rows.push_back(std::move(row));
  }
  print_csv(out, table);
}

// Prints one CSV row per coefficient.
void print_coefficients_csv(std::ostream& out, const record::ShownRun& run) {
  Table table;
  table.header = {"term", "estimate", "std_error", "t_stat", "p_value", "ci_low", "ci_high"};
  for (const auto& c : run.result.coefficients)
    table.rows.push_back({c.term, csv_figure(c.estimate), csv_figure(c.std_error),
                          csv_figure(c.t_stat), csv_figure(c.p_value), csv_figure(c.ci_low),
                          csv_figure(c.ci_high)});
  print_csv(out, table);
}

void run_show(const ShowOptions& o, const GlobalOptions& global) {
  auto ledger_opened = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                          store::OpenMode::read_only, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  // JSON shows the stored texts' keys as stored; the other formats read the typed run.
  switch (o.format) {
    case Format::json: print_json(std::cout, ledger.load_run(o.run_id)); break;
    case Format::csv: {
      const auto run = ledger.load_run_record(o.run_id);
      if (run.result.rolling)
        print_windows_csv(std::cout, run, *run.result.rolling);
      else
        print_coefficients_csv(std::cout, run);
      break;
    }
    case Format::table: print_run_text(std::cout, ledger.load_run_record(o.run_id)); break;
  }
}

}  // namespace

void setup_show(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<ShowOptions>();
  auto* cmd = app.add_subcommand("show", "Print one run in full");
  cmd->add_option("run", o->run_id, "Run id (see `alphatrail runs`)")->required();
  add_format_option(*cmd, o->format);
  cmd->callback([o, &global] { run_show(*o, global); });
}

}  // namespace alphatrail::cli
