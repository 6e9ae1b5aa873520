// Command-level tests of `alphatrail series`: the list in table, JSON and CSV form, a series'
// version history, and the errors for an unknown series or a missing ledger.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <gtest/gtest.h>

#include <filesystem>
#include <nlohmann/json.hpp>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::lines_of;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::ScratchDir;

bool is_hex64(const std::string& s) {
  return std::regex_match(s, std::regex("[0-9a-f]{64}"));
}

class SeriesTest : public ::testing::Test {
 protected:
  void SetUp() override {
    // Two strategies (fund-b has a missing month), a benchmark and a factor set.
    ingest({"strategy", dir_.write("funds.csv",
                                   "date,fund-a,fund-b\n"
                                   "2021-01-31,0.01,0.02\n"
                                   "2021-02-28,-0.005,NA\n"
                                   "2021-03-31,0.012,0.01\n")
                            .string()});
    ingest({"benchmark",
            dir_.write("mkt.csv",
                       "date,close\n2020-12-31,0.001\n2021-01-31,0.01\n2021-02-28,0.02\n"
                       "2021-03-31,0.03\n")
                .string(),
            "--name", "mkt"});
    ingest({"factor",
            dir_.write("ff.csv", "date,mkt_rf,smb\n2021-01-31,0.01,0.002\n2021-02-28,0.02,0.001\n")
                .string(),
            "--name", "ff2"});
  }

  void ingest(const std::vector<std::string>& args) const {
    std::vector<std::string> all{"--ledger", ledger_.string(), "ingest"};
    all.insert(all.end(), args.begin(), args.end());
    const CommandResult r = run_alphatrail(all);
    ASSERT_EQ(r.exit_code, 0) << r.err;
  }

  CommandResult series(const std::vector<std::string>& args = {}) const {
    std::vector<std::string> all{"--ledger", ledger_.string(), "series"};
    all.insert(all.end(), args.begin(), args.end());
    return run_alphatrail(all);
  }

  std::string hash_of(const std::string& name, int version = 1) const {
    SQLite::Database db(ledger_.string(), SQLite::OPEN_READONLY);
    SQLite::Statement q(db,
                        "SELECT content_hash FROM series_versions v JOIN series s USING "
                        "(series_id) WHERE s.name = ? AND v.version = ?");
    q.bind(1, name);
    q.bind(2, version);
    return q.executeStep() ? q.getColumn(0).getString() : "(none)";
  }

  ScratchDir dir_;
  fs::path ledger_ = dir_ / "ledger.db";
};

TEST_F(SeriesTest, TableListsEverySeries) {
  const CommandResult r = series();
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.err, "");
  const auto lines = lines_of(r.out);
  ASSERT_EQ(lines.size(), 6u) << r.out;  // header, rule, 4 rows
  EXPECT_EQ(lines[0].rfind("name", 0), 0u);
  EXPECT_TRUE(contains(lines[0], "content hash"));
  EXPECT_EQ(lines[1].find_first_not_of("- "), std::string::npos);  // the rule
  // Strategies, then benchmarks, then factor sets; names at the start of their rows.
  EXPECT_EQ(lines[2].rfind("fund-a ", 0), 0u) << lines[2];
  EXPECT_EQ(lines[3].rfind("fund-b ", 0), 0u) << lines[3];
  EXPECT_EQ(lines[4].rfind("mkt ", 0), 0u) << lines[4];
  EXPECT_EQ(lines[5].rfind("ff2 ", 0), 0u) << lines[5];
  // The table shows 12 hex digits of the hash, not all 64.
  EXPECT_TRUE(contains(lines[2], hash_of("fund-a").substr(0, 12)));
  EXPECT_FALSE(contains(r.out, hash_of("fund-a")));
  EXPECT_TRUE(contains(lines[2], "strategy"));
  EXPECT_TRUE(contains(lines[2], "monthly"));
  EXPECT_TRUE(contains(lines[4], "2020-12-31"));
}

TEST_F(SeriesTest, JsonListHasTheDocumentedKeysAndValues) {
  const CommandResult r = series({"--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json list = nlohmann::json::parse(r.out);
  ASSERT_TRUE(list.is_array());
  ASSERT_EQ(list.size(), 4u);
  for (const auto& item : list)
    for (const char* key :
         {"name", "kind", "frequency", "first", "last", "observations", "version", "content_hash"})
      EXPECT_TRUE(item.contains(key)) << key << " missing in " << item.dump();

  const auto& a = list[0];
  EXPECT_EQ(a["name"], "fund-a");
  EXPECT_EQ(a["kind"], "strategy");
  EXPECT_EQ(a["frequency"], "monthly");
  EXPECT_EQ(a["first"], "2021-01-31");
  EXPECT_EQ(a["last"], "2021-03-31");
  EXPECT_EQ(a["observations"], 3);
  EXPECT_EQ(a["version"], 1);
  ASSERT_TRUE(a["content_hash"].is_string());
  EXPECT_TRUE(is_hex64(a["content_hash"].get<std::string>())) << a["content_hash"];
  EXPECT_EQ(a["content_hash"], hash_of("fund-a"));

  const auto& b = list[1];
  EXPECT_EQ(b["name"], "fund-b");
  EXPECT_EQ(b["observations"], 3);
  EXPECT_EQ(b["missing"], 1);
  EXPECT_EQ(b["content_hash"], hash_of("fund-b"));
  EXPECT_NE(a["content_hash"], b["content_hash"]);

  const auto& m = list[2];
  EXPECT_EQ(m["name"], "mkt");
  EXPECT_EQ(m["kind"], "benchmark");
  EXPECT_EQ(m["first"], "2020-12-31");
  EXPECT_EQ(m["observations"], 4);
  EXPECT_EQ(m["columns"], nlohmann::json::array({"mkt"}));

  const auto& f = list[3];
  EXPECT_EQ(f["name"], "ff2");
  EXPECT_EQ(f["kind"], "factor");
  EXPECT_EQ(f["columns"], nlohmann::json::array({"mkt_rf", "smb"}));
  EXPECT_EQ(f["observations"], 2);
  EXPECT_EQ(f["unit"], "decimal return");
  EXPECT_TRUE(f["quote"].is_null());
}

TEST_F(SeriesTest, CsvListHasAHeaderAndFullHashes) {
  const CommandResult r = series({"--format", "csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto lines = lines_of(r.out);
  ASSERT_EQ(lines.size(), 5u) << r.out;
  EXPECT_EQ(lines[0], "name,kind,frequency,first,last,observations,columns,version,content hash");
  EXPECT_EQ(lines[1], "fund-a,strategy,monthly,2021-01-31,2021-03-31,3,1,1," + hash_of("fund-a"));
  EXPECT_EQ(lines[4], "ff2,factor,monthly,2021-01-31,2021-02-28,2,2,1," + hash_of("ff2"));
}

TEST_F(SeriesTest, HistoryShowsEveryVersionOldestFirst) {
  ingest({"strategy",
          dir_.write("fund-a-v2.csv",
                     "date,fund-a\n2021-01-31,0.01\n2021-02-28,-0.004\n2021-03-31,0.012\n"
                     "2021-04-30,0.002\n")
              .string(),
          "--note", "restated"});

  CommandResult r = series({"fund-a", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json history = nlohmann::json::parse(r.out);
  ASSERT_EQ(history.size(), 2u) << r.out;
  EXPECT_EQ(history[0]["version"], 1);
  EXPECT_EQ(history[0]["last"], "2021-03-31");
  EXPECT_EQ(history[0]["observations"], 3);
  EXPECT_EQ(history[0]["content_hash"], hash_of("fund-a", 1));
  EXPECT_EQ(history[0]["note"], "");
  EXPECT_EQ(history[1]["version"], 2);
  EXPECT_EQ(history[1]["last"], "2021-04-30");
  EXPECT_EQ(history[1]["observations"], 4);
  EXPECT_EQ(history[1]["content_hash"], hash_of("fund-a", 2));
  EXPECT_EQ(history[1]["note"], "restated");
  EXPECT_NE(history[0]["content_hash"], history[1]["content_hash"]);
  EXPECT_EQ(history[1]["source_file"], (dir_ / "fund-a-v2.csv").string());

  r = series({"fund-a"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto lines = lines_of(r.out);
  ASSERT_EQ(lines.size(), 6u) << r.out;  // title, blank, header, rule, 2 versions
  EXPECT_EQ(lines[0], "fund-a (strategy series, decimal return; columns: fund-a)");
  EXPECT_EQ(lines[2].rfind("version", 0), 0u) << lines[2];
  EXPECT_TRUE(contains(lines[4], hash_of("fund-a", 1).substr(0, 12))) << lines[4];
  EXPECT_TRUE(contains(lines[5], hash_of("fund-a", 2).substr(0, 12))) << lines[5];
  EXPECT_TRUE(contains(lines[5], "restated")) << lines[5];

  r = series({"fund-a", "--format", "csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(lines_of(r.out)[0],
            "version,ingested (UTC),by,observations,first,last,content hash,source file,note");
  EXPECT_EQ(lines_of(r.out).size(), 3u);
}

TEST_F(SeriesTest, UnknownSeriesIsNotFound) {
  const CommandResult r = series({"nope"});
  EXPECT_EQ(r.exit_code, 5) << r.err;
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(r.err, "alphatrail: error: no series named 'nope' in " + ledger_.string() +
                       "; `alphatrail series` lists them\n");
}

TEST_F(SeriesTest, BadFormatIsAUsageError) {
  const CommandResult r = series({"--format", "xml"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_EQ(r.out, "");
}

TEST_F(SeriesTest, ListingWritesNothing) {
  const auto bytes = [&] { return alphatrail::testing::read_file(ledger_); };
  // The ingests have ended, so the file holds everything; a listing must not change a byte.
  const std::string before = bytes();
  ASSERT_EQ(series({"--format", "json"}).exit_code, 0);
  ASSERT_EQ(series({"fund-a"}).exit_code, 0);
  EXPECT_EQ(bytes(), before);
}

TEST(SeriesCommand, EmptyLedgerSaysSo) {
  ScratchDir dir;
  const std::string ledger = (dir / "empty.db").string();
  ASSERT_EQ(run_alphatrail({"--ledger", ledger, "init"}).exit_code, 0);
  CommandResult r = run_alphatrail({"--ledger", ledger, "series"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out, "the ledger holds no series yet; add some with `alphatrail ingest`\n");
  r = run_alphatrail({"--ledger", ledger, "series", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(nlohmann::json::parse(r.out), nlohmann::json::array());
}

TEST(SeriesCommand, MissingLedgerIsNotCreated) {
  ScratchDir dir;
  const fs::path ledger = dir / "none.db";
  const CommandResult r = run_alphatrail({"series", "--ledger", ledger.string()});
  EXPECT_EQ(r.exit_code, 4) << r.err;
  EXPECT_TRUE(contains(r.err, "no ledger at " + ledger.string())) << r.err;
  EXPECT_TRUE(contains(r.err, "alphatrail init")) << r.err;
  EXPECT_FALSE(fs::exists(ledger));
}

TEST(SeriesCommand, SingleObservationIsIrregular) {
  ScratchDir dir;
  const std::string ledger = (dir / "one.db").string();
  ASSERT_EQ(run_alphatrail({"--ledger", ledger, "ingest", "strategy",
                            dir.write("one.csv", "date,once\n2021-01-31,0.01\n").string()})
                .exit_code,
            0);
  CommandResult r = run_alphatrail({"--ledger", ledger, "series", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto list = nlohmann::json::parse(r.out);
  ASSERT_EQ(list.size(), 1u);
  EXPECT_TRUE(list[0]["frequency"].is_null());
  r = run_alphatrail({"--ledger", ledger, "series"});
  EXPECT_TRUE(contains(lines_of(r.out).at(2), "irregular")) << r.out;
}

}  // namespace
