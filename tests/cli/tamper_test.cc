// Command-level tests of a ledger whose stored run text was edited outside alphatrail: on
// copies of the six-run ledger (triggers dropped on the copy), each stored parameters field of
// run 1 is given a wrong JSON type, an unknown value (enum fields), an out-of-range number or
// is removed, and the stored parameters and result texts are replaced by text that is not
// JSON. Every command that reads what was edited must stop with exit 8 (stored data that
// cannot be read) and a message naming run 1 and the field; none may crash (139, 134) or end
// in an internal error (1).
//
// Per command:
// - show 1, compare 1 2, reproduce 1, rerun 1, report 1 -o FILE read run 1's parameters and
//   result: exit 8.
// - runs reads only the run rows' own columns (never the stored JSON texts), so it exits 0;
//   its output must then be exactly that of the untouched ledger (correct and complete).
// - verify reports what was altered: exit 7 (the record hash no longer matches), naming run 1,
//   and names the field it cannot read.
#include <SQLiteCpp/Database.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <filesystem>
#include <string>
#include <vector>

#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::copy_ledger;
using alphatrail::testing::run_alphatrail;

// One edit of run 1: an SQL expression for the new column value, and the field (as it
// appears in the message) the commands must name.
struct Edit {
  std::string column;  // parameters_json or result_json
  std::string value;   // SQL expression over the column
  std::string field;   // named in the message
};

class TamperTest : public alphatrail::testing::SixRunLedgerTest {
 protected:
  // Applies an edit to a fresh copy of the six-run ledger at `path`.
  void tampered_copy(const fs::path& path, const Edit& edit) {
    copy_ledger(base(), path);
    SQLite::Database db(path.string(), SQLite::OPEN_READWRITE);
    db.exec("DROP TRIGGER runs_no_update");
    const int changed =
        db.exec(fmt::format("UPDATE runs SET {} = {} WHERE run_id = 1", edit.column, edit.value));
    ASSERT_EQ(changed, 1);
    // The edit must really change the stored text.
    ASSERT_NE(
        db.execAndGet(fmt::format("SELECT {} FROM runs WHERE run_id = 1", edit.column)).getString(),
        SQLite::Database(base().string(), SQLite::OPEN_READONLY)
            .execAndGet(fmt::format("SELECT {} FROM runs WHERE run_id = 1", edit.column))
            .getString())
        << edit.value;
    db.exec("PRAGMA wal_checkpoint(TRUNCATE)");
  }

  // Runs every command on a tampered copy per edit and checks how each ends.
  void check(const std::vector<Edit>& edits) {
    const CommandResult untouched = run_alphatrail({"--ledger", base().string(), "runs"});
    ASSERT_EQ(untouched.exit_code, 0) << untouched.err;
    int n = 0;
    for (const auto& edit : edits) {
      SCOPED_TRACE(fmt::format("{} = {}", edit.column, edit.value));
      const fs::path path = scratch_ / fmt::format("tampered-{}.db", n++);
      tampered_copy(path, edit);
      if (HasFatalFailure()) return;
      const std::string ledger = path.string();
      const std::string report = (scratch_ / fmt::format("report-{}.html", n)).string();
      const std::vector<std::vector<std::string>> reading{{"show", "1"},
                                                          {"compare", "1", "2"},
                                                          {"reproduce", "1"},
                                                          {"rerun", "1"},
                                                          {"report", "1", "-o", report}};
      for (const auto& args : reading) {
        std::vector<std::string> full{"--ledger", ledger};
        full.insert(full.end(), args.begin(), args.end());
        const CommandResult r = run_alphatrail(full);
        SCOPED_TRACE(args.front());
        EXPECT_EQ(r.exit_code, 8) << r.out << r.err;
        EXPECT_TRUE(contains(r.err, "run 1: stored ")) << r.err;
        EXPECT_TRUE(contains(r.err, edit.field)) << r.err;
        EXPECT_TRUE(contains(r.err, "changed outside alphatrail")) << r.err;
      }
      EXPECT_FALSE(fs::exists(report)) << "report written from a tampered run";
      // rerun recorded nothing.
      EXPECT_EQ(SQLite::Database(ledger, SQLite::OPEN_READONLY)
                    .execAndGet("SELECT count(*) FROM runs")
                    .getInt(),
                6);

      const CommandResult runs = run_alphatrail({"--ledger", ledger, "runs"});
      EXPECT_EQ(runs.exit_code, 0) << runs.err;
      EXPECT_EQ(runs.out, untouched.out);

      const CommandResult verify = run_alphatrail({"--ledger", ledger, "verify"});
      EXPECT_EQ(verify.exit_code, 7) << verify.out << verify.err;
      EXPECT_TRUE(contains(verify.out + verify.err, "run 1")) << verify.out << verify.err;
      EXPECT_TRUE(contains(verify.out + verify.err, edit.field)) << verify.out << verify.err;
    }
  }
};

std::string set_parameter(const std::string& field, const std::string& json_value) {
  return fmt::format("json_set(parameters_json, '$.{}', json('{}'))", field, json_value);
}

const std::vector<std::string> kParameterFields{
    "alignment", "annualize",       "confidence",   "errors",     "factors",
    "frequency", "frequency_rule",  "from",         "lag_rule",   "lags",
    "model",     "partial_periods", "rate_basis",   "rate_tenor", "rate_timing",
    "returns",   "rolling_window",  "small_sample", "tenor_rule", "to"};

TEST_F(TamperTest, AParameterOfTheWrongTypeStopsEveryReaderWithExit8) {
  std::vector<Edit> edits;
  for (const auto& field : kParameterFields) {
    // A value of a type no field of that name takes: an object for text, numbers and flags.
    edits.push_back(
        {"parameters_json", set_parameter(field, R"({"x":1})"), fmt::format("field '{}'", field)});
  }
  // Types close to the right one.
  edits.push_back({"parameters_json", set_parameter("confidence", R"("0.95")"), "'confidence'"});
  edits.push_back({"parameters_json", set_parameter("lags", "true"), "'lags'"});
  edits.push_back({"parameters_json", set_parameter("lags", "2.5"), "'lags'"});
  edits.push_back({"parameters_json", set_parameter("small_sample", "1"), "'small_sample'"});
  edits.push_back(
      {"parameters_json", set_parameter("rolling_window", R"("36")"), "'rolling_window'"});
  edits.push_back({"parameters_json", set_parameter("errors", "7"), "'errors'"});
  edits.push_back({"parameters_json", set_parameter("from", "20050101"), "'from'"});
  edits.push_back({"parameters_json", set_parameter("factors[0].set", "3"), "'factors[0].set'"});
  edits.push_back({"parameters_json", set_parameter("factors[0].columns", R"("size-spread")"),
                   "'factors[0].columns'"});
  edits.push_back({"parameters_json", set_parameter("factors[0].columns[1]", "null"),
                   "'factors[0].columns[1]'"});
  edits.push_back({"parameters_json", "'[1, 2]'", "not a JSON object"});
  check(edits);
}

TEST_F(TamperTest, AnUnknownOrOutOfRangeParameterStopsEveryReaderWithExit8) {
  std::vector<Edit> edits;
  for (const auto& field :
       {"alignment", "annualize", "errors", "frequency", "frequency_rule", "lag_rule", "lags",
        "model", "partial_periods", "rate_basis", "rate_timing", "returns", "tenor_rule"})
    edits.push_back({"parameters_json", set_parameter(field, R"("bogus")"),
                     fmt::format("field '{}' holds \"bogus\", not one of", field)});
  edits.push_back({"parameters_json", set_parameter("confidence", "1.5"), "'confidence'"});
  edits.push_back({"parameters_json", set_parameter("confidence", "0"), "'confidence'"});
  edits.push_back({"parameters_json", set_parameter("lags", "-1"), "'lags'"});
  edits.push_back({"parameters_json", set_parameter("lags", "100000000000"), "'lags'"});
  edits.push_back({"parameters_json", set_parameter("rolling_window", "0"), "'rolling_window'"});
  edits.push_back({"parameters_json", set_parameter("rolling_window", "-36"), "'rolling_window'"});
  edits.push_back({"parameters_json", set_parameter("from", R"("2021-02-30")"), "'from'"});
  edits.push_back({"parameters_json", set_parameter("to", R"("soon")"), "'to'"});
  edits.push_back({"parameters_json", set_parameter("rate_tenor", R"("")"), "'rate_tenor'"});
  edits.push_back(
      {"parameters_json", set_parameter("factors[0].set", R"("")"), "'factors[0].set'"});
  edits.push_back(
      {"parameters_json", set_parameter("factors[0].columns", "[]"), "'factors[0].columns'"});
  // Values each valid alone that contradict another field.
  edits.push_back({"parameters_json", set_parameter("model", R"("single-index")"), "'model'"});
  edits.push_back(
      {"parameters_json", "json_set(parameters_json, '$.errors', 'hc3', '$.lags', 2)", "'lags'"});
  edits.push_back(
      {"parameters_json",
       "json_set(parameters_json, '$.errors', 'classic', '$.small_sample', json('true'))",
       "'small_sample'"});
  edits.push_back({"parameters_json",
                   "json_set(parameters_json, '$.from', '2015-01-01', '$.to', '2010-01-01')",
                   "'to'"});
  check(edits);
}

TEST_F(TamperTest, AMissingParameterStopsEveryReaderWithExit8) {
  std::vector<Edit> edits;
  for (const auto& field : kParameterFields)
    edits.push_back({"parameters_json", fmt::format("json_remove(parameters_json, '$.{}')", field),
                     fmt::format("field '{}' is missing", field)});
  edits.push_back({"parameters_json", "json_remove(parameters_json, '$.factors[0].columns')",
                   "field 'factors[0].columns' is missing"});
  check(edits);
}

TEST_F(TamperTest, StoredTextThatIsNotJsonStopsEveryReaderWithExit8) {
  check({{"parameters_json", "'{\"errors\": '", "stored parameters"},
         {"parameters_json", "''", "stored parameters"},
         {"parameters_json", "'garbage'", "stored parameters"},
         {"result_json", "'{\"sample\": '", "stored result"},
         {"result_json", "'garbage'", "stored result"}});
}

TEST_F(TamperTest, AStoredResultFieldOfTheWrongTypeStopsEveryReaderWithExit8) {
  const auto set = [](const std::string& path, const std::string& json_value) {
    return fmt::format("json_set(result_json, '$.{}', json('{}'))", path, json_value);
  };
  check(
      {{"result_json", set("sample", "3"), "'sample'"},
       {"result_json", set("sample.frequency", R"("fortnightly")"), "'sample.frequency'"},
       {"result_json", set("sample.observations", R"("many")"), "'sample.observations'"},
       {"result_json", set("sample.first", "1"), "'sample.first'"},
       {"result_json", set("coefficients", R"("none")"), "'coefficients'"},
       {"result_json", set("coefficients[0].estimate", R"("big")"), "'coefficients[0].estimate'"},
       {"result_json", set("coefficients[1].term", "null"), "'coefficients[1].term'"},
       {"result_json", set("statistics.r_squared", "true"), "'statistics.r_squared'"},
       {"result_json", set("statistics.degrees_of_freedom", "1.5"),
        "'statistics.degrees_of_freedom'"},
       {"result_json", set("statistics.errors", R"("robust")"), "'statistics.errors'"},
       {"result_json", set("reading", "[1]"), "'reading[0]'"},
       {"result_json", set("warnings", "{}"), "'warnings'"},
       {"result_json", set("rolling", "[]"), "'rolling'"},
       // The six runs have no rolling estimates: the edits put some in.
       {"result_json", set("rolling", R"({"window":"36"})"), "'rolling.window'"},
       {"result_json",
        set("rolling", R"({"window":36,"errors":"newey-west","lag_rule":"auto","confidence":0.95,)"
                       R"("annualize":"compound","windows":[{"end":5}]})"),
        "'rolling.windows[0].end'"},
       {"result_json", "json_remove(result_json, '$.statistics')", "'statistics' is missing"},
       {"result_json", "json_remove(result_json, '$.coefficients[0].p_value')",
        "'coefficients[0].p_value' is missing"}});
}

}  // namespace
