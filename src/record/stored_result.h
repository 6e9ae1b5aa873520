// The stored result of a run (runs.result_json: sample, coefficients, statistics, reading,
// preparation, warnings, rolling) as a typed value. One writer makes the stored text from it
// (nlohmann-json's compact dump: keys in the engine's order, non-finite figures as null) and one
// reader takes stored text back, checking every field; nothing else parses a stored result.
// Figures are doubles, NaN where the text holds null.
//
// The reader throws StoredTextError (Failure::corruption, record/stored_text.h) naming the run
// and the field for text that is not JSON, a missing key, a value of the wrong type, an unknown
// name or a negative count. Runs recorded before engine 0.2.0 have no "rolling" key.
//
// Every text written here is hashed in users' ledgers: changing a byte breaks them.
#pragma once

#include <cstdint>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "core/annualize.h"
#include "core/dates.h"
#include "core/evaluation.h"
#include "core/regression.h"
#include "core/rolling.h"

namespace alphatrail::record {

// A period left out of the sample and why.
struct StoredDroppedPeriod {
  std::string period;  // its label, e.g. "2020-04"
  std::string reason;
  bool operator==(const StoredDroppedPeriod&) const = default;
};

struct StoredSample {
  std::string first;  // period labels, e.g. "2000-01"
  std::string last;
  int observations = 0;
  core::Frequency frequency = core::Frequency::monthly;
  int periods_per_year = 12;
  int dropped = 0;
  std::vector<std::pair<std::string, std::int64_t>> dropped_by_reason;  // in stored order
  std::vector<StoredDroppedPeriod> dropped_periods;
  std::vector<std::string> gaps;
  bool operator==(const StoredSample&) const = default;
};

struct StoredStatistics {
  double r_squared = 0;
  double adj_r_squared = 0;
  double residual_std = 0;
  double f_stat = 0;
  double f_p_value = 0;
  int observations = 0;
  int coefficients = 0;
  int degrees_of_freedom = 0;
  core::ErrorKind errors = core::ErrorKind::newey_west;
  int lags = 0;
  bool small_sample_factor = false;
  double confidence = 0.95;
  double condition_number = 0;
  double alpha_annualized = 0;  // by the run's annualize convention
  double appraisal_ratio = 0;
  double sharpe_strategy = 0;
  double sharpe_benchmark = 0;
  double treynor_ratio = 0;
  double tracking_error = 0;
  double information_ratio = 0;
  double correlation = 0;
  double mean_excess_strategy = 0;  // per period
  double mean_excess_benchmark = 0;
  double up_market_beta = 0;
  double down_market_beta = 0;
  int up_periods = 0;
  int down_periods = 0;
};

// The rolling estimates of a run (core/rolling.h). A window read back has no `problem`.
struct StoredRolling {
  int window = 0;  // N observations per window
  core::ErrorKind errors = core::ErrorKind::newey_west;
  bool auto_lags = false;  // lag_rule "auto": Newey-West lags by the automatic rule per window
  double confidence = 0.95;
  core::Annualize annualize = core::Annualize::compound;
  std::vector<core::RollingWindow> windows;  // oldest first; figures by kWindowFigures
};

struct RunResult {
  StoredSample sample;
  std::vector<core::Coefficient> coefficients;  // alpha, beta, then the factor loadings
  StoredStatistics statistics;
  std::vector<std::string> reading;
  std::vector<std::string> preparation;
  std::vector<std::string> warnings;
  std::optional<StoredRolling> rolling;  // nullopt: none asked for ("rolling": null)
  // Runs recorded before engine 0.2.0 have no "rolling" key; false writes none, so that their
  // text reads back and writes as stored.
  bool rolling_recorded = true;
};

// Returns the stored result of an evaluation with its plain-language reading.
RunResult run_result(const core::EvaluationResult& result, const std::vector<std::string>& reading);

// Returns the stored text of a result, the text runs.result_json holds and the hashes cover.
std::string result_text(const RunResult& result);

// Reads the stored result text of run `run_id`, every field checked, and with `document` also
// hands back the text as read (its keys in stored order, for showing).
RunResult read_run_result(std::int64_t run_id, std::string_view text,
                          nlohmann::ordered_json* document = nullptr);

// Returns the stored result as the document read, checked as read_run_result checks it: for
// comparing stored text with a fresh result key by key (`reproduce`).
nlohmann::ordered_json read_result(std::int64_t run_id, std::string_view text);

// Returns the coefficient of a term ("alpha", "beta", a factor), nullptr when the run has none.
const core::Coefficient* find_coefficient(const RunResult& result, std::string_view term);

}  // namespace alphatrail::record
