// Series on dates and on calendar periods, and compounding of simple returns from one
// frequency to a lower one (daily -> weekly/monthly/quarterly, weekly -> monthly/quarterly,
// monthly -> quarterly, or a frequency to itself).
//
// Missing values (NaN) are never skipped: a period that contains one is kept with a NaN value
// and listed in the report. Partial first and last periods (the series starts or ends inside
// the period) are detected by the rules below, dropped by default and listed in the report.
// Malformed input (unsorted or duplicate dates, two observations of one period at the same
// frequency, a return of -100% or less, resampling to a higher frequency) throws
// alphatrail::Error(Failure::bad_input) naming the date or period and the fix.
//
// Partial period rules (common practice has none; these are ours):
// - daily source: the first period is partial when more than one weekday (Mon-Fri) of the
//   period lies before the first observation; the last period is partial when more than one
//   weekday lies after the last observation. One weekday is tolerated as a market holiday
//   (a series starting Monday 2021-01-04 covers January 2021: Friday 01-01 was a holiday).
// - weekly source: partial when the first observation falls 7 or more days after the
//   period's first day, or the last observation 7 or more days before the period's last day
//   (room for a whole weekly observation that is not there).
// - monthly source (to quarterly): partial when the first or last month of the quarter has no
//   observation at the start or end of the series.
// - source == target: no period is partial.
// Holes inside the series (a daily series that skips 3 or more consecutive weekdays, a weekly
// one that skips more than 10 days, a monthly one that skips a month) are reported as gaps;
// the affected periods keep the compounded value of the observations present.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "core/dates.h"

namespace alphatrail::core {

// Values on calendar days, ascending by date, NaN for a missing value (a return, a level or
// an annualized yield, depending on the caller).
struct DatedSeries {
  std::vector<Day> dates;
  std::vector<double> values;
};

// Values on calendar periods of one frequency: keys strictly ascending (see period_key in
// dates.h), values[i] belongs to keys[i], NaN for a missing value.
struct PeriodSeries {
  Frequency frequency = Frequency::monthly;
  std::vector<std::int64_t> keys;
  std::vector<double> values;

  std::size_t size() const { return keys.size(); }
};

struct ResampleOptions {
  // Keep partial first/last periods instead of dropping them (they are reported either way).
  bool keep_partial = false;
};

// What compounding found: every entry is a period key of the target frequency.
struct ResampleReport {
  std::vector<std::int64_t> missing;          // kept with NaN: a source value in the period is NaN
  std::optional<std::int64_t> partial_first;  // the first period, found incomplete
  std::optional<std::int64_t> partial_last;   // the last period, found incomplete
  bool partial_dropped = true;                // false when ResampleOptions::keep_partial was set
  std::vector<std::int64_t> gaps;             // periods around a hole in the source dates (kept)
  Day first_date = 0;                         // first and last source dates (0 when empty)
  Day last_date = 0;
};

struct Resampled {
  PeriodSeries series;
  ResampleReport report;
};

// Compounds simple returns within each period of the target frequency, R = prod(1 + r) - 1.
// Example: daily 0.01, -0.02 in one week -> weekly 1.01 * 0.98 - 1 = -0.0102.
//   auto m = compound_returns(daily, Frequency::monthly, Frequency::daily);
Resampled compound_returns(const DatedSeries& returns, Frequency target, Frequency source,
                           const ResampleOptions& options = {});

// Describes the report in plain lines for stderr or a run record, one line per finding.
// Example: "2021-03: partial first period (series starts 2021-03-15), dropped".
std::vector<std::string> describe(const ResampleReport& report, Frequency target);

// Returns the number of weekdays (Monday to Friday) in the closed range [first, last].
// Example: weekdays_between(<Mon 2021-03-01>, <Sun 2021-03-07>) == 5; 0 when last < first.
int weekdays_between(Day first, Day last);

// Returns the first calendar day of a period.
// Example: period_start(Frequency::monthly, period_key(Frequency::monthly, <2021-03-15>)) is
// 2021-03-01.
Day period_start(Frequency f, std::int64_t key);

}  // namespace alphatrail::core
