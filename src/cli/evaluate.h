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
#include "record/run_parameters.h"
#include "store/ledger.h"

namespace alphatrail::cli {

// The rolling estimates asked for: none, three years of periods, or N periods per window.
struct RollingChoice {
  enum class Mode { off, automatic, periods };
  Mode mode = Mode::off;
  int periods = 0;  // with Mode::periods: the window, 1 or more
  // Returns the choice as --rolling spells it: off, auto or N.
  std::string text() const;
};

// What to evaluate and how, every setting typed: the command line parses into it
// (cmd_evaluate.cc) and request_from_run rebuilds it from a run's stored parameters.
struct EvaluateRequest {
  std::vector<std::string> strategies;  // names or glob patterns
  std::string benchmark;
  std::string rate;                          // the rate curve's name
  std::string rate_tenor;                    // empty: the tenor closest to the period length
  std::vector<record::FactorSet> factors;    // columns empty: every column of the set
  std::optional<core::Frequency> frequency;  // nullopt: lowest among the inputs
  std::string from;                          // YYYY-MM-DD or YYYY-MM; empty: the inputs' first
  std::string to;                            // likewise; empty: the inputs' last
  core::ErrorKind errors = core::ErrorKind::newey_west;
  std::optional<int> lags;  // Newey-West lags; nullopt: the automatic rule
  bool small_sample = false;
  double confidence = 0.95;
  core::RateBasis rate_basis = core::RateBasis::compound;
  core::RateTiming rate_timing = core::RateTiming::start;
  core::Annualize annualize = core::Annualize::compound;
  RollingChoice rolling;
  std::string study;
  std::string note;
  // Re-runs and reproductions: versions to use instead of the latest, and the run revised.
  std::map<std::string, int> pinned_versions;
  std::optional<std::int64_t> revises_run_id;
  bool keep_series = false;  // keep each result's per-period series (compare needs them)
};

// One evaluated strategy, ready to be recorded.
struct PendingRun {
  record::NewRun run;
  core::EvaluationResult result;
  core::EvaluationSettings settings;
};

// Evaluates every strategy the request names without recording anything. Throws
// alphatrail::Error when any strategy cannot be evaluated.
std::vector<PendingRun> evaluate_request(store::Ledger& ledger, const EvaluateRequest& request);

// Records evaluated runs in one transaction (the reading counts the runs already recorded).
std::vector<std::int64_t> record_runs(store::Ledger& ledger, std::vector<PendingRun>& pending,
                                      bool progress);

// Rebuilds the request that produced a run: same parameters, and with pin_versions the
// exact input versions it used (otherwise the latest).
EvaluateRequest request_from_run(store::Ledger& ledger, std::int64_t run_id, bool pin_versions);

// Evaluates every strategy the request names and records each as a run, all in one
// transaction. Shows a progress bar on stderr when `progress` and many strategies.
// Returns the new run ids. Throws alphatrail::Error; on failure nothing is recorded.
std::vector<std::int64_t> evaluate_and_record(store::Ledger& ledger, const EvaluateRequest& request,
                                              bool progress);

// A re-run: the run revised, the run that revises it, and the significance level of both.
struct RerunOutcome {
  record::RunRow before;
  record::RunRow after;
  double level = 0.05;
};

// Re-evaluates runs against the latest versions of their inputs with the same parameters and
// records each as a run that revises the old one, in one write transaction (the caller's, when
// one is open): every re-run uses the versions of one snapshot.
std::vector<RerunOutcome> rerun_runs(store::Ledger& ledger, const std::vector<std::int64_t>& ids,
                                     bool progress);

// Prints old and new figures of each re-run, with a plain verdict when a conclusion flipped.
void print_reruns(std::ostream& out, const std::vector<RerunOutcome>& outcomes, Format format);

// Prints runs in the chosen format: a block per run (a table for many), a JSON array of run
// objects, or CSV with one row per run.
void print_runs(std::ostream& out, store::Ledger& ledger, const std::vector<std::int64_t>& runs,
                Format format);

// Prints one run in full as text.
void print_run_text(std::ostream& out, const nlohmann::ordered_json& run);

}  // namespace alphatrail::cli
