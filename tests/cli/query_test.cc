// Command-level tests of `alphatrail query` on copies of the six-run ledger, through the real
// binary: one statement per query (a second one, or none, is refused), only reads (an
// authorizer refuses writes, transactions, ATTACH, VACUUM and pragma settings, each named in
// the message, and the file stays byte for byte as it was), rows streamed in every format
// (memory bounded however many rows, the first rows out before the query ends, --limit to stop
// an endless one), and table widths from the first rows. Every reading command leaves a
// current ledger as it was.
#include <SQLiteCpp/Database.h>
#include <fcntl.h>
#include <gtest/gtest.h>
#include <poll.h>
#include <signal.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "core/sha256.h"
#include "store/ledger.h"
#include "support/ledger_fixtures.h"
#include "support/test_support.h"

extern char** environ;

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::lines_of;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_program;
using alphatrail::testing::SixRunLedgerTest;
using nlohmann::json;

// An endless query: the recursive part has no LIMIT.
constexpr const char* kEndless =
    "WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c) SELECT x FROM c";

class QueryTest : public SixRunLedgerTest {
 protected:
  CommandResult query(const std::vector<std::string>& args) {
    std::vector<std::string> all{"--ledger", ledger(), "query"};
    all.insert(all.end(), args.begin(), args.end());
    return run_alphatrail(all);
  }

  // The ledger's bytes after a checkpoint through a separate connection (so that everything
  // is in the main file and the write-ahead log is empty).
  std::string checkpointed_bytes() {
    {
      SQLite::Database db(ledger(), SQLite::OPEN_READWRITE);
      db.exec("PRAGMA wal_checkpoint(TRUNCATE)");
    }
    return read_file(ledger_path());
  }

  // Checks the file is exactly `before` and no frames were added to its write-ahead log.
  void expect_unchanged(const std::string& before, const std::string& what) {
    EXPECT_EQ(fs::file_size(ledger_path()), before.size()) << what;
    EXPECT_TRUE(read_file(ledger_path()) == before) << what << " changed the ledger file";
    const fs::path wal = ledger() + "-wal";
    EXPECT_TRUE(!fs::exists(wal) || fs::file_size(wal) == 0) << what << " left frames in the WAL";
  }

  // Runs a statement that must be refused: exit 2 naming `refused`, no output, no change.
  void expect_refused(const std::string& sql, const std::string& refused) {
    SCOPED_TRACE(sql);
    const std::string before = checkpointed_bytes();
    const CommandResult r = query({sql});
    EXPECT_EQ(r.exit_code, 2) << r.out << r.err;
    EXPECT_TRUE(contains(r.err, "query only reads")) << r.err;
    EXPECT_TRUE(contains(r.err, refused + " was refused; nothing changed")) << r.err;
    EXPECT_EQ(r.out, "");
    expect_unchanged(before, sql);
    const CommandResult runs = query({"SELECT count(*) AS n FROM runs", "--format", "csv"});
    EXPECT_EQ(runs.out, "n\n6\n") << runs.err;
  }
};

// --- statements ------------------------------------------------------------------------------

TEST_F(QueryTest, MoreThanOneStatementIsRefusedAndNoneRuns) {
  for (const std::string sql :
       {"SELECT 1; DELETE FROM runs", "SELECT 1 AS one; SELECT 2 AS two",
        "SELECT 1; -- a comment, then\nDROP TABLE runs", "SELECT 1; garbage"}) {
    SCOPED_TRACE(sql);
    const std::string before = checkpointed_bytes();
    const CommandResult r = query({sql, "--format", "csv"});
    EXPECT_EQ(r.exit_code, 2) << r.out << r.err;
    EXPECT_TRUE(contains(r.err, "query runs one SQL statement, and more follows the first"))
        << r.err;
    EXPECT_TRUE(contains(r.err, "nothing was run")) << r.err;
    EXPECT_EQ(r.out, "");
    expect_unchanged(before, sql);
  }
  EXPECT_EQ(query({"SELECT count(*) AS n FROM runs", "--format", "csv"}).out, "n\n6\n");
}

TEST_F(QueryTest, TrailingSemicolonsCommentsAndWhiteSpaceAreFine) {
  for (const std::string sql :
       {"SELECT 1 AS one;", "SELECT 1 AS one ; ;", "SELECT 1 AS one; -- done",
        "SELECT 1 AS one /* why */ ;\n\t", "-- first a comment\nSELECT 1 AS one",
        "SELECT 1 AS one; /* an unclosed comment"}) {
    const CommandResult r = query({sql, "--format", "csv"});
    EXPECT_EQ(r.exit_code, 0) << sql << ": " << r.err;
    EXPECT_EQ(r.out, "one\n1\n") << sql;
  }
}

TEST_F(QueryTest, EmptyOrCommentOnlyTextIsRefused) {
  for (const std::string sql : {"", "   \n", "-- nothing", "/* nothing */", ";", " ; ; "}) {
    const CommandResult r = query({sql});
    EXPECT_EQ(r.exit_code, 2) << "[" << sql << "] " << r.out << r.err;
    EXPECT_TRUE(contains(r.err, "query needs an SQL statement, and the text holds none"))
        << "[" << sql << "] " << r.err;
    EXPECT_FALSE(contains(r.err, "reseted")) << r.err;
    EXPECT_EQ(r.out, "");
  }
}

TEST_F(QueryTest, SyntaxErrorSaysQueryFailed) {
  const CommandResult r = query({"SELEC 1"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_TRUE(contains(r.err, "query failed: near \"SELEC\": syntax error")) << r.err;
  EXPECT_EQ(r.out, "");
}

TEST_F(QueryTest, TextThatIsNotUtf8PrintsInEveryFormat) {
  // SQL can make bytes that are not UTF-8 (a blob cast to text): JSON shows them as U+FFFD
  // instead of failing with an internal error; table and CSV pass the bytes through.
  const std::string sql = "SELECT CAST(x'6361fe' AS TEXT) AS t";
  const CommandResult json = query({sql, "--format", "json"});
  EXPECT_EQ(json.exit_code, 0) << json.err;
  EXPECT_TRUE(contains(json.out, "\"t\": \"ca\xef\xbf\xbd\"")) << json.out;
  const CommandResult csv = query({sql, "--format", "csv"});
  EXPECT_EQ(csv.exit_code, 0) << csv.err;
  EXPECT_EQ(csv.out, "t\nca\xfe\n");
}

// --- reads only ------------------------------------------------------------------------------

TEST_F(QueryTest, PragmasThatReportRun) {
  const CommandResult mode = query({"PRAGMA journal_mode", "--format", "csv"});
  EXPECT_EQ(mode.exit_code, 0) << mode.err;
  EXPECT_EQ(mode.out, "journal_mode\nwal\n");

  const CommandResult version = query({"PRAGMA user_version", "--format", "csv"});
  EXPECT_EQ(version.exit_code, 0) << version.err;
  EXPECT_EQ(version.out,
            "user_version\n" + std::to_string(alphatrail::store::current_schema_version()) + "\n");

  const CommandResult columns = query({"PRAGMA table_info(runs)", "--format", "json"});
  ASSERT_EQ(columns.exit_code, 0) << columns.err;
  const json rows = json::parse(columns.out);
  ASSERT_GE(rows.size(), 5u) << columns.out;
  EXPECT_EQ(rows[0]["name"], "run_id");
  EXPECT_EQ(rows[0]["pk"], 1);

  // The table-valued forms, and json_each (which the observations view reads) on a fresh
  // connection: SQLite consults the authorizer while it declares their columns.
  const CommandResult function =
      query({"SELECT name FROM pragma_table_info('runs') WHERE cid = 0", "--format", "csv"});
  EXPECT_EQ(function.out, "name\nrun_id\n") << function.err;
  const CommandResult each =
      query({"SELECT count(*) AS n FROM json_each('[1, 2, 3]')", "--format", "csv"});
  EXPECT_EQ(each.out, "n\n3\n") << each.err;
  const CommandResult check = query({"PRAGMA integrity_check", "--format", "csv"});
  EXPECT_EQ(check.out, "integrity_check\nok\n") << check.err;
}

TEST_F(QueryTest, WritesAndChangesOfTheConnectionAreRefusedAndChangeNothing) {
  expect_refused("DELETE FROM runs", "DELETE on table runs");
  expect_refused("CREATE TABLE t(x)", "CREATE TABLE t");
  expect_refused("CREATE TEMP TABLE t(x)", "CREATE TEMP TABLE t");
  expect_refused("BEGIN", "BEGIN (a transaction)");
  expect_refused("SAVEPOINT here", "SAVEPOINT here");
  expect_refused("PRAGMA journal_mode = delete", "PRAGMA journal_mode = delete");
  expect_refused("PRAGMA user_version = 9", "PRAGMA user_version = 9");
  expect_refused("PRAGMA query_only = OFF", "PRAGMA query_only = OFF");
  expect_refused("PRAGMA wal_checkpoint", "PRAGMA wal_checkpoint");
  expect_refused("WITH r AS (SELECT 1) DELETE FROM runs WHERE run_id IN r", "DELETE on table runs");
  expect_refused("ANALYZE", "CREATE TABLE sqlite_stat1");  // ANALYZE first makes its table

  const fs::path attached = scratch_ / "x.db";
  expect_refused("ATTACH '" + attached.string() + "' AS x",
                 "ATTACH of '" + attached.string() + "'");
  EXPECT_FALSE(fs::exists(attached)) << "ATTACH created a file";

  const fs::path copy = scratch_ / "copy.db";
  expect_refused("VACUUM INTO '" + copy.string() + "'", "VACUUM statement");
  EXPECT_FALSE(fs::exists(copy)) << "VACUUM INTO wrote a file";
  expect_refused("VACUUM", "VACUUM statement");

  // The authorizer lets SQLite write its schema table while it declares a table-valued
  // function; a write of it by hand is refused all the same, by SQLite or by the check that
  // the statement only reads.
  for (const std::string sql :
       {"UPDATE sqlite_master SET sql = ''", "DELETE FROM sqlite_master",
        "INSERT INTO sqlite_master VALUES ('table', 't', 't', 0, 'CREATE TABLE t(x)')"}) {
    SCOPED_TRACE(sql);
    const std::string before = checkpointed_bytes();
    const CommandResult r = query({sql});
    EXPECT_EQ(r.exit_code, 2) << r.out << r.err;
    EXPECT_TRUE(contains(r.err, "nothing changed") || contains(r.err, "nothing was changed"))
        << r.err;
    EXPECT_EQ(r.out, "");
    expect_unchanged(before, sql);
  }

  auto version = query({"PRAGMA user_version", "--format", "csv"});
  EXPECT_EQ(version.out,
            "user_version\n" + std::to_string(alphatrail::store::current_schema_version()) + "\n");
  auto mode = query({"PRAGMA journal_mode", "--format", "csv"});
  EXPECT_EQ(mode.out, "journal_mode\nwal\n");
}

// --- streaming -------------------------------------------------------------------------------

TEST_F(QueryTest, LimitStopsAnEndlessQueryInEveryFormat) {
  const CommandResult csv = query({kEndless, "--limit", "3", "--format", "csv"});
  EXPECT_EQ(csv.exit_code, 0) << csv.err;
  EXPECT_EQ(csv.out, "x\n1\n2\n3\n");

  const CommandResult js = query({kEndless, "--limit", "3", "--format", "json"});
  EXPECT_EQ(js.exit_code, 0) << js.err;
  EXPECT_EQ(js.out,
            "[\n  {\n    \"x\": 1\n  },\n  {\n    \"x\": 2\n  },\n  {\n    \"x\": 3\n  }\n]\n");
  EXPECT_EQ(json::parse(js.out), json::parse(R"([{"x": 1}, {"x": 2}, {"x": 3}])"));

  const CommandResult table = query({kEndless, "--limit", "3"});
  EXPECT_EQ(table.exit_code, 0) << table.err;
  EXPECT_EQ(table.out, "x\n-\n1\n2\n3\n");

  EXPECT_EQ(query({kEndless, "--limit", "0", "--format", "csv"}).out, "x\n");
  EXPECT_EQ(query({kEndless, "--limit", "0", "--format", "json"}).out, "[]\n");
  EXPECT_EQ(query({kEndless, "--limit", "0"}).out, "x\n-\n");
  // A limit above the row count prints them all.
  EXPECT_EQ(query({"SELECT 7 AS n", "--limit", "5", "--format", "csv"}).out, "n\n7\n");

  const CommandResult negative = query({"SELECT 1", "--limit", "-1"});
  EXPECT_EQ(negative.exit_code, 2) << negative.err;
  EXPECT_EQ(negative.out, "");
}

// A table takes its column widths from the header and the first 200 rows; a wider cell later
// extends its own line and leaves the others as they were.
TEST_F(QueryTest, TableWidthsComeFromTheFirstRows) {
  const CommandResult r =
      query({"WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c LIMIT 1001) "
             "SELECT x, CASE WHEN x = 250 THEN 'a wider label' ELSE 'ab' END AS label FROM c"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto lines = lines_of(r.out);
  ASSERT_EQ(lines.size(), 2u + 1001u);
  EXPECT_EQ(lines[0], "  x  label");  // x: 3 wide (200), right-aligned; label: 5 wide
  EXPECT_EQ(lines[1], "---  -----");
  EXPECT_EQ(lines[2], "  1  ab");
  EXPECT_EQ(lines[2 + 199], "200  ab");
  EXPECT_EQ(lines[2 + 249], "250  a wider label");
  EXPECT_EQ(lines[2 + 250], "251  ab");
  EXPECT_EQ(lines[2 + 998], "999  ab");
  EXPECT_EQ(lines[2 + 999], "1000  ab");
  EXPECT_EQ(lines[2 + 1000], "1001  ab");

  // Up to 200 rows, the widths fit every row.
  const CommandResult few =
      query({"WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c LIMIT 200) "
             "SELECT x, CASE WHEN x = 150 THEN 'a wider label' ELSE 'ab' END AS label FROM c"});
  const auto few_lines = lines_of(few.out);
  ASSERT_EQ(few_lines.size(), 202u);
  EXPECT_EQ(few_lines[0], "  x  label");
  EXPECT_EQ(few_lines[1], "---  -------------");
  EXPECT_EQ(few_lines[2 + 149], "150  a wider label");
}

// What measure_query saw: the command's peak resident memory in KiB, its exit code, the lines
// it printed and what went to stderr.
struct Measured {
  long peak_kib = -1;
  int exit_code = -1;
  long lines = -1;
  std::string err;
};

// Runs a query of `rows` rows of about 500 bytes under /usr/bin/time, its output counted by wc
// (so that the test holds none of it).
Measured measure_query(const std::string& ledger, const std::string& format, long rows) {
  const std::string sql = "WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c LIMIT " +
                          std::to_string(rows) + ") SELECT x, printf('%0500d', x) AS padded FROM c";
  const CommandResult r =
      run_program({"/bin/sh", "-c",
                   "/usr/bin/time -f 'peak %M exit %x' \"$0\" --ledger \"$1\" query \"$2\" "
                   "--format \"$3\" | wc -l",
                   ALPHATRAIL_BINARY, ledger, sql, format});
  Measured m;
  m.err = r.err;
  m.lines = std::strtol(r.out.c_str(), nullptr, 10);
  const auto at = r.err.rfind("peak ");
  if (at != std::string::npos) std::istringstream(r.err.substr(at + 5)) >> m.peak_kib;
  const auto exit_at = r.err.rfind(" exit ");
  if (exit_at != std::string::npos) m.exit_code = std::atoi(r.err.c_str() + exit_at + 6);
  return m;
}

TEST_F(QueryTest, MemoryStaysBoundedHoweverManyRows) {
  // 400,000 rows of 500 digits are 200 MB of text; holding them took 540 MB (csv, table) and
  // 810 MB (json). Streamed, the command needs about 9 MB whatever the count.
  constexpr long kRows = 400000;
  constexpr long kBoundKib = 100 * 1024;
  for (const auto& [format, lines] : std::vector<std::pair<std::string, long>>{
           {"csv", kRows + 1}, {"table", kRows + 2}, {"json", 4 * kRows + 2}}) {
    SCOPED_TRACE(format);
    const Measured m = measure_query(ledger(), format, kRows);
    EXPECT_EQ(m.exit_code, 0) << m.err;
    EXPECT_EQ(m.lines, lines) << m.err;
    ASSERT_GT(m.peak_kib, 0) << m.err;
    EXPECT_LT(m.peak_kib, kBoundKib) << "peak resident memory " << m.peak_kib << " KiB";
  }
}

// Starts the binary with its stdout on a pipe; returns the pid and the pipe's reading end.
std::pair<pid_t, int> start_query(const std::vector<std::string>& args) {
  int out[2];
  if (pipe(out) != 0) return {-1, -1};
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, 0, "/dev/null", O_RDONLY, 0);
  posix_spawn_file_actions_adddup2(&actions, out[1], 1);
  posix_spawn_file_actions_addclose(&actions, out[0]);
  std::vector<std::string> argv{ALPHATRAIL_BINARY};
  argv.insert(argv.end(), args.begin(), args.end());
  std::vector<char*> c_argv;
  for (auto& a : argv) c_argv.push_back(a.data());
  c_argv.push_back(nullptr);
  pid_t pid = -1;
  const int rc = posix_spawn(&pid, c_argv[0], &actions, nullptr, c_argv.data(), environ);
  posix_spawn_file_actions_destroy(&actions);
  close(out[1]);
  if (rc != 0) {
    close(out[0]);
    return {-1, -1};
  }
  return {pid, out[0]};
}

// Reads from fd until the text holds `wanted` or `seconds` pass; returns what was read.
std::string read_until(int fd, const std::string& wanted, int seconds) {
  std::string text;
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(seconds);
  while (!contains(text, wanted)) {
    const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
        deadline - std::chrono::steady_clock::now());
    if (left.count() <= 0) break;
    pollfd p{fd, POLLIN, 0};
    if (poll(&p, 1, static_cast<int>(left.count())) <= 0) break;
    char buffer[4096];
    const ssize_t n = read(fd, buffer, sizeof buffer);
    if (n <= 0) break;
    text.append(buffer, static_cast<std::size_t>(n));
  }
  return text;
}

// The first rows reach the reader while the query is still working: here its second part
// counts an endless query and never ends, so the test stops it.
TEST_F(QueryTest, FirstRowsAppearWhileTheQueryRuns) {
  const std::string slow_rest = std::string(" UNION ALL SELECT count(*) FROM (") + kEndless + ")";
  struct Case {
    std::string format;
    std::string sql;
    std::string first;
  };
  for (const Case& c : std::vector<Case>{
           {"csv", "SELECT 1 AS x" + slow_rest, "x\n1\n"},
           {"json", "SELECT 1 AS x" + slow_rest, "[\n  {\n    \"x\": 1\n  }"},
           // A table holds its first 200 rows for the widths, then prints them at once.
           {"table",
            "SELECT x FROM (WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c "
            "LIMIT 200) SELECT x FROM c)" +
                slow_rest,
            "\n200\n"}}) {
    SCOPED_TRACE(c.format);
    const auto [pid, fd] =
        start_query({"--ledger", ledger(), "query", c.sql, "--format", c.format});
    ASSERT_GT(pid, 0);
    const std::string got = read_until(fd, c.first, 10);
    kill(pid, SIGKILL);
    int status = 0;
    waitpid(pid, &status, 0);
    close(fd);
    EXPECT_TRUE(contains(got, c.first)) << "got: " << got;
    EXPECT_TRUE(WIFSIGNALED(status)) << "the query ended by itself";
  }
}

// --- every reading command -------------------------------------------------------------------

TEST_F(QueryTest, ReadingCommandsLeaveACurrentLedgerAsItWas) {
  const std::string before = checkpointed_bytes();
  const std::string report = (scratch_ / "report.html").string();
  for (const auto& args :
       std::vector<std::vector<std::string>>{{"query", "SELECT count(*) FROM observations"},
                                             {"verify"},
                                             {"series"},
                                             {"series", "trend-12m"},
                                             {"runs"},
                                             {"show", "1"},
                                             {"compare", "1", "2"},
                                             {"reproduce", "1"},
                                             {"report", "1", "-o", report}}) {
    std::vector<std::string> all{"--ledger", ledger()};
    all.insert(all.end(), args.begin(), args.end());
    const CommandResult r = run_alphatrail(all);
    EXPECT_EQ(r.exit_code, 0) << args[0] << ": " << r.err;
    EXPECT_NE(r.out, "") << args[0];
    expect_unchanged(before, args[0]);
  }
  EXPECT_TRUE(fs::exists(report));
}

}  // namespace
