// The committed fixture ledgers, recorded by earlier engines, must keep their meaning: after
// `init` upgrades a copy, `verify` checks out on it and every run of fixtures/ledgers/
// track-record.db reproduces bit for bit (same inputs hash, same figures). A failure here means
// a change altered what an existing ledger says; fix the change, never the fixture.
#include <SQLiteCpp/Database.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::source_path;

// Copies a fixture ledger into the scratch folder and upgrades the copy.
fs::path upgraded_copy(const ScratchDir& dir, const std::string& fixture) {
  const fs::path copy = dir / fixture;
  fs::copy_file(source_path("fixtures/ledgers/" + fixture), copy);
  const CommandResult init = run_alphatrail({"--ledger", copy.string(), "init"});
  EXPECT_EQ(init.exit_code, 0) << init.err;
  return copy;
}

TEST(FixtureLedgers, TrackRecordVerifiesAndEveryRunReproducesBitForBit) {
  ScratchDir dir;
  const fs::path ledger = upgraded_copy(dir, "track-record.db");
  const CommandResult verify = run_alphatrail({"--ledger", ledger.string(), "verify"});
  EXPECT_EQ(verify.exit_code, 0) << verify.out << verify.err;
  EXPECT_TRUE(contains(verify.out, "checked 10 series versions and 16 runs")) << verify.out;

  std::vector<std::int64_t> runs;
  {
    SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
    SQLite::Statement q(db, "SELECT run_id FROM runs ORDER BY run_id");
    while (q.executeStep()) runs.push_back(q.getColumn(0).getInt64());
  }
  ASSERT_EQ(runs.size(), 16u);
  for (const auto run : runs) {
    const CommandResult r =
        run_alphatrail({"--ledger", ledger.string(), "reproduce", std::to_string(run)});
    EXPECT_EQ(r.exit_code, 0) << "run " << run << ": " << r.out << r.err;
    EXPECT_TRUE(contains(r.out, "(identical)")) << "run " << run << ": " << r.out;
    EXPECT_TRUE(contains(r.out, "identical, bit for bit")) << "run " << run << ": " << r.out;
  }
}

TEST(FixtureLedgers, SchemaVersionOneLedgerVerifiesOnceUpgraded) {
  ScratchDir dir;
  const fs::path ledger = upgraded_copy(dir, "v1.db");
  const CommandResult verify = run_alphatrail({"--ledger", ledger.string(), "verify"});
  EXPECT_EQ(verify.exit_code, 0) << verify.out << verify.err;
  EXPECT_TRUE(contains(verify.out, "everything checks out")) << verify.out;
}

}  // namespace
