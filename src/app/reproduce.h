// Reproducing a run: recomputing it from its stored input versions and parameters with this
// engine and comparing the figures and the inputs hash with what the ledger holds. The use
// case behind `alphatrail reproduce`; the cli words the outcome and turns a run that does not
// reproduce into a mismatch (exit 7). Reads only; throws alphatrail::Error (not_found for an
// unknown run, corruption for a stored result that cannot be read).
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "app/json_diff.h"
#include "store/ledger.h"

namespace alphatrail::app {

// A run recomputed beside its stored record.
struct ReproduceOutcome {
  std::int64_t run_id = 0;
  std::string strategy;
  std::string recorded_by_engine;  // the engine version that recorded the run
  std::string stored_inputs_hash;
  std::string recomputed_inputs_hash;  // over the same inputs and parameters, with this engine
  // Each figure of the stored result that the recomputation changed (stored: before). The
  // reading is left out: its words count the runs in the ledger, not the figures.
  std::vector<JsonDifference> differences;

  bool inputs_hash_matches() const { return stored_inputs_hash == recomputed_inputs_hash; }
  // Returns true when every figure and the inputs hash are identical, bit for bit.
  bool matched() const { return differences.empty() && inputs_hash_matches(); }
};

// Recomputes run `run_id` from the versions it used, in one read transaction.
ReproduceOutcome reproduce_run(store::Ledger& ledger, std::int64_t run_id);

}  // namespace alphatrail::app
