// Helpers shared by the test suites: scratch folders, running the real binary, fixture paths.
#pragma once

#include <gtest/gtest.h>
#include <sys/types.h>

#include <filesystem>
#include <string>
#include <vector>

#include "core/dates.h"

namespace alphatrail::testing {

// Returns the path of a file below the source tree, e.g. source_path("fixtures/x.csv").
std::filesystem::path source_path(const std::string& relative);

// Returns the path of a NIST StRD reference dataset (fixtures/nist-strd, see its README).
std::filesystem::path nist_path(const std::string& file);

// A fresh, empty folder removed when the object goes out of scope.
class ScratchDir {
 public:
  ScratchDir();
  ~ScratchDir();
  ScratchDir(const ScratchDir&) = delete;
  ScratchDir& operator=(const ScratchDir&) = delete;
  const std::filesystem::path& path() const { return path_; }
  std::filesystem::path operator/(const std::string& name) const { return path_ / name; }
  // Writes text to a file in the folder and returns its path.
  std::filesystem::path write(const std::string& name, const std::string& text) const;

 private:
  std::filesystem::path path_;
};

struct CommandResult {
  int exit_code = -1;
  std::string out;  // stdout
  std::string err;  // stderr
};

// Returns the binary under test: $ALPHATRAIL_TEST_BINARY when set (to run the suites against
// another build, e.g. to see a new test fail on the code before a fix), else this build's.
std::string alphatrail_binary();

// Runs the alphatrail binary with the arguments (no shell), capturing both streams. The child's
// environment is this one without ALPHATRAIL_ variables, plus `env`; it runs in `cwd` if given.
CommandResult run_alphatrail(const std::vector<std::string>& args,
                             const std::vector<std::string>& env = {},
                             const std::filesystem::path& cwd = {});

// Runs the binary on one ledger: run_alphatrail with "--ledger LEDGER" before the arguments.
CommandResult run_at(const std::filesystem::path& ledger, const std::vector<std::string>& args,
                     const std::vector<std::string>& env = {});

// Runs an arbitrary program (no shell), capturing both streams.
CommandResult run_program(const std::vector<std::string>& argv,
                          const std::vector<std::string>& env = {},
                          const std::filesystem::path& cwd = {});

// Starts the binary without waiting: stdin and stdout on /dev/null, stderr to a file (or
// /dev/null); environment as for run_alphatrail. Returns the process id.
pid_t start_alphatrail(const std::vector<std::string>& args,
                       const std::string& err_file = "/dev/null",
                       const std::vector<std::string>& env = {});

// Waits for a started process and returns its wait status (see waitpid).
int wait_for(pid_t pid);

// Returns true when text holds part.
bool contains(const std::string& text, const std::string& part);

// Splits text into its lines (without line ends).
std::vector<std::string> lines_of(const std::string& text);

// Reads a whole file.
std::string read_file(const std::filesystem::path& path);

// Reads a CSV of numbers written by a reference script: checks the header line and that every
// row has one number per column (failing the test otherwise) and returns the rows.
std::vector<std::vector<double>> read_number_rows(const std::filesystem::path& file,
                                                  const std::string& header);

// Returns the last day of a month, and the month ends of n consecutive months from (year, month).
// Example: month_ends(2020, 12, 2) is 2020-12-31, 2021-01-31.
core::Day month_end(int year, int month);
std::vector<core::Day> month_ends(int year, int month, int n);

}  // namespace alphatrail::testing
