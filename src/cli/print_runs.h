// Printing what the evaluate, rerun, show and demo commands produce: runs, re-runs and the
// progress bar drawn while runs are recorded. The work itself is the app layer's
// (app/evaluate.h, app/rerun.h).
#pragma once

#include <cstdint>
#include <ostream>
#include <vector>

#include "app/evaluate.h"
#include "app/rerun.h"
#include "cli/output.h"
#include "record/shown_run.h"
#include "store/ledger.h"

namespace alphatrail::cli {

// Returns a progress callback that draws a bar on stderr as runs are stored, when `show` and
// more than one run is stored; empty when not `show`.
app::Progress progress_bar(bool show);

// Prints old and new figures of each re-run, with a plain verdict when a conclusion flipped
// (defined in cmd_rerun.cc, with the command).
void print_reruns(std::ostream& out, const std::vector<app::RerunOutcome>& outcomes, Format format);

// Prints runs in the chosen format: a block per run (a table for many), a JSON array of run
// objects, or CSV with one row per run.
void print_runs(std::ostream& out, store::Ledger& ledger, const std::vector<std::int64_t>& runs,
                Format format);

// Prints one run in full as text.
void print_run_text(std::ostream& out, const record::ShownRun& run);

}  // namespace alphatrail::cli
