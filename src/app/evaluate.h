// Evaluating strategies from the ledger and recording the runs: the use case behind
// `alphatrail evaluate`, shared with the demo, re-runs, reproductions, comparisons and reports.
// Nothing here prints: failures are thrown as alphatrail::Error, progress is reported to a
// callback, and the cli layer words and draws both.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "core/evaluation.h"
#include "record/run_parameters.h"
#include "record/run_record.h"
#include "store/ledger.h"

namespace alphatrail::app {

// Called after each run is stored with the runs stored so far and the runs to store in all;
// empty: nobody is watching. It runs on the thread that owns the ledger's connection.
using Progress = std::function<void(std::size_t done, std::size_t total)>;

// The rolling estimates asked for: none, three years of periods, or N periods per window.
struct RollingChoice {
  enum class Mode { off, automatic, periods };
  Mode mode = Mode::off;
  int periods = 0;  // with Mode::periods: the window, 1 or more
  // Returns the choice as --rolling spells it: off, auto or N.
  std::string text() const;
};

// What to evaluate and how, every setting typed: the command line parses into it
// (cli/cmd_evaluate.cc) and request_from_run rebuilds it from a run's stored parameters.
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

// Evaluates every strategy the request names without recording anything, all inputs from one
// read snapshot. Throws alphatrail::Error when any strategy cannot be evaluated.
std::vector<PendingRun> evaluate_request(store::Ledger& ledger, const EvaluateRequest& request);

// Records evaluated runs in one transaction (the caller's, when one is open; the reading counts
// the runs already recorded), reporting each stored run to `progress`. Returns the new run ids.
std::vector<std::int64_t> record_runs(store::Ledger& ledger, std::vector<PendingRun>& pending,
                                      const Progress& progress = {});

// Rebuilds the request that produced a run: same parameters, and with pin_versions the
// exact input versions it used (otherwise the latest). Throws alphatrail::Error when the run
// is missing or its stored parameters or result cannot be read.
EvaluateRequest request_from_run(store::Ledger& ledger, std::int64_t run_id, bool pin_versions);

// Evaluates every strategy the request names and records each as a run, all in one
// transaction, reporting each stored run to `progress` (total: the strategies in all).
// Returns the new run ids. Throws alphatrail::Error; on failure nothing is recorded.
std::vector<std::int64_t> evaluate_and_record(store::Ledger& ledger, const EvaluateRequest& request,
                                              const Progress& progress = {});

}  // namespace alphatrail::app
