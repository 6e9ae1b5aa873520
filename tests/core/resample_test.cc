#include "core/resample.h"

#include <gtest/gtest.h>

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

// Every weekday from first to last (inclusive), each with the same return.
DatedSeries business_days(const char* first, const char* last, double r) {
  DatedSeries s;
  for (Day d = day(first); d <= day(last); ++d)
    if (weekday(d) < 5) {
      s.dates.push_back(d);
      s.values.push_back(r);
    }
  return s;
}

TEST(Resample, CompoundsDailyReturnsWithinAWeek) {
  // Monday 2021-03-01 .. Friday 2021-03-05. Hand computation:
  // 1.01 * 0.98 * 1.005 * 1.00 * 1.03 - 1 = 0.02459147.
  DatedSeries s{{day("2021-03-01"), day("2021-03-02"), day("2021-03-03"), day("2021-03-04"),
                 day("2021-03-05")},
                {0.01, -0.02, 0.005, 0.0, 0.03}};
  const Resampled w = compound_returns(s, Frequency::weekly, Frequency::daily);
  ASSERT_EQ(w.series.size(), 1u);
  EXPECT_EQ(w.series.frequency, Frequency::weekly);
  EXPECT_EQ(period_label(Frequency::weekly, w.series.keys[0]), "week of 2021-03-01");
  EXPECT_NEAR(w.series.values[0], 0.02459147, 1e-12);
  EXPECT_FALSE(w.report.partial_first);
  EXPECT_FALSE(w.report.partial_last);
}

TEST(Resample, CompoundsDailyReturnsToMonths) {
  // February 2021 has 20 weekdays (Mon 02-01 .. Fri 02-26): 1.001^20 - 1 = 0.0201911449.
  // March 2021 has 23 weekdays: 1.002^23 - 1 (computed with std::pow as the check).
  DatedSeries s = business_days("2021-02-01", "2021-02-28", 0.001);
  const DatedSeries march = business_days("2021-03-01", "2021-03-31", 0.002);
  s.dates.insert(s.dates.end(), march.dates.begin(), march.dates.end());
  s.values.insert(s.values.end(), march.values.begin(), march.values.end());
  const Resampled m = compound_returns(s, Frequency::monthly, Frequency::daily);
  ASSERT_EQ(m.series.size(), 2u);
  EXPECT_EQ(m.series.keys[0], month("2021-02-01"));
  EXPECT_NEAR(m.series.values[0], 0.0201911449, 1e-10);
  EXPECT_NEAR(m.series.values[1], std::pow(1.002, 23) - 1.0, 1e-14);
  EXPECT_TRUE(m.report.missing.empty());
  EXPECT_TRUE(m.report.gaps.empty());
}

TEST(Resample, MarksAPeriodWithAMissingValueAsMissing) {
  DatedSeries s = business_days("2021-02-01", "2021-03-31", 0.001);
  s.values[25] = NAN;  // a day in March
  const Resampled m = compound_returns(s, Frequency::monthly, Frequency::daily);
  ASSERT_EQ(m.series.size(), 2u);
  EXPECT_FALSE(std::isnan(m.series.values[0]));
  EXPECT_TRUE(std::isnan(m.series.values[1]));
  ASSERT_EQ(m.report.missing.size(), 1u);
  EXPECT_EQ(period_label(Frequency::monthly, m.report.missing[0]), "2021-03");
  const auto lines = describe(m.report, Frequency::monthly);
  ASSERT_EQ(lines.size(), 1u);
  EXPECT_EQ(lines[0], "2021-03: missing (the period contains a missing value)");
}

TEST(Resample, DropsAndReportsPartialFirstAndLastPeriods) {
  // Starts Monday 2021-03-15 (10 weekdays of March before it), ends Wednesday 2021-05-12.
  const DatedSeries s = business_days("2021-03-15", "2021-05-12", 0.001);
  const Resampled m = compound_returns(s, Frequency::monthly, Frequency::daily);
  ASSERT_TRUE(m.report.partial_first);
  ASSERT_TRUE(m.report.partial_last);
  EXPECT_EQ(*m.report.partial_first, month("2021-03-01"));
  EXPECT_EQ(*m.report.partial_last, month("2021-05-01"));
  EXPECT_TRUE(m.report.partial_dropped);
  ASSERT_EQ(m.series.size(), 1u);  // April only: 22 weekdays
  EXPECT_EQ(m.series.keys[0], month("2021-04-01"));
  EXPECT_NEAR(m.series.values[0], std::pow(1.001, 22) - 1.0, 1e-14);
  const auto lines = describe(m.report, Frequency::monthly);
  ASSERT_EQ(lines.size(), 2u);
  EXPECT_EQ(lines[0], "2021-03: partial first period (series starts 2021-03-15), dropped");
  EXPECT_EQ(lines[1], "2021-05: partial last period (series ends 2021-05-12), dropped");

  const Resampled kept =
      compound_returns(s, Frequency::monthly, Frequency::daily, ResampleOptions{true});
  EXPECT_EQ(kept.series.size(), 3u);
  EXPECT_FALSE(kept.report.partial_dropped);
  EXPECT_NEAR(kept.series.values[0], std::pow(1.001, 13) - 1.0, 1e-14);  // 03-15 .. 03-31
}

TEST(Resample, ToleratesOneHolidayAtEitherEndOfAPeriod) {
  // Friday 2021-01-01 is a holiday; a series starting Monday 01-04 covers January (one weekday
  // before it). Thursday 2021-12-30 as the last day leaves one weekday (Friday 12-31).
  const DatedSeries jan = business_days("2021-01-04", "2021-12-30", 0.0);
  const Resampled m = compound_returns(jan, Frequency::monthly, Frequency::daily);
  EXPECT_FALSE(m.report.partial_first);
  EXPECT_FALSE(m.report.partial_last);
  EXPECT_EQ(m.series.size(), 12u);

  // Starting Wednesday 2021-03-03 leaves two weekdays (Mon 03-01, Tue 03-02): partial.
  const DatedSeries wed = business_days("2021-03-03", "2021-04-30", 0.0);
  EXPECT_TRUE(compound_returns(wed, Frequency::monthly, Frequency::daily).report.partial_first);
  // Weekly target: a series starting Wednesday misses Monday and Tuesday: partial week.
  const Resampled w = compound_returns(wed, Frequency::weekly, Frequency::daily);
  ASSERT_TRUE(w.report.partial_first);
  EXPECT_EQ(period_label(Frequency::weekly, *w.report.partial_first), "week of 2021-03-01");
}

TEST(Resample, DetectsPartialQuartersOfAMonthlySeries) {
  // Month-end returns February .. June 2021: Q1 lacks January (partial), Q2 is complete.
  DatedSeries s{{day("2021-02-26"), day("2021-03-31"), day("2021-04-30"), day("2021-05-31"),
                 day("2021-06-30")},
                {0.01, 0.02, 0.01, -0.01, 0.03}};
  const Resampled q = compound_returns(s, Frequency::quarterly, Frequency::monthly);
  ASSERT_TRUE(q.report.partial_first);
  EXPECT_EQ(period_label(Frequency::quarterly, *q.report.partial_first), "2021-Q1");
  EXPECT_FALSE(q.report.partial_last);
  ASSERT_EQ(q.series.size(), 1u);
  // 1.01 * 0.99 * 1.03 - 1 = 0.029897 (hand computation).
  EXPECT_NEAR(q.series.values[0], 0.029897, 1e-12);
}

TEST(Resample, DetectsPartialMonthsOfAWeeklySeries) {
  // Friday returns. March 2021 starts Monday 03-01: a first observation on Friday 03-12 is 11
  // days in (room for the 03-05 week): partial. On Friday 03-05 (4 days in): complete.
  DatedSeries late{{day("2021-03-12"), day("2021-03-19"), day("2021-03-26"), day("2021-04-02")},
                   {0.01, 0.01, 0.01, 0.01}};
  EXPECT_TRUE(compound_returns(late, Frequency::monthly, Frequency::weekly).report.partial_first);
  DatedSeries early{{day("2021-03-05"), day("2021-03-12"), day("2021-03-19"), day("2021-03-26")},
                    {0.01, 0.01, 0.01, 0.01}};
  const Resampled m = compound_returns(early, Frequency::monthly, Frequency::weekly);
  EXPECT_FALSE(m.report.partial_first);
  EXPECT_FALSE(m.report.partial_last);  // 03-26 is 5 days before 03-31
  ASSERT_EQ(m.series.size(), 1u);
  EXPECT_NEAR(m.series.values[0], std::pow(1.01, 4) - 1.0, 1e-14);
}

TEST(Resample, ReportsHolesInsideTheSeries) {
  // A daily series that skips Mon 2021-03-08 .. Wed 03-10 (3 weekdays): March has a gap.
  DatedSeries s = business_days("2021-03-01", "2021-04-30", 0.0);
  DatedSeries holed;
  for (std::size_t i = 0; i < s.dates.size(); ++i)
    if (s.dates[i] < day("2021-03-08") || s.dates[i] > day("2021-03-10")) {
      holed.dates.push_back(s.dates[i]);
      holed.values.push_back(s.values[i]);
    }
  const Resampled m = compound_returns(holed, Frequency::monthly, Frequency::daily);
  ASSERT_EQ(m.report.gaps.size(), 1u);
  EXPECT_EQ(m.report.gaps[0], month("2021-03-01"));
  EXPECT_EQ(m.series.size(), 2u);  // kept, reported
  // Easter 2021: Good Friday 04-02 and Easter Monday 04-05 missing is no hole (2 weekdays).
  DatedSeries easter = business_days("2021-03-01", "2021-04-30", 0.0);
  std::erase(easter.dates, day("2021-04-02"));
  std::erase(easter.dates, day("2021-04-05"));
  easter.values.resize(easter.dates.size());
  EXPECT_TRUE(compound_returns(easter, Frequency::monthly, Frequency::daily).report.gaps.empty());
}

TEST(Resample, MapsEachObservationToItsPeriodAtTheSameFrequency) {
  DatedSeries s{{day("2021-01-29"), day("2021-02-26"), day("2021-03-31")}, {0.01, NAN, -0.02}};
  const Resampled m = compound_returns(s, Frequency::monthly, Frequency::monthly);
  ASSERT_EQ(m.series.size(), 3u);
  EXPECT_DOUBLE_EQ(m.series.values[0], 0.01);
  EXPECT_TRUE(std::isnan(m.series.values[1]));
  EXPECT_DOUBLE_EQ(m.series.values[2], -0.02);
  EXPECT_FALSE(m.report.partial_first);
  EXPECT_FALSE(m.report.partial_last);
  ASSERT_EQ(m.report.missing.size(), 1u);
}

TEST(Resample, RejectsTwoObservationsOfOnePeriodAtTheSameFrequency) {
  DatedSeries s{{day("2021-03-01"), day("2021-03-31")}, {0.01, 0.02}};
  try {
    compound_returns(s, Frequency::monthly, Frequency::monthly);
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::bad_input);
    EXPECT_NE(std::string(e.what()).find("period 2021-03 (2021-03-01 and 2021-03-31)"),
              std::string::npos)
        << e.what();
  }
}

TEST(Resample, RefusesToResampleToAHigherFrequency) {
  DatedSeries s{{day("2021-01-29"), day("2021-02-26")}, {0.01, 0.02}};
  try {
    compound_returns(s, Frequency::daily, Frequency::monthly);
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::bad_input);
    EXPECT_NE(std::string(e.what()).find("cannot turn monthly returns into daily returns"),
              std::string::npos)
        << e.what();
  }
}

TEST(Resample, RejectsInvalidReturnsAndUnsortedDates) {
  // A return of -100% or less is invalid input (GUIDE.md section 2).
  DatedSeries total_loss{{day("2021-03-01"), day("2021-03-02")}, {0.01, -1.0}};
  EXPECT_THROW(compound_returns(total_loss, Frequency::monthly, Frequency::daily), Error);
  DatedSeries unsorted{{day("2021-03-02"), day("2021-03-01")}, {0.01, 0.02}};
  try {
    compound_returns(unsorted, Frequency::monthly, Frequency::daily);
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find("2021-03-01 comes after 2021-03-02"), std::string::npos)
        << e.what();
  }
  DatedSeries duplicate{{day("2021-03-01"), day("2021-03-01")}, {0.01, 0.02}};
  EXPECT_THROW(compound_returns(duplicate, Frequency::monthly, Frequency::daily), Error);
  DatedSeries ragged{{day("2021-03-01")}, {0.01, 0.02}};
  EXPECT_THROW(compound_returns(ragged, Frequency::monthly, Frequency::daily), Error);
}

TEST(Resample, CountsWeekdaysAndFindsPeriodStarts) {
  EXPECT_EQ(weekdays_between(day("2021-03-01"), day("2021-03-07")), 5);   // Mon .. Sun
  EXPECT_EQ(weekdays_between(day("2021-03-06"), day("2021-03-07")), 0);   // Sat, Sun
  EXPECT_EQ(weekdays_between(day("2021-03-01"), day("2021-03-31")), 23);  // March 2021
  EXPECT_EQ(weekdays_between(day("2021-03-02"), day("2021-03-01")), 0);
  EXPECT_EQ(period_start(Frequency::monthly, month("2021-03-15")), day("2021-03-01"));
  EXPECT_EQ(period_start(Frequency::quarterly, period_key(Frequency::quarterly, day("2021-05-15"))),
            day("2021-04-01"));
  EXPECT_EQ(period_start(Frequency::weekly, period_key(Frequency::weekly, day("2021-03-07"))),
            day("2021-03-01"));
  EXPECT_TRUE(is_finer(Frequency::daily, Frequency::weekly));
  EXPECT_FALSE(is_finer(Frequency::quarterly, Frequency::monthly));
}

}  // namespace
}  // namespace alphatrail::core
