// Re-running stale runs: which runs to redo, re-evaluating them against the latest versions of
// their inputs, and whether a re-run overturns the conclusion of the run it revises. The
// wording of the verdict is the cli's (cli/cmd_rerun.cc); this layer only says what flipped.
#pragma once

#include <cstdint>
#include <vector>

#include "app/evaluate.h"
#include "record/run_record.h"
#include "store/ledger.h"

namespace alphatrail::app {

// A re-run: the run revised, the run that revises it, and the significance level of both.
struct RerunOutcome {
  record::RunRow before;
  record::RunRow after;
  double level = 0.05;
};

// What a re-run changed in the run's conclusion about alpha. Significant means a p-value below
// the level; a p-value that is not a number is not significant, and an alpha that is not a
// number is not positive.
struct Verdict {
  bool significance_lost = false;   // significant before, not after
  bool became_significant = false;  // not significant before, significant after
  bool sign_changed = false;        // alpha positive on one side only
  // Returns true when any of the above flipped.
  bool flipped() const { return significance_lost || became_significant || sign_changed; }
};

// Compares alpha's p-value and estimate before and after at one significance level.
Verdict verdict(double p_before, double p_after, double alpha_before, double alpha_after,
                double level);
// Compares the two runs of a re-run at the run's own level.
Verdict verdict(const RerunOutcome& outcome);

// The runs a rerun redoes: with all_stale every stale run not yet revised, otherwise the runs
// named, each of which must exist (throws alphatrail::Error naming the first missing one).
std::vector<std::int64_t> runs_to_rerun(store::Ledger& ledger,
                                        const std::vector<std::int64_t>& named, bool all_stale);

// Re-evaluates runs against the latest versions of their inputs with the same parameters and
// records each as a run that revises the old one, in one write transaction (the caller's, when
// one is open): every re-run uses the versions of one snapshot. Reports each stored run to
// `progress`. Throws alphatrail::Error; on failure nothing is recorded.
std::vector<RerunOutcome> rerun_runs(store::Ledger& ledger, const std::vector<std::int64_t>& ids,
                                     const Progress& progress = {});

}  // namespace alphatrail::app
