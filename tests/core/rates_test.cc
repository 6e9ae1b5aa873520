#include "core/rates.h"

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

TEST(Rates, MatchesThePerPeriodCheckValuesOfTheGuide) {
  // GUIDE.md section 2, computed, for y = 5%.
  EXPECT_NEAR(period_rate(0.05, RateBasis::simple, Frequency::monthly, 31), 0.00416667, 5e-9);
  EXPECT_NEAR(period_rate(0.05, RateBasis::act360, Frequency::daily, 1), 0.000138889, 5e-10);
  EXPECT_NEAR(period_rate(0.05, RateBasis::compound, Frequency::monthly, 31), 0.00407412, 5e-9);
  EXPECT_NEAR(period_rate(0.05, RateBasis::compound, Frequency::daily, 1), 0.00019363, 5e-9);
}

TEST(Rates, ParsesTenors) {
  // Lengths D = 1, W = 7, M = 365.25/12, Y = 365.25; bill days 4W = 28, 13W = 91, 26W = 182,
  // 52W = 364, 1M = 30, 3M = 91, 6M = 182, 1Y = 364 (bill conventions, common practice).
  EXPECT_EQ(parse_tenor("4W").bill_days, 28);
  EXPECT_DOUBLE_EQ(parse_tenor("4W").length_days, 28.0);
  EXPECT_EQ(parse_tenor("13W").bill_days, 91);
  EXPECT_EQ(parse_tenor("26W").bill_days, 182);
  EXPECT_EQ(parse_tenor("52W").bill_days, 364);
  EXPECT_EQ(parse_tenor("1M").bill_days, 30);
  EXPECT_DOUBLE_EQ(parse_tenor("1M").length_days, 30.4375);
  EXPECT_EQ(parse_tenor("3M").bill_days, 91);
  EXPECT_EQ(parse_tenor("6M").bill_days, 182);
  EXPECT_EQ(parse_tenor("1Y").bill_days, 364);
  EXPECT_DOUBLE_EQ(parse_tenor("1Y").length_days, 365.25);
  EXPECT_EQ(parse_tenor("30D").bill_days, 30);
  EXPECT_EQ(parse_tenor("3m").label, "3M");
  for (const char* bad : {"", "M", "0M", "3X", "-1M", "1.5M", "M3", "123456W"}) {
    EXPECT_THROW(parse_tenor(bad), Error) << bad;
  }
  try {
    parse_tenor("3X");
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::bad_input);
    EXPECT_NE(std::string(e.what()).find("tenor \"3X\""), std::string::npos) << e.what();
  }
}

TEST(Rates, ChoosesTheTenorClosestToThePeriod) {
  // Monthly 30.44 days: 1M (30.44) beats 4W (28); quarterly 91.31: 3M beats 13W (91).
  EXPECT_EQ(choose_tenor({"4W", "13W", "1M"}, Frequency::monthly).label, "1M");
  EXPECT_EQ(choose_tenor({"4W", "13W", "26W"}, Frequency::monthly).label, "4W");
  EXPECT_EQ(choose_tenor({"1M", "3M", "13W"}, Frequency::quarterly).label, "3M");
  EXPECT_EQ(choose_tenor({"4W", "1M", "3M"}, Frequency::daily).label, "4W");
  EXPECT_EQ(choose_tenor({"1M", "1W"}, Frequency::weekly).label, "1W");
  // A tie goes to the shorter tenor: 5D and 9D are both 2 days from a week.
  EXPECT_EQ(choose_tenor({"9D", "5D"}, Frequency::weekly).label, "5D");
  EXPECT_THROW(choose_tenor({}, Frequency::monthly), Error);
}

TEST(Rates, ConvertsTheBankDiscountOfAShortBill) {
  // d = 5%, r = 91 days. Hand computation: P = 100 (1 - 0.05 * 91 / 360) = 98.736111;
  // i = 365 * 0.05 / (360 - 0.05 * 91) = 18.25 / 355.45 = 0.0513434 (GUIDE.md section 2).
  EXPECT_NEAR(bill_price(0.05, 91), 98.736111, 5e-7);
  EXPECT_NEAR(bond_equivalent_yield(0.05, 91), 0.0513434, 5e-8);
  // Money-market yield 360 * 0.05 / 355.45 = 18 / 355.45 = 0.0506400 (common practice).
  EXPECT_NEAR(money_market_yield(0.05, 91), 0.0506400, 5e-8);
}

TEST(Rates, JoinsTheShortAndLongBillFormulasContinuously) {
  // Near half a year the two formulas must nearly agree. Computed: short at 182 days
  // 0.0520091, long (31 CFR 356 App. B) at 183 days 0.0520128.
  const double short_182 = bond_equivalent_yield(0.05, 182);
  const double long_183 = bond_equivalent_yield(0.05, 183);
  EXPECT_NEAR(short_182, 365 * 0.05 / (360 - 0.05 * 182), 1e-15);
  EXPECT_NEAR(long_183, 0.0520128, 5e-8);
  EXPECT_NEAR(short_182, long_183, 1e-5);
}

TEST(Rates, LongBillYieldReproducesThePrice) {
  // 31 CFR 356 Appendix B (from memory): for more than half a year to maturity the
  // bond-equivalent yield i solves P (1 + (r - y/2) i / y) (1 + i / 2) = 100, y = 365.
  for (int r : {183, 200, 273, 364}) {
    for (double d : {0.001, 0.02, 0.05, 0.12}) {
      const double i = bond_equivalent_yield(d, r);
      const double p = bill_price(d, r);
      EXPECT_NEAR(p * (1 + (r - 182.5) * i / 365.0) * (1 + i / 2), 100.0, 1e-10)
          << "d " << d << " r " << r;
    }
  }
  // 52-week bill at 5% (computed): P = 94.944444, i = 0.0527013, below the short formula's
  // 0.0533938 because of the semiannual compounding.
  EXPECT_NEAR(bond_equivalent_yield(0.05, 364), 0.0527013, 5e-8);
  EXPECT_THROW(bond_equivalent_yield(1.5, 364), Error);  // price below zero: wrong unit
}

TEST(Rates, UsesTheYieldKnownAtThePeriodStart) {
  // Month-end yields in percent; period 2021-03 with start timing uses the 2021-02 month-end
  // observation (GUIDE.md section 2, common practice), with end timing the 2021-03 one.
  DatedSeries y{{day("2021-01-29"), day("2021-02-26"), day("2021-03-31")}, {1.0, 2.0, 3.0}};
  RateConvention c;
  c.basis = RateBasis::simple;
  const PeriodRates start = per_period_rates(y, c, Frequency::monthly, {month("2021-03-01")});
  EXPECT_NEAR(start.series.values[0], 0.02 / 12, 1e-15);
  EXPECT_EQ(start.used[0], day("2021-02-26"));
  c.timing = RateTiming::end;
  const PeriodRates end = per_period_rates(y, c, Frequency::monthly, {month("2021-03-01")});
  EXPECT_NEAR(end.series.values[0], 0.03 / 12, 1e-15);
  EXPECT_EQ(end.used[0], day("2021-03-31"));
  EXPECT_EQ(rate_as_of(Frequency::monthly, month("2021-03-01"), RateTiming::start),
            day("2021-02-28"));
}

TEST(Rates, ReportsPeriodsWithoutAYieldAndStaleYields) {
  // Yields end 2020-12-31. Start timing: 2021-01 reads as of 12-31 (age 0), 2021-03 as of
  // 02-28 (59 days <= 62), 2021-04 as of 03-31 (90 days > 62: stale). 2020-12 reads as of
  // 11-30, before the first yield (12-31): no observation.
  DatedSeries y{{day("2020-12-31")}, {0.5}};
  RateConvention c;
  c.basis = RateBasis::simple;
  const PeriodRates r = per_period_rates(
      y, c, Frequency::monthly,
      {month("2020-12-01"), month("2021-01-01"), month("2021-03-01"), month("2021-04-01")});
  EXPECT_TRUE(std::isnan(r.series.values[0]));
  EXPECT_NEAR(r.series.values[1], 0.005 / 12, 1e-15);
  EXPECT_NEAR(r.series.values[2], 0.005 / 12, 1e-15);
  EXPECT_TRUE(std::isnan(r.series.values[3]));
  EXPECT_EQ(r.unobserved, std::vector<std::int64_t>{month("2020-12-01")});
  EXPECT_EQ(r.stale, std::vector<std::int64_t>{month("2021-04-01")});
  EXPECT_FALSE(r.used[3]);
  c.max_age_days = 100;  // a looser limit keeps April
  EXPECT_FALSE(std::isnan(
      per_period_rates(y, c, Frequency::monthly, {month("2021-04-01")}).series.values[0]));
}

TEST(Rates, CountsActualDaysForTheAct360Basis) {
  // y = 5% (decimal). February 2021 has 28 days: 0.05 * 28 / 360 = 0.00388889 (hand).
  DatedSeries monthly{{day("2021-01-29")}, {0.05}};
  RateConvention c;
  c.unit = RateUnit::decimal;
  c.basis = RateBasis::act360;
  const PeriodRates m = per_period_rates(monthly, c, Frequency::monthly, {month("2021-02-01")});
  EXPECT_NEAR(m.series.values[0], 0.05 * 28 / 360, 1e-15);

  // Daily: Thursday 03-04, Friday 03-05, Monday 03-08. Thursday is the first key (1 day),
  // Friday 1 day, Monday 3 days since Friday: 0.05 * 3 / 360 = 0.000416667 (hand).
  DatedSeries daily{{day("2021-03-01"), day("2021-03-02"), day("2021-03-03"), day("2021-03-04"),
                     day("2021-03-05")},
                    {0.05, 0.05, 0.05, 0.05, 0.05}};
  const PeriodRates d = per_period_rates(daily, c, Frequency::daily,
                                         {day("2021-03-04"), day("2021-03-05"), day("2021-03-08")});
  EXPECT_NEAR(d.series.values[0], 0.05 / 360, 1e-15);
  EXPECT_NEAR(d.series.values[1], 0.05 / 360, 1e-15);
  EXPECT_NEAR(d.series.values[2], 0.05 * 3 / 360, 1e-15);
  // Monday 03-08 as the first key also counts the weekend: 3 days.
  EXPECT_NEAR(per_period_rates(daily, c, Frequency::daily, {day("2021-03-08")}).series.values[0],
              0.05 * 3 / 360, 1e-15);
}

TEST(Rates, Act360OnABankDiscountGivesBackTheBillsHoldingReturn) {
  // Over the bill's own life (91 days) money-market yield * 91 / 360 = 100 / P - 1
  // (common practice): 100 / 98.736111 - 1 = 1.263889 / 98.736111 = 0.0128007.
  DatedSeries y{{day("2021-01-01")}, {5.0}};
  RateConvention c;
  c.quote = RateQuote::discount;
  c.bill_days = 91;
  c.basis = RateBasis::act360;
  c.max_age_days = 400;
  // A period of 91 days: the quarter 2021-Q2 (April 30 + May 31 + June 30).
  const std::int64_t q2 = period_key(Frequency::quarterly, day("2021-05-15"));
  const PeriodRates r = per_period_rates(y, c, Frequency::quarterly, {q2});
  EXPECT_NEAR(r.series.values[0], 100.0 / bill_price(0.05, 91) - 1.0, 1e-14);
  EXPECT_NEAR(r.series.values[0], 0.0128007, 5e-8);
  // The same discount with the simple basis uses the bond-equivalent yield: 0.0513434 / 4.
  c.basis = RateBasis::simple;
  EXPECT_NEAR(per_period_rates(y, c, Frequency::quarterly, {q2}).series.values[0], 0.0513434 / 4,
              5e-8);
}

TEST(Rates, SkipsMissingYieldsWithinTheStalenessLimit) {
  // A holiday (NaN) on Thursday 03-04: Friday 03-05 (start timing, as of 03-04) reads the
  // Wednesday yield.
  DatedSeries y{{day("2021-03-03"), day("2021-03-04")}, {2.0, NAN}};
  RateConvention c;
  c.basis = RateBasis::simple;
  const PeriodRates r = per_period_rates(y, c, Frequency::daily, {day("2021-03-05")});
  EXPECT_EQ(r.used[0], day("2021-03-03"));
  EXPECT_NEAR(r.series.values[0], 0.02 / 252, 1e-15);
}

TEST(Rates, RejectsYieldsThatLookLikeTheWrongUnit) {
  DatedSeries y{{day("2021-01-29")}, {5.0}};
  RateConvention c;
  c.unit = RateUnit::decimal;
  try {
    per_period_rates(y, c, Frequency::monthly, {month("2021-02-01")});
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::bad_input);
    EXPECT_NE(std::string(e.what()).find("almost surely in percent"), std::string::npos)
        << e.what();
  }
  c.unit = RateUnit::percent;
  c.quote = RateQuote::discount;  // without a tenor
  EXPECT_THROW(per_period_rates(y, c, Frequency::monthly, {month("2021-02-01")}), Error);
  c.quote = RateQuote::yield;
  EXPECT_THROW(
      per_period_rates(y, c, Frequency::monthly, {month("2021-03-01"), month("2021-02-01")}),
      Error);  // keys not ascending
}

TEST(Rates, NamesAndParsesConventions) {
  EXPECT_STREQ(rate_basis_name(RateBasis::act360), "act360");
  EXPECT_EQ(kRateBases.parse("compound"), RateBasis::compound);
  EXPECT_EQ(kRateTimings.parse("end"), RateTiming::end);
  EXPECT_EQ(parse_rate_quote("discount"), RateQuote::discount);
  EXPECT_EQ(kRateUnits.parse("decimal"), RateUnit::decimal);
  EXPECT_FALSE(kRateBases.parse("360"));
  EXPECT_EQ(default_max_age_days(Frequency::monthly), 62);
}

}  // namespace
}  // namespace alphatrail::core
