// Alignment of period series (strategy, benchmark, rate, factors...) on their common periods:
// keeps the complete cases and explains every period it drops and every hole left inside the
// kept sample. Pure computation; an empty kept sample is not an error here (the caller turns
// it into one, with the report as its explanation). Inputs of different frequencies or with
// keys that are not strictly ascending throw alphatrail::Error(Failure::bad_input).
//
// Rules (ours):
// - The periods considered are the union of all input keys (plus nothing else).
// - A period outside the --from/--to bounds is dropped as "outside the requested range".
// - The common range runs from the latest first finite value to the earliest last finite
//   value over the inputs; a period outside it is dropped as "outside the common range".
// - Inside the common range, a period where some inputs have no key or a NaN value is dropped
//   with the reason "<names> missing", e.g. "benchmark missing", "benchmark and rate missing".
// - Gaps inside the kept sample: two consecutive kept keys that are not consecutive periods,
//   counted in periods ("2 months missing between 2020-03 and 2020-06"). For daily keys a
//   gap is counted in weekdays and reported when a dropped period lies between the two days
//   or 3 or more weekdays are missing (1 or 2 are taken for market holidays).
#pragma once

#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "core/dates.h"
#include "core/resample.h"

namespace alphatrail::core {

struct NamedSeries {
  std::string name;  // as the reasons should say it: "benchmark", "rate", "SMB"
  PeriodSeries series;
};

struct AlignOptions {
  std::optional<Day> from;  // keep periods whose key >= period_key(f, *from)
  std::optional<Day> to;    // keep periods whose key <= period_key(f, *to)
};

struct DroppedPeriod {
  std::int64_t key = 0;
  std::string label;                 // "2020-04"
  std::string reason;                // "benchmark missing", "outside the common range", ...
  std::vector<std::string> missing;  // inputs without a value there (empty when out of bounds)
};

struct SampleGap {
  std::int64_t after = 0;    // last kept key before the gap
  std::int64_t before = 0;   // first kept key after the gap
  std::int64_t missing = 0;  // periods (weekdays for daily) between them
  std::string text;          // "2 months missing between 2020-03 and 2020-06"
};

struct InputCoverage {
  std::string name;
  std::optional<std::int64_t> first;  // first and last keys with a finite value
  std::optional<std::int64_t> last;
};

struct AlignReport {
  std::vector<DroppedPeriod> dropped;  // ascending by key
  std::map<std::string, std::size_t> dropped_by_reason;
  std::vector<SampleGap> gaps;          // inside the kept sample
  std::vector<InputCoverage> coverage;  // one per input, in input order
};

// The kept periods and the columns are shared, read-only, between the strategies aligned on
// one CommonSample: a thousand strategies on the same sample hold one copy of the benchmark,
// the rate and the factors, not a thousand.
using SharedKeys = std::shared_ptr<const std::vector<std::int64_t>>;
using SharedColumn = std::shared_ptr<const std::vector<double>>;

struct Aligned {
  Frequency frequency = Frequency::monthly;
  SharedKeys keys = std::make_shared<const std::vector<std::int64_t>>();  // kept, ascending
  std::vector<std::string> names;     // one per column, in input order
  std::vector<SharedColumn> columns;  // (*columns[j])[i]: input j at (*keys)[i], all finite
  AlignReport report;

  // Returns the column of an input by name; throws Error(Failure::internal) when unknown.
  const std::vector<double>& column(const std::string& name) const;
};

// Aligns the inputs on their common periods and reports what was dropped and why.
// Example: align({{"strategy", s}, {"benchmark", b}, {"rate", rf}}).columns[0] is the
// strategy's values on the complete periods.
Aligned align(const std::vector<NamedSeries>& inputs, const AlignOptions& options = {});

// Shared inputs aligned once (benchmark, rate, factors), against which many strategies are
// then aligned by a merge of key lists; same result as align() with the strategy first.
// Example: CommonSample common({{"benchmark", b}, {"rate", rf}});
//          for (auto& s : strategies) use(common.align(s));
class CommonSample {
 public:
  explicit CommonSample(const std::vector<NamedSeries>& shared, const AlignOptions& options = {});
  // Aligns one series (its name heads the result's columns) against the shared inputs.
  // Example: common.align({"momentum 12-1", monthly_returns}).keys->size()
  Aligned align(const NamedSeries& first) const;

 private:
  std::vector<std::string> names_;
  AlignOptions options_;
  Frequency frequency_ = Frequency::monthly;
  std::vector<std::int64_t> keys_;           // union of the shared keys
  std::vector<std::vector<double>> values_;  // values_[j][i] at keys_[i], NaN if absent
  std::vector<InputCoverage> coverage_;
  // The shared inputs aligned alone, and which of keys_ they kept: a series with a finite
  // value on every one of keys_ (the usual case) aligns to exactly this, without classifying.
  Aligned shared_alone_;
  std::vector<std::size_t> kept_positions_;
};

// Returns every period key from the period containing `from` to the one containing `to`
// (calendar periods: for daily, every calendar day); empty when to < from.
// Example: period_keys_between(Frequency::monthly, <2020-01-15>, <2020-03-01>).size() == 3.
std::vector<std::int64_t> period_keys_between(Frequency f, Day from, Day to);

// Returns the label of a number of periods: "1 month", "2 months", "3 business days".
// Example: count_label(Frequency::quarterly, 2) == "2 quarters".
std::string count_label(Frequency f, std::int64_t n);

}  // namespace alphatrail::core
