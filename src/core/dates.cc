#include "core/dates.h"

#include <fmt/format.h>

namespace alphatrail::core {

// Civil-from-days and days-from-civil after H. Hinnant, "chrono-Compatible Low-Level Date
// Algorithms" (public domain).
Day to_day(const CivilDate& date) {
  int y = date.year - (date.month <= 2 ? 1 : 0);
  const int era = (y >= 0 ? y : y - 399) / 400;
  const unsigned yoe = static_cast<unsigned>(y - era * 400);
  const unsigned m = static_cast<unsigned>(date.month);
  const unsigned doy =
      (153 * (m > 2 ? m - 3 : m + 9) + 2) / 5 + static_cast<unsigned>(date.day) - 1;
  const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
  return era * 146097 + static_cast<int>(doe) - 719468;
}

CivilDate to_civil(Day day) {
  const int z = day + 719468;
  const int era = (z >= 0 ? z : z - 146096) / 146097;
  const unsigned doe = static_cast<unsigned>(z - era * 146097);
  const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
  const int y = static_cast<int>(yoe) + era * 400;
  const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
  const unsigned mp = (5 * doy + 2) / 153;
  const unsigned d = doy - (153 * mp + 2) / 5 + 1;
  const unsigned m = mp < 10 ? mp + 3 : mp - 9;
  return {y + (m <= 2 ? 1 : 0), static_cast<int>(m), static_cast<int>(d)};
}

int days_in_month(int year, int month) {
  static constexpr int kDays[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  const bool leap = (year % 4 == 0 && year % 100 != 0) || year % 400 == 0;
  return month == 2 && leap ? 29 : kDays[month - 1];
}

int weekday(Day day) {
  // 1970-01-01 was a Thursday (3 when Monday is 0).
  int w = (day + 3) % 7;
  return w < 0 ? w + 7 : w;
}

namespace {

bool digits(std::string_view text, std::size_t from, std::size_t count, int& value) {
  value = 0;
  for (std::size_t i = from; i < from + count; ++i) {
    if (text[i] < '0' || text[i] > '9') return false;
    value = value * 10 + (text[i] - '0');
  }
  return true;
}

}  // namespace

ParsedDate parse_date(std::string_view text) {
  ParsedDate result;
  int year = 0;
  int month = 0;
  int day = 0;
  if (text.size() != 7 && text.size() != 10) return result;
  if (!digits(text, 0, 4, year) || text[4] != '-' || !digits(text, 5, 2, month)) return result;
  if (text.size() == 10 && (text[7] != '-' || !digits(text, 8, 2, day))) return result;
  if (month < 1 || month > 12) {
    result.status = DateParse::impossible;
    return result;
  }
  if (text.size() == 7) {
    result.month_only = true;
    day = days_in_month(year, month);
  } else if (day < 1 || day > days_in_month(year, month)) {
    result.status = DateParse::impossible;
    return result;
  }
  result.status = DateParse::ok;
  result.day = to_day({year, month, day});
  return result;
}

std::string format_date(Day day) {
  const CivilDate c = to_civil(day);
  return fmt::format("{:04}-{:02}-{:02}", c.year, c.month, c.day);
}

std::int64_t period_key(Frequency f, Day day) {
  switch (f) {
    case Frequency::daily: return day;
    case Frequency::weekly: {
      // Monday-based weeks: day -3 (1969-12-29) was a Monday.
      const std::int64_t shifted = static_cast<std::int64_t>(day) + 3;
      return shifted >= 0 ? shifted / 7 : (shifted - 6) / 7;
    }
    case Frequency::monthly: {
      const CivilDate c = to_civil(day);
      return static_cast<std::int64_t>(c.year) * 12 + (c.month - 1);
    }
    case Frequency::quarterly: {
      const CivilDate c = to_civil(day);
      return static_cast<std::int64_t>(c.year) * 4 + (c.month - 1) / 3;
    }
  }
  return day;
}

namespace {

int floor_div(std::int64_t a, int b) {
  return static_cast<int>(a >= 0 ? a / b : (a - b + 1) / b);
}

}  // namespace

std::string period_label(Frequency f, std::int64_t key) {
  switch (f) {
    case Frequency::daily: return format_date(static_cast<Day>(key));
    case Frequency::weekly: return "week of " + format_date(static_cast<Day>(key * 7 - 3));
    case Frequency::monthly: {
      const int year = floor_div(key, 12);
      return fmt::format("{:04}-{:02}", year, static_cast<int>(key - year * 12LL) + 1);
    }
    case Frequency::quarterly: {
      const int year = floor_div(key, 4);
      return fmt::format("{:04}-Q{}", year, static_cast<int>(key - year * 4LL) + 1);
    }
  }
  return std::to_string(key);
}

Day period_end(Frequency f, std::int64_t key) {
  switch (f) {
    case Frequency::daily: return static_cast<Day>(key);
    case Frequency::weekly: return static_cast<Day>(key * 7 - 3 + 6);
    case Frequency::monthly: {
      const int year = floor_div(key, 12);
      const int month = static_cast<int>(key - year * 12LL) + 1;
      return to_day({year, month, days_in_month(year, month)});
    }
    case Frequency::quarterly: {
      const int year = floor_div(key, 4);
      const int month = static_cast<int>(key - year * 4LL) * 3 + 3;
      return to_day({year, month, days_in_month(year, month)});
    }
  }
  return static_cast<Day>(key);
}

std::optional<Frequency> detect_frequency_from_median_gap(double gap) {
  if (gap >= 1 && gap <= 4) return Frequency::daily;  // weekends and holidays stretch a day
  if (gap >= 5 && gap <= 10) return Frequency::weekly;
  if (gap >= 26 && gap <= 35) return Frequency::monthly;
  if (gap >= 80 && gap <= 100) return Frequency::quarterly;
  return std::nullopt;
}

}  // namespace alphatrail::core
