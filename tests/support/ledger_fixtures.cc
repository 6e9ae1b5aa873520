#include "support/ledger_fixtures.h"

#include <SQLiteCpp/Database.h>
#include <fmt/format.h>

#include <string>
#include <vector>

namespace alphatrail::testing {

// The six-run ledger these tests start from, built from the demo's data files exactly as the
// demo's main job records it: benchmark alder-vale-composite (levels), rate alder-vale-bills,
// factor set brindle-styles, six strategies; runs 1-3 'trend-*' (study trend-lookbacks), runs
// 4-6 carry-g10, defensive-tilt and crash-hedge. (The demo itself goes on to restate the index
// and re-run; these tests make their own revisions.) Returns an error text, empty on success.
std::string build_six_run_ledger(const std::filesystem::path& demo,
                                 const std::filesystem::path& ledger) {
  const std::filesystem::path data = demo.string() + "-data";
  const auto file = [&](const char* name) { return (data / name).string(); };
  const std::vector<std::vector<std::string>> steps{
      {"--ledger", demo.string(), "demo"},
      {"--ledger", ledger.string(), "ingest", "benchmark", file("alder-vale-composite.csv"),
       "--levels", "--name", "alder-vale-composite"},
      {"--ledger", ledger.string(), "ingest", "rate", file("alder-vale-bills.csv"), "--name",
       "alder-vale-bills"},
      {"--ledger", ledger.string(), "ingest", "factor", file("brindle-styles.csv"), "--name",
       "brindle-styles"},
      {"--ledger", ledger.string(), "ingest", "strategy", file("brindle-hollow-strategies.csv"),
       "--percent"},
      {"--ledger", ledger.string(), "evaluate", "trend-*", "--benchmark", "alder-vale-composite",
       "--rate", "alder-vale-bills", "--factor", "brindle-styles", "--study", "trend-lookbacks",
       "--note", "demo: trend look-back variants"},
      {"--ledger", ledger.string(), "evaluate", "carry-g10", "defensive-tilt", "crash-hedge",
       "--benchmark", "alder-vale-composite", "--rate", "alder-vale-bills", "--factor",
       "brindle-styles", "--note", "demo: other books"}};
  for (const auto& args : steps) {
    const CommandResult r = run_alphatrail(args);
    if (r.exit_code != 0)
      return fmt::format("{} {} failed: {}", args[2], args.size() > 3 ? args[3] : "", r.err);
  }
  SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE);
  db.exec("PRAGMA wal_checkpoint(TRUNCATE)");
  return "";
}

void copy_ledger(const std::filesystem::path& from, const std::filesystem::path& to) {
  namespace fs = std::filesystem;
  for (const char* suffix : {"-wal", "-shm"}) fs::remove(to.string() + suffix);
  fs::copy_file(from, to, fs::copy_options::overwrite_existing);
  const fs::path wal = from.string() + "-wal";
  if (fs::exists(wal))
    fs::copy_file(wal, to.string() + "-wal", fs::copy_options::overwrite_existing);
}

void SixRunLedgerTest::SetUpTestSuite() {
  dir_ = new ScratchDir();
  problem_ = build_six_run_ledger(demo(), base());
}

void SixRunLedgerTest::TearDownTestSuite() {
  delete dir_;
  dir_ = nullptr;
}

void SixRunLedgerTest::SetUp() {
  ASSERT_NE(dir_, nullptr);
  ASSERT_EQ(problem_, "");
  copy_ledger(base(), ledger_path());
}

std::filesystem::path SixRunLedgerTest::demo() {
  return *dir_ / "demo.db";
}

std::filesystem::path SixRunLedgerTest::base() {
  return *dir_ / "six.db";
}

std::filesystem::path SixRunLedgerTest::benchmark_csv() {
  return *dir_ / "demo.db-data" / "alder-vale-composite.csv";
}

std::string evaluate_fixture(const std::string& name) {
  return source_path("fixtures/evaluate/" + name).string();
}

std::string ingest_evaluate_fixtures(const std::filesystem::path& ledger) {
  const std::vector<std::vector<std::string>> ingests{
      {"strategy", evaluate_fixture("strategies.csv")},
      {"strategy", evaluate_fixture("tiny.csv")},
      {"benchmark", evaluate_fixture("benchmark.csv"), "--levels", "--name", "market"},
      {"rate", evaluate_fixture("bills.csv"), "--name", "bills"},
      {"factor", evaluate_fixture("factors.csv"), "--name", "ff"}};
  for (const auto& args : ingests) {
    std::vector<std::string> all{"--ledger", ledger.string(), "ingest"};
    all.insert(all.end(), args.begin(), args.end());
    const CommandResult r = run_alphatrail(all);
    if (r.exit_code != 0) return fmt::format("ingest {}: {}", args[1], r.err);
  }
  return "";
}

}  // namespace alphatrail::testing
