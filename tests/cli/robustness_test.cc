// Robustness of the ledger under real processes (the real binary, fork/exec):
//
// Concurrency: two commands on one ledger at the same time (a big ingest and an evaluate; two
//   evaluates) both succeed, every row arrives and `verify` checks out. A writer that finds the
//   ledger locked past ALPHATRAIL_BUSY_TIMEOUT_MS exits 4, says "busy" and writes nothing.
// Kill: ingest, evaluate and rerun killed with SIGKILL after varied delays (spread over the
//   command's own duration, so that kills land before, during and after the write
//   transaction). After each kill `verify` checks out and the ledger holds all of the
//   command's rows or none: no version without observations, no run without inputs or
//   coefficients.
//
// Kept to well under a minute in total on a loaded two-core machine.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <fcntl.h>
#include <fmt/format.h>
#include <gtest/gtest.h>
#include <signal.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <iostream>
#include <random>
#include <string>
#include <thread>
#include <vector>

#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::build_six_run_ledger;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_at;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::start_alphatrail;
using alphatrail::testing::wait_for;
using Clock = std::chrono::steady_clock;

constexpr const char* kBenchmark = "alder-vale-composite";
constexpr const char* kRate = "alder-vale-bills";
constexpr const char* kFactors = "brindle-styles";

std::string describe(int status) {
  if (WIFEXITED(status)) return fmt::format("exit {}", WEXITSTATUS(status));
  if (WIFSIGNALED(status)) return fmt::format("signal {}", WTERMSIG(status));
  return "?";
}

void remove_ledger(const fs::path& path) {
  for (const char* suffix : {"", "-wal", "-shm", "-journal"}) fs::remove(path.string() + suffix);
}

void copy_ledger(const fs::path& from, const fs::path& to) {
  remove_ledger(to);
  fs::copy_file(from, to);
  const fs::path wal = from.string() + "-wal";
  if (fs::exists(wal) && fs::file_size(wal) > 0) fs::copy_file(wal, to.string() + "-wal");
}

void checkpoint(const fs::path& ledger) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READWRITE);
  db.exec("PRAGMA wal_checkpoint(TRUNCATE)");
}

std::int64_t scalar(const fs::path& ledger, const std::string& sql) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
  return db.execAndGet(sql).getInt64();
}

struct Counts {
  std::int64_t series = 0;
  std::int64_t versions = 0;
  std::int64_t columns = 0;
  std::int64_t runs = 0;
  std::int64_t run_inputs = 0;
  std::int64_t coefficients = 0;
};

Counts counts_of(const fs::path& ledger) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
  const auto n = [&](const char* table) {
    return db.execAndGet(fmt::format("SELECT count(*) FROM {}", table)).getInt64();
  };
  return {n("series"), n("series_versions"), n("version_columns"),
          n("runs"),   n("run_inputs"),      n("run_coefficients")};
}

// The all-or-nothing invariants of a ledger, whatever happened to the last writer: every
// series has a version, every version its observations, every run its inputs and
// coefficients, and nothing refers to a missing row.
void expect_whole_rows(const fs::path& ledger) {
  SQLite::Database db(ledger.string(), SQLite::OPEN_READONLY);
  const auto zero = [&](const char* what, const char* sql) {
    EXPECT_EQ(db.execAndGet(sql).getInt64(), 0) << what;
  };
  zero("series without a version",
       "SELECT count(*) FROM series s WHERE NOT EXISTS (SELECT 1 FROM series_versions v WHERE "
       "v.series_id = s.series_id)");
  zero("versions without observations",
       "SELECT count(*) FROM series_versions v WHERE (SELECT count(*) FROM version_columns c "
       "WHERE c.version_id = v.version_id) < 1");
  zero("observations of no version",
       "SELECT count(*) FROM version_columns c WHERE NOT EXISTS (SELECT 1 FROM series_versions "
       "v WHERE v.version_id = c.version_id)");
  zero("runs with fewer than 3 inputs",
       "SELECT count(*) FROM runs r WHERE (SELECT count(*) FROM run_inputs i WHERE i.run_id = "
       "r.run_id) < 3");
  zero("runs with fewer than 2 coefficients",
       "SELECT count(*) FROM runs r WHERE (SELECT count(*) FROM run_coefficients c WHERE "
       "c.run_id = r.run_id) < 2");
  zero("inputs of no run",
       "SELECT count(*) FROM run_inputs i WHERE NOT EXISTS (SELECT 1 FROM runs r WHERE r.run_id "
       "= i.run_id)");
  zero("coefficients of no run",
       "SELECT count(*) FROM run_coefficients c WHERE NOT EXISTS (SELECT 1 FROM runs r WHERE "
       "r.run_id = c.run_id)");
  zero("runs not numbered 1..n",
       "SELECT count(*) FROM runs WHERE run_id > (SELECT count(*) FROM runs)");
}

// Deterministic draws for the generated files.
class Draws {
 public:
  explicit Draws(std::uint64_t seed) : engine_(seed) {}
  double normal() {
    double s = 0;
    for (int i = 0; i < 12; ++i) s += (static_cast<double>(engine_() >> 11) + 0.5) * 0x1.0p-53;
    return s - 6;
  }

 private:
  std::mt19937_64 engine_;
};

// A wide daily file of strategy returns: `columns` columns over `days` weekdays from 2015.
std::string wide_daily_csv(const std::string& prefix, int columns, int days, std::uint64_t seed) {
  Draws draw(seed);
  std::string text = "date";
  for (int c = 0; c < columns; ++c) text += fmt::format(",{}{:03}", prefix, c);
  text += '\n';
  std::chrono::sys_days day = std::chrono::year{2015} / std::chrono::January / 1;
  for (int written = 0; written < days; day += std::chrono::days{1}) {
    const std::chrono::weekday w{day};
    if (w == std::chrono::Saturday || w == std::chrono::Sunday) continue;
    const std::chrono::year_month_day ymd{day};
    text += fmt::format("{:04}-{:02}-{:02}", static_cast<int>(ymd.year()),
                        static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()));
    for (int c = 0; c < columns; ++c) text += fmt::format(",{:.6f}", 0.0003 + 0.01 * draw.normal());
    text += '\n';
    ++written;
  }
  return text;
}

// Monthly strategies over the demo's months (2000-01 .. 2024-12), named PREFIXnnn.
std::string monthly_csv(const std::string& prefix, int columns, std::uint64_t seed) {
  Draws draw(seed);
  std::string text = "month";
  for (int c = 0; c < columns; ++c) text += fmt::format(",{}{:03}", prefix, c);
  text += '\n';
  for (int m = 0; m < 300; ++m) {
    text += fmt::format("{:04}-{:02}", 2000 + m / 12, m % 12 + 1);
    for (int c = 0; c < columns; ++c) text += fmt::format(",{:.5f}", 0.005 + 0.04 * draw.normal());
    text += '\n';
  }
  return text;
}

std::vector<std::string> with_ledger(std::vector<std::string> args, const fs::path& ledger) {
  args.insert(args.begin(), {"--ledger", ledger.string()});
  return args;
}

const std::vector<std::string> kEvaluateTrend{"evaluate", "trend-*", "--benchmark", kBenchmark,
                                              "--rate",   kRate,     "--factor",    kFactors};

// Shared fixtures, built once for both suites:
//   six.db    the six-run ledger (9 versions, 6 runs)
//   many.db   six.db and 150 more monthly strategies trend-x000.. (159 versions, 6 runs)
//   stale.db  many.db, 'trend-*' evaluated (159 runs), then the benchmark revised: every run
//             is stale
//   wide300.csv (300 columns x 2000 days) and wide200.csv (200 x 1500), daily strategies
class Fixtures {
 public:
  static Fixtures& get() {
    static Fixtures f;
    return f;
  }
  fs::path six() const { return dir_ / "six.db"; }
  fs::path many() const { return dir_ / "many.db"; }
  fs::path stale() const { return dir_ / "stale.db"; }
  fs::path wide300() const { return dir_ / "wide300.csv"; }
  fs::path wide200() const { return dir_ / "wide200.csv"; }
  fs::path small() const { return dir_ / "small.csv"; }
  const std::string& problem() const { return problem_; }

 private:
  Fixtures() {
    const auto step = [&](const fs::path& ledger, const std::vector<std::string>& args) {
      if (!problem_.empty()) return;
      const CommandResult r = run_at(ledger.string(), args);
      if (r.exit_code != 0) problem_ = fmt::format("{} failed: {}", args.front(), r.err);
    };
    problem_ = build_six_run_ledger(dir_ / "demo.db", six());
    if (!problem_.empty()) return;
    dir_.write("wide300.csv", wide_daily_csv("d", 300, 2000, 1));
    dir_.write("wide200.csv", wide_daily_csv("k", 200, 1500, 2));
    dir_.write("small.csv", wide_daily_csv("s", 5, 200, 3));
    const fs::path monthly = dir_.write("monthly.csv", monthly_csv("trend-x", 150, 4));
    copy_ledger(six(), many());
    step(many(), {"ingest", "strategy", monthly.string()});
    checkpoint(many());
    copy_ledger(many(), stale());
    step(stale(), kEvaluateTrend);
    // One index level revised: a new benchmark version.
    std::string levels = read_file(dir_ / "demo.db-data" / "alder-vale-composite.csv");
    const auto row = levels.find("\n2010-06-");
    const auto comma = levels.find(',', row);
    const auto end = levels.find('\n', comma);
    levels.replace(
        comma + 1, end - comma - 1,
        fmt::format("{:.2f}", std::stod(levels.substr(comma + 1, end - comma - 1)) * 1.02));
    const fs::path revised = dir_.write("revised.csv", levels);
    step(stale(), {"ingest", "benchmark", revised.string(), "--levels", "--name", kBenchmark});
    if (problem_.empty()) checkpoint(stale());
  }

  ScratchDir dir_;
  std::string problem_;
};

// ---------------------------------------------------------------------------------------------
// Concurrency

class ConcurrencyLedgerTest : public ::testing::Test {
 protected:
  void SetUp() override { ASSERT_EQ(Fixtures::get().problem(), ""); }
  fs::path work() const { return scratch_ / "work.db"; }
  std::string err_file(const std::string& name) const {
    return (scratch_ / (name + ".err")).string();
  }
  std::string err_of(const std::string& name) const { return read_file(err_file(name)); }
  ScratchDir scratch_;
};

TEST_F(ConcurrencyLedgerTest, BigIngestAndEvaluateAtOnceBothSucceed) {
  const auto& f = Fixtures::get();
  for (int round = 0; round < 3; ++round) {
    SCOPED_TRACE(fmt::format("round {}", round));
    copy_ledger(f.many(), work());
    const Counts before = counts_of(work());
    // The evaluate starts a little after the ingest in some rounds, so that it meets the
    // ingest's parsing, its write transaction or both.
    const pid_t ingest = start_alphatrail(
        with_ledger({"ingest", "strategy", f.wide300().string()}, work()), err_file("ingest"));
    std::this_thread::sleep_for(std::chrono::milliseconds(60 * round));
    const pid_t evaluate =
        start_alphatrail(with_ledger(kEvaluateTrend, work()), err_file("evaluate"));
    const int ingest_status = wait_for(ingest);
    const int evaluate_status = wait_for(evaluate);
    EXPECT_TRUE(WIFEXITED(ingest_status) && WEXITSTATUS(ingest_status) == 0)
        << describe(ingest_status) << ": " << err_of("ingest");
    EXPECT_TRUE(WIFEXITED(evaluate_status) && WEXITSTATUS(evaluate_status) == 0)
        << describe(evaluate_status) << ": " << err_of("evaluate");
    const Counts after = counts_of(work());
    EXPECT_EQ(after.series, before.series + 300);
    EXPECT_EQ(after.versions, before.versions + 300);
    EXPECT_EQ(after.columns, before.columns + 300);
    EXPECT_EQ(after.runs, before.runs + 153);
    EXPECT_EQ(after.run_inputs, before.run_inputs + 153 * 4);
    EXPECT_EQ(after.coefficients, before.coefficients + 153 * 4);
    expect_whole_rows(work());
    const CommandResult v = run_at(work().string(), {"verify"});
    EXPECT_EQ(v.exit_code, 0) << v.out << v.err;
  }
}

TEST_F(ConcurrencyLedgerTest, TwoEvaluatesAtOnceBothSucceedEachInOneBlock) {
  const auto& f = Fixtures::get();
  for (int round = 0; round < 3; ++round) {
    SCOPED_TRACE(fmt::format("round {}", round));
    copy_ledger(f.many(), work());
    const Counts before = counts_of(work());
    auto first = kEvaluateTrend;
    first.insert(first.end(), {"--note", "first"});
    auto second = kEvaluateTrend;
    second.insert(second.end(), {"--note", "second", "--errors", "hc1"});
    const pid_t a = start_alphatrail(with_ledger(first, work()), err_file("a"));
    std::this_thread::sleep_for(std::chrono::milliseconds(25 * round));
    const pid_t b = start_alphatrail(with_ledger(second, work()), err_file("b"));
    const int sa = wait_for(a);
    const int sb = wait_for(b);
    EXPECT_TRUE(WIFEXITED(sa) && WEXITSTATUS(sa) == 0) << describe(sa) << ": " << err_of("a");
    EXPECT_TRUE(WIFEXITED(sb) && WEXITSTATUS(sb) == 0) << describe(sb) << ": " << err_of("b");
    const Counts after = counts_of(work());
    EXPECT_EQ(after.runs, before.runs + 2 * 153);
    EXPECT_EQ(after.versions, before.versions);
    expect_whole_rows(work());
    // Each command recorded its runs in one transaction: one unbroken block of run ids.
    for (const char* note : {"first", "second"}) {
      const std::string where = fmt::format("FROM runs WHERE note = '{}'", note);
      EXPECT_EQ(scalar(work(), "SELECT count(*) " + where), 153) << note;
      EXPECT_EQ(scalar(work(), "SELECT max(run_id) - min(run_id) + 1 " + where), 153) << note;
    }
    EXPECT_EQ(scalar(work(), "SELECT count(*) FROM runs WHERE note = 'second' AND errors <> 'hc1'"),
              0);
    const CommandResult v = run_at(work().string(), {"verify"});
    EXPECT_EQ(v.exit_code, 0) << v.out << v.err;
  }
}

// A separate connection holds the write lock; the ingest gives up after the busy timeout.
TEST_F(ConcurrencyLedgerTest, BusyLedgerExitsFourAndWritesNothing) {
  const auto& f = Fixtures::get();
  copy_ledger(f.six(), work());
  const Counts before = counts_of(work());
  const std::vector<std::string> busy{"ALPHATRAIL_BUSY_TIMEOUT_MS=300"};
  {
    SQLite::Database holder(work().string(), SQLite::OPEN_READWRITE);
    holder.exec("BEGIN IMMEDIATE");
    const auto t0 = Clock::now();
    const CommandResult ingest =
        run_at(work().string(), {"ingest", "strategy", f.small().string()}, busy);
    const auto elapsed = std::chrono::duration_cast<std::chrono::milliseconds>(Clock::now() - t0);
    EXPECT_EQ(ingest.exit_code, 4) << ingest.out << ingest.err;
    EXPECT_TRUE(contains(ingest.err, "busy")) << ingest.err;
    EXPECT_TRUE(contains(ingest.err, "300 ms")) << ingest.err;
    EXPECT_TRUE(contains(ingest.err, "nothing was written")) << ingest.err;
    EXPECT_GE(elapsed.count(), 280) << "gave up before the busy timeout";
    EXPECT_LT(elapsed.count(), 8000) << "waited far longer than ALPHATRAIL_BUSY_TIMEOUT_MS";

    const CommandResult evaluate = run_at(work().string(), kEvaluateTrend, busy);
    EXPECT_EQ(evaluate.exit_code, 4) << evaluate.out << evaluate.err;
    EXPECT_TRUE(contains(evaluate.err, "busy")) << evaluate.err;

    // Readers are not blocked by the writer.
    const CommandResult runs = run_at(work().string(), {"runs", "--format", "json"}, busy);
    EXPECT_EQ(runs.exit_code, 0) << runs.err;
    holder.exec("ROLLBACK");
  }
  const Counts after = counts_of(work());
  EXPECT_EQ(after.series, before.series);
  EXPECT_EQ(after.versions, before.versions);
  EXPECT_EQ(after.columns, before.columns);
  EXPECT_EQ(after.runs, before.runs);
  const CommandResult v = run_at(work().string(), {"verify"});
  EXPECT_EQ(v.exit_code, 0) << v.out << v.err;
  // Once the lock is gone the same ingest goes through: the lock was the only obstacle.
  const CommandResult again =
      run_at(work().string(), {"ingest", "strategy", f.small().string()}, busy);
  EXPECT_EQ(again.exit_code, 0) << again.err;
  EXPECT_EQ(counts_of(work()).versions, before.versions + 5);
}

// ---------------------------------------------------------------------------------------------
// Kill

struct KillTally {
  int sent = 0;
  int killed = 0;           // the signal ended the process
  int completed = 0;        // it finished before the signal
  int all = 0;              // the ledger holds every row of the command
  int none = 0;             // the ledger holds none
  int killed_with_wal = 0;  // killed with frames in the write-ahead log: inside or after a write
  int mid_transaction = 0;  // killed with frames in the log and none of the rows: mid-write
};

class KillLedgerTest : public ::testing::Test {
 protected:
  void SetUp() override { ASSERT_EQ(Fixtures::get().problem(), ""); }
  static void TearDownTestSuite() {
    std::cout << fmt::format(
        "[ kills    ] {} sent, {} killed, {} completed first; ledgers with all rows {}, with "
        "none {}; killed with WAL frames {}, of them inside the write transaction {}\n",
        tally_.sent, tally_.killed, tally_.completed, tally_.all, tally_.none,
        tally_.killed_with_wal, tally_.mid_transaction);
  }

  // Runs the command once to completion (its duration sets the delays), then `iterations`
  // times on fresh copies of `base`, killed after 0 .. 110% of that duration. The command adds
  // `runs` runs and `versions` versions, or nothing.
  void kill_repeatedly(const fs::path& base, const std::vector<std::string>& args, int iterations,
                       std::int64_t runs, std::int64_t versions) {
    const fs::path work = scratch_ / "work.db";
    copy_ledger(base, work);
    const Counts before = counts_of(work);
    const auto t0 = Clock::now();
    const CommandResult full = run_alphatrail(with_ledger(args, work));
    const double duration_ms = std::chrono::duration<double, std::milli>(Clock::now() - t0).count();
    ASSERT_EQ(full.exit_code, 0) << full.err;
    const Counts complete = counts_of(work);
    ASSERT_EQ(complete.runs, before.runs + runs);
    ASSERT_EQ(complete.versions, before.versions + versions);

    for (int i = 0; i < iterations; ++i) {
      const double fraction = ((i * 5) % 12) / 10.0;  // 0, 0.5, 1.0, 0.3, ..., 1.1
      const auto delay =
          std::chrono::microseconds(static_cast<std::int64_t>(1000 * fraction * duration_ms));
      SCOPED_TRACE(fmt::format("kill {} of {} after {} us ({} of {:.0f} ms)", i + 1, iterations,
                               delay.count(), fraction, duration_ms));
      copy_ledger(base, work);
      const pid_t pid = start_alphatrail(with_ledger(args, work));
      std::this_thread::sleep_for(delay);
      kill(pid, SIGKILL);
      ++tally_.sent;
      const int status = wait_for(pid);
      const fs::path wal = work.string() + "-wal";
      const bool frames = fs::exists(wal) && fs::file_size(wal) > 0;
      const bool killed = WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL;
      if (killed) {
        ++tally_.killed;
        if (frames) ++tally_.killed_with_wal;
      } else {
        ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << describe(status);
        ++tally_.completed;
      }

      const CommandResult v = run_at(work.string(), {"verify"});
      ASSERT_EQ(v.exit_code, 0) << v.out << v.err;
      expect_whole_rows(work);
      const Counts after = counts_of(work);
      if (after.runs == complete.runs && after.versions == complete.versions &&
          after.columns == complete.columns && after.run_inputs == complete.run_inputs &&
          after.coefficients == complete.coefficients && after.series == complete.series) {
        ++tally_.all;
      } else {
        ++tally_.none;
        if (killed && frames) ++tally_.mid_transaction;
        EXPECT_EQ(after.series, before.series);
        EXPECT_EQ(after.versions, before.versions);
        EXPECT_EQ(after.columns, before.columns);
        EXPECT_EQ(after.runs, before.runs);
        EXPECT_EQ(after.run_inputs, before.run_inputs);
        EXPECT_EQ(after.coefficients, before.coefficients);
      }
      if (::testing::Test::HasFatalFailure()) return;
    }
  }

  ScratchDir scratch_;
  static KillTally tally_;
};

KillTally KillLedgerTest::tally_;

TEST_F(KillLedgerTest, KilledIngestLeavesAllOrNothing) {
  const auto& f = Fixtures::get();
  kill_repeatedly(f.six(), {"ingest", "strategy", f.wide200().string()}, 22, 0, 200);
}

TEST_F(KillLedgerTest, KilledEvaluateLeavesAllOrNothing) {
  const auto& f = Fixtures::get();
  kill_repeatedly(f.many(), kEvaluateTrend, 20, 153, 0);
}

TEST_F(KillLedgerTest, KilledRerunLeavesAllOrNothing) {
  const auto& f = Fixtures::get();
  ASSERT_EQ(scalar(f.stale(), "SELECT count(*) FROM run_summary WHERE stale"), 159);
  kill_repeatedly(f.stale(), {"rerun", "--all-stale"}, 16, 159, 0);
  // After a kill that left nothing, the re-run can still be done, once.
  const fs::path work = scratch_ / "after.db";
  copy_ledger(f.stale(), work);
  const pid_t pid = start_alphatrail(with_ledger({"rerun", "--all-stale"}, work));
  kill(pid, SIGKILL);
  wait_for(pid);
  const CommandResult r = run_at(work.string(), {"rerun", "--all-stale"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(scalar(work, "SELECT count(*) FROM runs"), 318);
  EXPECT_EQ(scalar(work, "SELECT count(*) FROM runs WHERE revises_run_id IS NOT NULL"), 159);
  const CommandResult again = run_at(work.string(), {"rerun", "--all-stale"});
  EXPECT_TRUE(contains(again.out, "no stale runs")) << again.out;
}

// At least fifty kills in all, most of them landing while the command ran.
TEST_F(KillLedgerTest, ZzEnoughKillsLanded) {
  if (tally_.sent == 0) GTEST_SKIP() << "run with the other kill tests";
  EXPECT_GE(tally_.sent, 50);
  EXPECT_GE(tally_.killed, tally_.sent / 2);
}

}  // namespace
