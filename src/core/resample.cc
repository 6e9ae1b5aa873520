#include "core/resample.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "core/error.h"

namespace alphatrail::core {

namespace {

[[noreturn]] void bad_input(const std::string& message) {
  throw Error(Failure::bad_input, message);
}

void validate(const DatedSeries& s, Frequency source) {
  if (s.dates.size() != s.values.size())
    bad_input(fmt::format("return series has {} dates but {} values; give one value per date",
                          s.dates.size(), s.values.size()));
  for (std::size_t i = 0; i < s.dates.size(); ++i) {
    if (i > 0 && s.dates[i] <= s.dates[i - 1])
      bad_input(fmt::format("{} return series: date {} {} {}; sort the dates and remove duplicates",
                            frequency_name(source), format_date(s.dates[i]),
                            s.dates[i] == s.dates[i - 1] ? "appears twice after" : "comes after",
                            format_date(s.dates[i - 1])));
    const double r = s.values[i];
    if (std::isnan(r)) continue;
    if (!std::isfinite(r))
      bad_input(
          fmt::format("return on {} is infinite; fix or blank the value", format_date(s.dates[i])));
    if (r <= -1.0)
      bad_input(
          fmt::format("return on {} is {} (-100% or less), which is not a valid simple "
                      "return; check the unit (percent vs decimal) and the data",
                      format_date(s.dates[i]), r));
  }
}

bool partial_at_start(Frequency target, Frequency source, Day first) {
  const Day start = period_start(target, period_key(target, first));
  switch (source) {
    case Frequency::daily: return weekdays_between(start, first - 1) > 1;
    case Frequency::weekly: return first - start >= 7;
    case Frequency::monthly:
      return period_key(Frequency::monthly, first) > period_key(Frequency::monthly, start);
    case Frequency::quarterly: return false;
  }
  return false;
}

bool partial_at_end(Frequency target, Frequency source, Day last) {
  const Day end = period_end(target, period_key(target, last));
  switch (source) {
    case Frequency::daily: return weekdays_between(last + 1, end) > 1;
    case Frequency::weekly: return end - last >= 7;
    case Frequency::monthly:
      return period_key(Frequency::monthly, end) > period_key(Frequency::monthly, last);
    case Frequency::quarterly: return false;
  }
  return false;
}

bool hole_between(Frequency source, Day prev, Day cur) {
  switch (source) {
    case Frequency::daily: return weekdays_between(prev + 1, cur - 1) >= 3;
    case Frequency::weekly: return cur - prev > 10;
    case Frequency::monthly:
      return period_key(Frequency::monthly, cur) - period_key(Frequency::monthly, prev) > 1;
    case Frequency::quarterly: return false;
  }
  return false;
}

}  // namespace

int weekdays_between(Day first, Day last) {
  if (last < first) return 0;
  const int days = last - first + 1;
  int count = (days / 7) * 5;
  const int rest = days % 7;
  const int w = weekday(first);
  for (int i = 0; i < rest; ++i)
    if ((w + i) % 7 < 5) ++count;
  return count;
}

Day period_start(Frequency f, std::int64_t key) {
  return f == Frequency::daily ? static_cast<Day>(key) : period_end(f, key - 1) + 1;
}

Resampled compound_returns(const DatedSeries& returns, Frequency target, Frequency source,
                           const ResampleOptions& options) {
  if (is_finer(target, source))
    bad_input(
        fmt::format("cannot turn {} returns into {} returns: a higher frequency cannot be "
                    "made from a lower one; evaluate at {} or a lower frequency",
                    frequency_name(source), frequency_name(target), frequency_name(source)));
  validate(returns, source);

  Resampled out;
  out.series.frequency = target;
  out.report.partial_dropped = !options.keep_partial;
  const auto& dates = returns.dates;
  if (dates.empty()) return out;
  out.report.first_date = dates.front();
  out.report.last_date = dates.back();

  PeriodSeries& s = out.series;
  s.keys.reserve(dates.size());
  s.values.reserve(dates.size());
  if (target == Frequency::daily) {
    // Daily returns evaluated daily: each date is its own period, nothing to compound (the
    // loop below would give 0 + r + 0 r, which is r but for the sign of a zero), and validate
    // has checked the dates ascend.
    s.keys.assign(dates.begin(), dates.end());
    s.values.resize(dates.size());
    std::size_t missing = 0;
    for (std::size_t i = 0; i < dates.size(); ++i) {
      const double r = returns.values[i];
      s.values[i] = std::isnan(r) ? NAN : r + 0.0;
      missing += std::isnan(r) ? 1 : 0;
    }
    if (missing > 0)
      for (std::size_t i = 0; i < s.keys.size(); ++i)
        if (std::isnan(s.values[i])) out.report.missing.push_back(s.keys[i]);
    return out;
  }
  // Compounded as R <- R + r + R r, i.e. (1 + R)(1 + r) - 1, which keeps a single return exact
  // and loses fewer digits than prod(1 + r) - 1 for small returns.
  double compounded = 0.0;
  bool missing = false;
  for (std::size_t i = 0; i < dates.size(); ++i) {
    const std::int64_t key = period_key(target, dates[i]);
    if (s.keys.empty() || key != s.keys.back()) {
      if (!s.keys.empty()) s.values.push_back(missing ? NAN : compounded);
      s.keys.push_back(key);
      compounded = 0.0;
      missing = false;
    } else if (target == source) {
      bad_input(
          fmt::format("{} series has two observations in period {} ({} and {}); keep one "
                      "value per period or declare the series at a higher frequency",
                      frequency_name(source), period_label(target, key), format_date(dates[i - 1]),
                      format_date(dates[i])));
    }
    const double r = returns.values[i];
    if (std::isnan(r))
      missing = true;
    else
      compounded += r + compounded * r;
  }
  s.values.push_back(missing ? NAN : compounded);

  ResampleReport& report = out.report;
  if (target != source) {
    if (partial_at_start(target, source, dates.front())) report.partial_first = s.keys.front();
    if (partial_at_end(target, source, dates.back())) report.partial_last = s.keys.back();
    for (std::size_t i = 1; i < dates.size(); ++i) {
      if (!hole_between(source, dates[i - 1], dates[i])) continue;
      const std::int64_t from = period_key(target, dates[i - 1] + 1);
      const std::int64_t to = period_key(target, dates[i] - 1);
      auto it = std::lower_bound(s.keys.begin(), s.keys.end(), from);
      for (; it != s.keys.end() && *it <= to; ++it)
        if (report.gaps.empty() || report.gaps.back() != *it) report.gaps.push_back(*it);
    }
  }

  if (!options.keep_partial && (report.partial_first || report.partial_last)) {
    PeriodSeries kept;
    kept.frequency = target;
    for (std::size_t i = 0; i < s.keys.size(); ++i) {
      if (s.keys[i] == report.partial_first || s.keys[i] == report.partial_last) continue;
      kept.keys.push_back(s.keys[i]);
      kept.values.push_back(s.values[i]);
    }
    s = std::move(kept);
    std::erase_if(report.gaps, [&](std::int64_t k) {
      return k == report.partial_first || k == report.partial_last;
    });
  }
  for (std::size_t i = 0; i < s.keys.size(); ++i)
    if (std::isnan(s.values[i])) report.missing.push_back(s.keys[i]);
  return out;
}

std::vector<std::string> describe(const ResampleReport& report, Frequency target) {
  std::vector<std::string> lines;
  const char* fate = report.partial_dropped ? "dropped" : "kept";
  if (report.partial_first)
    lines.push_back(fmt::format("{}: partial first period (series starts {}), {}",
                                period_label(target, *report.partial_first),
                                format_date(report.first_date), fate));
  if (report.partial_last && report.partial_last != report.partial_first)
    lines.push_back(fmt::format("{}: partial last period (series ends {}), {}",
                                period_label(target, *report.partial_last),
                                format_date(report.last_date), fate));
  else if (report.partial_last)
    lines.push_back(fmt::format("{}: the series also ends inside this period ({})",
                                period_label(target, *report.partial_last),
                                format_date(report.last_date)));
  for (std::int64_t k : report.missing)
    lines.push_back(
        fmt::format("{}: missing (the period contains a missing value)", period_label(target, k)));
  for (std::int64_t k : report.gaps)
    lines.push_back(
        fmt::format("{}: hole in the source dates; compounded from the "
                    "observations present",
                    period_label(target, k)));
  return lines;
}

}  // namespace alphatrail::core
