// The three report pages: one run, a strategy's history, a study's variants. Each takes what
// the ledger holds (runs as typed records, record/shown_run.h) plus, for one run, its aligned
// sample recomputed from the run's own input versions, and returns a self-contained HTML
// page (html.h) with charts (charts.h). Pure computation: no SQL, no file I/O.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "record/shown_run.h"

namespace alphatrail::report {

// A run's aligned sample: one entry per kept period, decimal returns per period.
struct PeriodData {
  std::vector<std::string> periods;  // "2004-06", or dates for daily runs
  std::vector<double> strategy_excess;
  std::vector<double> benchmark_excess;
  std::vector<double> risk_free;
  std::vector<double> residuals;
};

struct RunReportInput {
  record::ShownRun run;
  PeriodData data;
  std::string reproduction;  // how the sample was recomputed, and whether it matched
  // The run's rolling estimates, or ones computed for the page; nullopt: none could be.
  std::optional<record::StoredRolling> rolling;
  bool rolling_from_run = true;             // false: computed for this page, not part of the run
  std::optional<record::ShownRun> revised;  // the run this one revises, when it does
  std::string made_by;                      // footer: engine version and time
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
  std::vector<record::ShownRun> runs;  // every run of the strategy, oldest first
  std::vector<VersionRow> versions;    // every version of the strategy's series
  std::string made_by;
};

// Returns the page of a strategy's history: alpha (annualized) with its interval per run in
// time order, revisions marked, and the runs and series versions as tables.
std::string strategy_report(const StrategyReportInput& in);

struct StudyReportInput {
  std::string study;
  std::vector<record::ShownRun> runs;  // every run of the study, oldest first
  std::string made_by;
};

// Returns the page of a study: the alpha t statistic of every run, sorted, with the number of
// trials stated and the t = 3 line, and the runs as a table.
std::string study_report(const StudyReportInput& in);

// Describes a run's standard errors from its statistics, e.g. "Newey-West, 5 lags, no
// small-sample factor" or "White HC3".
std::string describe_errors(const record::StoredStatistics& statistics);

}  // namespace alphatrail::report
