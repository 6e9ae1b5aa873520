// Evaluating strategies from the ledger and recording the runs: the work behind
// `alphatrail evaluate`, shared with the demo and with re-runs.
#pragma once

#include <cstdint>
#include <map>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "cli/output.h"
#include "core/evaluation.h"
#include "ledger/ledger.h"
#include "ledger/run_store.h"

namespace alphatrail::cli {

struct EvaluateRequest {
  std::vector<std::string> strategies;  // names or glob patterns
  std::string benchmark;
  std::string rate;                  // NAME or NAME:TENOR
  std::vector<std::string> factors;  // SET or SET:col,col
  std::string frequency;             // empty: lowest among the inputs
  std::string from;
  std::string to;
  std::string errors = "newey-west";
  std::string lags = "auto";
  std::string small_sample = "off";
  double confidence = 0.95;
  std::string rate_basis = "compound";
  std::string rate_timing = "start";
  std::string annualize = "compound";
  std::string rolling = "off";  // N periods per rolling window, auto (three years) or off
  std::string study;
  std::string note;
  // Re-runs and reproductions: versions to use instead of the latest, and the run revised.
  std::map<std::string, int> pinned_versions;
  std::optional<std::int64_t> revises_run_id;
  bool keep_series = false;  // keep each result's per-period series (compare needs them)
};

// One evaluated strategy, ready to be recorded.
struct PendingRun {
  ledger::NewRun run;
  core::EvaluationResult result;
  core::EvaluationSettings settings;
};

// Evaluates every strategy the request names without recording anything. Throws
// alphatrail::Error when any strategy cannot be evaluated.
std::vector<PendingRun> evaluate_request(ledger::Ledger& ledger, const EvaluateRequest& request);

// Records evaluated runs in one transaction (the reading counts the runs already recorded).
std::vector<std::int64_t> record_runs(ledger::Ledger& ledger, std::vector<PendingRun>& pending,
                                      bool progress);

// Rebuilds the request that produced a run: same parameters, and with pin_versions the
// exact input versions it used (otherwise the latest).
EvaluateRequest request_from_run(ledger::Ledger& ledger, std::int64_t run_id, bool pin_versions);

// Evaluates every strategy the request names and records each as a run, all in one
// transaction. Shows a progress bar on stderr when `progress` and many strategies.
// Returns the new run ids. Throws alphatrail::Error; on failure nothing is recorded.
std::vector<std::int64_t> evaluate_and_record(ledger::Ledger& ledger,
                                              const EvaluateRequest& request, bool progress);

// A re-run: the run revised, the run that revises it, and the significance level of both.
struct RerunOutcome {
  ledger::RunRow before;
  ledger::RunRow after;
  double level = 0.05;
};

// Re-evaluates runs against the latest versions of their inputs with the same parameters and
// records each as a run that revises the old one, in one write transaction (the caller's, when
// one is open): every re-run uses the versions of one snapshot.
std::vector<RerunOutcome> rerun_runs(ledger::Ledger& ledger, const std::vector<std::int64_t>& ids,
                                     bool progress);

// Prints old and new figures of each re-run, with a plain verdict when a conclusion flipped.
void print_reruns(std::ostream& out, const std::vector<RerunOutcome>& outcomes, Format format);

// Prints runs in the chosen format: a block per run (a table for many), a JSON array of run
// objects, or CSV with one row per run.
void print_runs(std::ostream& out, ledger::Ledger& ledger, const std::vector<std::int64_t>& runs,
                Format format);

// Prints one run in full as text.
void print_run_text(std::ostream& out, const nlohmann::ordered_json& run);

}  // namespace alphatrail::cli
