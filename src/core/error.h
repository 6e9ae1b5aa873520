// Errors that reach the user. Each names the object, the problem and the fix, and carries
// a kind; the command line maps the kind to a documented exit code.
#pragma once

#include <fmt/format.h>

#include <stdexcept>
#include <string>

namespace alphatrail {

// What went wrong, in kinds the callers can act on. The command line maps each kind to its
// exit code in one table (cli/exit_codes.h); nothing below it knows about exit codes.
enum class Failure {
  internal,          // a bug: an invariant broke
  invalid_argument,  // a request that cannot be carried out as given (an option, a name)
  bad_input,         // an input file is missing, unreadable or invalid
  unusable_ledger,   // the ledger file is not a ledger, or of a schema this binary cannot use
  busy,              // another command held the ledger past the busy timeout
  not_found,         // a named series, run or study does not exist
  cannot_estimate,   // the data cannot be estimated (too short, collinear, not finite)
  mismatch,          // verification found stored content that does not match its hash
  corruption,        // stored data that cannot be read as what it should be
};

class Error : public std::runtime_error {
 public:
  Error(Failure kind, const std::string& message) : std::runtime_error(message), kind_(kind) {}
  Failure kind() const { return kind_; }

 private:
  Failure kind_;
};

// An input file problem at a position: "FILE:LINE:COLUMN: problem; fix".
// line and column are 1-based; 0 means "not applicable" and is left out of the message.
class InputError : public Error {
 public:
  InputError(const std::string& file, long line, long column, const std::string& problem,
             const std::string& fix)
      : Error(Failure::bad_input, format(file, line, column, problem, fix)) {}

 private:
  static std::string format(const std::string& file, long line, long column,
                            const std::string& problem, const std::string& fix) {
    std::string where = file;
    if (line > 0) where += fmt::format(":{}", line);
    if (column > 0) where += fmt::format(":{}", column);
    return fix.empty() ? fmt::format("{}: {}", where, problem)
                       : fmt::format("{}: {} ({})", where, problem, fix);
  }
};

}  // namespace alphatrail
