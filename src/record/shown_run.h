// A stored run as typed values for showing it (`show`, `evaluate`, the report pages): its row
// (the header fields and hashes), its parameters and result read checked, and its inputs with
// where each version came from. The store builds one (store::Ledger::load_run_record); the
// reads that build it throw StoredTextError (Failure::corruption) naming the run and the
// field, so whoever holds a ShownRun may use every field without further checks.
#pragma once

#include <string>
#include <vector>

#include "record/run_parameters.h"
#include "record/run_record.h"
#include "record/stored_result.h"

namespace alphatrail::record {

// One input version of a run, with its series' newest version.
struct ShownInput {
  std::string role;  // strategy | benchmark | rate | factor
  std::string series;
  int version = 0;
  std::string content_hash;
  std::string columns;  // as stored: "3M", "SMB,HML"
  std::string source_file;
  std::string note;  // empty when none
  int latest_version = 0;
};

struct ShownRun {
  RunRow row;  // row.parameters_json and row.result_json hold the texts as stored
  RunParameters parameters;
  RunResult result;
  std::vector<ShownInput> inputs;  // strategy, benchmark, rate, then factors
};

}  // namespace alphatrail::record
