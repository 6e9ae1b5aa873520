// One evaluation of a strategy: prepare the inputs (resample, convert the risk-free rate,
// align), regress the strategy's excess return on the market's excess return (and factor
// returns when given), and derive the figures a reader needs. Pure computation: the ledger
// supplies the series and records the result.
//
// Model: r_s - r_f = alpha + beta (r_m - r_f) + sum_j b_j f_j + e, where f_j are factor
// returns used as given (factor sets hold zero-investment spread returns). Its terms and their
// order are the Evaluator's ModelSpec (model.h); each result carries a copy, so alpha, beta and
// the loadings are found by role: coefficient(result.fit, result.model, TermRole::market).
//
// Failure: throws alphatrail::Error(Failure::cannot_estimate) when the aligned sample is too short,
// the design is collinear or ill-conditioned, or a figure every run must hold (an estimate, a
// standard error, annualized alpha) comes out as no finite number, and
// Error(Failure::bad_input) for inputs that cannot be put on the evaluation frequency.
// Nothing is returned on failure.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "core/align.h"
#include "core/annualize.h"
#include "core/dates.h"
#include "core/error.h"
#include "core/model.h"
#include "core/rates.h"
#include "core/regression.h"
#include "core/resample.h"
#include "core/rolling.h"

namespace alphatrail::core {

struct EvaluationSettings {
  std::optional<Frequency> frequency;  // nullopt: the lowest frequency among the inputs
  std::optional<Day> from;
  std::optional<Day> to;
  CovarianceOptions covariance;  // default Newey-West, auto lags, no small-sample factor
  double confidence = 0.95;
  RateBasis rate_basis = RateBasis::compound;
  RateTiming rate_timing = RateTiming::start;
  Annualize annualize = Annualize::compound;
  int rolling_window = 0;  // N observations per rolling window (rolling.h); 0: none
};

// A return series (decimal simple returns) with the frequency it was detected at.
struct ReturnInput {
  std::string name;
  DatedSeries data;
  std::optional<Frequency> frequency;  // nullopt: detect from the dates
};

// The risk-free rate: one tenor column of a rate curve.
struct RateInput {
  std::string name;   // curve name
  std::string tenor;  // chosen tenor label
  DatedSeries yields;
  RateUnit unit = RateUnit::percent;
  RateQuote quote = RateQuote::yield;
};

// Inputs shared by every strategy of one evaluate command.
struct SharedInputs {
  ReturnInput benchmark;
  RateInput rate;
  std::vector<ReturnInput> factors;  // name = the term name of the factor
};

struct DerivedStatistics {
  int periods_per_year = 12;
  double alpha_annualized = 0;       // by EvaluationSettings::annualize
  double appraisal_ratio = 0;        // alpha / sd(e), annualized by sqrt(P)
  double sharpe_strategy = 0;        // mean / sd of the strategy excess return, x sqrt(P)
  double sharpe_benchmark = 0;       // the same for the benchmark
  double treynor_ratio = 0;          // mean strategy excess / beta, annualized (x P)
  double tracking_error = 0;         // sd(r_s - r_m), annualized (x sqrt(P))
  double information_ratio = 0;      // mean(r_s - r_m) / sd(r_s - r_m), x sqrt(P)
  double correlation = 0;            // of strategy and benchmark excess returns
  double mean_excess_strategy = 0;   // per period
  double mean_excess_benchmark = 0;  // per period
  double up_market_beta = 0;         // slope over periods with benchmark excess > 0 (NaN if < 3)
  double down_market_beta = 0;       // slope over periods with benchmark excess < 0 (NaN if < 3)
  int up_periods = 0;
  int down_periods = 0;
};

struct SampleDescription {
  Frequency frequency = Frequency::monthly;
  std::string first;  // period label, e.g. "2000-01"
  std::string last;
  int observations = 0;
  std::vector<DroppedPeriod> dropped;
  std::map<std::string, std::size_t> dropped_by_reason;
  std::vector<std::string> gaps;         // gaps inside the kept sample
  std::vector<std::string> preparation;  // each preparation step, in words
  std::vector<std::string> warnings;     // short sample, stale rates, partial periods ...
};

struct EvaluationResult {
  std::string strategy;
  std::string rate_tenor;
  SampleDescription sample;
  ModelSpec model;  // the terms of `fit`, one per coefficient in the same order
  OlsResult fit;
  DerivedStatistics derived;
  // The aligned sample, for charts: period keys, strategy and benchmark excess returns, the
  // per-period risk-free rate and the strategy's own return.
  std::vector<std::int64_t> keys;
  std::vector<double> strategy_excess;
  std::vector<double> benchmark_excess;
  std::vector<double> risk_free;
  // Rolling estimates when EvaluationSettings::rolling_window > 0 (rolling.h): one window per
  // end, oldest first, empty when the sample is shorter than the window. Kept by
  // evaluate_many(keep_series = false): they are part of the run record.
  int rolling_window = 0;          // N; 0: none asked for
  bool rolling_auto_lags = false;  // Newey-West lags by the automatic rule in each window
  Annualize annualize = Annualize::compound;  // the convention of every annualized figure
  std::vector<RollingWindow> rolling;
};

// Returns the lowest frequency among the inputs (quarterly < monthly < weekly < daily).
// Example: lowest_frequency({daily, monthly}) == monthly.
Frequency lowest_frequency(const std::vector<Frequency>& frequencies);

// Returns the number of periods below which a sample is short: three years' worth
// (common practice: 36 months, 156 weeks, 756 trading days, 12 quarters).
int short_sample_threshold(Frequency f);

// Evaluates strategies against shared inputs at one frequency. The shared inputs are
// resampled, converted and aligned once; strategies on the same sample share one design
// matrix and one factorization.
class Evaluator {
 public:
  // Prepares the shared inputs at `frequency` under the settings.
  Evaluator(const SharedInputs& shared, Frequency frequency, const EvaluationSettings& settings);

  // Evaluates one strategy; throws as described at the top of this file.
  EvaluationResult evaluate(const ReturnInput& strategy) const;

  // Evaluates many strategies; results are bit-identical to evaluate() on each. A strategy
  // that cannot be estimated yields its error message instead of a result.
  struct Outcome {
    std::optional<EvaluationResult> result;
    std::string error;
    Failure failure = Failure::internal;
  };
  // keep_series = false frees each result's per-period series (keys, excess returns,
  // residuals) to bound memory when evaluating thousands of strategies.
  std::vector<Outcome> evaluate_many(const std::vector<ReturnInput>& strategies, int threads = 0,
                                     bool keep_series = true) const;

  Frequency frequency() const { return frequency_; }
  // The model every result of this Evaluator is fitted with.
  const ModelSpec& model() const { return model_; }

 private:
  struct Prepared;  // one strategy aligned on the shared sample
  Prepared prepare(const ReturnInput& strategy) const;
  // keep_series = false leaves out the per-period series (see evaluate_many).
  EvaluationResult finish(Prepared&& prepared, OlsResult&& fit, bool keep_series) const;
  // Fills the rolling windows of a result and warns about windows it could not estimate.
  void add_rolling(EvaluationResult& result, const Aligned& aligned) const;
  void evaluate_block(const std::vector<ReturnInput>& strategies, std::size_t begin,
                      std::size_t end, int threads, bool keep_series,
                      std::vector<Outcome>& outcomes) const;

  EvaluationSettings settings_;
  Frequency frequency_;
  std::string rate_tenor_;
  ModelSpec model_;
  std::vector<std::string> shared_preparation_;
  std::vector<std::string> shared_warnings_;
  std::optional<CommonSample> common_;
};

}  // namespace alphatrail::core
