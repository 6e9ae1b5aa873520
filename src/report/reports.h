// The three report pages: one run, a strategy's history, a study's variants. Each takes what
// the ledger holds (runs as `show --format json` prints them) plus, for one run, its aligned
// sample recomputed from the run's own input versions, and returns a self-contained HTML
// page (html.h) with charts (charts.h). Pure computation: no SQL, no file I/O.
#pragma once

#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <vector>

namespace alphatrail::report {

// A run's aligned sample: one entry per kept period, decimal returns per period.
struct PeriodData {
  std::vector<std::string> periods;  // "2004-06", or dates for daily runs
  std::vector<double> strategy_excess;
  std::vector<double> benchmark_excess;
  std::vector<double> risk_free;
  std::vector<double> residuals;
};

// clang-tidy takes the implicit move of the JSON members for one that may throw (nlohmann's
// move constructor checks its invariant); it does not.
struct RunReportInput {        // NOLINT(bugprone-exception-escape)
  nlohmann::ordered_json run;  // the run, as `alphatrail show RUN --format json`
  PeriodData data;
  std::string reproduction;        // how the sample was recomputed, and whether it matched
  nlohmann::ordered_json rolling;  // the run's "rolling" object, or one computed for the page
  bool rolling_from_run = true;    // false: computed for this page, not part of the run
  std::optional<nlohmann::ordered_json> revised;  // the run this one revises, when it does
  std::string made_by;                            // footer: engine version and time
};

// Returns the page of one run: header, scatter with the fit, rolling alpha and beta, growth
// of one unit and drawdown, residual histogram, coefficients, statistics, reading, cautions,
// provenance and, for a revision, what changed.
std::string run_report(const RunReportInput& in);

// One stored version of a series, for the strategy's history.
struct VersionRow {
  int version = 0;
  std::string ingested_at;
  std::string content_hash;
  std::string source_file;
  std::string note;
};

struct StrategyReportInput {
  std::string strategy;
  std::vector<nlohmann::ordered_json> runs;  // every run of the strategy, oldest first
  std::vector<VersionRow> versions;          // every version of the strategy's series
  std::string made_by;
};

// Returns the page of a strategy's history: alpha (annualized) with its interval per run in
// time order, revisions marked, and the runs and series versions as tables.
std::string strategy_report(const StrategyReportInput& in);

struct StudyReportInput {
  std::string study;
  std::vector<nlohmann::ordered_json> runs;  // every run of the study, oldest first
  std::string made_by;
};

// Returns the page of a study: the alpha t statistic of every run, sorted, with the number of
// trials stated and the t = 3 line, and the runs as a table.
std::string study_report(const StudyReportInput& in);

// Describes a run's standard errors from its "statistics" object, e.g. "Newey-West, 5 lags,
// no small-sample factor" or "White HC3".
std::string describe_errors(const nlohmann::ordered_json& statistics);

}  // namespace alphatrail::report
