// Ledgers the command-level tests start from, built by running the real binary: the six-run
// ledger of the demo's data and the evaluate fixtures. For tests/cli only (they use SQLite).
#pragma once

#include <filesystem>
#include <string>

#include "support/test_support.h"

namespace alphatrail::testing {

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

// Returns the path of a file in fixtures/evaluate.
std::string evaluate_fixture(const std::string& name);

// Ingests fixtures/evaluate into a ledger (created when missing): strategies trend-fast,
// trend-slow, carry (2010-01 .. 2019-12) and tiny (3 months); benchmark "market" from levels;
// rate curve "bills" (1M, 3M, percent); factor set "ff" (SMB, HML). Returns an error text,
// empty on success.
std::string ingest_evaluate_fixtures(const std::filesystem::path& ledger);

}  // namespace alphatrail::testing
