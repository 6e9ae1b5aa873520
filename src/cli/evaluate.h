// Evaluating strategies from the ledger and recording the runs: the work behind
// `alphatrail evaluate`, shared with the demo and with re-runs.
#pragma once

#include <cstdint>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "cli/output.h"
#include "ledger/ledger.h"

namespace alphatrail::cli {

struct EvaluateRequest {
  std::vector<std::string> strategies;  // names or glob patterns
  std::string benchmark;
  std::string rate;                     // NAME or NAME:TENOR
  std::vector<std::string> factors;     // SET or SET:col,col
  std::string frequency;                // empty: lowest among the inputs
  std::string from;
  std::string to;
  std::string errors = "newey-west";
  std::string lags = "auto";
  std::string small_sample = "off";
  double confidence = 0.95;
  std::string rate_basis = "compound";
  std::string rate_timing = "start";
  std::string annualize = "compound";
  std::string study;
  std::string note;
};

// Evaluates every strategy the request names and records each as a run, all in one
// transaction. Shows a progress bar on stderr when `progress` and many strategies.
// Returns the new run ids. Throws alphatrail::Error; on failure nothing is recorded.
std::vector<std::int64_t> evaluate_and_record(ledger::Ledger& ledger,
                                              const EvaluateRequest& request, bool progress);

// Prints runs in the chosen format: a block per run (a table for many), a JSON array of run
// objects, or CSV with one row per run.
void print_runs(std::ostream& out, ledger::Ledger& ledger, const std::vector<std::int64_t>& runs,
                Format format);

// Prints one run in full as text.
void print_run_text(std::ostream& out, const nlohmann::ordered_json& run);

}  // namespace alphatrail::cli
