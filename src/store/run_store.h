// Evaluation runs in the ledger: recording a run (with its inputs hash and its place in the
// hash chain), counting and listing runs, and reading one back as the JSON run object.
//
// Runs are immutable. Each stores the SHA-256 of its own record and of the previous run's
// record, so that editing, removing or reordering runs breaks the chain (`verify`).
#pragma once

#include <cstdint>
#include <functional>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <vector>

#include "core/evaluation.h"
#include "store/ledger.h"

namespace alphatrail::store {

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

// Returns the inputs of a stored run with their versions' names, numbers and hashes.
std::vector<RunInput> read_run_inputs(Ledger& ledger, std::int64_t run_id);

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

// Records runs in order, each chained to the one before, all with one time of recording;
// must run inside Ledger::write_transaction. Builds the rows on all cores, then inserts them
// one by one, calling on_stored(number stored so far) after each. Returns their run ids.
std::vector<std::int64_t> store_runs(Ledger& ledger, const std::vector<const NewRun*>& runs,
                                     const std::function<void(std::size_t)>& on_stored = {});

// Returns how many runs a study has (0 for an empty study name).
int count_study_runs(Ledger& ledger, const std::string& study);
// Returns how many runs a strategy has.
int count_strategy_runs(Ledger& ledger, const std::string& strategy);

// Returns the JSON run object of a run (the contract of `show --format json`); throws
// Error(not_found) when absent.
nlohmann::ordered_json load_run(Ledger& ledger, std::int64_t run_id);

struct RunFilter {
  std::string strategy;        // empty: any
  std::string study;           // empty: any
  std::int64_t first_run = 0;  // run ids from .. to (inclusive); 0: unbounded
  std::int64_t last_run = 0;
  bool staleness = true;  // false: leave RunSummary::stale false, which saves a join per run
};

// One line of `alphatrail runs`.
struct RunSummary {
  std::int64_t run_id = 0;
  std::string created_at;
  std::string strategy;
  std::string benchmark;
  std::string study;
  std::string inputs_hash;
  std::string frequency;
  int observations = 0;
  double alpha = 0;
  double alpha_annualized = 0;
  double alpha_t = 0;
  double alpha_p = 0;
  double beta = 0;
  double r_squared = 0;
  std::string errors;
  int lags = 0;
  bool stale = false;  // an input has a newer version than the run used
  std::optional<std::int64_t> revises_run_id;
};

// Returns the runs matching the filter, oldest first.
std::vector<RunSummary> list_runs(Ledger& ledger, const RunFilter& filter);

// Returns the stale runs (an input has a newer version than the run used: the run_summary
// view's definition) that no later run revises yet, oldest first.
std::vector<std::int64_t> unrevised_stale_runs(Ledger& ledger);

// An input of a run with a newer version than the one the run used.
struct NewerInput {
  std::string series;
  int version = 0;         // the version the run used
  int latest_version = 0;  // the newest version there is
};

// Returns the inputs of a run that have newer versions, in the run's input order.
std::vector<NewerInput> newer_input_versions(Ledger& ledger, std::int64_t run_id);

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

// Reads a run row with its inputs and coefficients; nullopt when absent.
std::optional<RunRow> read_run_row(Ledger& ledger, std::int64_t run_id);

// Returns the row of a run that must exist; throws Error(Failure::not_found) naming the run,
// the ledger and the command that lists the runs.
RunRow existing_run_row(Ledger& ledger, std::int64_t run_id);

// Returns the canonical text of a run row that its record hash covers (all but record_hash).
std::string canonical_run_record(const RunRow& row);

// Returns SHA-256 of previous hash, a line break and a canonical record.
std::string chain_hash(const std::string& previous_record_hash, const std::string& record);

inline const std::string kGenesisHash(64, '0');

}  // namespace alphatrail::store
