// The risk-free rate of an evaluation: bill tenors, bank-discount conversion and per-period
// rates from annualized yields, with the timing of GUIDE.md section 2 (the rate of period t is
// the yield known at its start). There is no single official standard, so every choice is a
// field of RateConvention that the caller records with the run.
//
// Conventions (ours unless a source is named):
// - Tenor length, for choosing: D = 1 day, W = 7, M = 365.25/12, Y = 365.25. The evaluation
//   period is 1 (daily), 7 (weekly), 365.25/12 (monthly), 365.25/4 (quarterly) days; the
//   closest tenor wins, ties go to the shorter.
// - Days to maturity r of a bill (bank-discount formulas): nD = n, nW = 7n, nM = round(364 n/12),
//   nY = 364 n; so 4W = 28, 13W = 91, 26W = 182, 52W = 364, 1M = 30, 3M = 91, 6M = 182,
//   1Y = 364 (bill conventions: a bill year is 52 weeks).
// - Bank discount d to bond-equivalent yield: short formula up to 182 days, the 31 CFR 356
//   Appendix B quadratic beyond, with y = 365 always (the 366-day year of leap-year spans is
//   ignored). The act360 basis uses the money-market yield 360 d / (360 - d r) instead, so that
//   y * days / 360 over the bill's life gives back its holding return 100 / P - 1.
// - act360 days: weekly/monthly/quarterly periods use their calendar length (the days from the
//   previous period's end to this one's end). Daily periods use the days since the previous
//   requested key when it is at most 7 days earlier (Friday -> Monday = 3), otherwise 3 for a
//   Monday and 1 for any other day.
// - Staleness: the yield used must be at most max_age_days older than the as-of day; default
//   7 (daily), 14 (weekly), 62 (monthly), 184 (quarterly), i.e. about two evaluation periods
//   (a week for daily data, to ride over holidays). A stale or absent yield gives NaN and is
//   reported. NaN yield observations (holidays) are skipped, the staleness limit still applies.
//
// Failures: malformed tenors, yields that look like the wrong unit, bank-discount prices of
// zero or below, and unsorted dates throw alphatrail::Error(Failure::bad_input) naming the
// value and the fix.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/dates.h"
#include "core/resample.h"
#include "core/series_file.h"
#include "core/vocabulary.h"

namespace alphatrail::core {

enum class RateBasis { compound, simple, act360 };  // (1+y)^(1/P)-1, y/P, y*days/360
enum class RateTiming {
  start,
  end
};  // yield known at the period's start | at its end (look-ahead)
// RateQuote (yield | bank discount) and its vocabulary come from core/series_file.h.
enum class RateUnit { percent, decimal };

// The names used in options and run records.
inline constexpr auto kRateBases = vocabulary<Word<RateBasis>>({
    {RateBasis::compound, "compound"},
    {RateBasis::simple, "simple"},
    {RateBasis::act360, "act360"},
});
inline constexpr auto kRateTimings = vocabulary<Word<RateTiming>>({
    {RateTiming::start, "start"},
    {RateTiming::end, "end"},
});
inline constexpr auto kRateUnits = vocabulary<Word<RateUnit>>({
    {RateUnit::percent, "percent"},
    {RateUnit::decimal, "decimal"},
});

// Returns the name of a basis: "compound", "simple", "act360".
inline const char* rate_basis_name(RateBasis b) {
  return kRateBases.name(b);
}
// Returns "start" or "end".
inline const char* rate_timing_name(RateTiming t) {
  return kRateTimings.name(t);
}

struct Tenor {
  std::string label;       // as given, upper-cased: "13W"
  double length_days = 0;  // for choosing: 13W -> 91, 1M -> 30.4375
  int bill_days = 0;       // days to maturity r: 13W -> 91, 1M -> 30
};

// Parses a tenor "<n>D|W|M|Y" (n >= 1, case-insensitive); throws bad_input when malformed.
// Example: parse_tenor("3M").bill_days == 91.
Tenor parse_tenor(std::string_view text);

// Returns the nominal length of a period in days: 1, 7, 365.25/12, 365.25/4.
// Example: nominal_period_days(Frequency::monthly) == 30.4375.
double nominal_period_days(Frequency f);

// Chooses the tenor closest in length to the evaluation period, the shorter on a tie; throws
// bad_input when the list is empty or a tenor is malformed.
// Example: choose_tenor({"4W", "13W", "1M"}, Frequency::monthly).label == "1M".
Tenor choose_tenor(const std::vector<std::string>& available, Frequency f);

// Returns the price per 100 of a bill at bank discount d (decimal) with r days to maturity.
// Example: bill_price(0.05, 91) == 100 * (1 - 0.05 * 91 / 360) = 98.7361...
double bill_price(double discount, int days);

// Converts a bank discount d (decimal) to the bond-equivalent yield (decimal); throws
// bad_input when the price is zero or below or days < 1.
// Example: bond_equivalent_yield(0.05, 91) == 365 * 0.05 / (360 - 0.05 * 91) = 0.051343...
double bond_equivalent_yield(double discount, int days);

// Converts a bank discount d (decimal) to the money-market (360-day) yield 360 d / (360 - d r).
// Example: money_market_yield(0.05, 91) == 18 / 355.45 = 0.050640...
double money_market_yield(double discount, int days);

// Turns an annualized decimal yield into the rate of one period; days matters for act360 only.
// Example: period_rate(0.05, RateBasis::simple, Frequency::monthly, 31) == 0.05 / 12.
double period_rate(double annual_yield, RateBasis basis, Frequency f, int days);

// Returns the default staleness limit in days: 7, 14, 62, 184.
int default_max_age_days(Frequency f);

struct RateConvention {
  RateUnit unit = RateUnit::percent;
  RateQuote quote = RateQuote::yield;
  int bill_days = 0;  // days to maturity (Tenor::bill_days), required for discount quotes
  RateBasis basis = RateBasis::compound;
  RateTiming timing = RateTiming::start;
  int max_age_days = 0;  // 0: default_max_age_days(frequency)
};

struct PeriodRates {
  PeriodSeries series;                   // one value per requested key, NaN when missing
  std::vector<std::optional<Day>> used;  // date of the yield used per key (nullopt: none)
  std::vector<std::int64_t> unobserved;  // keys with no yield at or before the as-of day
  std::vector<std::int64_t> stale;       // keys whose last yield is older than the limit
};

// Computes the per-period decimal risk-free rate for each requested period key (strictly
// ascending) from a series of annualized yields, as of the end of the previous period (start
// timing) or of the period itself (end timing).
// Example: month-end yields 2.0% (2021-02-26), 3.0% (2021-03-31), simple basis, start timing:
//   per_period_rates(y, conv, Frequency::monthly, {key of 2021-03}).series.values[0] == 0.02 / 12
PeriodRates per_period_rates(const DatedSeries& yields, const RateConvention& convention,
                             Frequency f, const std::vector<std::int64_t>& period_keys);

// Returns the day as of which the yield for a period is read: the end of the previous
// period (start timing) or of the period (end timing).
// Example: rate_as_of(Frequency::monthly, <key of 2021-03>, RateTiming::start) is 2021-02-28.
Day rate_as_of(Frequency f, std::int64_t key, RateTiming timing);

}  // namespace alphatrail::core
