// Writing HTML reports from the ledger: the work behind `alphatrail report`, shared with the
// demo. Each gathers what the page needs (runs, versions, the recomputed sample of a run) and
// writes one self-contained file through a temporary file, so a failed write leaves no half
// page behind. An existing file at the output is replaced only when it is a page of ours, or
// with `force`; the ledger itself never. Throws alphatrail::Error.
#pragma once

#include <cstdint>
#include <filesystem>
#include <string>

#include "store/ledger.h"

namespace alphatrail::cli {

// Writes the report of one run.
void write_run_report(store::Ledger& ledger, std::int64_t run_id,
                      const std::filesystem::path& output, bool force = false);

// Writes the history of a strategy across all its runs and revisions.
void write_strategy_report(store::Ledger& ledger, const std::string& strategy,
                           const std::filesystem::path& output, bool force = false);

// Writes all runs of a study side by side.
void write_study_report(store::Ledger& ledger, const std::string& study,
                        const std::filesystem::path& output, bool force = false);

}  // namespace alphatrail::cli
