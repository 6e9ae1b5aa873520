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

// Builds the six-run ledger the track-record tests start from, from the demo's data files
// (the demo at `demo` also restates and re-runs; `ledger` stops after the first six runs).
// Returns an error text, empty on success.
std::string build_six_run_ledger(const std::filesystem::path& demo,
                                 const std::filesystem::path& ledger);

// Copies a ledger file and its write-ahead log over `to` (dropping to's old -wal and -shm).
void copy_ledger(const std::filesystem::path& from, const std::filesystem::path& to);

// Tests on the six-run ledger: built once per suite by build_six_run_ledger; each test works on
// its own copy at ledger_path().
class SixRunLedgerTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite();
  static void TearDownTestSuite();
  void SetUp() override;

  static std::filesystem::path demo();           // the demo ledger the six runs' files came from
  static std::filesystem::path base();           // the six-run ledger, never modified
  static std::filesystem::path benchmark_csv();  // the demo's benchmark levels file
  std::filesystem::path ledger_path() const { return scratch_ / "ledger.db"; }
  std::string ledger() const { return ledger_path().string(); }

  ScratchDir scratch_;

 private:
  static inline ScratchDir* dir_ = nullptr;
  static inline std::string problem_;
};

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

// Returns the path of a file in fixtures/evaluate.
std::string evaluate_fixture(const std::string& name);

// Ingests fixtures/evaluate into a ledger (created when missing): strategies trend-fast,
// trend-slow, carry (2010-01 .. 2019-12) and tiny (3 months); benchmark "market" from levels;
// rate curve "bills" (1M, 3M, percent); factor set "ff" (SMB, HML). Returns an error text,
// empty on success.
std::string ingest_evaluate_fixtures(const std::filesystem::path& ledger);

}  // namespace alphatrail::testing
