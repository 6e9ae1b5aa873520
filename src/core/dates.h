// Calendar dates as day numbers, ISO 8601 parsing and formatting, the frequencies (one table of
// their names, nouns and periods a year) and period keys used to put series on one frequency. Pure
// computation: no I/O.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "core/vocabulary.h"

namespace alphatrail::core {

// Days since 1970-01-01 in the proleptic Gregorian calendar.
using Day = std::int32_t;

struct CivilDate {
  int year = 1970;
  int month = 1;  // 1..12
  int day = 1;    // 1..31
};

enum class Frequency { daily, weekly, monthly, quarterly };

// What a frequency is called and how long its period is.
struct FrequencyWord {
  Frequency value;
  const char* name;      // in options, output and the ledger: "monthly"
  const char* noun;      // one period, as in "% per month": "month"
  int periods_per_year;  // the conventional count (common practice); more is finer
};

// The frequencies from finest to coarsest.
inline constexpr auto kFrequencies = vocabulary<FrequencyWord>({
    {Frequency::daily, "daily", "day", 252},
    {Frequency::weekly, "weekly", "week", 52},
    {Frequency::monthly, "monthly", "month", 12},
    {Frequency::quarterly, "quarterly", "quarter", 4},
});

// Returns the day number of a civil date (no validation).
Day to_day(const CivilDate& date);
// Returns the civil date of a day number.
CivilDate to_civil(Day day);
// Returns the number of days in a month.
int days_in_month(int year, int month);
// Returns 0 for Monday .. 6 for Sunday.
int weekday(Day day);

enum class DateParse { ok, malformed, impossible };

struct ParsedDate {
  DateParse status = DateParse::malformed;
  Day day = 0;
  bool month_only = false;  // "YYYY-MM": the day is the month's last day
};

// Parses "YYYY-MM-DD" or "YYYY-MM" (the last day of that month).
// Example: parse_date("2021-02-30").status == DateParse::impossible.
ParsedDate parse_date(std::string_view text);

// Formats a day as "YYYY-MM-DD".
std::string format_date(Day day);

// Returns the name used in options and output: "daily", "weekly", ...
inline const char* frequency_name(Frequency f) {
  return kFrequencies.name(f);
}
// Parses a frequency name; nullopt when unknown.
inline std::optional<Frequency> parse_frequency(std::string_view name) {
  return kFrequencies.parse(name);
}
// Returns true when frequency a is finer than b (daily < weekly < monthly < quarterly): it has
// more periods in a year.
// Example: is_finer(Frequency::daily, Frequency::monthly) == true.
inline bool is_finer(Frequency a, Frequency b) {
  return kFrequencies.row(a).periods_per_year > kFrequencies.row(b).periods_per_year;
}
// Returns the noun of one period: "day", "week", "month", "quarter" (as in "% per month").
inline const char* period_noun(Frequency f) {
  return kFrequencies.row(f).noun;
}
// Returns the conventional number of periods per year: 252, 52, 12, 4 (common practice).
inline int periods_per_year(Frequency f) {
  return kFrequencies.row(f).periods_per_year;
}

// Returns the key of the period containing a day: the day itself (daily), the Monday-based
// week, the month (year*12 + month-1) or the quarter (year*4 + quarter-1).
std::int64_t period_key(Frequency f, Day day);
// Returns a label for a period key: "2021-03-15", "week of 2021-03-15" (its Monday),
// "2021-03", "2021-Q1".
std::string period_label(Frequency f, std::int64_t key);
// Returns the last calendar day of a period.
Day period_end(Frequency f, std::int64_t key);

// Detects the frequency from the median gap between consecutive sorted days: about 1
// business day (daily), 7 (weekly), 28-31 (monthly), 89-92 (quarterly). nullopt when fewer
// than two days or the gap fits none of them.
template <typename Days>
std::optional<Frequency> detect_frequency(const Days& sorted_days);

std::optional<Frequency> detect_frequency_from_median_gap(double median_gap_days);

}  // namespace alphatrail::core

#include <algorithm>
#include <vector>

namespace alphatrail::core {

template <typename Days>
std::optional<Frequency> detect_frequency(const Days& sorted_days) {
  if (sorted_days.size() < 2) return std::nullopt;
  std::vector<int> gaps;
  gaps.reserve(sorted_days.size() - 1);
  for (std::size_t i = 1; i < sorted_days.size(); ++i)
    gaps.push_back(static_cast<int>(sorted_days[i] - sorted_days[i - 1]));
  auto mid = gaps.begin() + static_cast<std::ptrdiff_t>(gaps.size() / 2);
  std::nth_element(gaps.begin(), mid, gaps.end());
  return detect_frequency_from_median_gap(*mid);
}

}  // namespace alphatrail::core
