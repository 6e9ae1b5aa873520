// The checked reader of stored results against every field it reads: each leaf of a result the
// one writer made is removed, given a value of the wrong type, and given garbage text in turn,
// and each edit must throw StoredTextError (Failure::corruption) naming the run and that field.
// A ledger edited outside alphatrail then stops every command with the corruption exit code
// instead of undefined behaviour (tests/cli/tamper_test.cc runs the commands).
#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <limits>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
#include <vector>

#include "record/stored_result.h"
#include "record/stored_text.h"

namespace {

using alphatrail::Failure;
using alphatrail::record::read_run_result;
using alphatrail::record::result_text;
using alphatrail::record::RunResult;
using alphatrail::record::StoredTextError;
using Json = nlohmann::ordered_json;
namespace core = alphatrail::core;

constexpr double kNull = std::numeric_limits<double>::quiet_NaN();

// A result with every part filled: two coefficients, a dropped period, a gap, one rolling
// window; one figure of each kind is null (NaN), as an exact fit stores it.
RunResult full_result() {
  RunResult r;
  r.sample.first = "2000-01";
  r.sample.last = "2002-12";
  r.sample.observations = 36;
  r.sample.dropped = 1;
  r.sample.dropped_by_reason = {{"benchmark missing", 1}};
  r.sample.dropped_periods = {{"2003-01", "benchmark missing"}};
  r.sample.gaps = {"1 month missing between 2001-03 and 2001-05"};
  r.coefficients = {{"alpha", 0.001, 0.0005, 2.0, 0.05, 0.0, 0.002},
                    {"beta", 0.9, 0.1, 9.0, 1e-9, 0.7, 1.1}};
  r.statistics.r_squared = 0.7;
  r.statistics.f_stat = 81;
  r.statistics.observations = 36;
  r.statistics.coefficients = 2;
  r.statistics.degrees_of_freedom = 34;
  r.statistics.lags = 3;
  r.statistics.treynor_ratio = kNull;
  r.reading = {"alpha is positive"};
  r.preparation = {"monthly returns"};
  r.warnings = {"short sample"};
  alphatrail::record::StoredRolling rolling;
  rolling.window = 24;
  core::RollingWindow w;
  w.first = "2000-01";
  w.end = "2001-12";
  w.observations = 24;
  w.alpha_std_error = kNull;
  rolling.windows = {w};
  r.rolling = rolling;
  return r;
}

// Every leaf of a document: its path as the reader names it ("sample.first",
// "coefficients[1].estimate", "sample.dropped_by_reason.benchmark missing").
void leaves(const Json& v, const std::string& path, std::vector<std::string>& out,
            std::vector<Json::json_pointer>& pointers, const Json::json_pointer& at) {
  if (v.is_object() && !v.empty()) {
    for (const auto& [key, child] : v.items())
      leaves(child, path.empty() ? key : path + "." + key, out, pointers, at / key);
  } else if (v.is_array() && !v.empty()) {
    for (std::size_t i = 0; i < v.size(); ++i)
      leaves(v[i], path + "[" + std::to_string(i) + "]", out, pointers, at / i);
  } else {
    out.push_back(path);
    pointers.push_back(at);
  }
}

// The problem the reader names for text, or "" when the text reads.
std::string problem_of(const Json& document) {
  try {
    read_run_result(42, document.dump());
  } catch (const StoredTextError& e) {
    EXPECT_EQ(e.kind(), Failure::corruption);
    EXPECT_EQ(e.run_id(), 42);
    EXPECT_NE(std::string(e.what()).find("run 42: stored result: "), std::string::npos);
    return e.problem();
  }
  return "";
}

class StoredResultReader : public ::testing::Test {
 protected:
  void SetUp() override {
    document = Json::parse(result_text(full_result()));
    leaves(document, "", paths, pointers, Json::json_pointer());
  }
  Json document;
  std::vector<std::string> paths;
  std::vector<Json::json_pointer> pointers;
};

TEST_F(StoredResultReader, ReadsWhatTheWriterWrites) {
  EXPECT_EQ(result_text(read_run_result(42, document.dump())), document.dump());
  EXPECT_GT(paths.size(), 60U);  // every part of the result is present
}

TEST_F(StoredResultReader, NamesEveryFieldThatHoldsAValueOfTheWrongType) {
  for (std::size_t i = 0; i < paths.size(); ++i) {
    SCOPED_TRACE(paths[i]);
    auto edited = document;
    const Json& leaf = edited[pointers[i]];
    // Text becomes a number; a number, a flag, null or an empty list becomes text.
    edited[pointers[i]] = leaf.is_string() ? Json(12345) : Json("not a value");
    EXPECT_NE(problem_of(edited).find("'" + paths[i] + "'"), std::string::npos)
        << problem_of(edited);
  }
}

TEST_F(StoredResultReader, NamesEveryFieldThatHoldsAnObject) {
  for (std::size_t i = 0; i < paths.size(); ++i) {
    SCOPED_TRACE(paths[i]);
    auto edited = document;
    edited[pointers[i]] = Json::object({{"x", 1}});
    EXPECT_NE(problem_of(edited).find("'" + paths[i] + "'"), std::string::npos)
        << problem_of(edited);
  }
}

TEST_F(StoredResultReader, NamesEveryMissingKey) {
  // Keys a reader accepts without: the rolling estimates of runs recorded before engine 0.2.0.
  const std::set<std::string> optional{"rolling"};
  int checked = 0;
  for (const auto& [key, part] : document.items()) {
    auto edited = document;
    edited.erase(key);
    if (optional.count(key)) {
      EXPECT_EQ(problem_of(edited), "") << key;
      continue;
    }
    EXPECT_EQ(problem_of(edited), "stored result: field '" + key + "' is missing");
    ++checked;
    if (!part.is_object() || key == "rolling") continue;
    for (const auto& [inner, value] : part.items()) {
      if (key == "sample" && inner == "dropped_by_reason") continue;
      SCOPED_TRACE(key + "." + inner);
      auto without = document;
      without[key].erase(inner);
      EXPECT_EQ(problem_of(without), "stored result: field '" + key + "." + inner + "' is missing");
      ++checked;
    }
  }
  for (const auto& [key, value] : document["coefficients"][0].items()) {
    auto without = document;
    without["coefficients"][0].erase(key);
    EXPECT_EQ(problem_of(without), "stored result: field 'coefficients[0]." + key + "' is missing");
    ++checked;
  }
  for (const auto& [key, value] : document["rolling"].items()) {
    auto without = document;
    without["rolling"].erase(key);
    EXPECT_EQ(problem_of(without), "stored result: field 'rolling." + key + "' is missing");
    ++checked;
  }
  EXPECT_GT(checked, 45);
}

TEST_F(StoredResultReader, NamesGarbageAndTruncatedText) {
  const std::string text = document.dump();
  for (const std::size_t cut : {std::size_t{1}, text.size() / 3, text.size() - 1}) {
    SCOPED_TRACE(cut);
    try {
      read_run_result(42, text.substr(0, cut));
      ADD_FAILURE() << "a truncated result was read";
    } catch (const StoredTextError& e) {
      EXPECT_EQ(e.problem().rfind("stored result: not JSON text", 0), 0U) << e.problem();
    }
  }
  try {
    read_run_result(42, "\x01\xff garbage");
    ADD_FAILURE() << "garbage was read";
  } catch (const StoredTextError& e) {
    EXPECT_EQ(e.kind(), Failure::corruption);
  }
}

}  // namespace
