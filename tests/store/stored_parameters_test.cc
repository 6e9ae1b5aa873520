// Every run of the fixture ledger recorded by engine 0.3.0 (fixtures/ledgers/track-record.db)
// reads back as typed parameters that write the stored text byte for byte, and its stored
// result reads checked: the one writer and the one reader agree with what the engine stored.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "record/run_parameters.h"
#include "record/stored_result.h"
#include "support/test_support.h"

namespace {

using alphatrail::testing::ScratchDir;
using alphatrail::testing::source_path;

TEST(StoredParameters, EveryFixtureRunWritesBackItsStoredTextByteForByte) {
  const ScratchDir dir;
  const auto copy = dir / "track-record.db";
  std::filesystem::copy_file(source_path("fixtures/ledgers/track-record.db"), copy);
  SQLite::Database db(copy.string(), SQLite::OPEN_READONLY);
  SQLite::Statement q(db,
                      "SELECT run_id, engine_version, parameters_json, result_json FROM runs "
                      "ORDER BY run_id");
  int runs = 0;
  while (q.executeStep()) {
    const auto run_id = q.getColumn(0).getInt64();
    SCOPED_TRACE(run_id);
    const std::string stored = q.getColumn(2).getString();
    const auto parameters =
        alphatrail::record::read_parameters(run_id, q.getColumn(1).getString(), stored);
    EXPECT_EQ(alphatrail::record::parameters_text(parameters), stored);
    const std::string result = q.getColumn(3).getString();
    EXPECT_EQ(alphatrail::record::read_result(run_id, result).dump(), result);
    EXPECT_EQ(alphatrail::record::result_text(alphatrail::record::read_run_result(run_id, result)),
              result);
    ++runs;
  }
  EXPECT_EQ(runs, 16);
}

}  // namespace
