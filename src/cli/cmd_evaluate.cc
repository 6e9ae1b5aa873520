#include <fmt/format.h>
#include <fnmatch.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <iostream>
#include <map>

#include "cli/commands.h"
#include "cli/evaluate.h"
#include "cli/option_text.h"
#include "cli/output.h"
#include "core/error.h"
#include "core/timings.h"

namespace alphatrail::cli {

namespace {

void run_evaluate_command(const EvaluateRequest& request, Format format,
                          const GlobalOptions& global) {
  // Text the runs store, checked before the ledger is opened; an empty study is none.
  if (!request.study.empty()) require_storable_name("--study", request.study);
  require_storable_text("--note", request.note);
  auto ledger = ledger::Ledger::open(ledger::resolve_ledger_path(global.ledger),
                                     ledger::OpenMode::existing, std::cerr);
  const auto runs = evaluate_and_record(ledger, request, isatty(2) != 0);
  print_runs(std::cout, ledger, runs, format);
  core::mark_phase("evaluate: printed");
}

}  // namespace

void setup_evaluate(CLI::App& app, const GlobalOptions& global) {
  auto r = std::make_shared<EvaluateRequest>();
  auto format = std::make_shared<Format>(Format::table);
  auto* cmd = app.add_subcommand(
      "evaluate",
      "Regress strategies' excess returns on the benchmark's (and factors'), record each as a run");
  cmd->add_option("strategies", r->strategies, "Strategy names or glob patterns ('trend-*')")
      ->required();
  cmd->add_option("--benchmark", r->benchmark, "Benchmark series")->required();
  cmd->add_option("--rate", r->rate, "Risk-free rate curve, NAME or NAME:TENOR")->required();
  cmd->add_option("--factor", r->factors,
                  "Factor set, SET or SET:col,col (repeatable); without it: single-index model");
  cmd->add_option("--frequency", r->frequency,
                  "daily, weekly, monthly or quarterly (default: the lowest among the inputs)")
      ->check(CLI::IsMember({"daily", "weekly", "monthly", "quarterly"}));
  cmd->add_option("--from", r->from, "First period, YYYY-MM-DD or YYYY-MM");
  cmd->add_option("--to", r->to, "Last period, YYYY-MM-DD or YYYY-MM");
  cmd->add_option("--errors", r->errors, "classic, hc0, hc1, hc3 or newey-west")
      ->check(CLI::IsMember({"classic", "hc0", "hc1", "hc2", "hc3", "newey-west"}))
      ->default_str("newey-west");
  cmd->add_option("--lags", r->lags, "Newey-West lags: N or auto (floor(4 (T/100)^(2/9)))")
      ->default_str("auto");
  cmd->add_option("--small-sample", r->small_sample,
                  "on or off: multiply the Newey-West covariance by T/(T-k) (default off)")
      ->check(CLI::IsMember({"on", "off"}))
      ->default_str("off");
  cmd->add_option("--confidence", r->confidence, "Confidence level of intervals and tests")
      ->check(CLI::Range(0.5, 0.9999))
      ->default_str("0.95");
  cmd->add_option("--rate-basis", r->rate_basis, "compound, simple or act360")
      ->check(CLI::IsMember({"compound", "simple", "act360"}))
      ->default_str("compound");
  cmd->add_option("--rate-timing", r->rate_timing,
                  "start (the yield known at the period's start) or end (look-ahead)")
      ->check(CLI::IsMember({"start", "end"}))
      ->default_str("start");
  cmd->add_option("--annualize", r->annualize, "compound ((1+a)^P - 1) or arithmetic (a P)")
      ->check(CLI::IsMember({"compound", "arithmetic"}))
      ->default_str("compound");
  cmd->add_option("--rolling", r->rolling,
                  "Rolling alpha and beta over windows of N periods: N, auto (three years: 36 "
                  "months, 156 weeks, 756 days, 12 quarters) or off")
      ->default_str("off");
  cmd->add_option("--study", r->study, "Tag the runs as trials of a named study");
  cmd->add_option("--note", r->note, "Note stored with the runs");
  add_format_option(*cmd, *format);
  cmd->callback([r, format, &global] { run_evaluate_command(*r, *format, global); });
}

}  // namespace alphatrail::cli
