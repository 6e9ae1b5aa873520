#include <fmt/format.h>
#include <fnmatch.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <iostream>
#include <map>
#include <optional>
#include <tuple>

#include "cli/choices.h"
#include "cli/commands.h"
#include "cli/option_text.h"
#include "cli/output.h"
#include "cli/print_runs.h"
#include "core/error.h"
#include "core/timings.h"

namespace alphatrail::cli {

namespace {

Error usage(const std::string& message) {
  return Error(Failure::invalid_argument, message);
}

// Splits "NAME:REST" at its first colon; REST is empty without one.
std::pair<std::string, std::string> split_colon(const std::string& s) {
  const auto colon = s.find(':');
  if (colon == std::string::npos) return {s, ""};
  return {s.substr(0, colon), s.substr(colon + 1)};
}

// Splits "a,b,,c" into its non-empty parts.
std::vector<std::string> split_commas(const std::string& s) {
  std::vector<std::string> out;
  std::size_t start = 0;
  while (start <= s.size()) {
    const auto comma = s.find(',', start);
    std::string part =
        s.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
    if (!part.empty()) out.push_back(part);
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  return out;
}

// Parses a whole number that is all of text; nullopt otherwise.
std::optional<int> whole_number(const std::string& text) {
  try {
    std::size_t used = 0;
    const int n = std::stoi(text, &used);
    if (used == text.size()) return n;
  } catch (const std::exception&) {
  }
  return std::nullopt;
}

// Parses --lags: auto (nullopt) or a whole number of lags, 0 or more.
std::optional<int> parse_lags(const std::string& text) {
  if (text == "auto") return std::nullopt;
  const auto n = whole_number(text);
  if (!n || *n < 0)
    throw usage(fmt::format("--lags {}: write a whole number of lags (0 or more) or auto", text));
  return n;
}

// Parses --rolling: off, auto (three years at the evaluation frequency) or the window in
// periods (checked against the model once the frequency is known).
app::RollingChoice parse_rolling(const std::string& text) {
  if (text == "off") return {};
  if (text == "auto") return {app::RollingChoice::Mode::automatic, 0};
  const auto n = whole_number(text);
  if (!n || *n <= 0)
    throw usage(fmt::format(
        "--rolling {}: write a whole number of periods per window, auto (three years of "
        "periods) or off",
        text));
  return {app::RollingChoice::Mode::periods, *n};
}

void run_evaluate_command(const app::EvaluateRequest& request, Format format,
                          const GlobalOptions& global) {
  // Text the runs store, checked before the ledger is opened; an empty study is none.
  if (!request.study.empty()) require_storable_name("--study", request.study);
  require_storable_text("--note", request.note);
  auto ledger_opened = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                          store::OpenMode::existing, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  const auto runs = app::evaluate_and_record(ledger, request, progress_bar(isatty(2) != 0));
  print_runs(std::cout, ledger, runs, format);
  core::mark_phase("evaluate: printed");
}

}  // namespace

void setup_evaluate(CLI::App& app, const GlobalOptions& global) {
  auto r = std::make_shared<app::EvaluateRequest>();
  auto format = std::make_shared<Format>(Format::table);
  auto* cmd = app.add_subcommand(
      "evaluate",
      "Regress strategies' excess returns on the benchmark's (and factors'), record each as a run");
  cmd->add_option("strategies", r->strategies, "Strategy names or glob patterns ('trend-*')")
      ->required();
  cmd->add_option("--benchmark", r->benchmark, "Benchmark series")->required();
  cmd->add_option_function<std::string>(
         "--rate",
         [r](const std::string& spec) { std::tie(r->rate, r->rate_tenor) = split_colon(spec); },
         "Risk-free rate curve, NAME or NAME:TENOR")
      ->required();
  cmd->add_option_function<std::vector<std::string>>(
      "--factor",
      [r](const std::vector<std::string>& specs) {
        for (const auto& spec : specs) {
          const auto [set, columns] = split_colon(spec);
          r->factors.push_back({set, split_commas(columns)});
        }
      },
      "Factor set, SET or SET:col,col (repeatable); without it: single-index model");
  add_choice_option<core::Frequency>(
      *cmd, "--frequency", choices_of(core::kFrequencies),
      [r](const core::Frequency& f) { r->frequency = f; },
      listed_names(core::kFrequencies) + " (default: the lowest among the inputs)");
  cmd->add_option("--from", r->from, "First period, YYYY-MM-DD or YYYY-MM");
  cmd->add_option("--to", r->to, "Last period, YYYY-MM-DD or YYYY-MM");
  add_choice_option<core::ErrorKind>(*cmd, "--errors", r->errors, choices_of(core::kErrorKinds),
                                     listed_names(core::kErrorKinds));
  cmd->add_option_function<std::string>(
         "--lags", [r](const std::string& text) { r->lags = parse_lags(text); },
         "Newey-West lags: N or auto (floor(4 (T/100)^(2/9)))")
      ->default_str("auto");
  add_choice_option<bool>(*cmd, "--small-sample", r->small_sample, {{"on", true}, {"off", false}},
                          "on or off: multiply the Newey-West covariance by T/(T-k) (default off)");
  cmd->add_option("--confidence", r->confidence, "Confidence level of intervals and tests")
      ->check(CLI::Range(0.5, 0.9999))
      ->default_str("0.95");
  add_choice_option<core::RateBasis>(*cmd, "--rate-basis", r->rate_basis,
                                     choices_of(core::kRateBases), listed_names(core::kRateBases));
  add_choice_option<core::RateTiming>(
      *cmd, "--rate-timing", r->rate_timing, choices_of(core::kRateTimings),
      "start (the yield known at the period's start) or end (look-ahead)");
  add_choice_option<core::Annualize>(*cmd, "--annualize", r->annualize,
                                     choices_of(core::kAnnualizations),
                                     "compound ((1+a)^P - 1) or arithmetic (a P)");
  cmd->add_option_function<std::string>(
         "--rolling", [r](const std::string& text) { r->rolling = parse_rolling(text); },
         "Rolling alpha and beta over windows of N periods: N, auto (three years: 36 "
         "months, 156 weeks, 756 days, 12 quarters) or off")
      ->default_str("off");
  cmd->add_option("--study", r->study, "Tag the runs as trials of a named study");
  cmd->add_option("--note", r->note, "Note stored with the runs");
  add_format_option(*cmd, *format);
  cmd->callback([r, format, &global] { run_evaluate_command(*r, *format, global); });
}

}  // namespace alphatrail::cli
