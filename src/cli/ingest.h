// Ingesting one CSV file into the ledger: the work behind `alphatrail ingest`, shared with
// the demo so that demo data takes exactly the path a user's file takes.
#pragma once

#include <filesystem>
#include <ostream>
#include <string>
#include <vector>

#include "store/ledger.h"

namespace alphatrail::cli {

struct IngestRequest {
  std::string kind;  // a name in core::kSeriesKinds: strategy | benchmark | rate | factor
  std::string file;
  std::string name;   // single-column strategy/benchmark rename, or the set/curve name
  std::string tenor;  // single-column rate file
  std::string date_column;
  std::vector<std::string> columns;
  bool percent = false;
  bool levels = false;
  bool decimal = false;
  bool allow_large_returns = false;  // accept a return above +1,000% in one period
  std::string quote = "yield";       // a name in core::kRateQuotes
  std::string note;
};

// A file read and validated, ready to be stored.
struct CheckedFile {
  std::string file;
  std::vector<store::NewVersion> versions;
  store::SourceInfo source;
};

// Reads and validates the file the request names, writing notes on `notes`. Throws
// alphatrail::Error naming the file, line and column.
CheckedFile check_file(const IngestRequest& request, std::ostream& notes);

// Stores a checked file's series as new versions (inside the caller's transaction when one is
// open), printing one line per series (or a summary for many) on `out`.
void store_file(store::Ledger& ledger, CheckedFile checked, std::ostream& out);

// Validates the file and stores its series in the ledger in one transaction, printing one
// line per series (or a summary for many) on `out` and notes on `notes`. Throws
// alphatrail::Error; on failure nothing is written.
void ingest_file(const std::filesystem::path& ledger_path, const IngestRequest& request,
                 std::ostream& out, std::ostream& notes);

}  // namespace alphatrail::cli
