#include "cli/exit_codes.h"

#include <fmt/format.h>

namespace alphatrail::cli {

int exit_code(Failure kind) {
  switch (kind) {
    case Failure::internal: return 1;
    case Failure::invalid_argument: return 2;
    case Failure::bad_input: return 3;
    case Failure::unusable_ledger:
    case Failure::busy: return 4;
    case Failure::not_found: return 5;
    case Failure::cannot_estimate: return 6;
    case Failure::mismatch: return 7;
    case Failure::corruption: return 8;
  }
  return 1;
}

const std::vector<ExitCodeRow>& exit_code_table() {
  static const std::vector<ExitCodeRow> table{
      {0, "success"},
      {1, "internal error (a bug: please report it)"},
      {2, "bad command line (unknown option, conflicting options, missing name)"},
      {3, "an input file is missing, unreadable or invalid"},
      {4,
       "the ledger cannot be opened: not a ledger, newer than this binary, older than it for a "
       "command that only reads (upgrade it with `init`), or busy past the timeout"},
      {5, "a named series, run or study does not exist"},
      {6, "the data cannot be estimated: sample too short, collinear or ill-conditioned design"},
      {7, "verification found a mismatch"},
      {8,
       "stored data cannot be read as what it should be (the ledger was damaged or edited "
       "outside alphatrail): the message names the run and the field"},
  };
  return table;
}

std::string exit_code_footer() {
  std::string text = "Exit codes:";
  const auto& table = exit_code_table();
  for (std::size_t i = 0; i < table.size(); ++i) {
    // The first clause of each meaning is enough for --help; the README has the rest.
    const std::string& m = table[i].meaning;
    const std::string brief = m.substr(0, std::min(m.find(" ("), m.find(':')));
    text += fmt::format(" {} {}{}", table[i].code, brief, i + 1 < table.size() ? ";" : ".");
  }
  return text;
}

}  // namespace alphatrail::cli
