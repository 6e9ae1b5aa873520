// Verification of a ledger: every version's content hash recomputed from its stored
// observations, every packed copy of a column compared with the column's JSON, every run's
// inputs hash and record hash, the hash chain over all runs, and the engine's own integrity
// check (SQLite's). Read-only; written against store::Ledger, so no SQL here: the store hands
// over what it stored (for_each_stored_version) and this recomputes it with record/.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "store/ledger.h"

namespace alphatrail::store {

struct VerifyProblem {
  std::string object;   // "series trend-12m version 2", "run 14", "ledger file"
  std::string problem;  // what does not match
};

struct VerifyReport {
  int versions_checked = 0;
  int runs_checked = 0;
  std::string chain_head;  // record hash of the last run (zeros when there are none)
  std::vector<VerifyProblem> problems;
  bool ok() const { return problems.empty(); }
};

// Checks everything the ledger can prove about itself.
// Note: removing the newest runs leaves a shorter but consistent chain; compare chain_head
// with a value kept outside the ledger to detect that.
VerifyReport verify_ledger(Ledger& ledger);

}  // namespace alphatrail::store
