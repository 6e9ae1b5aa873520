#include "core/dates.h"

#include <gtest/gtest.h>

namespace alphatrail::core {
namespace {

TEST(Dates, RoundTripsCivilDates) {
  for (Day d = -800000; d < 800000; d += 97) {
    EXPECT_EQ(to_day(to_civil(d)), d);
  }
  EXPECT_EQ(to_day({1970, 1, 1}), 0);
  EXPECT_EQ(to_day({2000, 3, 1}),
            11017);  // computed: 30 years of days incl. 7 leap days + Jan/Feb 2000
}

TEST(Dates, ParsesIsoDatesAndMonths) {
  auto d = parse_date("2021-03-31");
  ASSERT_EQ(d.status, DateParse::ok);
  EXPECT_EQ(format_date(d.day), "2021-03-31");
  auto m = parse_date("2020-02");
  ASSERT_EQ(m.status, DateParse::ok);
  EXPECT_TRUE(m.month_only);
  EXPECT_EQ(format_date(m.day), "2020-02-29");  // leap year: last day of the month
}

TEST(Dates, RejectsImpossibleAndMalformedDates) {
  EXPECT_EQ(parse_date("2021-02-30").status, DateParse::impossible);
  EXPECT_EQ(parse_date("1900-02-29").status, DateParse::impossible);  // 1900 is no leap year
  EXPECT_EQ(parse_date("2000-02-29").status, DateParse::ok);          // 2000 is
  EXPECT_EQ(parse_date("2021-13").status, DateParse::impossible);
  EXPECT_EQ(parse_date("21-03-01").status, DateParse::malformed);
  EXPECT_EQ(parse_date("2021/03/01").status, DateParse::malformed);
  EXPECT_EQ(parse_date("").status, DateParse::malformed);
}

TEST(Dates, KnowsWeekdays) {
  EXPECT_EQ(weekday(parse_date("2026-12-02").day), 2);  // a Wednesday
  EXPECT_EQ(weekday(0), 3);                             // 1970-01-01, a Thursday
}

TEST(Dates, GroupsDaysIntoPeriods) {
  const Day mon = parse_date("2021-03-15").day;
  const Day sun = parse_date("2021-03-21").day;
  const Day next_mon = parse_date("2021-03-22").day;
  EXPECT_EQ(period_key(Frequency::weekly, mon), period_key(Frequency::weekly, sun));
  EXPECT_NE(period_key(Frequency::weekly, sun), period_key(Frequency::weekly, next_mon));
  EXPECT_EQ(period_label(Frequency::weekly, period_key(Frequency::weekly, sun)),
            "week of 2021-03-15");
  EXPECT_EQ(period_label(Frequency::monthly, period_key(Frequency::monthly, sun)), "2021-03");
  EXPECT_EQ(period_label(Frequency::quarterly, period_key(Frequency::quarterly, sun)), "2021-Q1");
  EXPECT_EQ(format_date(period_end(Frequency::quarterly, period_key(Frequency::quarterly, sun))),
            "2021-03-31");
  EXPECT_EQ(format_date(period_end(Frequency::weekly, period_key(Frequency::weekly, mon))),
            "2021-03-21");
}

TEST(Dates, DetectsFrequencyFromGaps) {
  std::vector<Day> business;
  for (Day d = parse_date("2021-01-04").day; business.size() < 60; ++d)
    if (weekday(d) < 5) business.push_back(d);
  EXPECT_EQ(detect_frequency(business), Frequency::daily);
  std::vector<Day> months;
  for (int m = 1; m <= 12; ++m) months.push_back(to_day({2021, m, days_in_month(2021, m)}));
  EXPECT_EQ(detect_frequency(months), Frequency::monthly);
  std::vector<Day> quarters{to_day({2021, 3, 31}), to_day({2021, 6, 30}), to_day({2021, 9, 30})};
  EXPECT_EQ(detect_frequency(quarters), Frequency::quarterly);
  std::vector<Day> one{0};
  EXPECT_FALSE(detect_frequency(one).has_value());
}

}  // namespace
}  // namespace alphatrail::core
