// Errors that reach the user. Each names the object, the problem and the fix; the CLI maps
// the kind to a documented exit code.
#pragma once

#include <fmt/format.h>

#include <stdexcept>
#include <string>

namespace alphatrail {

// Exit codes, documented in `alphatrail --help` and the README.
enum class ExitCode : int {
  ok = 0,
  failure = 1,        // unexpected internal error
  usage = 2,          // bad command line
  bad_input = 3,      // an input file is missing, unreadable or invalid
  ledger = 4,         // the ledger cannot be opened, is newer than the binary, or is busy
  not_found = 5,      // a named series, run or study does not exist
  estimation = 6,     // the data cannot be estimated (too short, collinear, ill-conditioned)
  verify_failed = 7,  // verification found a mismatch
};

class Error : public std::runtime_error {
 public:
  Error(ExitCode code, const std::string& message) : std::runtime_error(message), code_(code) {}
  ExitCode code() const { return code_; }

 private:
  ExitCode code_;
};

// An input file problem at a position: "FILE:LINE:COLUMN: problem; fix".
// line and column are 1-based; 0 means "not applicable" and is left out of the message.
class InputError : public Error {
 public:
  InputError(const std::string& file, long line, long column, const std::string& problem,
             const std::string& fix)
      : Error(ExitCode::bad_input, format(file, line, column, problem, fix)) {}

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
