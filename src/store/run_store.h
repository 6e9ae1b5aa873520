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
#include "record/run_record.h"
#include "store/ledger.h"

namespace alphatrail::store {

// Returns the inputs of a stored run with their versions' names, numbers and hashes.
std::vector<record::RunInput> read_run_inputs(Ledger& ledger, std::int64_t run_id);

// Records runs in order, each chained to the one before, all with one time of recording;
// must run inside Ledger::write_transaction. Builds the rows on all cores, then inserts them
// one by one, calling on_stored(number stored so far) after each. Returns their run ids.
std::vector<std::int64_t> store_runs(Ledger& ledger, const std::vector<const record::NewRun*>& runs,
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

// Reads a run row with its inputs and coefficients; nullopt when absent.
std::optional<record::RunRow> read_run_row(Ledger& ledger, std::int64_t run_id);

// Returns the row of a run that must exist; throws Error(Failure::not_found) naming the run,
// the ledger and the command that lists the runs.
record::RunRow existing_run_row(Ledger& ledger, std::int64_t run_id);

}  // namespace alphatrail::store
