// Comparing two runs side by side: the input versions each used (and what a revision between
// them changed), the parameters that differ, the samples (and the periods one has that the
// other lacks) and every figure. The use case behind `alphatrail compare`; the cli renders the
// Comparison as a table, JSON or CSV. Reads only, in one read transaction; throws
// alphatrail::Error (not_found for an unknown run, corruption for a stored text that cannot be
// read, and whatever re-evaluating a run's sample throws).
#pragma once

#include <cstddef>
#include <cstdint>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <vector>

#include "app/json_diff.h"
#include "store/ledger.h"

namespace alphatrail::app {

// One version of a series as a run used it.
struct UsedVersion {
  std::string series;
  int version = 0;
};

// What changed between two versions of one series, counted in observations over its columns.
struct RevisionCounts {
  int from_version = 0;
  int to_version = 0;
  std::size_t changed = 0;
  std::size_t added = 0;
  std::size_t removed = 0;
};

// One input role (a factor: one factor series) and what each run used for it. Inputs pair up by
// role, factors by role and series; an input only one run has is empty on the other side.
struct InputComparison {
  std::string role;
  std::optional<UsedVersion> a;
  std::optional<UsedVersion> b;
  std::optional<RevisionCounts> revision;  // when both used one series at different versions
  bool same = false;                       // both used content with the same hash
};

// The sample of one run as its stored result gives it.
struct SampleSpan {
  std::string first;
  std::string last;
  std::int64_t observations = 0;
};

struct SampleComparison {
  SampleSpan a;
  SampleSpan b;
  // Periods (labelled as the frequency labels them) only b has, and only a has; compared only
  // when both runs have one frequency, and empty otherwise.
  bool same_frequency = false;
  std::vector<std::string> periods_gained;
  std::vector<std::string> periods_lost;
};

// One figure of the two runs: a coefficient's "TERM estimate|std_error|t_stat|p_value" or a
// statistic's name. A value is the stored JSON value, null when that run has no such figure.
struct FigureComparison {
  std::string figure;
  nlohmann::ordered_json a;
  nlohmann::ordered_json b;
};

// Two runs side by side, a first.
struct Comparison {
  std::int64_t run_a = 0;
  std::int64_t run_b = 0;
  std::string strategy_a;
  std::string strategy_b;
  std::vector<InputComparison> inputs;     // a's inputs in order, then those only b has
  std::vector<JsonDifference> parameters;  // path "a.b", before: a's value, after: b's
  SampleComparison sample;
  std::vector<FigureComparison> figures;  // a's coefficients, b's other terms, a's statistics
};

// Compares run `a` with run `b`, re-evaluating both to find the periods of their samples.
Comparison compare_runs(store::Ledger& ledger, std::int64_t a, std::int64_t b);

}  // namespace alphatrail::app
