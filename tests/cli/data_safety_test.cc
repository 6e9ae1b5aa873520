// Commands that must never lose or alter a track record, through the real binary on real
// ledger files: `report -o` never writes over the ledger it reads nor over a file it did not
// write (unless --force); `demo --replace` replaces only a demo ledger it made, never reads the
// ledger path from the environment, and empties its ledger in place under the write lock;
// `rerun` reads the stale set, evaluates and records in one write transaction, so concurrent
// re-runs revise each run once and every re-run uses one snapshot of the inputs.
#include <SQLiteCpp/Database.h>
#include <fmt/format.h>
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <string>
#include <thread>
#include <vector>

#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_at;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::SixRunLedgerTest;
using alphatrail::testing::start_alphatrail;
using alphatrail::testing::wait_for;

constexpr const char* kBenchmark = "alder-vale-composite";
constexpr const char* kRate = "alder-vale-bills";
constexpr const char* kFactors = "brindle-styles";

// The bytes of a ledger file and of its write-ahead log: equal before and after a command
// means the command changed nothing.
std::string contents_of(const fs::path& ledger) {
  const fs::path wal = ledger.string() + "-wal";
  return read_file(ledger) + "|wal|" + (fs::exists(wal) ? read_file(wal) : "");
}

std::int64_t scalar(const fs::path& ledger, const std::string& sql) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
  return db.execAndGet(sql).getInt64();
}

ino_t inode_of(const fs::path& path) {
  struct stat st {};
  return ::stat(path.c_str(), &st) == 0 ? st.st_ino : 0;
}

// ---------------------------------------------------------------------------------------
// report -o

using ReportOutputTest = SixRunLedgerTest;

TEST_F(ReportOutputTest, RefusesTheLedgerItReadsByAnyName) {
  const std::string before = contents_of(ledger_path());
  fs::create_symlink(ledger_path(), scratch_ / "link.html");
  fs::create_hard_link(ledger_path(), scratch_ / "hard.html");
  const std::vector<fs::path> names{ledger_path(), scratch_.path() / "." / "ledger.db",
                                    scratch_ / "link.html", scratch_ / "hard.html"};
  for (const auto& name : names) {
    for (const bool force : {false, true}) {
      std::vector<std::string> args{"report", "1", "-o", name.string()};
      if (force) args.push_back("--force");
      const CommandResult r = run_at(ledger_path(), args);
      EXPECT_EQ(r.exit_code, 2) << name << (force ? " --force" : "") << ": " << r.out;
      EXPECT_TRUE(contains(r.err, "is the ledger file")) << r.err;
      EXPECT_FALSE(contains(r.out, "report written")) << r.out;
      EXPECT_EQ(contents_of(ledger_path()), before) << "the ledger changed through " << name;
    }
  }
  EXPECT_TRUE(fs::is_symlink(scratch_ / "link.html"));
  const CommandResult verify = run_at(ledger_path(), {"verify"});
  EXPECT_EQ(verify.exit_code, 0) << verify.out << verify.err;
}

TEST_F(ReportOutputTest, RefusesTheLedgersWriteAheadLog) {
  // A writer's log beside the ledger is part of it too. An open connection keeps the log after
  // the rerun's connection closes.
  SQLite::Database keep(ledger(), SQLite::OPEN_READONLY);
  ASSERT_EQ(keep.execAndGet("SELECT count(*) FROM runs").getInt(), 6);
  ASSERT_EQ(run_at(ledger_path(), {"rerun", "1"}).exit_code, 0);
  const fs::path wal = ledger() + "-wal";
  ASSERT_TRUE(fs::exists(wal));
  const CommandResult r = run_at(ledger_path(), {"report", "1", "-o", wal.string(), "--force"});
  EXPECT_EQ(r.exit_code, 2) << r.out << r.err;
  EXPECT_TRUE(contains(r.err, "is the ledger file")) << r.err;
}

TEST_F(ReportOutputTest, RefusesAFileItDidNotWriteUnlessForced) {
  const fs::path notes = scratch_.write("notes.html", "<p>my own notes</p>\n");
  const CommandResult refused = run_at(ledger_path(), {"report", "1", "-o", notes.string()});
  EXPECT_EQ(refused.exit_code, 2) << refused.out;
  EXPECT_TRUE(contains(refused.err, "is not a report page alphatrail wrote")) << refused.err;
  EXPECT_TRUE(contains(refused.err, "--force")) << refused.err;
  EXPECT_EQ(read_file(notes), "<p>my own notes</p>\n");

  const CommandResult forced =
      run_at(ledger_path(), {"report", "1", "-o", notes.string(), "--force"});
  EXPECT_EQ(forced.exit_code, 0) << forced.err;
  EXPECT_EQ(read_file(notes).rfind("<!DOCTYPE html>", 0), 0u);
}

TEST_F(ReportOutputTest, ReplacesAPageItWroteAndWritesNewFiles) {
  const fs::path page = scratch_ / "run-1.html";
  const CommandResult first = run_at(ledger_path(), {"report", "1", "-o", page.string()});
  ASSERT_EQ(first.exit_code, 0) << first.err;
  EXPECT_TRUE(contains(read_file(page), "<meta name=\"generator\" content=\"alphatrail\">"));
  // Another kind of page over the first: still a page of ours, so no --force needed.
  const CommandResult again =
      run_at(ledger_path(), {"report", "--study", "trend-lookbacks", "-o", page.string()});
  EXPECT_EQ(again.exit_code, 0) << again.err;
  EXPECT_TRUE(contains(read_file(page), "trend-lookbacks"));
  // A page of an earlier version (no generator mark, the footer of ours) is ours too.
  std::string old = read_file(page);
  const std::string mark = "<meta name=\"generator\" content=\"alphatrail\">\n";
  old.erase(old.find(mark), mark.size());
  scratch_.write("old.html", old);
  const CommandResult over_old =
      run_at(ledger_path(), {"report", "2", "-o", (scratch_ / "old.html").string()});
  EXPECT_EQ(over_old.exit_code, 0) << over_old.err;
  // A folder or a device is never replaced, not even with --force.
  fs::create_directory(scratch_ / "folder.html");
  for (const bool force : {false, true}) {
    for (const std::string& target :
         {(scratch_ / "folder.html").string(), std::string("/dev/null")}) {
      std::vector<std::string> args{"report", "1", "-o", target};
      if (force) args.push_back("--force");
      const CommandResult r = run_at(ledger_path(), args);
      EXPECT_EQ(r.exit_code, 2) << target << (force ? " --force: " : ": ") << r.out;
      EXPECT_TRUE(contains(r.err, "is not a regular file")) << r.err;
    }
  }
  EXPECT_TRUE(fs::is_directory(scratch_ / "folder.html"));
  EXPECT_TRUE(fs::is_character_file("/dev/null"));
}

// ---------------------------------------------------------------------------------------
// demo --replace

TEST(DemoReplace, NeverReadsTheLedgerFromTheEnvironment) {
  ScratchDir dir;
  ASSERT_EQ(run_alphatrail({"--ledger", (dir / "prod.db").string(), "init"}).exit_code, 0);
  const std::string before = contents_of(dir / "prod.db");
  const CommandResult r =
      run_alphatrail({"demo", "--replace"}, {"ALPHATRAIL_LEDGER=prod.db"}, dir.path());
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(contents_of(dir / "prod.db"), before) << "the demo touched $ALPHATRAIL_LEDGER";
  EXPECT_TRUE(fs::exists(dir / "demo.db"));
  EXPECT_EQ(scalar(dir / "demo.db", "SELECT count(*) FROM ledger_marks WHERE mark = 'demo'"), 1);
}

TEST(DemoReplace, RefusesAFileThatIsNotALedger) {
  ScratchDir dir;
  const fs::path thesis = dir.write("thesis.txt", "Chapter 1\n");
  const CommandResult r = run_alphatrail({"demo", "--ledger", thesis.string(), "--replace"});
  EXPECT_EQ(r.exit_code, 2) << r.out;
  EXPECT_TRUE(contains(r.err, "is not a ledger the demo made")) << r.err;
  EXPECT_EQ(read_file(thesis), "Chapter 1\n");
}

using DemoReplaceLedgerTest = SixRunLedgerTest;

TEST_F(DemoReplaceLedgerTest, RefusesALedgerItDidNotMake) {
  const std::string before = contents_of(ledger_path());
  const CommandResult r = run_alphatrail({"demo", "--ledger", ledger(), "--replace"});
  EXPECT_EQ(r.exit_code, 2) << r.out;
  EXPECT_TRUE(contains(r.err, "has no demo mark")) << r.err;
  EXPECT_EQ(contents_of(ledger_path()), before);
  EXPECT_EQ(scalar(ledger_path(), "SELECT count(*) FROM runs"), 6);
}

TEST(DemoReplace, ReplacesItsOwnLedgerInPlace) {
  ScratchDir dir;
  const fs::path demo = dir / "demo.db";
  ASSERT_EQ(run_alphatrail({"demo", "--ledger", demo.string()}).exit_code, 0);
  // Runs a user added to the demo ledger go with it when it is replaced.
  ASSERT_EQ(
      run_at(demo, {"evaluate", "carry-g10", "--benchmark", kBenchmark, "--rate", kRate}).exit_code,
      0);
  ASSERT_EQ(scalar(demo, "SELECT count(*) FROM runs"), 13);
  const ino_t inode = inode_of(demo);
  const CommandResult without = run_alphatrail({"demo", "--ledger", demo.string()});
  EXPECT_EQ(without.exit_code, 2);
  EXPECT_TRUE(contains(without.err, "pass --replace")) << without.err;

  const CommandResult r = run_alphatrail({"demo", "--ledger", demo.string(), "--replace"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(inode_of(demo), inode) << "the demo replaced the file instead of emptying it";
  EXPECT_EQ(scalar(demo, "SELECT count(*) FROM runs"), 12);
  EXPECT_EQ(scalar(demo, "SELECT min(run_id) FROM runs"), 1);
  EXPECT_EQ(scalar(demo, "SELECT count(*) FROM ledger_marks"), 1);
  const CommandResult verify = run_at(demo, {"verify"});
  EXPECT_EQ(verify.exit_code, 0) << verify.out << verify.err;
}

TEST(DemoReplace, WaitsForTheWriteLockAndKeepsTheFileOthersHaveOpen) {
  ScratchDir dir;
  const fs::path demo = dir / "demo.db";
  ASSERT_EQ(run_alphatrail({"demo", "--ledger", demo.string()}).exit_code, 0);
  const ino_t inode = inode_of(demo);

  // Another writer holds the lock (as an evaluate in progress would) while the demo starts.
  SQLite::Database other(demo.string(), SQLite::OPEN_READWRITE, 1000);
  other.exec("BEGIN IMMEDIATE");
  const pid_t pid =
      start_alphatrail({"demo", "--ledger", demo.string(), "--replace"},
                       (dir / "demo.err").string(), {"ALPHATRAIL_BUSY_TIMEOUT_MS=60000"});
  std::this_thread::sleep_for(std::chrono::milliseconds(700));
  int status = 0;
  const pid_t done = waitpid(pid, &status, WNOHANG);
  EXPECT_EQ(done, 0) << "the demo did not wait for the writer";
  EXPECT_EQ(inode_of(demo), inode) << "the demo removed the file while another process wrote";
  other.exec("COMMIT");
  if (done == 0) status = wait_for(pid);
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << read_file(dir / "demo.err");

  // The connection that was open all along sees the new demo: nobody writes into a lost file.
  EXPECT_EQ(inode_of(demo), inode);
  EXPECT_EQ(other.execAndGet("SELECT count(*) FROM runs").getInt(), 12);
  other.exec("BEGIN IMMEDIATE");
  other.exec("INSERT INTO ledger_marks VALUES ('after', 'written by the other process', 'now')");
  other.exec("COMMIT");
  EXPECT_EQ(scalar(demo, "SELECT count(*) FROM ledger_marks WHERE mark = 'after'"), 1);
}

// ---------------------------------------------------------------------------------------
// rerun

// A ledger with 300 runs (50 evaluations of the six strategies), all stale after one revision
// of the benchmark; `restated` holds a second revision, for a race.
class ConcurrentRerunTest : public SixRunLedgerTest {
 protected:
  static void SetUpTestSuite() {
    SixRunLedgerTest::SetUpTestSuite();
    many_ = new ScratchDir();
    const fs::path ledger = *many_ / "many.db";
    alphatrail::testing::copy_ledger(base(), ledger);
    for (int i = 0; i < 49; ++i) {
      const CommandResult r =
          run_at(ledger, {"evaluate", "trend-*", "carry-g10", "defensive-tilt", "crash-hedge",
                          "--benchmark", kBenchmark, "--rate", kRate, "--factor", kFactors});
      if (r.exit_code != 0) problem_ = r.err;
    }
    const std::string levels = read_file(benchmark_csv());
    many_->write("revised.csv", restate(levels, "2008-10-31", 1.01));
    many_->write("revised-again.csv", restate(levels, "2008-10-31", 1.02));
    const CommandResult revise =
        run_at(ledger, {"ingest", "benchmark", (*many_ / "revised.csv").string(), "--levels",
                        "--name", kBenchmark});
    if (revise.exit_code != 0) problem_ += revise.err;
    SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE);
    db.exec("PRAGMA wal_checkpoint(TRUNCATE)");
  }
  static void TearDownTestSuite() {
    delete many_;
    many_ = nullptr;
    SixRunLedgerTest::TearDownTestSuite();
  }
  void SetUp() override {
    SixRunLedgerTest::SetUp();
    ASSERT_EQ(problem_, "");
    alphatrail::testing::copy_ledger(*many_ / "many.db", ledger_path());
    ASSERT_EQ(scalar(ledger_path(), "SELECT count(*) FROM run_summary WHERE stale"), 300);
  }

  // The levels file with the level at `date` multiplied by `factor`.
  static std::string restate(const std::string& levels, const std::string& date, double factor) {
    const std::size_t at_line = levels.find("\n" + date + ",");
    const std::size_t start = levels.find(',', at_line) + 1;
    const std::size_t end = levels.find('\n', start);
    const double level = std::stod(levels.substr(start, end - start));
    return levels.substr(0, start) + fmt::format("{:.2f}", level * factor) + levels.substr(end);
  }

  static fs::path many() { return many_->path(); }

 private:
  static inline ScratchDir* many_ = nullptr;
  static inline std::string problem_;
};

TEST_F(ConcurrentRerunTest, TwoRerunsAtOnceReviseEachStaleRunOnce) {
  const std::vector<std::string> env{"ALPHATRAIL_BUSY_TIMEOUT_MS=120000"};
  const std::vector<std::string> args{"--ledger", ledger(), "rerun", "--all-stale"};
  const pid_t a = start_alphatrail(args, (scratch_ / "a.err").string(), env);
  const pid_t b = start_alphatrail(args, (scratch_ / "b.err").string(), env);
  const int status_a = wait_for(a);
  const int status_b = wait_for(b);
  EXPECT_TRUE(WIFEXITED(status_a) && WEXITSTATUS(status_a) == 0) << read_file(scratch_ / "a.err");
  EXPECT_TRUE(WIFEXITED(status_b) && WEXITSTATUS(status_b) == 0) << read_file(scratch_ / "b.err");

  EXPECT_EQ(scalar(ledger_path(), "SELECT count(*) FROM runs"), 600);
  EXPECT_EQ(scalar(ledger_path(),
                   "SELECT count(*) FROM (SELECT revises_run_id FROM runs WHERE revises_run_id "
                   "IS NOT NULL GROUP BY revises_run_id HAVING count(*) > 1)"),
            0)
      << "a stale run was revised twice";
  EXPECT_EQ(scalar(ledger_path(),
                   "SELECT count(*) FROM run_summary s WHERE stale AND NOT EXISTS "
                   "(SELECT 1 FROM runs r WHERE r.revises_run_id = s.run_id)"),
            0);
  const CommandResult verify = run_at(ledger_path(), {"verify"});
  EXPECT_EQ(verify.exit_code, 0) << verify.out << verify.err;
}

TEST_F(ConcurrentRerunTest, ARerunRacingIngestsUsesOneSnapshot) {
  // Revisions of the benchmark land one after another for as long as the rerun works: each
  // ingest alternates between two restatements, so every one adds a version.
  const std::vector<std::string> env{"ALPHATRAIL_BUSY_TIMEOUT_MS=120000"};
  const pid_t rerun = start_alphatrail({"--ledger", ledger(), "rerun", "--all-stale"},
                                       (scratch_ / "rerun.err").string(), env);
  int status = 0;
  int ingests = 0;
  for (pid_t done = 0; done == 0 && ingests < 400; done = waitpid(rerun, &status, WNOHANG)) {
    const char* file = ingests % 2 == 0 ? "revised-again.csv" : "revised.csv";
    const CommandResult r = run_at(
        ledger_path(),
        {"ingest", "benchmark", (many() / file).string(), "--levels", "--name", kBenchmark}, env);
    ASSERT_EQ(r.exit_code, 0) << r.err;
    ++ingests;
  }
  if (ingests == 400) status = wait_for(rerun);
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << read_file(scratch_ / "rerun.err");
  ASSERT_GE(ingests, 1);

  EXPECT_EQ(scalar(ledger_path(), "SELECT count(*) FROM runs WHERE revises_run_id IS NOT NULL"),
            300);
  EXPECT_EQ(scalar(ledger_path(), fmt::format("SELECT count(DISTINCT i.version) FROM runs r JOIN "
                                              "run_input_versions i ON i.run_id = r.run_id WHERE "
                                              "r.revises_run_id IS NOT NULL AND i.series = '{}'",
                                              kBenchmark)),
            1)
      << "the re-runs used more than one version of the benchmark (" << ingests
      << " revisions landed while the rerun worked)";
}

TEST_F(ConcurrentRerunTest, DryRunRecordsNothing) {
  const std::string before = contents_of(ledger_path());
  const CommandResult r = run_at(ledger_path(), {"rerun", "--all-stale", "--dry-run"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.out, "would re-run run 300 (crash-hedge)")) << r.out;
  EXPECT_EQ(contents_of(ledger_path()), before);
}

}  // namespace
