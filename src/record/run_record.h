// A run as the ledger records it, pure: the row every hash covers (RunRow), drafting it from
// an evaluation (NewRun), the text of its stored result, and the hashes that make the record
// tamper-evident: the inputs hash, the canonical record and the chain hash. Nothing here
// touches storage; the store writes and reads these rows, `verify` recomputes the hashes.
//
// Every text produced here is hashed in users' ledgers: changing a byte breaks them.
#pragma once

#include <cstdint>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "core/evaluation.h"

namespace alphatrail::record {

// One input version of a run and its role in it.
struct RunInput {
  std::string role;  // strategy | benchmark | rate | factor
  int position = 1;  // order among inputs of the same role
  std::int64_t version_id = 0;
  std::string series;
  int version = 0;
  std::string content_hash;
  std::vector<std::string> columns;  // columns used: the tenor, the factors
};

// Returns the inputs hash: SHA-256 over the engine version, the canonical parameters and
// every input's role, position, series, version, content hash and columns.
// parameters_json is the canonical text (nlohmann::json dump: sorted keys, no spaces).
std::string inputs_hash(const std::string& engine_version, const std::string& parameters_json,
                        const std::vector<RunInput>& inputs);

// A run to record.
struct NewRun {
  std::string strategy;
  std::string benchmark;
  std::string rate;     // curve:tenor
  std::string factors;  // "set:col,col; set2" or empty
  std::string study;
  std::string note;
  std::optional<std::int64_t> revises_run_id;
  std::string parameters_json;  // canonical JSON: sorted keys, every default written out
  std::vector<RunInput> inputs;
  const core::EvaluationResult* result = nullptr;
  std::vector<std::string> reading;
};

// Returns the result part of a run (sample, coefficients, statistics, reading, preparation,
// warnings, rolling) as the text stored in runs.result_json: nlohmann-json's compact dump of
// it, non-finite numbers as null.
std::string result_json_text(const core::EvaluationResult& result,
                             const std::vector<std::string>& reading);

// Returns the same as a JSON document.
nlohmann::ordered_json result_json(const core::EvaluationResult& result,
                                   const std::vector<std::string>& reading);

// A run as stored: every field its record hash covers.
struct RunRow {
  std::int64_t run_id = 0;
  std::string created_at;
  std::string engine_version;
  std::string strategy;
  std::string benchmark;
  std::string rate;
  std::optional<std::string> factors;
  std::optional<std::string> study;
  std::optional<std::string> note;
  std::optional<std::int64_t> revises_run_id;
  std::string parameters_json;
  std::string inputs_hash;
  std::string frequency;
  std::string first_period;
  std::string last_period;
  int observations = 0;
  int dropped_periods = 0;
  std::string errors;
  int lags = 0;
  double alpha = 0;
  double alpha_std_error = 0;
  double alpha_t = 0;
  double alpha_p = 0;
  double alpha_annualized = 0;
  double beta = 0;
  double beta_t = 0;
  double r_squared = 0;
  std::string result_json;
  std::string previous_record_hash;
  std::string record_hash;
  struct Input {
    std::string role;
    int position = 0;
    std::int64_t version_id = 0;
    std::string columns;
  };
  std::vector<Input> inputs;
  std::vector<core::Coefficient> coefficients;
};

// Returns the canonical record of a row in two parts, the text before and after the previous
// run's record hash, so that a batch builds them on all cores and only chains them in order.
std::pair<std::string, std::string> canonical_record_parts(const RunRow& row);

// Returns a run's row with every field but the two hashes (run id and time of recording as
// given).
RunRow draft_row(const NewRun& run, std::int64_t run_id, const std::string& created_at);

// Returns the canonical text of a run row that its record hash covers (all but record_hash).
std::string canonical_run_record(const RunRow& row);

// Returns SHA-256 of previous hash, a line break and a canonical record.
std::string chain_hash(const std::string& previous_record_hash, const std::string& record);

inline const std::string kGenesisHash(64, '0');

}  // namespace alphatrail::record
