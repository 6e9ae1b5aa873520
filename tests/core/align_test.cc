#include "core/align.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "core/error.h"

namespace alphatrail::core {
namespace {

Day day(const char* iso) {
  return parse_date(iso).day;
}
std::int64_t month(const char* iso) {
  return period_key(Frequency::monthly, parse_date(iso).day);
}

// Monthly series from `first` ("YYYY-MM-DD" in the first month), values v0, v0 + step, ...
PeriodSeries monthly(const char* first, int count, double v0, double step = 0.001) {
  PeriodSeries s;
  s.frequency = Frequency::monthly;
  for (int i = 0; i < count; ++i) {
    s.keys.push_back(month(first) + i);
    s.values.push_back(v0 + step * i);
  }
  return s;
}

void erase_key(PeriodSeries& s, std::int64_t key) {
  for (std::size_t i = 0; i < s.size(); ++i)
    if (s.keys[i] == key) {
      s.keys.erase(s.keys.begin() + static_cast<std::ptrdiff_t>(i));
      s.values.erase(s.values.begin() + static_cast<std::ptrdiff_t>(i));
      return;
    }
}

// The values of an aligned sample's columns (the columns themselves are shared pointers).
std::vector<std::vector<double>> values_of(const Aligned& a) {
  std::vector<std::vector<double>> out;
  for (const auto& c : a.columns) out.push_back(*c);
  return out;
}

// Strategy 2020-01..2020-08; benchmark 2019-11..2020-08 with 2020-04 NaN; rate 2020-01..2020-09
// without 2020-05 (invented data).
std::vector<NamedSeries> example() {
  PeriodSeries strategy = monthly("2020-01-15", 8, 0.01);
  PeriodSeries benchmark = monthly("2019-11-15", 10, 0.02);
  benchmark.values[5] = NAN;  // 2020-04
  PeriodSeries rate = monthly("2020-01-15", 9, 0.0001, 0.0);
  erase_key(rate, month("2020-05-01"));
  return {{"strategy", strategy}, {"benchmark", benchmark}, {"rate", rate}};
}

TEST(Align, KeepsCompleteCasesAndExplainsEveryDrop) {
  const Aligned a = align(example());
  // Kept: 2020-01, 02, 03, 06, 07, 08.
  ASSERT_EQ(a.keys->size(), 6u);
  EXPECT_EQ(a.keys->front(), month("2020-01-01"));
  EXPECT_EQ((*a.keys)[3], month("2020-06-01"));
  EXPECT_EQ(a.names, (std::vector<std::string>{"strategy", "benchmark", "rate"}));
  ASSERT_EQ(a.columns.size(), 3u);
  EXPECT_DOUBLE_EQ(a.column("strategy")[3], 0.015);   // 2020-06 is the strategy's 6th month
  EXPECT_DOUBLE_EQ(a.column("benchmark")[0], 0.022);  // 2020-01 is the benchmark's 3rd month

  const AlignReport& r = a.report;
  ASSERT_EQ(r.dropped.size(), 5u);
  EXPECT_EQ(r.dropped[0].label, "2019-11");
  EXPECT_EQ(r.dropped[0].reason, "outside the common range");
  EXPECT_EQ(r.dropped[0].missing, (std::vector<std::string>{"strategy", "rate"}));
  EXPECT_EQ(r.dropped[2].label, "2020-04");
  EXPECT_EQ(r.dropped[2].reason, "benchmark missing");
  EXPECT_EQ(r.dropped[3].label, "2020-05");
  EXPECT_EQ(r.dropped[3].reason, "rate missing");
  EXPECT_EQ(r.dropped[4].label, "2020-09");
  EXPECT_EQ(r.dropped[4].reason, "outside the common range");
  EXPECT_EQ(r.dropped_by_reason.at("outside the common range"), 3u);
  EXPECT_EQ(r.dropped_by_reason.at("benchmark missing"), 1u);
  EXPECT_EQ(r.dropped_by_reason.at("rate missing"), 1u);

  ASSERT_EQ(r.gaps.size(), 1u);
  EXPECT_EQ(r.gaps[0].missing, 2);
  EXPECT_EQ(r.gaps[0].text, "2 months missing between 2020-03 and 2020-06");

  ASSERT_EQ(r.coverage.size(), 3u);
  EXPECT_EQ(r.coverage[1].first, month("2019-11-01"));
  EXPECT_EQ(r.coverage[2].last, month("2020-09-01"));
}

TEST(Align, NamesEveryInputMissingInAPeriod) {
  auto inputs = example();
  inputs[2].series.values[3] = NAN;  // rate 2020-04, where the benchmark is NaN too
  const Aligned a = align(inputs);
  EXPECT_EQ(a.report.dropped[2].reason, "benchmark and rate missing");
  EXPECT_EQ(a.report.dropped[2].missing, (std::vector<std::string>{"benchmark", "rate"}));
  inputs.push_back({"SMB", monthly("2020-01-15", 8, 0.0)});
  inputs.back().series.values[3] = NAN;
  EXPECT_EQ(align(inputs).report.dropped[2].reason, "benchmark, rate and SMB missing");
}

TEST(Align, HonoursFromAndToBounds) {
  AlignOptions o;
  o.from = day("2020-02-20");  // inclusive: the month containing the day
  o.to = day("2020-07-01");
  const Aligned a = align(example(), o);
  ASSERT_EQ(a.keys->size(), 4u);  // 2020-02, 03, 06, 07
  EXPECT_EQ(a.keys->front(), month("2020-02-01"));
  EXPECT_EQ(a.keys->back(), month("2020-07-01"));
  EXPECT_EQ(a.report.dropped_by_reason.at("outside the requested range"),
            5u);  // 19-11, 19-12, 20-01, 20-08, 20-09
  EXPECT_TRUE(a.report.dropped[0].missing.empty());
}

TEST(Align, CommonSampleGivesTheSameResultForManyStrategies) {
  const auto inputs = example();
  const CommonSample common({inputs[1], inputs[2]});
  for (int i = 0; i < 1000; ++i) {
    NamedSeries s{"strategy", monthly("2019-06-15", 20 + i % 7, 0.001 * i)};
    if (i % 3 == 0) erase_key(s.series, month("2020-02-01"));
    const Aligned fast = common.align(s);
    const Aligned slow = align({s, inputs[1], inputs[2]});
    ASSERT_EQ(*fast.keys, *slow.keys) << i;
    ASSERT_EQ(values_of(fast), values_of(slow)) << i;
    ASSERT_EQ(fast.report.dropped.size(), slow.report.dropped.size()) << i;
    for (std::size_t k = 0; k < fast.report.dropped.size(); ++k)
      ASSERT_EQ(fast.report.dropped[k].reason, slow.report.dropped[k].reason) << i;
    ASSERT_EQ(fast.report.dropped_by_reason, slow.report.dropped_by_reason) << i;
    ASSERT_EQ(fast.report.gaps.size(), slow.report.gaps.size()) << i;
  }
  // One case checked by value: strategy without 2020-02 gives "strategy missing".
  NamedSeries s{"momentum", monthly("2020-01-15", 8, 0.01)};
  erase_key(s.series, month("2020-02-01"));
  const Aligned a = common.align(s);
  EXPECT_EQ(a.report.dropped_by_reason.at("momentum missing"), 1u);
  EXPECT_EQ(a.keys->size(), 5u);  // 2020-01, 03, 06, 07, 08
}

// A strategy with a finite value on every shared period takes the shortcut in CommonSample;
// the result must be exactly align()'s, report included.
TEST(Align, CommonSampleShortcutEqualsAFullAlignment) {
  const auto inputs = example();
  const CommonSample common({inputs[1], inputs[2]});
  std::vector<std::int64_t> union_keys = inputs[1].series.keys;
  for (auto k : inputs[2].series.keys)
    if (std::find(union_keys.begin(), union_keys.end(), k) == union_keys.end())
      union_keys.push_back(k);
  std::sort(union_keys.begin(), union_keys.end());
  NamedSeries s{"strategy", {Frequency::monthly, union_keys, {}}};
  for (std::size_t i = 0; i < union_keys.size(); ++i) s.series.values.push_back(0.003 * i - 0.01);

  const Aligned fast = common.align(s);
  const Aligned slow = align({s, inputs[1], inputs[2]});
  EXPECT_EQ(*fast.keys, *slow.keys);
  EXPECT_EQ(fast.names, slow.names);
  EXPECT_EQ(values_of(fast), values_of(slow));
  ASSERT_EQ(fast.report.dropped.size(), slow.report.dropped.size());
  for (std::size_t k = 0; k < fast.report.dropped.size(); ++k) {
    EXPECT_EQ(fast.report.dropped[k].key, slow.report.dropped[k].key);
    EXPECT_EQ(fast.report.dropped[k].label, slow.report.dropped[k].label);
    EXPECT_EQ(fast.report.dropped[k].reason, slow.report.dropped[k].reason);
    EXPECT_EQ(fast.report.dropped[k].missing, slow.report.dropped[k].missing);
  }
  EXPECT_EQ(fast.report.dropped_by_reason, slow.report.dropped_by_reason);
  ASSERT_EQ(fast.report.gaps.size(), slow.report.gaps.size());
  for (std::size_t k = 0; k < fast.report.gaps.size(); ++k)
    EXPECT_EQ(fast.report.gaps[k].text, slow.report.gaps[k].text);
  ASSERT_EQ(fast.report.coverage.size(), 3u);
  for (std::size_t k = 0; k < 3; ++k) {
    EXPECT_EQ(fast.report.coverage[k].name, slow.report.coverage[k].name);
    EXPECT_EQ(fast.report.coverage[k].first, slow.report.coverage[k].first);
    EXPECT_EQ(fast.report.coverage[k].last, slow.report.coverage[k].last);
  }
  // The example's shared inputs drop 2019-11, 2019-12 and 2020-09 (outside the common range),
  // 2020-04 (benchmark missing) and 2020-05 (rate missing): the shortcut really was taken on a
  // sample with drops and a gap.
  EXPECT_EQ(fast.keys->size(), 6u);
  EXPECT_EQ(fast.report.dropped.size(), 5u);
  EXPECT_EQ(fast.report.gaps.size(), 1u);
}

TEST(Align, ReportsGapsOfDailySamplesInBusinessDays) {
  // Daily keys are days. Fri 2021-03-05 -> Mon 03-08 is no gap (weekend); Thu 2021-04-01 ->
  // Tue 04-06 (Good Friday, Easter Monday: 2 weekdays) is no gap; a benchmark missing on
  // Wed 03-10 is a gap of 1 business day; a hole Mon 03-15 .. Wed 03-17 (3 weekdays that no
  // input has) is a gap of 3; Thu 03-18 -> Thu 04-01 misses 9 weekdays (03-19, 22-26, 29-31).
  PeriodSeries s;
  s.frequency = Frequency::daily;
  for (const char* d : {"2021-03-05", "2021-03-08", "2021-03-09", "2021-03-10", "2021-03-11",
                        "2021-03-12", "2021-03-18", "2021-04-01", "2021-04-06"}) {
    s.keys.push_back(day(d));
    s.values.push_back(0.001);
  }
  PeriodSeries b = s;
  b.values[3] = NAN;  // 03-10
  const Aligned a = align({{"strategy", s}, {"benchmark", b}});
  EXPECT_EQ(a.keys->size(), 8u);
  ASSERT_EQ(a.report.gaps.size(), 3u);
  EXPECT_EQ(a.report.gaps[0].text, "1 business day missing between 2021-03-09 and 2021-03-11");
  EXPECT_EQ(a.report.gaps[1].text, "3 business days missing between 2021-03-12 and 2021-03-18");
  EXPECT_EQ(a.report.gaps[2].text, "9 business days missing between 2021-03-18 and 2021-04-01");
}

TEST(Align, RejectsMixedFrequenciesUnsortedKeysAndDuplicateNames) {
  auto inputs = example();
  inputs[1].series.frequency = Frequency::quarterly;
  try {
    align(inputs);
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::bad_input);
    EXPECT_NE(std::string(e.what()).find("\"benchmark\" is quarterly but the evaluation is "
                                         "monthly"),
              std::string::npos)
        << e.what();
  }
  inputs = example();
  std::swap(inputs[0].series.keys[0], inputs[0].series.keys[1]);
  EXPECT_THROW(align(inputs), Error);
  inputs = example();
  inputs[2].name = "benchmark";
  EXPECT_THROW(align(inputs), Error);
  EXPECT_THROW(CommonSample(std::vector<NamedSeries>{example()[1]}).align(example()[1]),
               Error);  // same name twice
}

TEST(Align, HandlesEmptyInputs) {
  EXPECT_TRUE(align({}).keys->empty());
  auto inputs = example();
  inputs[2].series.values.assign(inputs[2].series.size(), NAN);  // a rate with no value
  const Aligned a = align(inputs);
  EXPECT_TRUE(a.keys->empty());
  EXPECT_EQ(a.report.dropped.size(), 11u);  // every period of the union, 2019-11 .. 2020-09
  EXPECT_FALSE(a.report.coverage[2].first);
}

TEST(Align, EnumeratesPeriodKeys) {
  const auto m = period_keys_between(Frequency::monthly, day("2020-01-15"), day("2020-03-01"));
  EXPECT_EQ(m, (std::vector<std::int64_t>{month("2020-01-01"), month("2020-02-01"),
                                          month("2020-03-01")}));
  EXPECT_EQ(period_keys_between(Frequency::daily, day("2020-02-27"), day("2020-03-01")).size(),
            4u);  // 02-27, 02-28, 02-29 (leap year), 03-01
  EXPECT_TRUE(
      period_keys_between(Frequency::monthly, day("2020-03-01"), day("2020-01-01")).empty());
  EXPECT_EQ(count_label(Frequency::quarterly, 2), "2 quarters");
  EXPECT_EQ(count_label(Frequency::weekly, 1), "1 week");
}

}  // namespace
}  // namespace alphatrail::core
